"""Routes whose matrices of the statistics by the statistics would exceed the tool's one limit of a matrix
(cfa_tool.numerics.sizes) are refused in one line (exit 3) before the work that leads to them: ordinal items whose
statistics' asymptotic covariance is too large, before their correlations are estimated (robust-s20: 200 items with
four answers need a 20,500 x 20,500 matrix, 3.1 GiB, and the run ran out of time and memory), and the
full-information robust route, before the saturated moments and the fit.  The limit is lowered so that 10 items
cross it; the sizes asserted are counts: 10 items of four answers have 3 thresholds each and 10 * 9 / 2 = 45
correlations, 75 statistics; 10 items have 10 + 55 = 65 means, variances and covariances."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import EstimationError

MODEL = "factor F1: y1..y5\nfactor F2: y6..y10\n"


def _answers(n: int = 400, seed: int = 5) -> pd.DataFrame:
    """Answers 1 to 4 to ten items of two factors (loadings .7), cut at invented thresholds; a test helper."""
    rng = np.random.default_rng(seed)
    factors = rng.multivariate_normal(np.zeros(2), [[1.0, 0.4], [0.4, 1.0]], size=n)
    latent = 0.7 * factors[:, np.arange(10) // 5] + np.sqrt(0.51) * rng.normal(size=(n, 10))
    return pd.DataFrame(np.digitize(latent, [-0.8, 0.0, 0.8]) + 1, columns=[f"y{j + 1}" for j in range(10)])


def _lower_limit(monkeypatch, statistics: int) -> None:
    from cfa_tool.numerics import sizes

    monkeypatch.setattr(sizes, "MATRIX_BYTES", statistics * statistics * 8)


def test_ordinal_statistics_beyond_the_limit_are_refused_before_their_correlations(monkeypatch):
    import cfa_tool.data.polychoric as polychoric

    estimated = []
    original = polychoric._pair_correlations
    monkeypatch.setattr(polychoric, "_pair_correlations", lambda *a, **k: estimated.append(1) or original(*a, **k))
    _lower_limit(monkeypatch, 74)
    with pytest.raises(EstimationError, match=r"the 10 items' 30 thresholds and 45 correlations are 75 statistics.*"
                                              r"75 x 75 matrix.*fit the items in smaller sets"):
        cfa_tool.fit(MODEL, _answers(), ordinal="all")
    assert estimated == []
    _lower_limit(monkeypatch, 75)  # at the limit: estimated
    assert cfa_tool.fit(MODEL, _answers(), ordinal="all").converged


def test_the_command_line_refuses_them_in_one_line_with_exit_3(monkeypatch, tmp_path, capsys):
    _lower_limit(monkeypatch, 74)
    (tmp_path / "m.cfa").write_text(MODEL)
    _answers().to_csv(tmp_path / "d.csv", index=False)
    before = {p.name: p.read_bytes() for p in tmp_path.iterdir()}
    report = tmp_path / "out.json"
    code = main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "d.csv"), "--ordinal", "y1..y10",
                 "--json", str(report)])
    err = capsys.readouterr().err
    assert code == 3
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err and "internal error" not in err
    assert "75 statistics" in err
    assert {p.name: p.read_bytes() for p in tmp_path.iterdir()} == before  # nothing written, nothing changed


def test_the_full_information_robust_route_is_refused_before_the_saturated_moments(monkeypatch, tmp_path):
    # the robust route with gaps needs matrices of the k = p + p(p+1)/2 = 65 moments of 10 items by themselves; the
    # refusal comes before the EM estimate of the saturated moments and the fit, not after them
    import cfa_tool.data.em as em

    ran = []
    original = em.em_saturated
    monkeypatch.setattr(em, "em_saturated", lambda *a, **k: ran.append(1) or original(*a, **k))
    rng = np.random.default_rng(9)
    frame = pd.DataFrame(rng.normal(size=(300, 10)) + rng.normal(size=(300, 1)), columns=[f"y{j + 1}" for j in range(10)])
    frame.iloc[::6, 3] = np.nan
    _lower_limit(monkeypatch, 64)
    (tmp_path / "m.cfa").write_text(MODEL)
    frame.to_csv(tmp_path / "d.csv", index=False)
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "d.csv"), "--robust"]) == 3
    assert ran == []
    with pytest.raises(EstimationError, match=r"65 means, variances and covariances of the 10 items"):
        cfa_tool.fit(MODEL, frame, test="robust")
    assert ran == []
