"""The assessment after the search (pipeline.continuous.assess) takes each likelihood's shared pieces by the flag the
likelihood declares (``complete_data``, as the score tests take their route by ``score_route``), never by whether an
attribute is there: a complete-data likelihood that also had ``patterns`` is never asked for them, and a
full-information one that also had ``sample_factors`` or ``sigma_inverse`` is never asked for those.  The report
is the one the plain likelihoods give.  Holzinger & Swineford (1939) data, the three-factor model."""

from __future__ import annotations

import json

import numpy as np

import cfa_tool
from cfa_tool.estimation import fiml, ml
from tests.conftest import THREE_FACTORS


def _refused(name: str):
    def read(self):
        raise AssertionError(f"the assessment read {name} of a likelihood whose flag says it has none")
    return property(read)


def test_complete_rows_never_asked_for_patterns(hs_data, monkeypatch):
    plain = json.dumps(cfa_tool.fit(THREE_FACTORS, hs_data).to_dict())
    monkeypatch.setattr(ml.NormalLikelihood, "patterns", _refused("patterns"), raising=False)
    assert json.dumps(cfa_tool.fit(THREE_FACTORS, hs_data).to_dict()) == plain


def test_rows_with_gaps_never_asked_for_complete_rows_pieces(hs_data, monkeypatch):
    gaps = hs_data.copy()
    rng = np.random.default_rng(11)
    for column in [f"x{i}" for i in range(1, 10)]:
        gaps.loc[rng.random(len(gaps)) < 0.08, column] = np.nan
    plain = json.dumps(cfa_tool.fit(THREE_FACTORS, gaps, missing="full-information").to_dict())
    monkeypatch.setattr(fiml.MissingDataLikelihood, "sample_factors", _refused("sample_factors"), raising=False)
    monkeypatch.setattr(fiml.MissingDataLikelihood, "sigma_inverse", _refused("sigma_inverse"), raising=False)
    result = cfa_tool.fit(THREE_FACTORS, gaps, missing="full-information")
    assert json.dumps(result.to_dict()) == plain
    assert result.groups[0].unusual_cases  # the case diagnostics ran, on the rows with their gaps
