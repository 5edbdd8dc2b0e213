"""No table prints a rounded zero for an estimate or standard error that is not zero (s23): a loading fixed at 1e-6,
or an item scaled in the thousands, printed every such loading, standard error and error variance as 0.000.  Each
table cell of a value smaller than its last decimal's unit is printed to two significant digits in plain digits
(reporting.numbers.est_num, est_unit), in every view: terminal, HTML, Markdown, Word and the CSV files of --tables; so
a loading of 0.00055 reads '0.00055', inside its interval [0.00036, 0.00075], not '0.001'.

The data are Holzinger & Swineford (1939) (tests/datasets, 301 pupils) with x2 divided by 1,000: the same model's
loading of x2 is the unscaled fit's divided by 1,000 and its error variance divided by 1,000,000 (a linear rescaling
of one indicator; Bollen 1989, ch. 7, on the scale of indicators), which the test checks against the unscaled fit
before reading the tables.
"""

from __future__ import annotations

import csv
import html
import re

import docx
import pytest

import cfa_tool
from cfa_tool.reporting.numbers import est_num, est_unit, num, unit
from tests.conftest import holzinger_swineford, run_cli

MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
FIXED = MODEL + "fix loading(visual, x2) = 0.000001\n"


@pytest.mark.parametrize("value, digits", [(1e-6, 3), (4.79e-7, 3), (-3.3e-5, 3), (0.00045, 3), (0.0004, 2),
                                           (-0.004, 2), (2e-12, 3), (0.00055, 3)])
def test_a_small_value_is_printed_to_its_significant_digits(value, digits):
    """A value that ``digits`` decimals would print as zero: plain digits (no exponent), its sign, within 5% of it
    (two significant digits); the bounded form without its leading zero."""
    text = est_num(value, digits)
    assert float(num(value, digits)) in (0, 10 ** -digits)  # what the tables printed before: 0.000, or 0.001
    assert "e" not in text and float(text) != 0 and float(text) == pytest.approx(value, rel=0.05)
    assert (text[0] == "-") == (value < 0)
    bounded = est_unit(value, digits)
    assert not bounded.lstrip("-").startswith("0") and float(bounded) == pytest.approx(value, rel=0.05)


@pytest.mark.parametrize("value, digits", [(0.0, 3), (0.925, 3), (-1.234, 2), (0.0016, 3), (-0.0159, 2), (12.5, 3)])
def test_other_values_are_printed_as_before(value, digits):
    assert est_num(value, digits) == num(value, digits)
    if abs(value) <= 1:
        assert est_unit(value, digits) == unit(value, digits)


@pytest.fixture()
def scaled(tmp_path):
    hs = holzinger_swineford()
    plain = cfa_tool.fit(MODEL, hs)
    hs["x2"] = hs["x2"] / 1000
    data = tmp_path / "scaled.csv"
    hs.to_csv(data)
    return plain, data, tmp_path


def _estimate(result, kind, variables):
    return next(e for e in result.estimates if e.kind == kind and tuple(e.variables) == variables)


def _views(model_text, data, tmp_path, capsys) -> dict[str, str]:
    """Every view of one fit: terminal, HTML, Markdown, Word and the CSV files of --tables (each as one text)."""
    model = tmp_path / "m.cfa"
    model.write_text(model_text)
    code, out, err = run_cli(["fit", model, "--data", data, "--html", tmp_path / "r.html", "--markdown",
                              tmp_path / "r.md", "--docx", tmp_path / "r.docx", "--tables", tmp_path / "tables"], capsys)
    assert code == 0, err
    word = docx.Document(str(tmp_path / "r.docx"))
    cells = [cell.text for table in word.tables for row in table.rows for cell in row.cells]
    rows = [cell for path in sorted((tmp_path / "tables").glob("*.csv"))
            for row in csv.reader(path.read_text(encoding="utf-8").splitlines()) for cell in row]
    return {"terminal": out, "html": html.unescape((tmp_path / "r.html").read_text(encoding="utf-8")),
            "markdown": (tmp_path / "r.md").read_text(encoding="utf-8").replace("\\_", "_"),
            "word": "\n".join(cells).replace("\u2212", "-"), "csv": "\n".join(rows)}


def _shown(text: str, value: float) -> bool:
    """Whether ``text`` shows ``value`` within 5% (two significant digits) as a number of plain digits."""
    return any(float(n) == pytest.approx(value, rel=0.05) for n in re.findall(r"-?\d+(?:\.\d+)?(?:e-?\d+)?", text))


def test_an_item_scaled_in_the_thousands(scaled, capsys):
    plain, data, tmp_path = scaled
    fitted = cfa_tool.fit(MODEL, str(data))
    loading, residual = _estimate(fitted, "loading", ("visual", "x2")), _estimate(fitted, "residual_variance", ("x2",))
    # the rescaling's check: the unscaled fit's values divided by 1,000 and by 1,000,000
    assert loading.estimate == pytest.approx(_estimate(plain, "loading", ("visual", "x2")).estimate / 1e3, rel=1e-4)
    assert residual.estimate == pytest.approx(_estimate(plain, "residual_variance", ("x2",)).estimate / 1e6, rel=1e-4)
    assert loading.se < 5e-4 and residual.estimate < 5e-4  # what 0.000 printed
    views = _views(MODEL, data, tmp_path, capsys)
    for view, text in views.items():
        for value in (loading.estimate, loading.se, loading.ci95[0], loading.ci95[1], residual.estimate):
            assert _shown(text, value), (view, value)


def test_a_loading_fixed_at_one_millionth(scaled, capsys):
    _, data, tmp_path = scaled
    fitted = cfa_tool.fit(FIXED, str(data))
    free = _estimate(fitted, "loading", ("visual", "x3"))  # scaled by the fix: about 1e-3 of x2's 1e-6
    views = _views(FIXED, data, tmp_path, capsys)
    for view, text in views.items():
        assert _shown(text, 1e-6) and _shown(text, free.se), view
        assert "0.000001" in text or view == "csv", view


def test_the_other_table_writers_print_no_rounded_zero(tmp_path, capsys):
    """The scores' precision table (reporting.score_report), another table writer: with x1..x3 divided by 1,000 the
    visual factor's scale (its marker x1's) is a thousandth of the unscaled one, and so are its scores' standard
    error, band and real difference (a linear rescaling; Bollen 1989, ch. 7), which 2 decimals printed as 0.00."""
    hs = holzinger_swineford()
    hs[["x1", "x2", "x3"]] = hs[["x1", "x2", "x3"]] / 1000
    data = tmp_path / "scaled.csv"
    hs.to_csv(data)
    model = tmp_path / "m.cfa"
    model.write_text(MODEL)
    code, out, err = run_cli(["scores", model, "--data", data, "--output", tmp_path / "scores.csv"], capsys)
    assert code == 0, err
    table = out[out.index("Precision of one person's score"):]
    visual = next(line for line in table.splitlines() if line.split()[:1] == ["visual"])
    numbers = [float(n) for n in re.findall(r"\d+\.\d+", visual)]
    assert len(numbers) == 5 and all(n > 0 for n in numbers), visual
    textual = next(line for line in table.splitlines() if line.split()[:1] == ["textual"])
    # visual's SE is of the order of a thousandth, textual's (whose items are not rescaled) of the order of one tenth
    # or more: a bound of sizes, not a check value
    assert 1e-5 < numbers[0] < 1e-2 and float(textual.split()[1]) > 0.1
