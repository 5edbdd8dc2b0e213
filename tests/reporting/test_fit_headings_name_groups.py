"""A fit's headings, table titles and path diagrams name each group by the one rule of every text of the report
(language.names.written_group among the fit's groups): with a label that holds a space every label in double quotes,
as the notes and the methods paragraph write them (s23: the headings wrote 'Estimates, group east side' and 'group
north' bare beside 'group "east side"' in the notes).  Data: the bundled fictional rider survey, its 'south' district
relabelled 'east side'."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.fit_document import fit_report


def test_headings_titles_and_diagrams_quote_every_group_when_one_needs_it(rider_demo, rider_model):
    data = rider_demo.assign(district=rider_demo["district"].replace({"south": "east side"}))
    result = cfa_tool.fit(rider_model, data, group="district")
    report = fit_report(result)
    sections = [t.section for t in report.tables if t.section]
    assert 'Estimates, group "north" (N = 250)' in sections  # 250 rows of north in the demo data (pandas count)
    assert 'Estimates, group "east side" (N = 230)' in sections
    for heading in ("Local fit", "Modification indices"):
        assert f'{heading}, group "north"' in sections and f'{heading}, group "east side"' in sections
    assert not any(s.endswith((", group north", ", group east side")) or "group north (" in s for s in sections)
    titles = [t.title for t in report.tables]
    assert 'Intercepts, group "east side"' in titles
    assert not any(t.endswith((", group north", ", group east side")) for t in titles)
    # a title that names its group already (the items' correlations) is not named twice
    assert sum('group "north"' in t for t in titles if t.startswith("Correlations of the items")) == 1
    assert not any(t.count('group "north"') > 1 for t in titles)
    assert sorted(f.title for f in report.figures) == [
        'Path diagram of the fitted model, group "east side" (standardized values)',
        'Path diagram of the fitted model, group "north" (standardized values)']


def test_plain_labels_stay_plain(rider_demo, rider_model):
    """Labels that are each one word are written as they are, in the notes and the headings alike."""
    result = cfa_tool.fit(rider_model, rider_demo, group="district")
    sections = [t.section for t in fit_report(result).tables if t.section]
    assert "Estimates, group north (N = 250)" in sections and "Local fit, group south" in sections
