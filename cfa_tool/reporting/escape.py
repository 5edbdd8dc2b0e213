"""Escaping of user-supplied text (column names, titles, labels) for each output format."""

from __future__ import annotations

import html
import re

from cfa_tool.errors import printable


def html_text(value) -> str:
    """Text for HTML and SVG element content and attribute values; control characters (which XML does not
    allow and a browser would not show) are written as visible escapes."""
    return html.escape(printable(value), quote=True)


# Characters that change the meaning of text inside a paragraph or a table cell: emphasis, code,
# links, table delimiters, the escape itself.  Dots, parentheses and hyphens inside a line are plain
# text in Markdown (CommonMark) and stay as they are, so the raw file reads as normal text.
_MARKDOWN_SPECIAL = re.compile(r"([\\`*_\[\]|~])")


def markdown_text(value) -> str:
    """Backslash-escape the Markdown punctuation that would change the text's meaning; angle brackets
    become entities so no HTML passes through; a '#', '+', '-' or '>' at the start cannot make a heading
    or a list."""
    text = printable(" ".join(str(value).splitlines()))  # other control characters shown as escapes
    text = _MARKDOWN_SPECIAL.sub(r"\\\1", text)
    text = re.sub(r"<(?=[A-Za-z/!?])", "&lt;", text)  # only what could open an HTML tag ("p < .05" stays)
    if text[:1] in ("#", "+", "-", "=", ">"):
        text = "\\" + text
    return text


_LATEX = {
    "\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#", "_": r"\_", "{": r"\{", "}": r"\}",
    "~": r"\textasciitilde{}", "^": r"\textasciicircum{}", "<": r"\textless{}", ">": r"\textgreater{}",
    # symbols the reports print, written as macros so that any LaTeX engine and font set sets them
    "\u00b2": r"\textsuperscript{2}", "\u03c7": r"$\chi$", "\u2265": r"$\geq$", "\u2264": r"$\leq$",
    "\u2212": r"$-$", "\u2013": "--", "\u2014": "---", "\u00b1": r"$\pm$", "\u2026": r"\dots{}",
    "\u03b1": r"$\alpha$", "\u03c9": r"$\omega$", "\u0394": r"$\Delta$", "\u00d7": r"$\times$",
    "\u03bb": r"$\lambda$", "\u03c1": r"$\rho$", "\u00a0": "~", "\u221a": r"$\surd$",
}


def latex_text(value) -> str:
    return "".join(_LATEX.get(ch, ch) for ch in printable(str(value).replace("\n", " ")))
