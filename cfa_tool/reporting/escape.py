"""Escaping of user-supplied text (column names, titles, labels) for each output format."""

from __future__ import annotations

import html
import re


def html_text(value) -> str:
    """Text for HTML and SVG element content and attribute values."""
    return html.escape(str(value), quote=True)


_MARKDOWN_SPECIAL = re.compile(r"([\\`*_{}\[\]()#+\-.!|<>~])")


def markdown_text(value) -> str:
    """Backslash-escape Markdown punctuation; angle brackets become entities so no HTML passes through."""
    text = str(value).replace("\n", " ")
    text = _MARKDOWN_SPECIAL.sub(r"\\\1", text)
    return text.replace("\\<", "&lt;").replace("\\>", "&gt;")


_LATEX = {
    "\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#", "_": r"\_", "{": r"\{", "}": r"\}",
    "~": r"\textasciitilde{}", "^": r"\textasciicircum{}", "<": r"\textless{}", ">": r"\textgreater{}",
}


def latex_text(value) -> str:
    return "".join(_LATEX.get(ch, ch) for ch in str(value).replace("\n", " "))
