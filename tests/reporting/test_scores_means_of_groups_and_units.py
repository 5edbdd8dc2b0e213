"""Scores of a fit without groups advise no comparison of groups whose invariance nobody tested, and every view of the
scores' report says what comparing or ranking groups and units (wards, sites, teams) by their mean scores needs:
measurement invariance across them tested first (the invariance command), enough rows in each unit, and, for rewards
or sanctions, what any decision about people needs (new-user trial s22: a hospital analyst followed the box's 'use the
scores to compare groups', ranked 18 wards by their mean scores for a bonus, and the three wards ranked last were those
of the one site whose patients answered an item differently at the same level of the factor).

The band of a unit's mean is 1.96 standard errors of a mean of n rows, SD / sqrt(n) (the normal distribution's 97.5%
point, scipy.stats.norm.ppf(.975) = 1.95996...; the 95% band is common practice): 0.31 SD for 40 rows, 0.20 for 100.
The reliability of units' means is Bliese's (2000) ICC(2), the Spearman-Brown formula n ICC / (1 + (n - 1) ICC)
(recalled from memory)."""

from __future__ import annotations

import html
import json
import re

import docx

import cfa_tool
from tests.conftest import THREE_FACTORS

#: what the box's advice says with one group, and the closing caution on means of groups and units
ADVICE = ("use the scores for research, not for decisions about one person; comparing groups or units (wards, sites, "
          "teams) by their mean scores needs measurement invariance across them tested first (the invariance command, "
          "with their column as the groups) and enough rows in each")
UNITS = ("by the mean of their rows' scores needs measurement invariance across them tested first (the invariance "
         "command, with their column as the groups)")
BAND = "a 95% band of about ±0.31 SD for 40 rows, ±0.20 SD for 100"
RANKING = "Ranking units, or the staff in them, for rewards or sanctions is a decision about people"
HIGH_STAKES = "decisions about people (screening, hiring, diagnosis, ranking staff, wards or schools for rewards or sanctions)"


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_the_band_of_a_units_mean_is_that_of_a_mean_of_its_rows():
    from scipy.stats import norm

    z = float(norm.ppf(0.975))
    assert f"±{z / 40 ** 0.5:.2f} SD for 40 rows, ±{z / 100 ** 0.5:.2f} SD for 100" in BAND


def test_one_group_scores_advise_no_comparison_of_untested_groups(hs_data):
    """The precision caution's advice in the box names the invariance test and the caution under the report; the
    caution on means of groups comes just before the high-stakes caution, which names ranking staff, wards or
    schools."""
    from cfa_tool.reporting.score_report import scores_report, unit_means_caution
    from cfa_tool.reporting.tables import HIGH_STAKES_NOTE

    result = cfa_tool.scores(THREE_FACTORS, hs_data)
    report = scores_report(result)
    lines = [str(x) for x in report.notice.lines]
    advised = [x for x in lines if "decisions about individuals usually need" in x]
    assert advised and all(ADVICE in x for x in advised)
    assert not any("compare groups" in x for x in lines)
    cautions = [str(x) for x in report.cautions]
    at = cautions.index(unit_means_caution(result))
    assert cautions[at + 1] == HIGH_STAKES_NOTE
    assert HIGH_STAKES in HIGH_STAKES_NOTE
    for words in (UNITS, BAND, RANKING, "Bliese 2000"):
        assert words in cautions[at]
    assert "The groups of this fit" not in cautions[at]


def test_scores_of_groups_held_equal_compare_those_groups_only(hs_data):
    """With 'invariance scalar' the fit's groups are compared under the equalities the model holds; other groups
    and units still need invariance tested first."""
    from cfa_tool.reporting.score_report import scores_report, unit_means_caution

    result = cfa_tool.scores(THREE_FACTORS + "invariance scalar\n", hs_data, group="school")
    lines = [str(x) for x in scores_report(result).notice.lines]
    advised = [x for x in lines if "decisions about individuals usually need" in x]
    assert advised and all("use the scores for research and to compare the groups of this fit under the loadings and "
                           "intercepts the model holds equal across them" in x and "other groups or units (wards, teams) only once "
                           "measurement invariance across them is tested" in x for x in advised)
    assert "The groups of this fit are compared under the loadings and intercepts the model holds equal" \
        in unit_means_caution(result)


def test_every_view_says_the_same(hs_data, tmp_path, capsys):
    """The terminal, HTML, Markdown, Word and JSON views of one run hold the advice, the caution on means of groups
    and units and the high-stakes caution naming ranking."""
    from cfa_tool.cli import main

    model = tmp_path / "m.cfa"
    model.write_text(THREE_FACTORS)
    data = tmp_path / "d.csv"
    hs_data.to_csv(data, index=False)
    out = {k: tmp_path / f"r.{k}" for k in ("json", "html", "markdown", "docx")}
    code = main(["scores", str(model), "--data", str(data), "--output", str(tmp_path / "s.csv"),
                 *[x for k, p in out.items() for x in (f"--{k}", str(p))]])
    terminal = capsys.readouterr().out
    assert code == 0
    document = docx.Document(str(out["docx"]))
    word = " ".join([p.text for p in document.paragraphs]
                    + [c.text for t in document.tables for row in t.rows for c in row.cells])
    saved = json.loads(out["json"].read_text())["report"]
    in_json = " ".join(str(x) for x in saved["notice"]["lines"] + saved["cautions"])
    views = {"terminal": re.sub("[│╭╮╰╯─]", " ", terminal), "html": html.unescape(re.sub(r"<[^>]+>", " ", out["html"].read_text())),
             "markdown": out["markdown"].read_text().replace("\\", ""), "word": word, "json": in_json}
    for name, text in views.items():
        flat = _flat(text).replace("\u2212", "-")
        for words in (ADVICE, UNITS, BAND, RANKING, HIGH_STAKES):
            assert _flat(words).replace("\u2212", "-") in flat, (name, words)


def test_the_scores_page_says_what_the_report_says():
    """docs/scores.md has a section on means of groups and units with the report's figures and sources."""
    from pathlib import Path

    page = _flat((Path(__file__).resolve().parents[2] / "docs" / "scores.md").read_text(encoding="utf-8"))
    section = page[page.index("## Means of groups and units"):page.index("## Python, and scoring new data")]
    for words in ("Measurement invariance across them, tested first", "cfa-tool invariance", "--group-column UNIT",
                  "a 95% band of about ±0.31 SD for 40 rows and ±0.20 SD for 100", "Bliese 2000",
                  "Ranking units, or the staff in them, for rewards or sanctions is a decision about people"):
        assert words in section, words
