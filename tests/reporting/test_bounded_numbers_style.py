"""Numbers bounded by 1 in size (correlations, loadings in standard units) are printed without a leading zero in
every text, as APA style prints them (American Psychological Association 2020, Publication Manual, 7th ed.,
sec. 6.36; recalled from memory) and as the tables of the same reports do ('.603'); the nineteenth round found an
alignment caution saying 'correlate 0.603 ... below the 0.98' beside its table's 'r >= .98'.
"""

from __future__ import annotations

from types import SimpleNamespace

import cfa_tool
from cfa_tool.numerics.plain import journal_decimal
from tests.conftest import holzinger_swineford

ONE = "factor g: x1, x2, x3, x4, x5, x6, x7, x8, x9\n"


def test_journal_decimals_of_negative_values_and_zero():
    assert journal_decimal(-0.25, digits=2) == "-.25" and journal_decimal(0.603) == ".603"
    assert journal_decimal(-0.0001) == ".000"  # a value that rounds to zero has no sign
    assert journal_decimal(1.25, digits=2) == "1.25"  # beyond 1 the leading digit stays


def test_the_alignment_check_caution_prints_correlations_as_its_table_does():
    from cfa_tool.workflows.alignment import TRUSTED_CORRELATION, _cautions

    factor = SimpleNamespace(factor="worry", converged=True, noninvariant_share=0.0,
                             groups=(SimpleNamespace(mean_se=0.0), SimpleNamespace(mean_se=0.2)))
    check = SimpleNamespace(factors=(SimpleNamespace(factor="worry", trusted=False, mean_error=0.1,
                                                     mean_correlation=0.6031),), completed=10, trials=10)
    [caution] = [c for c in _cautions(SimpleNamespace(factors=(factor,), check=check)) if "Monte Carlo" in c]
    assert "correlate .603 on average" in caution and "below the .98 the method's authors" in caution
    assert TRUSTED_CORRELATION == 0.98  # Asparouhov & Muthén 2014's rule of thumb, as the module cites it
    assert "0.6" not in caution and "0.98" not in caution


def test_a_cutoffs_misspecification_names_its_correlation_without_a_leading_zero():
    from cfa_tool.language.parser import parse_model
    from cfa_tool.workflows.cutoffs import misspecified_covariance

    result = cfa_tool.fit(ONE, holzinger_swineford())
    _, what, size = misspecified_covariance(parse_model(ONE), result)
    assert what.startswith("a residual correlation of .30 between") and size == 0.30  # the tool's default size


def test_few_replications_name_their_monte_carlo_errors_as_their_shares():
    # 'a power near .80 has a Monte Carlo standard error of about 0.09': one sentence, two styles (s20); the error
    # of a share p from R replications is sqrt(p (1 - p) / R) (the binomial standard error)
    from cfa_tool.reporting.group_power_report import _few_replications
    from cfa_tool.reporting.workflow_tables import few_replications

    [said] = few_replications(20)
    assert "about .09 and" in said and "0.09" not in said  # sqrt(.16 / 20) = .089
    [said] = _few_replications(20)
    assert "about .09, and a false-alarm rate near .05 one of about .05;" in said  # sqrt(.0475 / 20) = .049
