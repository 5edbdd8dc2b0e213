"""The bootstrap of a just-identified model (0 degrees of freedom) has no test of fit to give: its chi-square is zero
up to rounding, so a Bollen-Stine p-value would count rounding noise (hostile tester, session 18: '.040' for a
one-factor model of three items).  It is not computed, and every view and the JSON say why, as a fit's report does;
a p-value beside a statistic reads 'p = .213', 'p < .001' (reporting.numbers.p_phrase) wherever the bootstrap
names one."""

from __future__ import annotations

import json
import re

import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from tests.workflows.test_full_information_refits import with_gaps

#: one factor of three items: 6 moments, 6 free parameters (marker scaling), so 0 degrees of freedom
#: (the counting rule t = p(p+1)/2 of a just-identified model, Bollen 1989, ch. 7; recalled from memory)
JUST_IDENTIFIED = "factor visual: x1, x2, x3\n"


def test_a_just_identified_model_gets_no_bollen_stine_p_value_and_says_why(hs_data, tmp_path):
    boot = cfa_tool.bootstrap(JUST_IDENTIFIED, hs_data, replications=20, seed=3, workers=1, bca=False)
    assert boot.fit.fit.df == 0  # 3 * 4 / 2 = 6 moments, 6 parameters (counting rule, as above)
    assert boot.bollen_stine_p is None and boot.bollen_stine_converged is None
    assert "just-identified" in boot.bollen_stine_not_computed
    saved = boot.to_dict()["result"]
    assert saved["bollen_stine_p_value"] is None
    assert saved["bollen_stine_not_computed"] == boot.bollen_stine_not_computed
    text = " ".join(boot.summary(100).split())
    assert "No Bollen-Stine p-value: the model is just-identified" in text
    assert "normal-theory p" not in text and "the test of fit remains" not in text
    assert "No Bollen-Stine p-value: the model is just-identified" in " ".join(boot._repr_html_().split())


def test_the_command_line_says_it_in_the_report_and_the_json(hs_data, tmp_path, capsys):
    from tests.conftest import run_cli

    (tmp_path / "m.cfa").write_text(JUST_IDENTIFIED)
    hs_data.to_csv(tmp_path / "hs.csv", index=False)
    code, out, _ = run_cli(["bootstrap", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "hs.csv"), "--replications",
                            "20", "--workers", "1", "--json", str(tmp_path / "b.json"), "--markdown",
                            str(tmp_path / "b.md")], capsys)
    assert code == 0
    written = json.loads((tmp_path / "b.json").read_text())["result"]
    assert written["bollen_stine_p_value"] is None and "just-identified" in written["bollen_stine_not_computed"]
    for view in (out, (tmp_path / "b.md").read_text()):
        assert "No Bollen-Stine p-value: the model is just-identified" in " ".join(view.split())


def test_asking_for_it_on_a_just_identified_model_is_an_error(hs_data):
    with pytest.raises(OptionError, match="just-identified"):
        cfa_tool.bootstrap(JUST_IDENTIFIED, hs_data, replications=10, workers=1, bollen_stine=True)


def test_the_fit_s_p_value_beside_its_statistic_reads_p_equals():
    """With gaps the test of fit stays the fit's: its p-value reads '(p = .xyz)' as in the fit's own table, never
    '(p .xyz)'.  The data follow the fitted model, so the p-value is far from the ends where '<' or '>' would show."""
    boot = cfa_tool.bootstrap("factor f1: y1, y2, y3\nfactor f2: y4, y5, y6\n", with_gaps(300, 5), replications=10,
                              seed=2, workers=1, bca=False)
    assert 0.001 < boot.fit.fit.p_value < 0.999
    text = " ".join(boot.summary(120).split())
    assert re.search(r"the test of fit remains the fit's chi-square \(p = \.\d{3}\)", text), text
