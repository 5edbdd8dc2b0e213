"""The methods paragraph writes names of items, factors and groups as the model language writes them
(language.names.written_name: in double quotes unless a plain word), so that names holding commas and full stops,
such as question texts used as column names, do not run together in its lists ("items Q1. I enjoy, my work., Q2 ...").
The data are Holzinger & Swineford (1939) with three tests, a factor and a school renamed as a survey platform would
name them; the names the paragraph must hold are the ones written here."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.paragraph import comparison_paragraph, invariance_paragraph, methods_paragraph
from cfa_tool.workflows.invariance import LEVELS
from tests.conftest import holzinger_swineford

Q1, Q2, Q3 = "Q1. I enjoy, my work.", "Q2. I see, and I do.", "Q3. Cubes, paper form."
FACTOR = "visual, spatial."
SCHOOL = "Pasteur, north"
MODEL = (f'factor "{FACTOR}": "{Q1}", "{Q2}", "{Q3}"\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n'
         f'covary "{Q1}", "{Q2}"\n')


def _data():
    data = holzinger_swineford()[["school"] + [f"x{i}" for i in range(1, 10)]].rename(
        columns={"x1": Q1, "x2": Q2, "x3": Q3})
    data["school"] = data["school"].replace({"Pasteur": SCHOOL})
    return data


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_the_fit_paragraph_quotes_items_factors_and_groups():
    text = _flat(methods_paragraph(cfa_tool.fit(MODEL, _data())))
    assert f'three correlated factors ("{FACTOR}", textual, and speed)' in text
    assert f'("{Q1}" for "{FACTOR}", x4 for textual, and x7 for speed)' in text  # the markers
    assert f'one residual covariance ("{Q1}" with "{Q2}")' in text
    assert f"({Q1} for" not in text and f"{FACTOR}, textual" not in text


def test_the_group_labels_and_parameters_are_quoted_too():
    result = cfa_tool.fit(MODEL + f'fix loading("{FACTOR}", "{Q3}") = 1\n', _data(), group="school")
    text = _flat(methods_paragraph(result))
    # Holzinger & Swineford (1939): 145 pupils of Grant-White, 156 of Pasteur
    assert f'in two groups defined by school ("Grant-White", n = 145; "{SCHOOL}", n = 156)' in text
    assert f'The loading of "{Q3}" on "{FACTOR}" was fixed at 1.' in text


def test_the_comparison_and_invariance_paragraphs_quote_them():
    compared = cfa_tool.compare([MODEL, MODEL + "covary x7, x8\n"], _data())
    text = _flat(comparison_paragraph(compared))
    assert f'three correlated factors ("{FACTOR}", textual, and speed)' in text
    ladder = cfa_tool.invariance(MODEL, _data(), "school")
    text = _flat(invariance_paragraph(ladder, LEVELS))
    assert f'(two groups: "Grant-White", n = 145; "{SCHOOL}", n = 156)' in text
    assert f'("{Q1}" for "{FACTOR}", x4 for textual, and x7 for speed)' in text
