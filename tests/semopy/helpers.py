"""What the comparisons with semopy share: fitting a model in semopy and keying both programs' estimates
alike.  semopy is imported only when a comparison runs."""

from __future__ import annotations

import numpy as np
import pytest


def _semopy_fit(description: str, data):
    import semopy

    model = semopy.Model(description)
    model.fit(data, solver="trust-constr")
    table = model.inspect()
    return model, table


def _semopy_lookup(table) -> dict:
    """(kind-ish key) -> (estimate, se) from semopy's parameter table."""
    out = {}
    for _, row in table.iterrows():
        se = row["Std. Err"]
        se = float(se) if se != "-" else float("nan")
        if row["op"] == "~":
            out[("loading", row["rval"], row["lval"])] = (float(row["Estimate"]), se)
        elif row["op"] == "~~":
            a, b = sorted((row["lval"], row["rval"]))
            out[("cov", a, b)] = (float(row["Estimate"]), se)
    return out


def _ours_lookup(result) -> dict:
    out = {}
    for r in result.estimates:
        if r.kind == "loading":
            out[("loading", *r.variables)] = (r.estimate, r.se)
        else:
            names = r.variables if len(r.variables) == 2 else r.variables * 2
            a, b = sorted(names)
            out[("cov", a, b)] = (r.estimate, r.se)
    return out


def _compare(ours: dict, theirs: dict) -> None:
    assert set(ours) == set(theirs)
    for key, (est, se) in theirs.items():
        assert ours[key][0] == pytest.approx(est, rel=1e-3, abs=1e-6), key
        if np.isfinite(se):
            assert ours[key][1] == pytest.approx(se, rel=1e-3), key


def observed_information_compared(rows, theirs: dict) -> int:
    """Each of our estimate rows with a standard error (``rows``) against semopy's estimate and standard error from
    its observed information (``theirs``: :func:`_semopy_lookup`); the number compared.  semopy's estimates stop near
    1e-6 of the minimum (trust-constr) and its Hessian is a numerical one (numdifftools), hence the tolerances."""
    compared = 0
    for r in rows:
        names = r.variables if len(r.variables) == 2 else r.variables * 2  # a variance: the variable twice
        key = ("loading", *r.variables) if r.kind == "loading" else ("cov", *sorted(names))
        estimate, se = theirs[key]
        assert r.estimate == pytest.approx(estimate, rel=1e-4, abs=1e-6), key
        assert r.se == pytest.approx(se, rel=1e-5), key
        compared += 1
    return compared
