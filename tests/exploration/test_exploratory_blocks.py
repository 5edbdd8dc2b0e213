"""Exploratory blocks in a confirmatory model ('exploratory factors ... from ...'), on Holzinger & Swineford
(1939), x1..x9, N = 301.

* A block of m factors over all items is the m-factor exploratory ML factor analysis: the same
  chi-square and df as the project's explore extraction (its own iteration, Joreskog 1967) and the
  same log-likelihood as scikit-learn's FactorAnalysis (an independent implementation: N times its
  mean log-likelihood per row).  The df of an m-factor analysis of p items,
  ((p - m)^2 - (p + m)) / 2, is 12 for 9 items and 3 factors (Lawley & Maxwell 1971, ch. 4).
* Any rotation of the block leaves its fit unchanged, and target rotation of the block gives the
  rotated loadings of the exploratory solution rotated to the same target (explore's rotation).
* Standard errors of rotated loadings and factor correlations (implicit differentiation of the
  rotation's conditions) agree with a delta method written here from finite differences of the whole
  rotation rerun at perturbed estimates: the gradient projection iterated to convergence again at each
  perturbed estimate, started from the rotation found at the estimates (with all its random starts) - the
  same local optimum a rerun with random starts returns there, without searching for it 2 x (number of
  parameters) times over.
* A block beside an ordinary factor has the fit semopy finds (tests/semopy/test_exploratory_blocks_against_semopy.py).
"""

from __future__ import annotations

import json
from types import SimpleNamespace

import numpy as np
import pytest

import cfa_tool
from cfa_tool.data.moments import sample_moments
from cfa_tool.errors import ModelError
from cfa_tool.exploration import RotationMethod, RotationSpec, extract, from_sample_moments, rotate
from cfa_tool.exploration.rotation import gp_oblique
from cfa_tool.language.parser import parse_model
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import build_parameter_table

ITEMS = tuple(f"x{i}" for i in range(1, 10))
GEOMIN = "exploratory factors f1, f2, f3 from x1..x9\n"
TARGET = ("exploratory factors visual, textual, speed from x1..x9 rotated by target\n"
          "near zero visual: x4..x7\nnear zero textual: x1, x7..x9\nnear zero speed: x1..x6\n")


@pytest.fixture(autouse=True)
def _one_blas_thread():
    from cfa_tool.numerics.threads import blas_threads_for

    with blas_threads_for(1):
        yield


@pytest.fixture(scope="module")
def geomin_fit(hs_data):
    return cfa_tool.fit(GEOMIN, hs_data)


@pytest.fixture(scope="module")
def target_fit(hs_data):
    return cfa_tool.fit(TARGET, hs_data)


SIDE = "factor speed: x7, x8, x9\nexploratory factors visual, textual from x1, x4, x2, x3, x5, x6\n"


@pytest.fixture(scope="module")
def side_fit(hs_data):
    """A geomin block of two factors beside a confirmatory factor."""
    return cfa_tool.fit(SIDE, hs_data)


def test_block_over_all_items_is_the_exploratory_ml_solution(hs_data, geomin_fit):
    from sklearn.decomposition import FactorAnalysis

    efa = extract(from_sample_moments(sample_moments(hs_data, ITEMS, "hs")), 3)
    assert geomin_fit.converged
    assert geomin_fit.fit.df == efa.fit.df == 12  # ((9 - 3)^2 - 12) / 2 (Lawley & Maxwell 1971)
    assert geomin_fit.fit.chi_square == pytest.approx(efa.fit.chi_square, rel=1e-6)
    X = hs_data[list(ITEMS)].to_numpy(float)
    theirs = FactorAnalysis(3, tol=1e-12, max_iter=200_000, svd_method="lapack").fit(X)
    assert geomin_fit.fit.log_likelihood == pytest.approx(len(X) * theirs.score(X), rel=1e-6)


def test_rotation_does_not_change_the_fit(geomin_fit, target_fit):
    assert target_fit.fit.chi_square == pytest.approx(geomin_fit.fit.chi_square, rel=1e-7)
    assert target_fit.fit.df == geomin_fit.fit.df


def test_target_rotation_equals_the_exploratory_solution_rotated_to_the_target(hs_data, target_fit):
    efa = extract(from_sample_moments(sample_moments(hs_data, ITEMS, "hs")), 3)
    block = target_fit.exploratory[0]
    theirs = rotate(efa.loadings, RotationSpec(RotationMethod.TARGET, target=block.target))
    assert block.rotation is RotationMethod.TARGET and block.factors == ("visual", "textual", "speed")
    np.testing.assert_allclose(block.standardized, theirs.pattern, atol=2e-4)
    np.testing.assert_allclose(block.correlations, theirs.factor_correlations, atol=2e-4)


def test_geomin_block_recovers_the_three_abilities(geomin_fit):
    """Each item's largest geomin loading is on the factor of its ability (visual x1-x3, textual x4-x6,
    speed x7-x9; Holzinger & Swineford 1939), and x9 loads on visual too, the cross-loading of these data
    (common knowledge of these data; the largest modification index in test_holzinger_swineford_published.py)."""
    block = geomin_fit.exploratory[0]
    L = block.standardized
    groups = [int(np.argmax(np.abs(L[i]))) for i in range(9)]
    assert len({groups[0], groups[3], groups[6]}) == 3
    assert groups[:3] == [groups[0]] * 3 and groups[3:6] == [groups[3]] * 3 and groups[6:] == [groups[6]] * 3
    assert abs(L[8, groups[0]]) > 0.3


def _warm_rotation(spec: RotationSpec, A0: np.ndarray):
    """The oblique rotation of unrotated loadings A near A0 by ``spec``'s criterion, iterated by gradient projection
    (Jennrich 2002) to ``spec``'s tolerance from the optimum found at A0 by the full rotation (every random start):
    a function of A returning (pattern, factor correlations, M) with pattern = A M, its columns in A0's rotated
    order and signs.  A perturbation of 1e-4 moves the optimum by about as much, so it is the optimum a rerun from
    scratch keeps there; the rotation at A0 is explore's own (rotate)."""
    spec = spec.checked(*A0.shape)
    assert spec.oblique and not spec.row_normalization  # the route written here: no rows normalized
    start = np.linalg.inv(rotate(A0, spec).transformation).T  # T of the reported optimum (columns ordered and signed)
    criterion = spec.criterion()

    def rotated(A):
        T, _, _, converged = gp_oblique(A, criterion, start, spec.tolerance, spec.max_iterations)
        assert converged
        M = np.linalg.inv(T).T
        return A @ M, T.T @ T, M

    return rotated


def _numeric_delta(fit, text: str, data, spec_of_rotation) -> tuple[np.ndarray, np.ndarray]:
    """SEs of the standardized rotated loadings and factor correlations: central differences (step 1e-4) of the
    whole rotation, iterated to convergence again at perturbed estimates (``_warm_rotation``), matched to the
    reported columns."""
    spec = parse_model(text)
    model = StructuredModel(build_parameter_table(spec))
    block = spec.exploratory[0]
    reported = fit.exploratory[0]
    rows = [model.table.observed.index(x) for x in block.item_names]
    cols = [model.table.latent.index(f) for f in block.factor_names]

    def standardized(theta):
        mats = model.matrices(theta)
        return mats.L[np.ix_(rows, cols)] / np.sqrt(np.diag(mats.implied_covariance())[rows])[:, None]

    rotation = _warm_rotation(spec_of_rotation, standardized(fit.theta))

    def rotated(theta):
        P, Phi, _ = rotation(standardized(theta))
        # the same columns as reported: best matching order and sign
        order = [int(np.argmax(np.abs(reported.standardized.T @ P)[k])) for k in range(P.shape[1])]
        P, Phi = P[:, order], Phi[np.ix_(order, order)]
        signs = np.sign(np.sum(P * reported.standardized, axis=0))
        return np.concatenate([(P * signs).ravel(), (Phi * np.outer(signs, signs)).ravel()])

    theta = fit.theta
    h = 1e-4
    J = np.column_stack([(rotated(theta + h * e) - rotated(theta - h * e)) / (2 * h) for e in np.eye(len(theta))])
    se = np.sqrt(np.diag(J @ fit.parameter_covariance @ J.T))
    p, m = reported.standardized.shape
    return se[: p * m].reshape(p, m), se[p * m:].reshape(m, m)


@pytest.mark.parametrize("which", ["target", "geomin"])
def test_standard_errors_agree_with_a_finite_difference_delta_method(hs_data, target_fit, geomin_fit, which):
    if which == "target":
        fit, text = target_fit, TARGET
        rotation = RotationSpec(RotationMethod.TARGET, target=fit.exploratory[0].target, tolerance=1e-11)
    else:
        fit, text = geomin_fit, GEOMIN
        rotation = RotationSpec(RotationMethod.GEOMIN, tolerance=1e-11)
    block = fit.exploratory[0]
    loading_se, phi_se = _numeric_delta(fit, text, hs_data, rotation)
    assert np.all(np.isfinite(block.standardized_se))
    np.testing.assert_allclose(block.standardized_se, loading_se, rtol=2e-3, atol=2e-5)
    np.testing.assert_allclose(block.correlations_se, phi_se, rtol=2e-3, atol=2e-5)


@pytest.mark.parametrize("text, message, line, column", [
    ("factor g: y1, y2, y3\nexploratory factors f1, f2 from x1..x4\n", "needs at least 5 items", 2, 33),
    ("exploratory factors f1 from x1..x3\nexploratory factors f2 from x3..x6\n", "two exploratory blocks", 2, 29),
    ("exploratory factors f1, f2 from x1..x9 rotated by obliquemax\n", "unknown rotation 'obliquemax'", 1, 51),
    ("exploratory factors f1, f2 from x1..x9 rotated by geomni\n", "did you mean 'geomin'", 1, 51),
    ("exploratory factors f1, f2 from x1..x9 rotated by target\n", "needs its targets", 1, 51),
    ("exploratory factors f1, f2 from x1..x9\nnear zero f1: x1\n", "rotated by geomin", 2, 11),
    ("exploratory factors f1, f2 from x1..x9\nfix variance(f1) = 2\n", "parameter of an exploratory block", 2, 5),
    # Browne (2001): a target rotation of k factors is identified only with at least k - 1 targets on each factor
    ("exploratory factors f1, f2, f3 from x1..x9 rotated by target\nnear zero f1: x4..x9\nnear zero f2: x1\n"
     "near zero f3: x1..x6\n", "at least 2 targets on each factor (Browne 2001), and 'f2' has 1", 3, 11),
    ("exploratory factors f1, f2 from x1..x9 rotated by target\nnear zero f1: x4..x9\n",
     "at least 1 target on each factor (Browne 2001), and 'f2' has 0", 1, 51),
    ("exploratory factors f1, f2 from x1..x5 rotated by target\nnear zero f1: x1..x5\nnear zero f2: x1\n",
     "'near zero f1' names every item of its block", 2, 11),
    ("exploratory factors f1 from x1..x3 rotated by target\nnear zero f1: x1\n", "one factor ('f1') has nothing to rotate",
     1, 47),
    ("factor g: x4, x5, x6\nexploratory factors f1, f2 from x1, x7, x2, x3, x8, x9\nreversed x2 on 1 to 10\n",
     "'x2' is an item of an exploratory block only", 3, 10),
])
def test_model_errors_name_the_line_and_column(text, message, line, column):
    with pytest.raises(ModelError) as caught:
        parse_model(text)
    error = caught.value
    assert message in str(error)
    assert (error.location.line, error.location.column) == (line, column)
    assert "\n" not in error.message


def test_blocks_are_one_group_only(hs_data):
    with pytest.raises(ModelError, match="one group only"):
        cfa_tool.fit(GEOMIN, hs_data, group="school")


def test_reports_show_the_rotated_block_not_the_unrotated_one(geomin_fit):
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.html_report import report_html
    from cfa_tool.reporting.paragraph import methods_paragraph
    from cfa_tool.reporting.text_formats import report_markdown

    block = geomin_fit.exploratory[0]
    assert not any(set(r.variables) & set(block.factors) for r in geomin_fit.estimates)
    text = geomin_fit.summary()
    markdown = report_markdown(fit_report(geomin_fit))
    html = report_html(fit_report(geomin_fit))
    for report in (markdown, html, " ".join(text.split())):
        assert "Exploratory block f1, f2, f3 (geomin rotation, oblique)" in report
        assert "Correlations of the rotated factors" in report
    assert 'class="r faint"' in html
    # x9's visual loading (about .37 here) is shown with its SE, as in the block's values
    i = block.items.index("x9")
    j = int(np.argmax(np.abs(block.standardized[i])))
    assert f"{block.standardized_se[i, j]:.3f}" in markdown
    paragraph = methods_paragraph(geomin_fit)
    assert "rotated by geomin (oblique)" in paragraph and "echelon" not in paragraph
    assert "first k - 1 items fixed at 0" in paragraph


def test_diagram_draws_the_rotated_salient_loadings(geomin_fit):
    from cfa_tool.reporting.diagram import BLOCK_LOADING_DRAWN, path_diagram
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.html_report import report_html
    from cfa_tool.reporting.numbers import unit

    svg = path_diagram(geomin_fit)
    block = geomin_fit.exploratory[0]
    for name in block.factors:
        assert f">{name}</text>" in svg
    salient = block.standardized[np.abs(block.standardized) >= BLOCK_LOADING_DRAWN]
    assert len(salient) == 10  # nine items on their own factor, and x9 on a second (the .37 cross-loading)
    for value in salient:
        assert f">{unit(value, 2).replace('-', chr(0x2212))}</text>" in svg  # the printed minus sign (U+2212)
    assert "rotated loadings of .30 or more" in report_html(fit_report(geomin_fit))


def test_json_holds_the_rotated_block(geomin_fit):
    import json

    out = json.loads(json.dumps(geomin_fit.to_dict()))
    block = out["exploratory_blocks"][0]
    assert block["rotation"] == "geomin" and block["oblique"] is True
    np.testing.assert_allclose(block["standardized"], geomin_fit.exploratory[0].standardized)
    assert block["standard_errors"] == "delta-method"


@pytest.mark.parametrize("command", ["scores", "bootstrap"])
def test_workflows_that_would_show_the_unrotated_block_refuse_it(tmp_path, command, capsys):
    from cfa_tool.cli import main
    from tests.conftest import DATASETS

    model = tmp_path / "block.cfa"
    model.write_text(GEOMIN)
    extra = ["--output", tmp_path / "s.csv"] if command == "scores" else ["--replications", 20]
    code = main([str(a) for a in [command, model, "--data", DATASETS / "holzinger_swineford_1939.csv", *extra]])
    err = capsys.readouterr().err
    assert code == 2 and "not available for a model with an exploratory block" in err and "block.cfa:1:1:" in err
    assert not (tmp_path / "s.csv").exists()


RIDER_ITEMS = ("on_time", "seat_available", "short_wait", "accurate_info", "easy_transfer", "clean", "temperature",
               "room_to_stand")


def test_ordinal_block_over_all_items_is_explores_polychoric_solution():
    """A 2-factor block over all 8 ordinal items, fitted by unweighted least squares on the polychoric
    correlations, is the least-squares (minimum residual; Harman & Jones 1966) exploratory solution of those
    correlations: explore's own extraction, rotated by geomin here.  The latent responses have variance 1, so
    the standardized loadings are the loadings themselves (not divided by sqrt(common variance + 1))."""
    import pandas as pd

    from cfa_tool.data.polychoric import ordinal_moments
    from cfa_tool.exploration import ExtractionMethod, from_ordinal_moments
    from tests.conftest import DATASETS

    frame = pd.read_csv(DATASETS.parent.parent / "demo" / "rider_survey.csv").dropna(subset=list(RIDER_ITEMS))
    text = f"exploratory factors f1, f2 from {', '.join(RIDER_ITEMS)} rotated by geomin\n"
    fit = cfa_tool.fit(text, frame, ordinal="all", ordinal_estimator="unweighted")
    block = fit.exploratory[0]
    efa = extract(from_ordinal_moments(ordinal_moments(frame, list(RIDER_ITEMS), "rider", frozenset())), 2,
                  ExtractionMethod.LEAST_SQUARES)
    theirs = rotate(efa.loadings, RotationSpec(RotationMethod.GEOMIN))
    P, Phi = theirs.pattern, theirs.factor_correlations
    order = [int(np.argmax(np.abs(block.standardized.T @ P)[k])) for k in range(2)]  # same columns, same signs
    P, Phi = P[:, order], Phi[np.ix_(order, order)]
    signs = np.sign(np.sum(P * block.standardized, axis=0))
    np.testing.assert_allclose(block.standardized, P * signs, atol=2e-3)
    np.testing.assert_allclose(block.correlations, Phi * np.outer(signs, signs), atol=2e-3)
    np.testing.assert_allclose(block.pattern, block.standardized)  # latent responses of variance 1
    assert np.all(np.isfinite(block.standardized_se)) and np.all(block.standardized_se > 0)


@pytest.mark.parametrize("rotation", ["geomin", "varimax"])
def test_names_stay_with_their_anchor_items(hs_data, rotation):
    """Names given in the order of a strong item of each ability (x1 visual, x4 textual, x7 speed: the abilities
    of Holzinger & Swineford 1939's tests) head the columns of those abilities' items, whatever the order of the
    factors' sizes, and each anchor loads positively."""
    text = f"exploratory factors visual, textual, speed from x1, x4, x7, x2, x3, x5, x6, x8, x9 rotated by {rotation}\n"
    fit = cfa_tool.fit(text, hs_data)
    block = fit.exploratory[0]
    assert block.factors == ("visual", "textual", "speed")
    home = {item: block.factors[int(np.argmax(np.abs(block.standardized[i])))] for i, item in enumerate(block.items)}
    assert home == {**dict.fromkeys(("x1", "x2", "x3"), "visual"), **dict.fromkeys(("x4", "x5", "x6"), "textual"),
                    **dict.fromkeys(("x7", "x8", "x9"), "speed")}
    assert np.all(block.standardized[[0, 1, 2], [0, 1, 2]] > 0.5)
    assert block.to_dict()["names_by"] == "anchor-items"
    assert "the k-th name (visual, textual, speed)" in " ".join(fit.summary().split())


def _two_blocks_data() -> "pd.DataFrame":
    """Ten items, two 2-factor clusters of five items, the clusters' factors correlated (simulated, fixed seed)."""
    import pandas as pd

    rng = np.random.default_rng(11)
    L = np.zeros((10, 4))
    L[[0, 1, 2], 0] = L[[3, 4], 1] = L[[5, 6, 7], 2] = L[[8, 9], 3] = 0.7
    L[2, 1] = L[7, 3] = 0.3
    Phi = np.full((4, 4), 0.35) + 0.65 * np.eye(4)
    X = rng.multivariate_normal(np.zeros(4), Phi, 800) @ L.T + rng.normal(0, 0.6, (800, 10))
    return pd.DataFrame(X, columns=[f"y{i}" for i in range(1, 11)])


TWO_BLOCKS = ("exploratory factors a1, a2 from y1, y4, y2, y3, y5\n"
              "exploratory factors b1, b2 from y6, y9, y7, y8, y10 rotated by quartimin\n")


@pytest.fixture(scope="module")
def two_blocks_fit():
    return cfa_tool.fit(TWO_BLOCKS, _two_blocks_data())


def test_correlations_between_two_blocks_are_reported_with_delta_method_errors(two_blocks_fit):
    """Block a's rotated factors with block b's: cov(a*, b*) = Ma^-1 cov(a, b) Mb^-1' (Asparouhov & Muthén 2009),
    recomputed here from the fitted matrices with each block rotated afresh (explore's rotation at the estimates,
    iterated to convergence again from there at perturbed ones: ``_warm_rotation``), and its SEs by central
    differences of that whole computation (step 1e-4) against the reported delta method."""
    fit = two_blocks_fit
    a, b = fit.exploratory
    assert a.other_factors == ("b1", "b2") and b.other_factors == ("a1", "a2")
    spec = parse_model(TWO_BLOCKS)
    model = StructuredModel(build_parameter_table(spec))
    rotations = [RotationSpec(RotationMethod.GEOMIN, tolerance=1e-11), RotationSpec(RotationMethod.QUARTIMIN, tolerance=1e-11)]

    places = [([model.table.observed.index(x) for x in block.item_names],
               [model.table.latent.index(f) for f in block.factor_names]) for block in spec.exploratory]

    def standardized(theta):
        mats = model.matrices(theta)
        sd = np.sqrt(np.diag(mats.implied_covariance()))
        return mats, [mats.L[np.ix_(rows, cols)] / sd[rows, None] for rows, cols in places]

    warm = [_warm_rotation(rotation, A0) for rotation, A0 in zip(rotations, standardized(fit.theta)[1])]

    def cross(theta):
        mats, unrotated = standardized(theta)
        inverses = []
        for (_, cols), A, reported, rotation in zip(places, unrotated, (a, b), warm):
            P, _, M = rotation(A)
            order = [int(np.argmax(np.abs(reported.standardized.T @ P)[k])) for k in range(2)]
            signs = np.sign(np.sum(P[:, order] * reported.standardized, axis=0))
            M = M[:, order] * signs  # A_std M = the reported pattern
            inverses.append((np.linalg.inv(M), cols))
        (Wa, ca), (Wb, cb) = inverses
        return (Wa @ mats.latent_covariance()[np.ix_(ca, cb)] @ Wb.T).ravel()

    theta = fit.theta
    np.testing.assert_allclose(a.other_correlations.ravel(), cross(theta), atol=1e-6)
    np.testing.assert_allclose(b.other_correlations, a.other_correlations.T, atol=1e-10)
    h = 1e-4
    J = np.column_stack([(cross(theta + h * e) - cross(theta - h * e)) / (2 * h) for e in np.eye(len(theta))])
    np.testing.assert_allclose(a.other_correlations_se.ravel(), np.sqrt(np.diag(J @ fit.parameter_covariance @ J.T)),
                               rtol=2e-3, atol=2e-5)
    out = fit.to_dict()["exploratory_blocks"][0]
    assert out["other_factors"] == ["b1", "b2"]
    np.testing.assert_allclose(out["other_correlations"], a.other_correlations)


def test_an_orthogonal_block_reports_its_correlations_with_the_other_factors(hs_data):
    """A varimax block beside a factor: its rotated factors' correlations with that factor are shown in every
    format, equal to cov(f*, g) = M' cov(f, g) / sd(g) (M orthogonal) recomputed here from the fitted matrices."""
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.html_report import report_html
    from cfa_tool.reporting.text_formats import report_markdown

    text = "factor speed: x7, x8, x9\nexploratory factors visual, textual from x1, x4, x2, x3, x5, x6 rotated by varimax\n"
    fit = cfa_tool.fit(text, hs_data)
    block = fit.exploratory[0]
    assert block.other_factors == ("speed",)
    model = StructuredModel(build_parameter_table(parse_model(text)))
    mats = model.matrices(fit.theta)
    latent = model.table.latent
    rows = [model.table.observed.index(x) for x in block.items]
    cols = [latent.index(f) for f in block.factors]
    g = latent.index("speed")
    A = mats.L[np.ix_(rows, cols)] / np.sqrt(np.diag(mats.implied_covariance())[rows])[:, None]
    M = np.linalg.lstsq(A, block.standardized, rcond=None)[0]  # the reported rotation
    np.testing.assert_allclose(M.T @ M, np.eye(2), atol=1e-8)
    phi = mats.latent_covariance()
    expected = M.T @ phi[cols, g] / np.sqrt(phi[g, g])
    np.testing.assert_allclose(block.other_correlations[:, 0], expected, atol=1e-8)
    assert np.all(np.isfinite(block.other_correlations_se)) and np.all(block.other_correlations_se > 0)
    value = f"{block.other_correlations[1, 0]:.2f}".lstrip("0")
    for report in (" ".join(fit.summary().split()), report_markdown(fit_report(fit)), report_html(fit_report(fit))):
        assert "Correlations of the rotated factors visual, textual" in report and value in report


def test_diagram_draws_each_correlation_between_two_blocks_once(two_blocks_fit):
    from cfa_tool.reporting.diagram import _block_rows

    pairs = [frozenset(r.variables) for r in _block_rows(two_blocks_fit) if r.kind == "factor_covariance"]
    assert len(pairs) == len(set(pairs)) == 1 + 1 + 4  # within a, within b, a with b


def test_the_note_says_when_standard_errors_could_not_be_computed(geomin_fit):
    from cfa_tool.exploration.blocks import rotate_blocks
    from cfa_tool.exploration.choices import BlockErrors
    from cfa_tool.reporting.tables import block_tables

    spec = parse_model(GEOMIN)
    block = rotate_blocks(StructuredModel(build_parameter_table(spec)), spec, geomin_fit.theta, None)[0]
    assert block.errors is BlockErrors.NO_PARAMETER_COVARIANCE and np.all(np.isnan(block.standardized_se))
    np.testing.assert_allclose(block.standardized, geomin_fit.exploratory[0].standardized, atol=1e-10)
    notes = " ".join(t.note for t in block_tables(SimpleNamespace(exploratory=(block,))))
    assert "No standard errors" in notes and "delta method" not in notes


def test_reversed_item_of_a_block_and_a_factor_is_checked_against_the_factor_only(hs_data):
    """'reversed' on an item of a block and of a confirmatory factor keys that factor's sum score; the block's
    unrotated loadings (an arbitrary orientation) give no keying warning and no coefficient."""
    text = "factor verbal: x4, x5, x6, x2\nexploratory factors visual, speed from x1, x7, x2, x3, x8, x9\nreversed x2 on 1 to 10\n"
    fit = cfa_tool.fit(text, hs_data)
    keyed = {r.factor: r for r in fit.groups[0].reliability}
    assert set(keyed) == {"verbal"} and keyed["verbal"].reversed == ("x2",)
    assert not any("visual" in w or "speed" in w for w in fit.warnings)


def test_methods_paragraph_counts_each_factors_items_and_a_one_factor_block_is_not_rotated(hs_data, side_fit):
    """Three items of 'speed' and six of the block (the model file's own counts); a one-factor block has nothing to
    rotate, and its loadings are those of the same factor fitted as a confirmatory factor with variance 1."""
    from cfa_tool.reporting.paragraph import methods_paragraph
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.text_formats import report_markdown

    assert ("three indicators of one factor (speed) and six indicators of two exploratory factors (visual and textual)"
            in methods_paragraph(side_fit))
    one = cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nexploratory factors speed from x7..x9\n",
                       hs_data)
    block = one.exploratory[0]
    assert block.names_by.value == "one-factor"
    report = report_markdown(fit_report(one))
    assert "Exploratory block speed (one factor: no rotation)" in report and "speed (geomin" not in report
    assert "one factor: no rotation" in methods_paragraph(one)
    # a one-factor block is the confirmatory three-factor model of these data; its standardized speed loadings
    # .570, .723, .665 (the widely reproduced Holzinger-Swineford three-factor example; recalled from memory)
    np.testing.assert_allclose(block.standardized[:, 0], [0.570, 0.723, 0.665], atol=2e-3)


def test_the_methods_text_names_the_analysis_the_model_is(hs_data, geomin_fit, side_fit):
    """A model of one exploratory block alone was called "a confirmatory factor analysis with nine indicators of three
    exploratory factors" (hostile trial s26, 01): it is an exploratory factor analysis, and a block among other parts
    (a confirmatory factor, a residual covariance) makes an exploratory structural equation model (Asparouhov &
    Muthén, 2009), in the paragraph of every view."""
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.paragraph import methods_paragraph
    from cfa_tool.reporting.text_formats import report_markdown

    alone = methods_paragraph(geomin_fit)
    assert alone.startswith("An exploratory factor analysis with nine indicators of three exploratory factors (f1, f2, "
                            "and f3) was estimated by maximum likelihood")
    for view in (alone, report_markdown(fit_report(geomin_fit)), json.dumps(geomin_fit.to_dict())):
        assert "confirmatory" not in view.lower()
    with_residuals = cfa_tool.fit(GEOMIN + "covary x2, x3\n", hs_data)
    assert methods_paragraph(with_residuals).startswith(
        "An exploratory structural equation model with nine indicators of three exploratory factors")
    assert methods_paragraph(side_fit).startswith("An exploratory structural equation model with three indicators of "
                                                  "one factor (speed) and six indicators of two exploratory factors")
