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


#: what the package's top module installs: the parts of higher layers that objects made below them use
#: ("presenter": how results show themselves; "scorer": how a fit scores data with its parameters)
_loaders: dict[str, Callable] = {}


def install(loader: Callable[[], Presenter], name: str = "presenter") -> None:
    """Make ``loader()`` the source of ``name`` (the package's top module does this once per name)."""
    _loaders[name] = loader


def _installed(name: str):
    if name not in _loaders:  # pragma: no cover - the package's top module always installs them
        raise RuntimeError(f"no {name} is installed; import cfa_tool first")
    return _loaders[name]()


def presenter() -> Presenter:
    return _installed("presenter")


def scorer() -> Callable:
    """The function that scores data with a fit's parameters (a workflow, above the result objects)."""
    return _installed("scorer")


class Presentable:
    """``summary()``, ``_repr_html_()`` and ``str()`` for result objects, through the installed presenter."""

    def summary(self, width: int = 120) -> str:
        """The report as text, as the command line prints it."""
        return presenter().text(self, width)

    def _repr_html_(self) -> str:
        return presenter().notebook(self)

    def __str__(self) -> str:
        return self.summary()
