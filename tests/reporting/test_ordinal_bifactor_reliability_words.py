"""An ordinal bifactor model: the observed-sum omega of each factor (Green & Yang 2009) is the share of the keyed sum's
variance due to that factor alone, omega hierarchical for the general factor and omega hierarchical subscale for a
specific one (Rodriguez, Reise & Haviland 2016).  The methods paragraph called them 'the reliability of the factors'
keyed sums' (s22): '.29 for comfort', far below the reliability of comfort's subscale sum, which its general factor
feeds too.  The subscale's omega (general and specific factor together) is computed here by hand from the fit's
standardized loadings (McDonald 1999's formula on the latent responses): (sum of general loadings)^2 + (sum of specific
loadings)^2 over that plus the sum of residual variances."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.resources import resource_dir


def test_the_paragraph_names_the_shares_of_an_ordinal_bifactor_model(rider_demo):
    model = (resource_dir("models") / "rider_bifactor.cfa").read_text()
    result = cfa_tool.fit(model, rider_demo, ordinal="all")
    text = " ".join(methods_paragraph(result).split())
    rows = {r.factor: r for r in result.groups[0].reliability}
    share = rows["comfort"].observed_sum_omega
    items = rows["comfort"].items
    std = {(r.variables[0], r.variables[1]): r.standardized for r in result.estimates if r.kind == "loading"}
    general = sum(std[("experience", x)] for x in items)
    specific = sum(std[("comfort", x)] for x in items)
    residual = sum(1 - std[("experience", x)] ** 2 - std[("comfort", x)] ** 2 for x in items)
    subscale = (general ** 2 + specific ** 2) / (general ** 2 + specific ** 2 + residual)
    assert share < subscale - 0.3  # the share of comfort alone, not the reliability of its subscale's sum
    assert "The reliability of the factors' keyed sums of the answers' codes" not in text
    assert ("For the general factor of the bifactor model, omega hierarchical of the keyed sum of the answers' codes, "
            "the share of that sum's variance due to the general factor alone") in text
    assert ("Omega hierarchical subscale of the keyed subscale sum of the answers' codes, the share due to a specific "
            "factor beyond the general factor (Rodriguez, Reise & Haviland, 2016), was") in text
    assert f"{share:.2f} for comfort".lstrip("0") in text
