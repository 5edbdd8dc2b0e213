"""The full-information robust route's one size refusal (cfa_tool.numerics.sizes; inference.robust_missing) comes
before the moments and the fit in every command that fits with it, as in fit (large-s21: compare, invariance and
bootstrap ran the EM and the fits first, then refused, after minutes of work at 200 items).  The limit is lowered so
that 10 items cross it: their 10 + 55 = 65 means, variances and covariances need a 65 x 65 matrix, the limit is
64 x 64 (a count, not a measured value)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main

MODEL = "factor F1: y1..y5\nfactor F2: y6..y10\n"
ONE_FACTOR = "factor F1: y1..y10\n"


@pytest.fixture
def files(tmp_path):
    """Ten items of two factors with gaps (every sixth row misses y4), a site column of two groups, sampling
    weights and 40 clusters of 10 rows; invented rows (a test helper)."""
    rng = np.random.default_rng(9)
    n = 400
    frame = pd.DataFrame(rng.normal(size=(n, 10)) + rng.normal(size=(n, 1)), columns=[f"y{j + 1}" for j in range(10)])
    frame.iloc[::6, 3] = np.nan
    frame.insert(0, "site", np.repeat(["north", "south"], n // 2))
    frame.insert(0, "weight", rng.uniform(0.5, 1.5, n))
    frame.insert(0, "school", np.repeat(np.arange(40), n // 40))
    frame.to_csv(tmp_path / "d.csv", index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    (tmp_path / "one.cfa").write_text(ONE_FACTOR)
    return tmp_path


@pytest.mark.parametrize("command, options", [
    ("compare", ["--robust"]),
    ("compare", ["--cluster", "school"]),
    ("invariance", ["--group-column", "site", "--robust"]),
    ("invariance", ["--group-column", "site", "--weights", "weight"]),
    ("bootstrap", ["--weights", "weight", "--replications", "20"]),
    ("bootstrap", ["--cluster", "school", "--replications", "20"]),
], ids=["compare-robust", "compare-clusters", "invariance-robust", "invariance-weights", "bootstrap-weights",
        "bootstrap-clusters"])
def test_each_route_refuses_before_the_moments_and_the_fit(monkeypatch, capsys, files, command, options):
    import cfa_tool.data.em as em
    import cfa_tool.pipeline.continuous as continuous
    from cfa_tool.numerics import sizes

    ran = []
    em_saturated, estimate = em.em_saturated, continuous.estimate
    monkeypatch.setattr(em, "em_saturated", lambda *a, **k: ran.append("EM") or em_saturated(*a, **k))
    monkeypatch.setattr(continuous, "estimate", lambda *a, **k: ran.append("fit") or estimate(*a, **k))
    monkeypatch.setattr(sizes, "MATRIX_BYTES", 64 * 64 * 8)
    models = [str(files / "m.cfa")] + ([str(files / "one.cfa")] if command == "compare" else [])
    report = files / "out.json"
    before = {p.name: p.read_bytes() for p in files.iterdir()}
    code = main([command, *models, "--data", str(files / "d.csv"), *options, "--json", str(report)])
    err = capsys.readouterr().err
    assert code == 3
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err and "internal error" not in err
    assert "65 means, variances and covariances of the 10 items" in err
    assert ran == []  # refused before any estimation
    assert {p.name: p.read_bytes() for p in files.iterdir()} == before  # nothing written, nothing changed


def test_at_the_limit_the_routes_run(monkeypatch, files):
    # 65 x 65 allowed: the same compare runs (the check refuses only beyond the limit)
    from cfa_tool.numerics import sizes

    monkeypatch.setattr(sizes, "MATRIX_BYTES", 65 * 65 * 8)
    assert main(["compare", str(files / "m.cfa"), str(files / "one.cfa"), "--data", str(files / "d.csv"),
                 "--robust", "--json", str(files / "out.json")]) == 0
