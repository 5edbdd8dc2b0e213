"""A bifactor model (a general factor on every item, uncorrelated with specific factors on parts of them; Holzinger &
Swineford 1937; Reise 2012) read as a reviewer would: the methods text names the structure instead of listing every
item as a cross-loading, the reliability table gives omega hierarchical for the general factor and omega hierarchical
subscale for the specific ones (Rodriguez, Reise & Haviland 2016), and a general factor is not compared with its
specific factors for discriminant validity."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.method_factors import bifactor_parts
from cfa_tool.assessment.reliability import BifactorPart
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import distinct_table, normality_lines, reliability_table
from tests.conftest import exact_cfa_rows

ITEMS = [f"y{i + 1}" for i in range(9)]
BIFACTOR = ("factor g: y1, y2, y3, y4, y5, y6, y7, y8, y9\nfactor s1: y1, y2, y3\nfactor s2: y4, y5, y6\n"
            "factor s3: y7, y8, y9\nuncorrelated g, s1, s2, s3\nscale latent by variance\n")
# invented population values: general loadings .6, specific loadings .5, .4, .3 on their three items
GENERAL = np.full(9, 0.6)
SPECIFIC = np.array([0.5, 0.5, 0.5, 0.4, 0.4, 0.4, 0.3, 0.3, 0.3])


def _data(n: int = 1000):
    L = np.zeros((9, 4))
    L[:, 0] = GENERAL
    for k in range(3):
        L[3 * k:3 * k + 3, k + 1] = SPECIFIC[3 * k:3 * k + 3]
    theta = np.diag(1.0 - (L**2).sum(axis=1))
    return exact_cfa_rows(L, np.eye(4), theta, n, 20261203)


@pytest.fixture(scope="module")
def bifactor_fit():
    return cfa_tool.fit(BIFACTOR, _data())


def _text(table) -> str:
    return " ".join(str(table.note or "").split())  # a Note as the terminal says it


def test_the_one_rule_recognises_a_general_factor_only_when_it_is_uncorrelated_with_its_specific_factors():
    items = {"g": set(ITEMS), "s1": {"y1", "y2", "y3"}, "s2": {"y4", "y5", "y6"}, "s3": {"y7", "y8", "y9"}}
    apart = {frozenset(("g", s)) for s in ("s1", "s2", "s3")}
    assert bifactor_parts(items, frozenset(), apart) == {"g": ("s1", "s2", "s3")}
    assert bifactor_parts(items, frozenset(), apart - {frozenset(("g", "s3"))}) == {}  # correlated: no split
    assert bifactor_parts(items, frozenset({"g"}), apart) == {}  # a declared method factor is not a general factor
    # a wording factor on some items of each trait holds no trait's items whole: not a general factor
    wording = {"a": {"y1", "y2", "y3"}, "b": {"y4", "y5", "y6"}, "m": {"y2", "y5"}}
    assert bifactor_parts(wording, frozenset(), {frozenset(("m", "a")), frozenset(("m", "b"))}) == {}


def test_the_methods_text_names_the_bifactor_structure_not_nine_cross_loadings(bifactor_fit):
    text = " ".join(methods_paragraph(bifactor_fit).split())
    assert "cross-loading" not in text
    assert ("a bifactor structure (Holzinger & Swineford, 1937; Reise, 2012), a general factor (g) on all nine items "
            "and three specific factors (s1, s2, and s3), each on its own part of those items and uncorrelated with the "
            "general factor and with each other, was estimated") in text
    assert "were fixed at zero" not in text  # the structure's sentence says it once


def _omegas(result):
    """Omega hierarchical and omega hierarchical subscale by the published formulas (Rodriguez, Reise & Haviland 2016,
    from the standardized loadings lambda and residual variances 1 - h^2 of an orthogonal bifactor model):
    omega_H = (sum lambda_g)^2 / ((sum lambda_g)^2 + sum_s (sum lambda_s)^2 + sum theta) over all items, and
    omega_HS(s) = (sum lambda_s)^2 / ((sum lambda_g)^2 + (sum lambda_s)^2 + sum theta) over the items of s."""
    std = {(r.variables[0], r.variables[1]): r.standardized for r in result.estimates if r.kind == "loading"}
    g = np.array([std[("g", x)] for x in ITEMS])
    s = {f: np.array([std[(f, x)] for x in ITEMS[3 * k:3 * k + 3]]) for k, f in enumerate(("s1", "s2", "s3"))}
    spec = np.concatenate(list(s.values()))
    theta = 1.0 - g**2 - spec**2
    omega_h = g.sum()**2 / (g.sum()**2 + sum(v.sum()**2 for v in s.values()) + theta.sum())
    subscale = {}
    for k, (f, v) in enumerate(s.items()):
        part = slice(3 * k, 3 * k + 3)
        subscale[f] = v.sum()**2 / (g[part].sum()**2 + v.sum()**2 + theta[part].sum())
    return omega_h, subscale


def test_omega_hierarchical_and_subscale_follow_the_published_formulas(bifactor_fit):
    rows = {r.factor: r for r in bifactor_fit.groups[0].reliability}
    omega_h, subscale = _omegas(bifactor_fit)
    assert rows["g"].bifactor is BifactorPart.GENERAL
    assert rows["g"].omega_hierarchical == pytest.approx(omega_h, abs=1e-6)
    for f, value in subscale.items():
        assert rows[f].bifactor is BifactorPart.SPECIFIC and rows[f].omega == pytest.approx(value, abs=1e-6)
        assert rows[f].composite_reliability is None  # describes no score in a bifactor model
    # the population values (the data's covariance matrix is the population's exactly): omega_H =
    # 5.4^2 / (5.4^2 + 1.5^2 + 1.2^2 + 0.9^2 + 9 - 9 * .36 - .75 - .48 - .27) = 29.16 / 37.92 (hand computation)
    assert omega_h == pytest.approx(29.16 / 37.92, abs=1e-3)
    # omega_HS(s1) = 1.5^2 / (1.8^2 + 1.5^2 + 3 - 3 * .36 - .75) = 2.25 / 6.66
    assert subscale["s1"] == pytest.approx(2.25 / 6.66, abs=1e-3)


def test_the_reliability_table_labels_which_omega_is_which(bifactor_fit):
    table = reliability_table(bifactor_fit)
    headers = list(table.columns)
    assert "Omega hierarchical" in headers
    assert [row[0] for row in table.rows] == ["g", "s1 (subscale)", "s2 (subscale)", "s3 (subscale)"]
    note = _text(table)
    assert "omega hierarchical subscale" in note and "Rodriguez, Reise & Haviland 2016" in note
    assert "Composite reliability is not given for them" in note
    text = " ".join(methods_paragraph(bifactor_fit).split())
    assert "omega hierarchical subscale" in text and "omega (McDonald, 1999)" not in text


def test_a_general_factor_is_not_compared_with_its_specific_factors(bifactor_fit):
    # the general factor is not compared with its specific factors, and the specific factors' correlations are fixed
    # at 0 ('uncorrelated'): nothing is left for the table (tests/reporting/test_bifactor_read_once.py shows its notes)
    assert distinct_table(bifactor_fit) is None
    assert {h.first for h in bifactor_fit.groups[0].htmt} <= {"s1", "s2"}


def test_advice_to_scale_by_variance_stays_where_a_marker_sets_the_scale():
    text = "factor a: y1, y2, y3, y4\nfactor b: y5, y6, y7, y8\n"
    L = np.zeros((8, 2))
    L[:4, 0] = L[4:, 1] = 0.7
    phi = np.array([[1.0, 0.4], [0.4, 1.0]])
    result = cfa_tool.fit(text, exact_cfa_rows(L, phi, np.eye(8) * 0.51, 500, 7))
    note = _text(distinct_table(result))
    assert "('scale latent by variance'), and a and b are scaled otherwise" in note


def test_an_undeclared_method_factor_is_named_as_one_not_as_cross_loadings():
    text = ("factor a: y1, y2, y3, y4\nfactor b: y5, y6, y7, y8\nfactor m: y2, y4, y6, y8\n"
            "uncorrelated m, a\nuncorrelated m, b\nscale m by variance\n")
    L = np.zeros((8, 3))
    L[:4, 0] = L[4:, 1] = 0.7
    L[[1, 3, 5, 7], 2] = 0.4
    phi = np.eye(3)
    phi[0, 1] = phi[1, 0] = 0.4
    result = cfa_tool.fit(text, exact_cfa_rows(L, phi, np.diag(1.0 - np.diag(L @ phi @ L.T)), 800, 11))
    paragraph = " ".join(methods_paragraph(result).split())
    assert "cross-loading" not in paragraph and "bifactor" not in paragraph
    assert ("The factor m loads only on items that load on other factors too (y2, y4, y6, and y8), as a method factor "
            "does") in paragraph


def test_the_normality_note_does_not_ask_for_the_robust_test_a_fit_already_has():
    data = _data(600)
    data = data * np.sqrt(8.0 / np.random.default_rng(4).chisquare(8, len(data)))[:, None]  # heavy tails (t, 8 df)
    data.iloc[::7, 2] = np.nan  # incomplete rows: full-information ML, whose kurtosis reads each row's answered items
    robust = cfa_tool.fit(BIFACTOR, data, test="robust")
    line = " ".join(map(str, normality_lines(robust)))
    assert "each on the items it answered" in line and robust.groups[0].normality.kurtosis_p_value < 0.05
    assert "--robust" not in line and "consider" not in line
    plain_fit = cfa_tool.fit(BIFACTOR, data)
    plain = " ".join(map(str, normality_lines(plain_fit)))
    # the advice is the caution first's (tails-s25: answers far from normal under plain ML), the line points there
    assert "The data depart from normality: see the caution first" in plain
    (caution,) = [p for p in plain_fit.problems if p.kind.name == "NON_NORMAL_ANSWERS"]
    assert "test='robust'" in str(caution.advice)  # from Python, its keyword


def test_an_ordinal_bifactor_table_keeps_its_sum_omega_column_and_labels_the_others():
    data = _data(800)
    cut = data.apply(lambda column: np.digitize(column, [-1.0, 0.0, 1.0]))  # four categories (invented cut points)
    result = cfa_tool.fit(BIFACTOR, cut, ordinal=ITEMS)
    table = reliability_table(result)
    assert table.columns[:4] == ("Factor", "Items", "Sum omega", "Omega hierarchical")
    assert "Latent-response omega hierarchical (subscale for a specific factor)" in table.value_columns
    assert table.value_columns[1] == "Bifactor part" and table.values[1][1] == "specific factor"
