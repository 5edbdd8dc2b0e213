"""An impossible solution is the first thing every view shows.

The Heywood case used throughout: the Holzinger-Swineford (1939) three-factor model with the residual
covariances x7-x8 and x8-x9 added converges to a negative residual variance of x9.  Its value is checked
against a direct minimisation of the maximum-likelihood discrepancy written here with scipy (an
implementation that shares nothing with the package)."""

from __future__ import annotations

import json

import numpy as np
import pytest
from scipy.optimize import minimize

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import csv_table, report_markdown
from cfa_tool.reporting import tables as T
from tests.commands.test_cli import run
from tests.reporting.test_reports import figure_svgs

HEYWOOD = """factor visual: x1, x2, x3
factor textual: x4, x5, x6
factor speed: x7, x8, x9
covary x7, x8
covary x8, x9
"""
PLAIN = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
ITEMS = [f"x{i}" for i in range(1, 10)]


@pytest.fixture(scope="module")
def heywood(hs_data):
    return cfa_tool.fit(HEYWOOD, hs_data)


def _scipy_minimum(S: np.ndarray) -> np.ndarray:
    """The ML estimates of the Heywood model by direct minimisation of
    F = log|Sigma| + tr(S Sigma^-1) - log|S| - p (Joreskog 1967), no bounds."""
    p = 9

    def sigma(t):
        L = np.zeros((p, 3))
        L[[0, 3, 6], [0, 1, 2]] = 1.0
        L[[1, 2], 0], L[[4, 5], 1], L[[7, 8], 2] = t[0:2], t[2:4], t[4:6]
        phi = np.array([[t[6], t[9], t[10]], [t[9], t[7], t[11]], [t[10], t[11], t[8]]])
        theta = np.diag(t[12:21])
        theta[6, 7] = theta[7, 6] = t[21]
        theta[7, 8] = theta[8, 7] = t[22]
        return L @ phi @ L.T + theta

    def f(t):
        s = sigma(t)
        sign, logdet = np.linalg.slogdet(s)
        if sign <= 0:
            return 1e10
        return logdet + np.trace(np.linalg.solve(s, S)) - np.linalg.slogdet(S)[1] - p

    start = np.r_[np.ones(6), np.diag(S)[[0, 3, 6]] / 2, np.zeros(3), np.diag(S) / 2, 0.0, 0.0]
    best = minimize(f, start, method="BFGS", options={"gtol": 1e-9, "maxiter": 20000})
    return best.x


def test_the_heywood_case_is_found_and_matches_a_direct_minimisation(heywood, hs_data):
    rows = hs_data[ITEMS].to_numpy(float)
    S = np.cov(rows.T, bias=True)  # ML uses the covariance matrix with divisor N
    theta = _scipy_minimum(S)
    x9 = next(r.estimate for r in heywood.estimates if r.kind == "residual_variance" and r.variables == ("x9",))
    assert theta[20] < 0
    assert x9 == pytest.approx(theta[20], abs=2e-3)
    assert x9 == pytest.approx(-1.016, abs=1e-3)  # the value the issue reports
    assert not heywood.admissible
    kinds = [p.kind for p in heywood.problems]
    assert ProblemKind.NEGATIVE_RESIDUAL_VARIANCE in kinds
    problem = heywood.problems[kinds.index(ProblemKind.NEGATIVE_RESIDUAL_VARIANCE)]
    assert problem.parameters == ("residual_variance(x9)",)
    assert heywood.r_squared["x9"] == pytest.approx(2.001, abs=1e-3)


def test_an_admissible_solution_has_no_problems(hs_data):
    result = cfa_tool.fit(PLAIN, hs_data)
    assert result.admissible and result.problems == ()
    assert T.problem_notice(result) is None
    assert "not admissible" not in report_text(fit_report(result), width=100)
    assert 'id="problems"' not in report_html(fit_report(result))


def test_terminal_shows_problems_before_the_fit_table(heywood):
    text = report_text(fit_report(heywood), width=100)
    assert text.index(T.NOT_ADMISSIBLE) < text.index("Model fit")
    assert text.index("x9 is negative") < text.index("Model fit")


def test_html_banner_comes_first_and_marks_rows_and_diagram(heywood):
    page = report_html(fit_report(heywood))
    body = page[page.index("<body>"):]
    assert body.index('id="problems"') < body.index("<h1>") < body.index("Summary for a paper")
    assert any('<circle class="residual problem"' in svg for svg in figure_svgs(page))
    assert '<tr class="problem">' in page
    assert "red: a value that makes the solution impossible or doubtful" in page  # the legend under the drawing


def test_notebook_view_shows_the_banner_and_the_rows_used(heywood):
    fragment = heywood._repr_html_()
    assert fragment.index('id="problems"') < fragment.index("<table")
    assert "301 rows analysed of 301 read" in fragment


def test_markdown_and_json_put_problems_first(heywood):
    markdown = report_markdown(fit_report(heywood))
    assert markdown.startswith(f"## {T.NOT_ADMISSIBLE}")  # before the title
    out = heywood.to_dict()
    assert list(out)[:2] == ["admissible", "problems"]
    assert out["admissible"] is False
    assert out["problems"][0]["kind"] == "negative residual variance"
    assert out["problems"][0]["value"] == pytest.approx(-1.016, abs=1e-3)
    assert out["problems"][0]["advice"]


def test_tables_mark_the_affected_rows_in_place(heywood):
    tables = {t.title.split(" (")[0]: t for t in T.estimate_tables(heywood)}
    speed = tables["Factor speed"]
    x9 = [k for k, row in enumerate(speed.rows) if row[0] == "x9"]
    assert speed.flagged == tuple(x9)
    assert speed.columns[-1] == "Problem"
    assert "negative variance" in speed.rows[x9[0]][-1]
    assert speed.rows[x9[0]][speed.columns.index("R²")] == "2.00"
    assert "negative variance" in csv_table(speed)  # the mark reaches every format
    assert tables["Factor visual"].flagged == ()


def test_methods_paragraph_does_not_report_an_inadmissible_solution_as_a_good_fit(heywood, hs_data):
    text = methods_paragraph(heywood)
    assert "not admissible" in text and "negative residual variance of x9" in text
    assert "guide values" not in text  # no judgement of fit for an impossible solution
    assert "not admissible" not in methods_paragraph(cfa_tool.fit(PLAIN, hs_data))


def test_compare_marks_the_inadmissible_model(tmp_path, hs_data):
    data = tmp_path / "hs.csv"
    hs_data.to_csv(data, index=False)
    (tmp_path / "heywood.cfa").write_text(HEYWOOD)
    (tmp_path / "plain.cfa").write_text(PLAIN)
    out = tmp_path / "c.json"
    proc = run("compare", str(tmp_path / "heywood.cfa"), str(tmp_path / "plain.cfa"), "--data", str(data),
               "--json", str(out))
    assert proc.returncode == 0, proc.stderr
    text = proc.stdout
    assert text.index("solution of heywood is not admissible") < text.index("Fit of each model")
    assert "lowest AIC and BIC belong to heywood" in text
    models = {m["name"]: m for m in json.loads(out.read_text())["models"]}
    assert models["heywood"]["admissible"] is False and models["plain"]["admissible"] is True
    assert models["heywood"]["problems"][0]["kind"] == "negative residual variance"


def test_a_bound_mark_names_the_parameter_it_belongs_to(hs_data):
    # found in a hostile trial: a loading held at its bound was marked "held at a bound" in the Problem column, which a
    # split table printed beside the item's free error variance; the mark names its parameter
    from cfa_tool.reporting.tables import estimate_tables
    from tests.conftest import THREE_FACTORS

    result = cfa_tool.fit(THREE_FACTORS + "bound loading(visual, x2) <= 0.3\n", hs_data)  # x2's estimate is about .55
    (visual,) = [t for t in estimate_tables(result) if t.title.startswith("Factor visual")]
    marks = {row[0]: row[-1] for row in visual.rows}
    assert marks["x2"] == "loading: held at a bound"
    assert marks["x3"] == ""


def test_one_sentence_of_samples_whose_solution_is_not_admissible():
    # the bootstrap, the cutoffs and the power simulation built this sentence three ways; one builder now
    from cfa_tool.assessment.admissibility import not_admissible_sentence

    assert not_admissible_sentence([(0, 200, "", "")], "resamples", "the intervals") == ""
    assert not_admissible_sentence([(1, 200, "a negative residual variance in 1", "")], "resamples", "the intervals") == (
        "1 of the 200 converged resamples (a negative residual variance in 1) has a solution that is not admissible, "
        "as a single fit would judge it; it is kept in the intervals")
    assert not_admissible_sentence([(3, 90, "x in 3", " at N = 60"), (0, 100, "", " at N = 120"),
                                    (2, 100, "", " at N = 200")], "replications", "the figures") == (
        "3 of the 90 converged replications at N = 60 (x in 3) and 2 of the 100 converged replications at N = 200 "
        "(problems not recorded) have a solution that is not admissible, as a single fit would judge it; they are "
        "kept in the figures")
