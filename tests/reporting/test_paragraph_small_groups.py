"""The caution that opens a report when a group (or the sample) has fewer rows than its model's free parameters is
in the methods paragraph too, before any result (a new user's finding: the invariance paragraph said every level
held across five departments, one of 45 people for 54 parameters, without a word)."""

from __future__ import annotations

import re

import pandas as pd

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.workflow_tables import invariance_report

THREE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def test_the_invariance_paragraph_names_a_group_smaller_than_its_model(hs_data):
    first = hs_data["school"].unique()[0]
    data = pd.concat([hs_data[hs_data["school"] == first].iloc[20:40], hs_data[hs_data["school"] != first]])
    ladder = cfa_tool.invariance(THREE, data, "school")
    text = " ".join(invariance_report(ladder).paragraph.split())
    said = (f"Group {first} had 20 rows for the 21 free parameters of its model (not counting its 9 item "
            f"intercepts), so its estimates, and every comparison with the other groups, rest on too few "
            f"answers.")  # 21 by hand: tests/pipeline/test_small_groups.py
    assert said in text
    result = re.search(r"The configural model (held|did not hold)", text)
    assert result and text.index(said) < result.start()  # before any step's result
    whole = cfa_tool.invariance(THREE, hs_data, "school")
    assert "fewer rows than the free parameters" not in invariance_report(whole).paragraph


def test_the_fit_paragraph_names_a_sample_smaller_than_its_model(hs_data):
    small = cfa_tool.fit("factor visual: x1, x2, x3, x4, x5, x6\n", hs_data.iloc[:11])
    text = " ".join(methods_paragraph(small).split())
    # 6 loadings (one fixed) + 6 residual variances + 1 factor variance = 12, with the 6 item means not counted
    said = ("The sample had 11 rows for the 12 free parameters of the model, fewer rows than parameters, so every "
            "estimate and fit index rests on")
    assert said in text
    assert text.index(said) < text.index("χ²")


def test_a_change_that_rounds_to_zero_has_no_sign():
    """ΔCFI of -0.0002 (the restricted model fits worse) printed '+.000' in a table and the methods text (new user
    s14), a wrong sign; then '-.000' and '+.000' stood in invariance tables and the methods text (new-user s19), a
    sign on a zero no paper prints: a change that rounds to zero has none, whatever its direction, and every other
    change has its own (no leading zero for values bounded by 1: journal style, APA Publication Manual 7th ed.,
    recalled from memory; the signs are this project's rule)."""
    from cfa_tool.reporting.numbers import signed, signed_num

    assert signed(-0.0002) == ".000"
    assert signed(0.0002) == ".000"
    assert signed(0.0) == ".000" and signed(-0.0) == ".000"
    assert signed(-0.026) == "-.026" and signed(0.035) == "+.035"
    assert signed(-0.0004, beside=-0.01) == ".000" and signed(-0.0006) == "-.001"
    assert signed_num(-0.04, 1) == "0.0" and signed_num(0.04, 1) == "0.0"
    assert signed_num(2.26, 1) == "+2.3" and signed_num(-12.5, 1) == "-12.5"


def test_the_rare_categories_advice_of_a_small_ordinal_group_names_the_ways_out():
    """An ordinal group of 14 rows whose polychoric matrix is not positive definite: the advice names the model's
    'join answers' statement and a row filter for the group, not only a copy of the data (new user s14). Simulated ordinal answers (seed 27, found by trying seeds for this error)."""
    import numpy as np
    import pytest

    from cfa_tool.errors import DataError

    rng = np.random.default_rng(27)
    f = rng.normal(size=314)
    x = 0.8 * f[:, None] + 0.6 * rng.normal(size=(314, 5))
    frame = pd.DataFrame(np.clip(np.round(x * 1.3 + 3), 1, 5).astype(int), columns=list("abcde"))
    frame["g"] = ["big"] * 300 + ["small"] * 14
    with pytest.raises(DataError) as found:
        cfa_tool.invariance("factor f: a, b, c, d, e\n", frame, "g", ordinal="all")
    text = str(found.value)
    assert "group small of 'g'" in text and "not positive definite" in text
    assert "join such a category with its neighbour by a 'join answers' statement in the model file" in text
    assert "or leave this group out with a row filter (keep=...)" in text


def test_the_note_on_few_rows_per_parameter_does_not_call_the_groups_small(hs_data):
    """Groups with more rows than parameters but fewer than five per parameter: the note says the figures and that
    fewer rows per parameter vary more, not 'a group this small' (departments of 165-260 people read as too small)."""
    ladder = cfa_tool.invariance(THREE, hs_data.groupby("school").head(100), "school")  # 100 / 21 = 4.7 each
    notes = " ".join(" ".join(str(x) for x in ladder.notes + ladder.warnings).split())
    assert "rows per free parameter of the group's model" in notes
    assert "with fewer rows per parameter, a group's estimates, and every comparison with the other groups, vary more" \
           in notes
    assert "this small" not in notes


def test_group_labels_are_quoted_alike_and_factor_markers_named(hs_data):
    """A list of groups quotes every label when one needs quotes ('"Grant-White", n = 145; Pasteur, n = 156' read
    unevenly), none when each is one word as prose names groups (new-user trial s20; '"men, 40+"' beside them:
    tests/reporting/test_group_labels_alike.py), and a higher-order factor's marker is said to be one of its factors
    (new user s14)."""
    ladder = cfa_tool.invariance(THREE, hs_data, "school")
    text = " ".join(invariance_report(ladder).paragraph.split())
    assert '(two groups: Grant-White, n = 145; Pasteur, n = 156)' in text
    higher = cfa_tool.fit(THREE + "factor g: visual, textual, speed\n", hs_data)
    assert ("fixing the loading of one indicator (for a higher-order factor, one of its factors) to 1 (x1 for visual, "
            "x4 for textual, x7 for speed, and visual for g)") in " ".join(methods_paragraph(higher).split())


def test_a_comparison_says_the_reverse_keyed_items_once_when_every_model_declares_them(hs_data):
    """Three models declaring the same reverse-keyed items: one sentence, not one per model (new user s14)."""
    from cfa_tool.reporting.paragraph import comparison_paragraph

    keyed = "reversed x2, x5 on 0 to 10\n"
    one = "factor g: x1, x2, x3, x4, x5, x6, x7, x8, x9\n" + keyed
    comparison = cfa_tool.compare([one, THREE + keyed], hs_data)
    text = " ".join(comparison_paragraph(comparison).split())
    assert text.count("declared reverse-keyed") == 1
    assert "In every model, the items x2 and x5 were declared reverse-keyed" in text


def test_a_comparison_names_a_group_smaller_than_its_model(hs_data):
    """compare in groups with a group of 20 rows: the paragraph says it before the fit (review s14: the terminal said
    it twice, the paragraph never)."""
    from cfa_tool.reporting.paragraph import comparison_paragraph

    first = hs_data["school"].unique()[0]
    data = pd.concat([hs_data[hs_data["school"] == first].iloc[20:40], hs_data[hs_data["school"] != first]])
    comparison = cfa_tool.compare([THREE, THREE + "invariance metric\n"], data, group="school")
    text = " ".join(comparison_paragraph(comparison).split())
    said = f'Group {first} had 20 rows for the 21 free parameters of its model'
    assert said in text and text.index(said) < text.index("Fit:")
