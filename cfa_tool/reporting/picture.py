"""The path diagram as a file: SVG as drawn, or converted by the rsvg-convert program (librsvg) to PNG at a
chosen resolution or to PDF, both on a white background."""

from __future__ import annotations

import re
import shutil
import subprocess
import tempfile
from enum import Enum
from pathlib import Path

from cfa_tool.errors import OptionError, clipped

DEFAULT_DPI = 300  # print resolution journals ask for (common practice)
SVG_DPI = 96  # the CSS pixel: SVG user units are drawn at this resolution


class PictureFormat(Enum):
    """The formats the diagram is written in, by the file's extension."""
    SVG = ".svg"
    PNG = ".png"
    PDF = ".pdf"


def picture_format(option: str, path: str) -> PictureFormat:
    """The format a file name asks for (standard output, ``-``, gets SVG); any other extension is an error."""
    if path == "-":
        return PictureFormat.SVG
    suffix = Path(path).suffix.lower()
    for member in PictureFormat:
        if member.value == suffix:
            return member
    known = ", ".join(m.value for m in PictureFormat)
    raise OptionError(f"{option}: '{path}' must end in one of {known} (the formats the diagram is written in)")


def png_converter() -> str | None:
    """The path of the converter program, or None when it is not installed."""
    return shutil.which("rsvg-convert")


def require_converter(kind: PictureFormat) -> None:
    """An error, before any work is done, when ``kind`` needs the converter and it is not installed."""
    if kind is not PictureFormat.SVG and png_converter() is None:
        raise OptionError(f"writing {kind.name} needs the rsvg-convert program (Debian package librsvg2-bin); "
                          "write .svg instead")


def picture(svg: str, kind: PictureFormat, dpi: int = DEFAULT_DPI) -> str | bytes:
    """``svg`` in the format ``kind``: the SVG text itself, or the bytes of a PNG (at ``dpi``) or a PDF."""
    if kind is PictureFormat.SVG:
        return svg
    return _convert(svg, kind, dpi)


def svg_to_png(svg: str, dpi: int = DEFAULT_DPI) -> bytes:
    """PNG bytes of ``svg`` at ``dpi`` dots per inch, white background."""
    return _convert(svg, PictureFormat.PNG, dpi)


def _convert(svg: str, kind: PictureFormat, dpi: int) -> bytes:
    """PNG or PDF bytes of ``svg``, white background.  A PDF keeps the drawing as vectors at its natural size
    (one SVG unit is one CSS pixel, 1/96 inch); a PNG is scaled to ``dpi`` dots per inch."""
    require_converter(kind)
    converter = png_converter()
    with tempfile.TemporaryDirectory() as tmp:
        source = Path(tmp) / "diagram.svg"
        source.write_text(svg, encoding="utf-8")
        out = Path(tmp) / f"diagram{kind.value}"
        size = ["--zoom", f"{dpi / SVG_DPI:.6g}"] if kind is PictureFormat.PNG else []
        done = subprocess.run([converter, "--format", kind.name.lower(), *size, "--background-color", "white",
                               "-o", str(out), str(source)], capture_output=True, text=True)
        if done.returncode != 0 or not out.exists():
            raise OptionError(f"the SVG-to-{kind.name} converter failed: {clipped(done.stderr.strip(), 200)}")
        return out.read_bytes()


def png_size(png: bytes) -> tuple[int, int]:
    """The width and height of a PNG picture in pixels, read from its IHDR chunk (PNG specification, section
    11.2.2)."""
    return int.from_bytes(png[16:20], "big"), int.from_bytes(png[20:24], "big")


def page_fit(png: bytes, width: float = 6.5, height: float = 8.0) -> tuple[str, float]:
    """Which side of a PNG picture to set, and to how many inches, so that it fills the width of a page's text
    area without running off its foot: ``width`` by ``height`` inches, the text area of a letter page with margins
    of one inch less room for the figure's caption and note."""
    pixels_wide, pixels_high = png_size(png)
    if pixels_high * width > pixels_wide * height:
        return "height", height
    return "width", width


_FONT_SIZE = re.compile(r'font-size="([0-9.]+)"')
_SVG_WIDTH = re.compile(r'<svg[^>]*?\swidth="([0-9.]+)"')


def smallest_text(svg: str, inches: float) -> float | None:
    """The size in points of the smallest text of the SVG drawing ``svg`` (this tool's: sizes in font-size
    attributes, its width in user units on the root element) printed ``inches`` wide; None without text."""
    sizes = [float(s) for s in _FONT_SIZE.findall(svg)]
    width = _SVG_WIDTH.search(svg)
    if not sizes or width is None or not float(width.group(1)):
        return None
    return min(sizes) * inches * 72.0 / float(width.group(1))


_SVG_HEIGHT = re.compile(r'<svg[^>]*?\sheight="([0-9.]+)"')
_BREAKS = re.compile(r'<svg[^>]*?\sdata-breaks="([0-9. ]+)"')


def svg_size(svg: str) -> tuple[float, float]:
    """The width and height of an SVG drawing of this tool, in user units, from its root element; ValueError when
    the root gives none (a drawing changed by hand in a saved result: reporting.reports.saved_report says so)."""
    width, height = _SVG_WIDTH.search(svg), _SVG_HEIGHT.search(svg)
    if width is None or height is None:
        raise ValueError("the drawing's root element gives no width and height")
    return float(width.group(1)), float(height.group(1))


def svg_strips(svg: str, most: float) -> list[str]:
    """The SVG drawing ``svg`` cut across into strips at most ``most`` user units high, each as an SVG drawing of
    its own: cut only where the drawing says nothing is drawn (its root's ``data-breaks``: between the bands of a
    diagram of many items, and between groups), as few strips as that allows; a part between two cuts that is
    higher than ``most`` is a strip of its own.  ``[svg]`` when it is not cut."""
    found, width, height = _BREAKS.search(svg), _SVG_WIDTH.search(svg), _SVG_HEIGHT.search(svg)
    if found is None or width is None or height is None or float(height.group(1)) <= most:
        return [svg]
    w, h = float(width.group(1)), float(height.group(1))
    cuts = [0.0]
    candidates = sorted(float(b) for b in found.group(1).split()) + [h]
    for k, at in enumerate(candidates[:-1]):
        if candidates[k + 1] - cuts[-1] > most:
            cuts.append(at)
    cuts.append(h)
    head = svg[:svg.index(">", svg.index("<svg")) + 1]
    strips = []
    for top, bottom in zip(cuts, cuts[1:]):
        root = re.sub(r'viewBox="[^"]*"', f'viewBox="0 {top:.0f} {w:.0f} {bottom - top:.0f}"', head, count=1)
        found = _SVG_HEIGHT.search(root)
        root = root[:found.start(1)] + f"{bottom - top:.0f}" + root[found.end(1):]
        strips.append(root + svg[len(head):])
    return strips
