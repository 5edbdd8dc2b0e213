"""The path diagram as a picture for print: SVG converted to PNG by the rsvg-convert program (librsvg),
at a chosen resolution on a white background."""

from __future__ import annotations

import shutil
import subprocess
import tempfile
from pathlib import Path

from cfa_tool.errors import OptionError

DEFAULT_DPI = 300  # print resolution journals ask for (common practice)
SVG_DPI = 96  # the CSS pixel: SVG user units are drawn at this resolution


def png_converter() -> str | None:
    """The path of the converter program, or None when it is not installed."""
    return shutil.which("rsvg-convert")


def require_png_converter() -> str:
    converter = png_converter()
    if converter is None:
        raise OptionError("writing PNG needs the rsvg-convert program (Debian package librsvg2-bin); write .svg instead")
    return converter


def svg_to_png(svg: str, dpi: int = DEFAULT_DPI) -> bytes:
    """PNG bytes of ``svg`` at ``dpi`` dots per inch, white background."""
    converter = require_png_converter()
    with tempfile.TemporaryDirectory() as tmp:
        source = Path(tmp) / "diagram.svg"
        source.write_text(svg, encoding="utf-8")
        out = Path(tmp) / "diagram.png"
        done = subprocess.run([converter, "--zoom", f"{dpi / SVG_DPI:.6g}", "--background-color", "white",
                               "-o", str(out), str(source)], capture_output=True, text=True)
        if done.returncode != 0 or not out.exists():
            raise OptionError(f"the SVG-to-PNG converter failed: {done.stderr.strip()[:200]}")
        return out.read_bytes()
