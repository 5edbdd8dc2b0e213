"""align over few groups says what its Monte Carlo check can and cannot show, and that the method was made for many
groups (new-user trial s24, finding 10: three language versions; the check's correlations of three means, .002 to
.94, stood as trust figures without a word that a correlation of three values says little).

The chance figure is the probability that a correlation of G pairs of unrelated normal values reaches .98 (Fisher
1915: t = r sqrt(G - 2) / sqrt(1 - r^2) is Student's t with G - 2 df), checked against scipy.stats.t; for three groups
it is arccos(.98) / pi = .0638 (the density of r for three pairs is 1 / (pi sqrt(1 - r^2)): Fisher 1915).

Data: simulated one-factor rows in each group (tests/workflows/test_alignment.simulate: random group means and
variances, seeded)."""

from __future__ import annotations

import math

import pytest

import cfa_tool
from cfa_tool.numerics.distributions import correlation_null_sf
from cfa_tool.reporting.align_report import few_groups_line
from cfa_tool.note_parts import said
from tests.workflows.test_alignment import MODEL, simulate


@pytest.mark.parametrize("groups", [3, 4, 5, 6, 7, 10, 25, 60])
@pytest.mark.parametrize("r", [-0.9, -0.2, 0.0, 0.35, 0.8, 0.98, 0.999])
def test_the_chance_of_a_correlation_against_scipy(groups, r):
    stats = pytest.importorskip("scipy.stats")
    df = groups - 2
    t = r * math.sqrt(df) / math.sqrt(1.0 - r * r)
    assert correlation_null_sf(r, groups) == pytest.approx(float(stats.t.sf(t, df)), abs=1e-12, rel=1e-9)


def test_three_pairs_by_the_closed_form():
    # Fisher (1915): with three pairs, r has density 1 / (pi sqrt(1 - r^2)), so P(R >= .98) = arccos(.98) / pi
    assert correlation_null_sf(0.98, 3) == pytest.approx(math.acos(0.98) / math.pi, rel=1e-12)


def test_three_groups_are_said_to_be_few_first():
    data, _, _ = simulate(groups=3, rows=300, seed=31)
    result = cfa_tool.align(MODEL, data, "country", trials=3, seed=5)
    line = few_groups_line(result)
    assert line is not None
    text = said(line)
    assert text.startswith("Only 3 groups: the alignment method was made for comparing many groups")
    assert "Asparouhov & Muthén 2014" in text and ("--partial auto" in text or "partial='auto'" in text)
    assert "in 6% of draws by chance alone" in text  # .0638 (the closed form above), rounded
    flat = " ".join(str(result).split())
    assert flat.index("Only 3 groups") < flat.index("Alignment across country")  # first, in the box


def test_many_groups_are_not():
    data, _, _ = simulate(groups=8, rows=200, seed=23)
    result = cfa_tool.align(MODEL, data, "country", trials=2, seed=5)
    assert few_groups_line(result) is None
