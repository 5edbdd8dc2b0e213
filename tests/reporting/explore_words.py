"""The words and numbers a reader finds in an exploration's report, format by format (terminal text, HTML, Markdown),
for the test that the one report model says everything the exploration's own layout said
(test_explore_views.py; the words of that layout are kept in data/explore_words_before.json)."""

from __future__ import annotations

import base64
import re
from html.parser import HTMLParser

from cfa_tool.version import __version__
from cfa_tool.workflows.explore import explore
from tests.conftest import DATASETS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"  # Holzinger & Swineford (1939), open data
# a seeded split (a confirmation half, notes) and a 4-factor solution with a Heywood case (the notice first)
CASES = {"split": dict(items="x1..x9", split=11, replications=20),
         "four_factors": dict(items="x1..x9", factors=4, replications=20)}


def case(name: str):
    return explore(HS_FILE, **CASES[name])


def words(text: str) -> set[str]:
    """Words and numbers, without the punctuation around them."""
    out = set()
    text = text.replace("\\", "").replace(str(HS_FILE), "HS_FILE").replace(__version__, "VERSION")
    for token in re.findall(r"[^\s|(),;:\[\]{}*`<>\"=#]+", text):
        token = token.strip(".'")
        if token and any(c.isalnum() for c in token):
            out.add(token)
    return out


class _Visible(HTMLParser):
    """The text of an HTML page a reader sees, pictures' text included (inline SVG, or SVG in a data address)."""

    def __init__(self):
        super().__init__()
        self.parts: list[str] = []
        self._skip = 0

    def handle_starttag(self, tag, attrs):
        if tag in ("style", "title"):
            self._skip += 1
        src = dict(attrs).get("src") or ""
        if tag == "img" and src.startswith("data:image/svg+xml;base64,"):
            inner = _Visible()
            inner.feed(base64.b64decode(src.split(",", 1)[1]).decode("utf-8"))
            self.parts += inner.parts

    def handle_endtag(self, tag):
        if tag in ("style", "title"):
            self._skip -= 1

    def handle_data(self, data):
        if not self._skip:
            self.parts.append(data)


def html_words(page: str) -> set[str]:
    parser = _Visible()
    parser.feed(page)
    # (the former page showed the draft's line ends so; it wrote a minus sign and a relation as the terminal does,
    # where the page now prints them by the printed views' rule, reporting.numbers.printed: read back as before)
    text = " ".join(parser.parts).replace("\\n", " ").replace("\u2212", "-")
    return words(text) | words(text.replace("\u2265", ">=").replace("\u2264", "<="))


def markdown_words(text: str) -> set[str]:
    """Markdown's words, pictures' text included (SVG in a data address)."""
    pictures = re.findall(r"\(data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)\)", text)
    text = re.sub(r"\(data:image/svg\+xml;base64,[A-Za-z0-9+/=]+\)", " ", text)
    return words(text) | set().union(*(html_words(base64.b64decode(p).decode("utf-8")) for p in pictures))
