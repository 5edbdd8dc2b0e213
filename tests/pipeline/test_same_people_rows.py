"""The same people's rows taken as independent cases (new-user trial s25, findings 1 and 3).

A survey of a fictional transit agency's riders asked twice, stacked in long form (one row per rider and wave, a
'rider_id' column, riders within depots): fit analysed 2 x the riders' rows as independent people without a word,
though explore takes 'rider_id' for an id by its name (data.column_roles), and with --id a one-group fit spoke of
merging files only.  Invariance across the waves under --cluster said the groups were taken for independent
samples while its sandwich summed each depot's rows of both waves together.  Simulated with a fixed seed.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.note_parts import Command
from cfa_tool.options import Option

MODEL = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")


def _riders(n: int = 240, again: int = 180, seed: int = 25) -> pd.DataFrame:
    """Two waves of the same riders (the second of ``again`` of them), each rider in one of 12 depots; a rider's two
    rows share the rider's trait and part of each answer, as people answering twice do."""
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    own = rng.normal(0, .5, (n, 6))  # what a rider's answers share across the waves beyond the traits

    def wave(rows, label):
        frame = pd.DataFrame(.7 * traits[rows][:, [0, 0, 0, 1, 1, 1]] + own[rows] + rng.normal(0, .5, (len(rows), 6)),
                             columns=ITEMS)
        frame.insert(0, "rider_id", [f"R{k:04d}" for k in rows])
        frame.insert(1, "depot_id", [f"D{k % 12:02d}" for k in rows])
        frame.insert(2, "wave", label)
        return frame

    return pd.concat([wave(np.arange(n), "first"), wave(np.arange(again), "second")], ignore_index=True)


def _flat(text) -> str:
    return " ".join(str(text).split())


def _repeated(result) -> list:
    return [p for p in result.problems if p.kind is ProblemKind.REPEATED_IDS]


def _commands(note) -> list[str]:
    return [p.text for p in note.parts if isinstance(p, Command)]


def test_a_column_named_as_an_id_that_repeats_is_a_caution_first_without_id():
    stacked = _riders()
    fitted = cfa_tool.fit(MODEL, stacked)
    said = _repeated(fitted)
    assert said and fitted.problems[0] is said[0]  # first in every view
    words = _flat(said[0].explanation)
    assert words.startswith("The column 'rider_id', an id by its name, gives 180 ids each to more than one row "
                            "(360 rows in all)")  # 180 riders of the second wave, planted above
    assert "takes them as independent cases: the standard errors are then too small" in words
    assert "merged by them" not in words  # no id was given: no merge by it
    # the ways to allow for them: one wave by a row filter (the column that tells the waves apart), the id as the
    # cluster, or the waves side by side
    commands = _commands(said[0].advice)
    assert f" ({Option.KEEP.given('wave = first')})" in commands
    assert f" ({Option.CLUSTER.given('rider_id')})" in commands
    assert "side by side in one row per person" in _flat(said[0].advice)
    # compare, invariance and check give it alike (pipeline.inputs.data_problems, the one rule)
    two = "factor all: seat, clean, quiet, driver, info, punctual\n"
    compared = cfa_tool.compare([MODEL, two], stacked)
    assert any("'rider_id', an id by its name" in _flat(p.explanation) for p in compared.results[0].problems)
    checked = cfa_tool.check(MODEL, stacked)
    assert any("'rider_id', an id by its name" in _flat(p.explanation) for p in checked.problems)


def test_no_caution_when_the_rows_have_an_id_each_or_the_design_holds_each_person():
    stacked = _riders()
    # one wave: each rider once; 'depot_id' repeats, but beside a unique 'rider_id' it names depots, not rows
    assert not _repeated(cfa_tool.fit(MODEL, stacked, keep=["wave = first"]))
    # every rider's rows in one depot, and the depots are the clusters: the sandwich allows for the rows
    assert not _repeated(cfa_tool.fit(MODEL, stacked, cluster="depot_id"))
    # columns not named as ids repeat: nothing is said (the rule is explore's, by name)
    assert not _repeated(cfa_tool.fit(MODEL, stacked.rename(columns={"rider_id": "rider", "depot_id": "depot"})))
    # the depots' id alone, repeated within each wave: a depot's id names no rider (s26: it was said as people
    # answering twice), so its own caution, with the depots as clusters for the remedy
    fitted = cfa_tool.fit(MODEL, stacked.rename(columns={"rider_id": "rider"}))
    assert not _repeated(fitted)
    [said] = [p for p in fitted.problems if p.kind is ProblemKind.UNIT_ROWS_AS_INDEPENDENT]
    assert _flat(said.explanation).startswith(f"The column 'depot_id', an id of depots by its name, gives 12 depots "
                                              f"to {len(stacked)} rows (35 rows each on average)")  # 420 / 12, pandas
    assert "same people" not in _flat(said.explanation)
    assert _commands(said.advice) == [f" ({Option.CLUSTER.given('depot_id')})"]


def test_with_id_a_one_group_fit_says_what_the_analysis_does_with_the_rows():
    stacked = _riders()
    said = _repeated(cfa_tool.fit(MODEL, stacked, id_column="rider_id"))[0]
    words = _flat(said.explanation)
    assert "merged by them" in words and "takes them as independent cases" in words
    assert f" ({Option.CLUSTER.given('rider_id')})" in _commands(said.advice)
    assert "merge by the id and the time together" in _flat(said.advice)
    # under the depots as clusters the rows of each rider lie in one cluster: said so, no false alarm
    said = _repeated(cfa_tool.fit(MODEL, stacked, id_column="rider_id", cluster="depot_id"))[0]
    words = _flat(said.explanation)
    assert "lie in one cluster of 'depot_id', so the cluster-robust standard errors" in words
    assert "independent cases" not in words and f" ({Option.CLUSTER.given('rider_id')})" not in _commands(said.advice)
    # riders moved between depots at the second wave: the depots' sandwich does not join their rows
    moved = stacked.copy()
    second = moved["wave"] == "second"
    moved.loc[second, "depot_id"] = moved.loc[second, "depot_id"].map(lambda d: f"D{(int(d[1:]) + 1) % 12:02d}")
    words = _flat(_repeated(cfa_tool.fit(MODEL, moved, id_column="rider_id", cluster="depot_id"))[0].explanation)
    assert "the rows of 180 of these ids lie in more than one cluster of 'depot_id'" in words


def test_the_claim_holds_standard_errors_of_the_rows_as_independent_are_smaller():
    """What the caution says, checked on the data: the same riders' rows taken as independent give smaller standard
    errors than the cluster-robust ones over the riders (Williams 2000: the sandwich over clusters allows for any
    correlation within a cluster; riders' two rows correlate by construction above)."""
    stacked = _riders()
    plain = cfa_tool.fit(MODEL, stacked)
    by_rider = cfa_tool.fit(MODEL, stacked, cluster="rider_id")

    def errors(result):
        return {tuple(e["variables"]): e["se"] for e in result.to_dict()["estimates"]
                if e["kind"] == "loading" and e["se"] is not None}
    a, b = errors(plain), errors(by_rider)
    assert a and all(a[k] < b[k] for k in a)


def test_invariance_across_waves_under_clusters_says_what_is_true():
    stacked = _riders()
    held = cfa_tool.invariance(MODEL, stacked, group="wave", id_column="rider_id", cluster="depot_id")
    first = next(_flat(w) for w in held.warnings if "more than one group of 'wave'" in _flat(w))
    assert "take the groups for independent samples" not in first
    assert "The groups share the clusters of 'depot_id', and the rows of each of these ids lie in one cluster" in first
    # without clusters, the multi-group tests do take the waves for independent samples: said as before
    alone = cfa_tool.invariance(MODEL, stacked, group="wave", id_column="rider_id")
    assert any("take the groups for independent samples" in _flat(w) for w in alone.warnings)


@pytest.mark.parametrize("name, role", [("employee_id", "ids"), ("Respondent ID", "ids"), ("team_id", "ids"),
                                        ("idea3", None), ("w1", None)])
def test_the_rule_of_names_is_explores(name, role):
    from cfa_tool.data.column_roles import column_role
    from cfa_tool.workflows.explore import column_role as explores

    assert column_role(name) == role and explores is column_role  # one rule, declared once


def test_a_file_with_a_team_id_alone_is_not_taken_for_people_answering_twice():
    # s26: 'team_id' (each team many rows) and no person id: the repeated-ids caution, meant for people answering
    # twice, listed the teams' rows and advised one row per person; a team's id is no person's (column_roles.UNIT_WORDS)
    from cfa_tool.data.column_roles import id_named_column, unit_word

    one = _riders().query("wave == 'first'").drop(columns=["rider_id", "wave"]).rename(columns={"depot_id": "team_id"})
    assert unit_word("team_id") == "team" and unit_word("School ID") == "school" and unit_word("employee_id") is None
    assert unit_word("team_size") is None  # not named as an id
    assert id_named_column(one, set(ITEMS)) is None
    fitted = cfa_tool.fit(MODEL, one)
    assert not _repeated(fitted)
    [said] = [p for p in fitted.problems if p.kind is ProblemKind.UNIT_ROWS_AS_INDEPENDENT]
    assert _flat(said.explanation).startswith("The column 'team_id', an id of teams by its name, gives 12 teams to "
                                              "240 rows (20 rows each on average)")  # 240 riders in 12 depots
    assert not [p for p in cfa_tool.fit(MODEL, one, cluster="team_id").problems
                if p.kind is ProblemKind.UNIT_ROWS_AS_INDEPENDENT]  # the teams as clusters: allowed for
    # beside a person's id that repeats, the person's id is the rows' id, as before
    both = _riders().rename(columns={"depot_id": "team_id"})
    assert id_named_column(both, set(ITEMS) | {"wave"}) == "rider_id"
