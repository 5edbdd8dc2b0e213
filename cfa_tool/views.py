"""How a result object shows itself: its report as text and as a notebook's HTML.

Result objects are made below the reporting layer (by the pipeline and the workflows), so they
cannot import it.  Instead the reporting layer's presenter is installed here by the package's top
module (``cfa_tool/__init__.py``), which Python runs before any other module of the package, and
loaded only when a result is first shown.  Results inherit :class:`Presentable`.
"""

from __future__ import annotations

from typing import Callable, Protocol


class Presenter(Protocol):
    def text(self, result: object, width: int = 120) -> str:
        """The terminal report as plain text, ``width`` columns wide."""

    def notebook(self, result: object) -> str:
        """An HTML fragment for a notebook."""


_loader: Callable[[], Presenter] | None = None


def install(loader: Callable[[], Presenter]) -> None:
    """Make ``loader()`` the source of the presenter (the package's top module does this once)."""
    global _loader
    _loader = loader


def presenter() -> Presenter:
    if _loader is None:  # pragma: no cover - the package's top module always installs one
        raise RuntimeError("no report presenter is installed; import cfa_tool first")
    return _loader()


class Presentable:
    """``summary()``, ``_repr_html_()`` and ``str()`` for result objects, through the installed presenter."""

    def summary(self, width: int = 120) -> str:
        """The report as text, as the command line prints it."""
        return presenter().text(self, width)

    def _repr_html_(self) -> str:
        return presenter().notebook(self)

    def __str__(self) -> str:
        return self.summary()


_scorer_loader: Callable[[], Callable] | None = None


def install_scorer(loader: Callable[[], Callable]) -> None:
    """Make ``loader()`` the source of the function that scores data with a fit's parameters (the package's
    top module installs the workflow that does it, which sits above the result objects)."""
    global _scorer_loader
    _scorer_loader = loader


def scorer() -> Callable:
    if _scorer_loader is None:  # pragma: no cover - the package's top module always installs one
        raise RuntimeError("no scorer is installed; import cfa_tool first")
    return _scorer_loader()
