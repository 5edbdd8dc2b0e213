"""The methods paragraph of a fit in groups names each group with its size and says where the factor means were
estimated and where they were fixed at zero, as the fit's own mean parameters say: without equal intercepts every
group's means are zero; with them the reference group's are zero and the others' estimated.  Group sizes of
Holzinger & Swineford (1939): 156 pupils of the Pasteur school, 145 of Grant-White."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import THREE_FACTORS, holzinger_swineford


def _flat(text: str) -> str:
    return " ".join(text.split())


def _means(result) -> dict[str, set[bool]]:
    """Per group, whether its factor means are free (the fit's own parameters)."""
    out: dict[str, set[bool]] = {}
    for r in result.estimates:
        if r.kind == "mean":
            out.setdefault(r.group, set()).add(r.free)
    return out


def test_without_equal_intercepts_every_groups_means_are_zero():
    result = cfa_tool.fit(THREE_FACTORS + "invariance metric\n", holzinger_swineford(), group="school")
    assert _means(result) == {"Grant-White": {False}, "Pasteur": {False}}
    assert [(g.label, g.data.n_obs) for g in result.groups] == [("Grant-White", 145), ("Pasteur", 156)]
    text = _flat(methods_paragraph(result))
    assert 'estimated in two groups defined by school (Grant-White, n = 145; Pasteur, n = 156) by' in text
    assert "The factor means were fixed at zero in every group." in text


def test_with_equal_intercepts_the_other_groups_means_are_estimated():
    result = cfa_tool.fit(THREE_FACTORS + "invariance scalar\n", holzinger_swineford(), group="school",
                          reference_group="Pasteur")
    assert _means(result) == {"Pasteur": {False}, "Grant-White": {True}}
    text = _flat(methods_paragraph(result))
    assert 'The factor means were fixed at zero in group Pasteur and estimated in group Grant-White.' in text


def test_a_fit_of_one_group_says_nothing_of_factor_means():
    assert "factor means" not in methods_paragraph(cfa_tool.fit(THREE_FACTORS, holzinger_swineford()))


def _ordinal_groups():
    from tests.reporting.test_paragraph_keying_and_reliability import TRAITS, _answers

    data = _answers()
    data["site"] = ["east"] * 300 + ["west"] * 300
    return TRAITS, data


def _latent_responses(result, group: str) -> tuple[set, set]:
    """Whether the items' latent-response intercepts and residual variances are free in ``group`` (own parameters)."""
    own = [r for r in result.estimates if r.group == group]
    return ({r.free for r in own if r.kind == "intercept"}, {r.free for r in own if r.kind == "residual_variance"})


def test_an_ordinal_fit_in_groups_says_how_its_latent_responses_were_identified():
    model, data = _ordinal_groups()
    result = cfa_tool.fit(model + "invariance thresholds\n", data, group="site", ordinal="all")
    assert _latent_responses(result, "east") == ({False}, {False})
    assert _latent_responses(result, "west") == ({True}, {True})  # free once thresholds are equal (Wu & Estabrook)
    text = _flat(methods_paragraph(result))
    assert ("The latent responses behind the ordinal items had intercepts fixed at 0 and residual variances fixed at 1 "
            "in group east; intercepts estimated and residual variances estimated in group west (the identification of "
            "Wu & Estabrook, 2016).") in text  # each group named as every sentence names it (s22: 'in east')
    configural = cfa_tool.fit(model, data, group="site", ordinal="all")
    assert _latent_responses(configural, "west") == ({False}, {False})
    assert ("intercepts fixed at 0 and residual variances fixed at 1 in every group"
            in _flat(methods_paragraph(configural)))


def test_the_invariance_paragraph_says_rows_with_gaps_were_used_as_the_fit_does():
    import numpy as np

    from cfa_tool.reporting.paragraph import invariance_paragraph
    from cfa_tool.workflows.invariance import LEVELS

    data = holzinger_swineford()
    data.loc[data.index[[3, 40, 77, 150, 210]], "x2"] = np.nan  # x2 answered by 296 of 301 rows: 98.3%, not rounded up
    ladder = cfa_tool.invariance(THREE_FACTORS, data, "school")
    assert ladder.steps[0].result.method.full_information
    fitted = cfa_tool.fit(THREE_FACTORS, data, group="school")
    assert min(fitted.missing_data["coverage"].values()) == 296 / 301
    # new-user trial s11: the assumption full-information ML rests on is said where the paragraph says it was used
    # with groups, the lowest share of any group's rows (pandas: x2 answered by 152 of Pasteur's 156 rows, 97.4%)
    lowest = data.groupby("school")["x2"].apply(lambda x: x.notna().mean()).min()
    assert f"{np.floor(1000 * lowest) / 10:g}" == "97.4"
    phrase = ("every answer of every row was used, including rows with missing answers, which assumes that answers are "
              "missing at random, Little & Rubin, 2002; each item was answered in at least 97.4% of each group's rows")
    assert phrase in _flat(methods_paragraph(fitted)) and phrase in _flat(invariance_paragraph(ladder, LEVELS))


def test_a_fit_in_groups_without_equalities_says_none_were_imposed(hs_data):
    # a reviewer reading only the paragraph must not take the groups' loadings for invariant ones
    result = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
    assert not result.description.invariant
    text = " ".join(methods_paragraph(result).split())
    assert ("No invariance constraints were imposed: the parameters were estimated separately in each group, with "
            "the same pattern in every group.") in text
    held = " ".join(methods_paragraph(cfa_tool.fit(THREE_FACTORS + "invariance metric\n", hs_data,
                                                   group="school")).split())
    assert "No invariance constraints" not in held and "Loadings were held equal across groups" in held


def test_loadings_and_correlations_of_every_group_are_said_to_span_the_groups():
    # new-user trial s13: "ranged from .34 to .80 in absolute value (12 negative)" for a 15-item model in two groups:
    # the rows of both groups pooled without a word. x2 answered the other way round (-x2; not a marker) loads
    # negatively in both schools of Holzinger & Swineford (1939): one negative loading in each group, not "2 negative".
    data = holzinger_swineford()
    data["x2"] = -data["x2"]
    result = cfa_tool.fit(THREE_FACTORS, data, group="school")
    text = _flat(methods_paragraph(result))
    loadings = [abs(r.standardized) for r in result.estimates if r.kind == "loading"]
    assert sum(r.standardized < 0 for r in result.estimates if r.kind == "loading") == 2  # one per school
    low, high = f"{min(loadings):.2f}".lstrip("0"), f"{max(loadings):.2f}".lstrip("0")
    assert (f"Standardized loadings ranged from {low} to {high} in absolute value across the two groups "
            f"(1 negative in each group).") in text
    corr = [r.standardized for r in result.estimates if r.kind == "factor_covariance" and r.free]
    assert len(corr) == 6  # three correlations in each school, each standardized in its own school
    assert (f"Factor correlations ranged from {min(corr):.2f} to {max(corr):.2f} across the two groups."
            .replace("0.", ".")) in text


def test_the_higher_order_loadings_of_a_fit_in_groups_span_the_groups(rider_demo):
    """The higher-order factor's loadings of every group make one range, as the items' do: the sentence says so (s22:
    'across the two groups' after the items' range and not after the factors')."""
    from cfa_tool.resources import resource_dir

    model = (resource_dir("models") / "rider_higher_order.cfa").read_text() + "invariance metric\n"
    result = cfa_tool.fit(model, rider_demo, group="district")
    second = [r.standardized for r in result.estimates if r.kind == "loading" and r.variables[0] == "service"]
    assert len(second) == 6  # three factors in each of two groups
    text = _flat(methods_paragraph(result))
    assert (f"The standardized loadings of the factors on the higher-order factor ranged from "
            f"{min(second):.2f} to {max(second):.2f} across the two groups.").replace(" 0.", " .") in text
