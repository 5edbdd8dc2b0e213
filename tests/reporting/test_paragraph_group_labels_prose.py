"""A methods paragraph names groups as prose does (new-user trial s20, item 10): 'support in group 8', never
'support in "8"', which read as code; quotes remain where a label needs them to be told from the sentence (spaces,
commas, brackets), for every label alike (language.names.written_group, into which s22 folded the paragraph's own rule)."""

from __future__ import annotations

import re

from cfa_tool.reporting.paragraph import invariance_paragraph
from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS


def test_one_word_or_number_labels_are_written_as_they_are():
    from cfa_tool.language.names import written_group

    assert [written_group(x, ("5", "6", "8")) for x in ("5", "8")] == ["5", "8"]
    assert written_group("translated", ("original", "translated")) == "translated"
    assert written_group("Grant-White", ("Pasteur", "Grant-White")) == "Grant-White"
    assert written_group("École", ("École", "Lycée")) == "École"
    # a label that would run into the sentence: every label quoted alike (written_group's rule)
    assert [written_group(x, ("men, 40+", "women")) for x in ("men, 40+", "women")] == ['"men, 40+"', '"women"']
    assert written_group("grade 8", ("grade 8", "grade 9")) == '"grade 8"'
    assert written_group("8)", ("8)", "9")) == '"8)"' and written_group("-8", ("-8",)) == '"-8"'


def test_the_invariance_paragraph_names_grades_without_quotes(hs_data):
    # Holzinger & Swineford (1939): the pupils' grade, 7 or 8, as the groups
    data = hs_data.dropna(subset=["grade"]).assign(grade=lambda d: d["grade"].astype(int))
    ladder = invariance(THREE_FACTORS, data, "grade")
    text = " ".join(invariance_paragraph(ladder, [s.level for s in ladder.steps]).split())
    assert not re.search(r'"[78]"', text), text
    assert "(two groups: 7, n = " in text and "; 8, n = " in text
    assert "estimated in the other groups against group 7, the reference group" in text
    assert "against group 7 (d: over the pooled latent standard deviation)" in text
    assert "visual in group 8, " in text
    from cfa_tool.reporting.workflow_tables import invariance_report

    report = invariance_report(ladder)
    assert report.title == "Measurement invariance across grade (7, 8)"  # the title too
    # and every other line of the report, by the same rule (s22: the lines under the title wrote '"7": 145 rows')
    lines = " ".join(" ".join(map(str, report.lines + tuple(report.notes))).split())
    assert "rows analysed (7: " in lines and not re.search(r'"[78]"', lines), lines
