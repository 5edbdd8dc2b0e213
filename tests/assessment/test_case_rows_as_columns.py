"""Case diagnostics held as columns (assessment.diagnostics.Cases, issue 20, sixteenth round): a default fit and its
JSON build no record per row, and every row read from the columns is the row the rule gives (each row's distance,
p-value and share; its id when the fit names rows by an id column)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment import diagnostics
from cfa_tool.assessment.diagnostics import CaseDiagnostic, Cases
from cfa_tool.numerics import distributions as dist

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
ITEMS = [f"x{i}" for i in range(1, 10)]


def test_a_default_fit_and_its_json_build_no_record_per_row(hs_data, monkeypatch):
    built = []
    original = CaseDiagnostic.__init__

    def counted(self, *args, **kwargs):
        built.append(args)
        original(self, *args, **kwargs)

    monkeypatch.setattr(CaseDiagnostic, "__init__", counted)
    result = cfa_tool.fit(THREE_FACTORS, hs_data)
    out = result.to_dict()
    assert built == []
    assert len(out["diagnostics"]["unusual_cases"]) == len(out["diagnostics"]["influential_cases"]) == 10
    first = result.groups[0].unusual_cases[0]  # a row is built when read
    assert len(built) == 1 and isinstance(first, CaseDiagnostic)


def test_rows_read_from_the_columns_are_the_distances_written_out(hs_data):
    """Each row's squared Mahalanobis distance from the centroid under the divisor-N covariance (Mahalanobis 1936),
    its chi-square p-value on 9 df (numerics.distributions' survival function, checked against scipy.special in
    tests/numerics/test_distributions.py), largest first."""
    result = cfa_tool.fit(THREE_FACTORS, hs_data)
    cases = result.groups[0].unusual_cases
    assert isinstance(cases, Cases)
    X = hs_data[ITEMS].to_numpy(dtype=float)
    centred = X - X.mean(axis=0)
    S = centred.T @ centred / len(X)
    d = np.einsum("ij,ij->i", centred @ np.linalg.inv(S), centred)
    order = np.argsort(-d, kind="stable")[:10]
    assert [c.row for c in cases] == hs_data.index[order].tolist()  # rows named by the frame's index labels
    assert [c.mahalanobis for c in cases] == pytest.approx(d[order].tolist(), rel=1e-10)
    assert [c.p_value for c in cases] == pytest.approx(dist.chi2_sf(d[order], 9).tolist(), rel=1e-8)
    assert cases[:2] == tuple(cases)[:2] and cases[-1] == tuple(cases)[-1]


def test_rows_named_by_an_id_column(hs_data):
    data = hs_data.assign(code=[f"p{k:03d}" for k in range(len(hs_data))])
    result = cfa_tool.fit(THREE_FACTORS, data, id_column="code")
    for cases in (result.groups[0].unusual_cases, result.groups[0].influential_cases):
        assert len(cases) == 10 and [c.id for c in cases] == [data.loc[c.row, "code"] for c in cases]
        assert [d["id"] for d in diagnostics.case_dicts(cases, result.data.row_naming)] == [c.id for c in cases]
