"""Parameters set apart in one group, said in sentences (s22): the methods paragraph ran them on after a comma ('Held
equal across groups: loadings and intercepts, the intercept of clean in group "east side" was set apart from the other
groups', which were held equal': a comma splice, and with two groups there is one other group, not several held equal
among themselves); the comparison's and the ladder's sentences say it alike, and the groups are named by the one rule
of group names (language.names.written_group): every label quoted when one holds a space.  Demo data: the bundled
fictional rider survey, its 'south' district relabelled 'east side'."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph

RIDER = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n")
SET_APART = 'equal across groups: loadings, intercepts\nin group "east side": noninvariant intercept(clean)\n'


def _spaced(rider_demo):
    return rider_demo.assign(district=rider_demo["district"].replace({"south": "east side"}))


def test_a_fit_says_what_it_sets_apart_in_a_sentence_of_its_own(rider_demo):
    result = cfa_tool.fit(RIDER + SET_APART, _spaced(rider_demo), group="district")
    text = " ".join(methods_paragraph(result).split())
    assert ('Loadings and intercepts were held equal across groups. The intercept of clean in group "east side" was '
            "set apart from the other group's.") in text
    assert "intercepts, the intercept" not in text  # no comma splice
    assert 'the factor means were fixed at zero in group "east side" and estimated in group "north"' in text.lower()


def test_the_comparison_and_the_ladder_say_it_alike(rider_demo):
    from cfa_tool.reporting.workflow_tables import comparison_report, invariance_report
    from cfa_tool.workflows.compare import compare
    from cfa_tool.workflows.invariance import invariance

    data = _spaced(rider_demo)
    report = comparison_report(compare([RIDER + "equal across groups: loadings\n", RIDER + SET_APART], data,
                                       "district"))
    text = " ".join(report.paragraph.split())
    assert ('held loadings and intercepts equal across groups. The intercept of clean in group "east side" was set '
            "apart from the other group's.") in text
    ladder = invariance(RIDER + 'in group "east side": noninvariant intercept(clean)\n', data, "district")
    ladder_report = invariance_report(ladder)
    paragraph = " ".join(ladder_report.paragraph.split())
    assert ('Scalar invariance, partial with the intercept of clean in group "east side" set apart from the other '
            "group's, held") in paragraph
    notes = " ".join(" ".join(map(str, ladder_report.notes)).split())
    assert ('Partial invariance declared in the model file: the intercept of clean in group "east side" (from the '
            "scalar step) is set apart from the other group's.") in notes


def test_a_comparisons_lines_and_cautions_name_groups_by_the_one_rule(rider_demo):
    """The comparison's line of groups and its cautions of one group wrote the label bare ('east side (15 rows)',
    'group east side: 15 rows ...') beside the quoted reference group (s22)."""
    import pandas as pd

    from cfa_tool.reporting.workflow_tables import comparison_report
    from cfa_tool.workflows.compare import compare

    data = _spaced(rider_demo)
    data = pd.concat([data[data["district"] == "north"], data[data["district"] == "east side"].head(15)])
    two = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
           "factor comfort: seat_available, clean, temperature, room_to_stand\n")
    report = comparison_report(compare([two + "equal across groups: loadings\n",
                                        two + "equal across groups: loadings, intercepts\n"], data, "district"))
    assert 'Groups defined by district: "east side" (15 rows), "north" (250 rows).' in report.lines
    # 15 rows for 17 free parameters in that group (6 loadings, 8 residual variances, 2 variances, 1 covariance)
    notice = " ".join(str(line) for line in report.notice.lines)
    assert 'group "east side": 15 rows for the 17 free parameters' in notice
    assert "group east side" not in notice
