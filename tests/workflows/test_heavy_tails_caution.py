"""Normal-theory chi-square differences over heavy-tailed answers (hostile trial s23, 05).

Two random halves of one population whose answers are heavier-tailed than normal: the normal-theory difference
tests of an invariance ladder or a comparison reject restrictions that hold far more often than their level (Curran,
West & Finch 1996), and nothing said so (strict invariance 'did not hold', p < .001).  Each view now opens with a
caution naming the groups and their Mardia (1970) kurtosis z, with the scaled differences as the remedy; a robust
run, or answers with normal (or light) tails, get none.  The kurtosis z is checked against Mardia's definition
computed here by hand (b2,p = mean of squared Mahalanobis distances, z = (b2 - p(p+2)) / sqrt(8p(p+2)/N)).  The data
are invented (a fictional transit agency's rider survey), simulated with a fixed seed.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main

MODEL = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")


def _rows(heavy: bool, n: int = 600, seed: int = 20261205) -> pd.DataFrame:
    """Two correlated traits, loadings .7; heavy: every row's answers scaled by one draw (a multivariate t with 4
    df, elliptical, so that every restriction of the ladder holds in the population)."""
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    X = .7 * traits[:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .7, (n, 6))
    if heavy:
        X *= np.sqrt(2.0 / rng.chisquare(4, n))[:, None]
    frame = pd.DataFrame(X, columns=ITEMS)
    frame["site"] = np.where(np.arange(n) % 2 == 0, "harbour", "hills")  # halves of one population
    return frame


@pytest.fixture
def not_material(monkeypatch):
    """Tails heavier than normal by Mardia's test but not materially so (assessment.normality.departs_materially
    false): the caution on the difference tests alone says them (with material ones the caution on answers far from
    normal says them, once: test_heavy_tails_are_said_once)."""
    from cfa_tool.assessment import normality

    monkeypatch.setattr(normality, "departs_materially", lambda n: False)


def _kurtosis_z(rows: np.ndarray) -> float:
    """Mardia (1970): b2,p and its z, by hand."""
    n, p = rows.shape
    z = rows - rows.mean(axis=0)
    S = z.T @ z / n
    d2 = np.einsum("ij,jk,ik->i", z, np.linalg.inv(S), z)
    return (np.mean(d2 ** 2) - p * (p + 2)) / np.sqrt(8 * p * (p + 2) / n)


def test_a_ladder_over_heavy_tailed_groups_says_so_first(tmp_path, capsys, not_material):
    frame = _rows(heavy=True)
    found = cfa_tool.invariance(MODEL, frame, group="site")
    first = " ".join(str(found.warnings[-1]).split())
    for label in ("harbour", "hills"):
        z = _kurtosis_z(frame.loc[frame.site == label, list(ITEMS)].to_numpy())
        assert z > 1.96
        assert f"group {label} (z = {z:.1f})" in first
    assert first.startswith("The answers have heavier tails than normal ones (Mardia's multivariate kurtosis)")
    assert "so a step that did not hold may be an artefact" in first and "scaled differences" in first
    path = tmp_path / "d.csv"
    frame.to_csv(path, index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    assert main(["invariance", str(tmp_path / "m.cfa"), "--data", str(path), "--group-column", "site"]) == 0
    out = " ".join(capsys.readouterr().out.split())
    box = out[:out.index("Measurement invariance across site")]
    assert "heavier tails than normal" in box and "(--robust)" in box
    robust = cfa_tool.invariance(MODEL, frame, group="site", test="robust")
    assert not any("heavier tails" in str(w) for w in robust.warnings)


def test_normal_answers_get_no_such_caution():
    found = cfa_tool.invariance(MODEL, _rows(heavy=False), group="site")
    assert not any("heavier tails" in str(w) for w in found.warnings)
    compared = cfa_tool.compare([MODEL, "factor both: seat, clean, quiet, driver, info, punctual\n"], _rows(heavy=False))
    assert compared.heavy_tails == ()


def test_a_comparison_over_heavy_tailed_answers_says_so_first(tmp_path, capsys, not_material):
    frame = _rows(heavy=True).drop(columns="site")
    one = "factor both: seat, clean, quiet, driver, info, punctual\n"
    compared = cfa_tool.compare([MODEL, one], frame)
    z = _kurtosis_z(frame.to_numpy())
    assert compared.heavy_tails == (f"these rows (z = {z:.1f})",)
    assert compared.to_dict()["heavy_tailed_answers"] == [f"these rows (z = {z:.1f})"]
    (tmp_path / "a.cfa").write_text(MODEL)
    (tmp_path / "b.cfa").write_text(one)
    frame.to_csv(tmp_path / "d.csv", index=False)
    assert main(["compare", str(tmp_path / "a.cfa"), str(tmp_path / "b.cfa"), "--data", str(tmp_path / "d.csv")]) == 0
    out = " ".join(capsys.readouterr().out.split())
    assert out.index("heavier tails than normal") < out.index("Model comparison")
    assert cfa_tool.compare([MODEL, one], frame, test="robust").heavy_tails == ()


def _gap_in_every_row(frame: pd.DataFrame) -> pd.DataFrame:
    rng = np.random.default_rng(3)
    gaps = frame.copy()
    for k, j in enumerate(rng.integers(0, 6, len(frame))):
        gaps.iloc[k, j] = np.nan
    return gaps


def test_rows_with_gaps_are_judged_on_the_items_they_answered(not_material):
    # hostile trial s23b (02): with a gap in every row (full-information ML) there were no complete rows for Mardia's
    # kurtosis, and the tails were not judged; now each row is judged on the items it answered (Yuan, Lambert &
    # Fouladi 2004), its z the one tests/assessment/test_kurtosis_with_gaps.py checks against a direct computation
    from cfa_tool.assessment.normality import kurtosis_with_gaps

    gaps = _gap_in_every_row(_rows(heavy=True))
    found = cfa_tool.invariance(MODEL, gaps, group="site")
    first = " ".join(str(found.warnings[-1]).split())
    assert first.startswith("The answers have heavier tails than normal ones (Mardia's multivariate kurtosis)")
    for label in ("harbour", "hills"):
        z = kurtosis_with_gaps(gaps.loc[gaps.site == label, list(ITEMS)].to_numpy()).kurtosis_z
        assert z > 1.96
        assert f"group {label} (z = {z:.1f}, each row on the items it answered)" in first
    assert not any("could not be judged" in str(n) for n in found.notes)
    compared = cfa_tool.compare([MODEL, "factor both: seat, clean, quiet, driver, info, punctual\n"],
                                gaps.drop(columns="site"))
    z = kurtosis_with_gaps(gaps[list(ITEMS)].to_numpy()).kurtosis_z
    assert compared.heavy_tails == (f"these rows (z = {z:.1f}, each row on the items it answered)",)


def test_tails_that_cannot_be_judged_are_said_so(monkeypatch):
    # the kurtosis of rows with gaps needs the information of the covariances to be positive definite (before s25 also
    # to fit within the largest matrix the tool makes, which it no longer forms); where it cannot be solved, the
    # tails cannot be judged and the note says so
    from cfa_tool.assessment import normality

    def unsolved(*_args, **_kwargs):
        raise np.linalg.LinAlgError("the information of the saturated covariances is not positive definite")

    gaps = _gap_in_every_row(_rows(heavy=True))
    monkeypatch.setattr(normality, "information_quadratic", unsolved)
    found = cfa_tool.invariance(MODEL, gaps, group="site")
    notes = " ".join(" ".join(str(n).split()) for n in found.notes)
    assert not any("heavier tails than normal ones (Mardia's multivariate kurtosis) in" in str(w) for w in found.warnings)
    assert "could not be judged in group harbour (300 of 300 rows with gaps), group hills (300 of 300 rows" in notes
    assert "normal-theory chi-square differences over heavy tails reject restrictions that hold" in notes
    compared = cfa_tool.compare([MODEL, "factor both: seat, clean, quiet, driver, info, punctual\n"],
                                gaps.drop(columns="site"))
    said = " ".join(" ".join(str(n).split()) for n in compared.notes)
    assert "could not be judged in these rows (600 of 600 rows with gaps)" in said


def test_a_comparison_that_rejects_nothing_gets_no_caution_of_artefacts(tmp_path, capsys, not_material):
    # a restriction that holds (two loadings of .7 held equal), over heavy tails: no test rejected (p = .57), so
    # 'a rejected restriction may be an artefact' would describe nothing; the note says what the tails do to the p-values
    frame = _rows(heavy=True).drop(columns="site")
    tied = MODEL + "equal loading(comfort, clean), loading(comfort, quiet)\n"
    compared = cfa_tool.compare([MODEL, tied], frame)
    assert compared.heavy_tails and all(t.p_value > 0.05 for t in compared.tests)
    (tmp_path / "a.cfa").write_text(MODEL)
    (tmp_path / "b.cfa").write_text(tied)
    frame.to_csv(tmp_path / "d.csv", index=False)
    assert main(["compare", str(tmp_path / "a.cfa"), str(tmp_path / "b.cfa"), "--data", str(tmp_path / "d.csv")]) == 0
    out = " ".join(capsys.readouterr().out.split())
    assert "may be an artefact" not in out
    assert out.index("Model comparison") < out.index("heavier tails than normal")  # a note, not a caution first
    assert "p-values tend to be smaller than they should be; no test rejected a restriction here" in out


def test_a_ladder_whose_every_step_held_gets_no_caution_of_artefacts(not_material):
    # the neighbour in invariance: 'a step that did not hold may be an artefact' when every step held
    found = cfa_tool.invariance(MODEL, _rows(heavy=True, n=300, seed=1), group="site")
    assert all(s.holds for s in found.steps)
    assert not any("heavier tails" in str(w) for w in found.warnings)
    notes = " ".join(" ".join(str(n).split()) for n in found.notes)
    assert "heavier tails than normal ones" in notes and "no test rejected a restriction here" in notes


def test_heavy_tails_are_said_once(tmp_path, capsys):
    """fixleft s26: tails far from normal were said twice in a comparison and a ladder, by the caution on answers far
    from normal (as fit gives it) and again by the caution on the difference tests.  Now once, the first saying what
    the tails do to the differences; the JSON's heavy_tailed_answers still lists them.  The z is Mardia's (1970),
    by hand."""
    frame = _rows(heavy=True).drop(columns="site")
    one = "factor both: seat, clean, quiet, driver, info, punctual\n"
    compared = cfa_tool.compare([MODEL, one], frame)
    z = _kurtosis_z(frame.to_numpy())
    assert compared.heavy_tails == (f"these rows (z = {z:.1f})",) and compared.heavy_tails_cautioned == ()
    (tmp_path / "a.cfa").write_text(MODEL)
    (tmp_path / "b.cfa").write_text(one)
    frame.to_csv(tmp_path / "d.csv", index=False)
    assert main(["compare", str(tmp_path / "a.cfa"), str(tmp_path / "b.cfa"), "--data", str(tmp_path / "d.csv")]) == 0
    out = " ".join(capsys.readouterr().out.replace("\u2502", " ").split())  # the box's sides left out
    box = out[:out.index("Model comparison")]
    assert box.count("Mardia 1970") == 1 and f"z = {z:.1f}; Mardia 1970" in box
    assert "heavier tails than normal ones (Mardia's multivariate kurtosis) in" not in out
    assert ("The chi-square differences inherit it, so a restriction the difference test rejects may be an artefact "
            "of these tails.") in box
    found = cfa_tool.invariance(MODEL, _rows(heavy=True), group="site")
    said = [" ".join(str(w).split()) for w in found.warnings]
    assert not any("heavier tails than normal ones (Mardia's multivariate kurtosis) in" in w for w in said)
    frame = _rows(heavy=True)
    for label in ("harbour", "hills"):
        z = _kurtosis_z(frame.loc[frame.site == label, list(ITEMS)].to_numpy())
        (line,) = [w for w in said if w.startswith(f"Group {label}: The answers depart")]
        assert f"z = {z:.1f}; Mardia 1970" in line and "so a step that did not hold may be an artefact" in line


def test_a_comparison_judges_each_set_of_items_its_models_hold():
    """fixleft s26: the tails were judged on the first model's items alone.  A first model of normal items beside a
    second with heavy-tailed ones: each set judged, said with the models whose items they are (z by hand, Mardia
    1970)."""
    rng = np.random.default_rng(20261226)
    frame = _rows(heavy=True).drop(columns="site")
    normal = pd.DataFrame(rng.normal(size=(len(frame), 3)) @ np.linalg.cholesky([[1, .5, .5], [.5, 1, .5],
                                                                                 [.5, .5, 1]]).T,
                          columns=["calm1", "calm2", "calm3"])
    frame = pd.concat([frame, normal], axis=1)
    calm = "factor calm: calm1, calm2, calm3\nfactor comfort: seat, clean, quiet\n"
    compared = cfa_tool.compare(["factor calm: calm1, calm2, calm3\n", MODEL, calm], frame)
    z = _kurtosis_z(frame[list(ITEMS)].to_numpy())
    lines = [" ".join(str(p.explanation).split()) for p in compared.problems
             if "depart from multivariate normality" in str(p.explanation)]
    assert any(line.startswith("The answers on the items of <model text> (2) depart") and f"z = {z:.1f}" in line
               for line in lines)
    assert not any(line.startswith("The answers on the items of <model text> depart") for line in lines)  # normal
    assert len(lines) == 2  # the second model's items and the third's (three of them heavy-tailed)


def test_replicate_judges_each_sample():
    """fixleft s26: replicate said nothing of tails far from normal, which fit, compare and invariance caution on.
    Each sample judged by its own rows (z by hand, Mardia 1970), named; random halves once each in the report,
    though each direction of the split holds both; none under the robust test."""
    from cfa_tool.reporting.reports import report_of

    frame = _rows(heavy=True).drop(columns="site")
    cal, val = frame.iloc[:300], frame.iloc[300:]
    found = cfa_tool.replicate(MODEL, cal, val)
    lines = [" ".join(str(p.explanation).split()) for p in found.data_problems
             if "depart from multivariate normality" in str(p.explanation)]
    assert len(lines) == 2
    for line, role, rows in zip(lines, ("calibration", "validation"), (cal, val)):
        assert line.startswith(f"The answers in the {role} sample (<data frame>) depart")
        assert f"z = {_kurtosis_z(rows.to_numpy()):.1f}; Mardia 1970" in line
    assert not cfa_tool.replicate(MODEL, cal, val, test="robust").data_problems
    cautions = [str(c) for c in report_of(found).notice.lines]
    assert sum("depart from multivariate normality" in c for c in cautions) == 2
    from cfa_tool.workflows.replication import Replications

    pair = cfa_tool.split_half(MODEL, frame)

    halves = report_of(Replications(tuple(pair)))
    said = [" ".join(str(c).split()) for c in halves.notice.lines if "depart from multivariate normality" in str(c)]
    assert [s[:40] for s in said] == ["The answers in <data frame> (half A, see", "The answers in <data frame> (half B, see"]
