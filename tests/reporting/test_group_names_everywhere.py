"""Every text that names a group names it by the one rule of the reports (language.names.written_group among the
fit's groups, as a fit's headings name it since s23: 'north', or every label in double quotes when one needs them)
and lists groups by the list rule (cfa_tool.numbers.word_list: 'a, b, and c').  s23's closing note: an ordinal fit's
notes on rows with gaps ('in group east side'), the path diagram's name over each group's drawing ('Group east side')
and alignment's note on a factor turned round (labels joined by ', ') wrote the labels bare; a continuous fit's rows
left out wrote them in single quotes.  Data: the bundled fictional rider survey, its 'south' district relabelled
'east side' (a label with a space, so every label is quoted); alignment's data simulated in tests/workflows."""

from __future__ import annotations

import html

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.fit_document import fit_report
from tests.workflows.test_alignment import MODEL, simulate


@pytest.fixture(scope="module")
def districts() -> pd.DataFrame:
    from cfa_tool.resources import resource_dir

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    return data.assign(district=data["district"].replace({"south": "east side"}))


def _said(result) -> list[str]:
    return [str(w) for w in result.warnings] + [p.line() for p in result.problems]


def test_an_ordinal_fits_notes_quote_every_group(districts, rider_model):
    items = [c for c in districts.columns if c not in ("rider_id", "district")]
    result = cfa_tool.fit(rider_model + "ordinal " + ", ".join(items) + "\n", districts, group="district")
    said = _said(result)
    # the demo data have gaps in both districts (9 missing answers, pandas count), said per group
    assert any('missing answers in group "east side"' in s for s in said)
    assert any('missing answers in group "north"' in s for s in said)
    assert not any("in group east side" in s or "in group north" in s for s in said)


def test_a_continuous_fits_rows_left_out_quote_every_group(districts, rider_model):
    result = cfa_tool.fit(rider_model, districts, group="district", missing="listwise")
    said = _said(result)
    assert any('rows in group "east side"' in s for s in said) and any('rows in group "north"' in s for s in said)
    assert not any("group 'east side'" in s or "group 'north'" in s for s in said)


def test_the_path_diagram_names_its_group_as_the_figure_title_does(districts, rider_model):
    report = fit_report(cfa_tool.fit(rider_model, districts, group="district"))
    for figure, label in zip(report.figures, ("east side", "north")):  # the labels sorted
        assert f'group "{label}"' in figure.title
        assert f'>Group "{label}"<' in html.unescape(figure.svg)
    plain = fit_report(cfa_tool.fit(rider_model, pd.read_csv(_demo_path()), group="district"))
    assert ">Group north<" in plain.figures[0].svg  # one-word labels stay bare, as in the headings


def _demo_path():
    from cfa_tool.resources import resource_dir

    return resource_dir("demo") / "rider_survey.csv"


def test_alignments_note_on_turned_factors_names_the_groups_by_the_rules(monkeypatch):
    """A configural solution turned round in two groups (its loadings negated there, the same model: one factor scaled
    by its variance, mean 0): the note names them as every text does and lists them in a sentence."""
    from dataclasses import replace

    import cfa_tool.pipeline.continuous as continuous

    data, _, _ = simulate(groups=4, rows=80, seed=37)
    data["country"] = data["country"].replace({"land02": "land 02", "land03": "land 03"})
    estimate = continuous.estimate

    def turned(spec, groups, options, **kwargs):
        est = estimate(spec, groups, options, **kwargs)
        theta = est.theta.copy()
        for par in est.table.parameters:  # the groups sorted: land 02, land 03, land00, land01
            if par.kind == "loading" and par.group in (1, 3):
                theta[par.terms[0][0]] *= -1
        return replace(est, theta=theta)

    monkeypatch.setattr(continuous, "estimate", turned)
    result = cfa_tool.align(MODEL, data, "country", trials=0)
    [note] = [n for n in map(str, result.notes) if "turned round" in n]
    assert 'in groups "land 03" and "land01"' in note
