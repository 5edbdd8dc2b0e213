"""A factor with one item (its error variance fixed, as identification requires) gets no reliability or AVE: with one
indicator the factor's share of the item's variance is whatever the fixed error variance makes it (Bollen 1989,
ch. 7), so omega, composite reliability and AVE of 1 (error variance 0) restate an assumption (hostile trial).
Data: Holzinger & Swineford (1939), tests/datasets."""

from __future__ import annotations

import math

import cfa_tool
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.version import __version__

MODEL = "factor visual: x1\nfix variance(x1) = 0\nfactor textual: x4, x5, x6\n"


def test_a_one_item_factor_gets_no_coefficients_and_its_item_a_factor(hs_data):
    result = cfa_tool.fit(MODEL, hs_data)
    by_factor = {r.factor: r for r in result.groups[0].reliability}
    one = by_factor["visual"]
    assert math.isnan(one.omega) and math.isnan(one.omega_total)
    assert one.composite_reliability is None and one.average_variance_extracted is None
    assert one.fornell_larcker_holds is None
    assert 0 < by_factor["textual"].omega < 1  # the factor with three items keeps its coefficients
    words = " ".join(report_text(report_of(result)).split())
    table = words[words.index("Reliability of the scale scores"):]
    assert table.index("visual 1 textual 3") < table.index(
        "visual: measured by one item, whose error variance the model fixes, so its reliability coefficients restate "
        "that fixed value (Bollen 1989, ch. 7), not evidence from the data; no coefficients are shown, and it takes no "
        "part in the Fornell-Larcker comparison.")
    assert "1.000" not in table[:table.index("textual 3")]
    assert "Distinctness of the factors: correlations, HTMT and AVE" not in words  # one trait factor with an AVE left: nothing to compare
    items = words[words.index("Items: descriptive statistics"):]
    assert "x1 301" in items and items.index("visual") < items.index("textual")


def test_every_note_finds_one_item_factors_by_one_detector_and_says_it_in_one_wording(hs_data, tmp_path):
    # the reliability note (fit report) and the scores notes (from the fit, and from its saved JSON rows) name the
    # same factors in the same words; the detector agrees with the reliability rows' own count of items
    import json

    from cfa_tool.reporting.one_item import one_item_factors
    from cfa_tool.reporting.score_report import scores_report
    from cfa_tool.workflows.factor_scores import score_with_saved_fit

    model = MODEL.replace("factor textual: x4, x5, x6\n", "factor speed: x7\nfix variance(x7) = 0.2\n"
                                                             "factor textual: x4, x5, x6\n")
    result = cfa_tool.fit(model, hs_data)
    assert one_item_factors(result.estimates, result.observed) == ("visual", "speed")
    from cfa_tool.model.saved_estimates import saved_rows

    read_back = saved_rows(result.to_dict()["estimates"], "the fit")  # a saved fit's rows as its one reader gives them
    assert one_item_factors(read_back, result.observed) == ("visual", "speed")
    assert [r.factor for r in result.groups[0].reliability if len(r.items) == 1] == ["visual", "speed"]
    fact = ("visual, speed: measured by one item, whose error variance the model fixes, so their {} restate that "
            "fixed value (Bollen 1989, ch. 7), not evidence from the data")
    reliability = next(t for t in report_of(result).tables if t.title.startswith("Reliability of the scale scores"))
    assert fact.format("reliability coefficients") + "; no coefficients are shown, and they take no part" \
        in reliability.note
    model_file, saved = tmp_path / "m.cfa", tmp_path / "fit.json"
    model_file.write_text(model)
    saved.write_text(json.dumps(result.to_dict() | {"tool": "cfa-tool", "version": __version__}))
    for scored in (cfa_tool.scores(model, hs_data), score_with_saved_fit(model_file, saved, hs_data)):
        quality = next(t for t in scores_report(scored).tables if t.title.startswith("Quality of the scores"))
        assert fact.format("determinacy, reliability and precision") + "." in str(quality.note)
