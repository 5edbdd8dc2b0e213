"""Halves drawn cluster by cluster from a handful of clusters (hostile s24: `replicate --data --cluster district` with
two districts made 'random halves' of one district each, without a word): the report and the methods paragraph say
the halves are those clusters rather than samples of them, in replicate and explore alike; with enough clusters
nothing is added.  The rider survey demo data (invented) with its district column."""
from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.data.halves import FEW_CLUSTERS_IN_A_HALF, few_clusters_words
from cfa_tool.resources import resource_dir
from cfa_tool.workflows.replication import split_half

MODEL = resource_dir("models") / "rider_three_factors.cfa"


def test_replicate_halves_of_two_districts_say_they_compare_those_districts(rider_demo):
    assert rider_demo["district"].nunique() == 2
    a, _ = split_half(MODEL, rider_demo, seed=3, cluster="district")
    words = " ".join(a.summary().split())
    assert "with only 1 cluster in a half, the halves are those clusters rather than samples of them" in words


def test_explore_halves_of_two_districts_say_so(rider_demo):
    result = cfa_tool.explore(rider_demo, split=3, cluster="district")
    assert "the halves are those clusters rather than samples of them" in " ".join(result.summary().split())


def test_enough_clusters_add_nothing(rider_demo):
    frame = rider_demo.copy()
    frame["household"] = np.arange(len(frame)) // 4
    result = cfa_tool.explore(frame, split=3, cluster="household")
    assert "rather than samples of them" not in result.summary()
    assert few_clusters_words((FEW_CLUSTERS_IN_A_HALF, 40)) == ""
