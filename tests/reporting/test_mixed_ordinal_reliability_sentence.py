"""Some items ordinal, others continuous: the methods paragraph gives the reliability of every factor, the observed
sum's omega of a factor of ordinal items (Green & Yang 2009) and McDonald's (1999) omega of a factor of continuous
items (hostile s21: comfort and courtesy, whose items are continuous, were left out).  The omega checked here is
McDonald's formula computed by hand from the fit's own estimates: (sum of loadings)^2 var / ((sum)^2 var + sum of
error variances)."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph

RIDER = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n")


def _omega(result, factor: str) -> float:
    rows = result.estimates
    loadings = [r.estimate for r in rows if r.kind == "loading" and r.variables[0] == factor]
    items = [r.variables[1] for r in rows if r.kind == "loading" and r.variables[0] == factor]
    errors = sum(r.estimate for r in rows if r.kind == "residual_variance" and r.variables[0] in items)
    variance = next(r.estimate for r in rows if r.kind == "factor_variance" and r.variables == (factor,))
    common = sum(loadings) ** 2 * variance
    return common / (common + errors)


def test_every_factor_has_its_reliability(rider_demo):
    result = cfa_tool.fit(RIDER, rider_demo, ordinal=["on_time", "short_wait", "accurate_info", "easy_transfer"])
    text = " ".join(methods_paragraph(result).split())
    observed = next(r.observed_sum_omega for r in result.groups[0].reliability if r.factor == "punctuality")
    assert f"Green & Yang, 2009) was {observed:.2f} for punctuality".replace(" 0.", " .") in text
    expected = {f: f"{_omega(result, f):.2f}".lstrip("0") for f in ("comfort", "courtesy")}
    assert (f"For the keyed sum scores of the factors of continuous items, omega (McDonald, 1999) was "
            f"{expected['comfort']} for comfort and {expected['courtesy']} for courtesy") in text


def test_all_ordinal_no_sentence_on_continuous_items(rider_demo):
    result = cfa_tool.fit(RIDER, rider_demo, ordinal="all")
    assert "factors of continuous items" not in " ".join(methods_paragraph(result).split())


def test_the_table_says_which_factors_its_ordinal_reading_does_not_describe(rider_demo):
    from cfa_tool.reporting.tables import reliability_table

    result = cfa_tool.fit(RIDER, rider_demo, ordinal=["on_time", "short_wait"])
    table = reliability_table(result)
    note = " ".join(str(table.note).split())
    assert "The factors comfort and courtesy, whose items are continuous, have no Sum omega" in note
    assert "The factor punctuality, with ordinal and continuous items, has no Sum omega (" in note
    assert "the others for the latent responses" not in table.title


def test_the_paragraph_names_the_factors_mixing_both_kinds(rider_demo):
    """A factor of ordinal and continuous items has no omega of the answers' sum (Green & Yang 2009 define it for a
    sum of ordinal answers): the table's note said so and the methods paragraph said nothing of the factor (hostile
    s22); both now say it, in one wording (paragraph.mixed_kinds_sentence)."""
    from cfa_tool.reporting.tables import reliability_table

    result = cfa_tool.fit(RIDER, rider_demo, ordinal=["on_time", "short_wait"])
    text = " ".join(methods_paragraph(result).split())
    assert ("The factor punctuality, with ordinal and continuous items, has no omega of the answers' sum (Green & "
            "Yang, 2009, give it for a sum of ordinal answers alone), so no reliability of its keyed sum score is "
            "reported.") in text
    note = " ".join(str(reliability_table(result).note).split())
    assert ("The factor punctuality, with ordinal and continuous items, has no Sum omega (Green & Yang 2009 give it "
            "for a sum of ordinal answers alone)") in note
    # every factor of ordinal items only: no such sentence
    whole = cfa_tool.fit(RIDER, rider_demo, ordinal=["on_time", "short_wait", "accurate_info", "easy_transfer"])
    assert "with ordinal and continuous items" not in " ".join(methods_paragraph(whole).split())


def test_a_mixed_fit_in_groups_says_its_continuous_moments_in_one_aside(rider_demo):
    """In groups, least squares fits the continuous items' means and variances beside the correlations: said inside the
    aside that names the ordinal items, not in a second parenthesis right after it (s22: '... as continuous) (and the
    means and variances of the continuous items)')."""
    result = cfa_tool.fit(RIDER + "invariance scalar\n", rider_demo, group="district",
                          ordinal=["on_time", "short_wait"])
    text = " ".join(methods_paragraph(result).split())
    assert ("(on_time and short_wait treated as ordinal, the other ten items as continuous, their means and variances "
            "fitted beside the correlations), with robust standard errors") in text
    assert ") (" not in text
