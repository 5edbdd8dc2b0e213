"""Records of many rows held as columns: one frozen record whose fields hold a value per row each (arrays or tuples),
whose rows are built when they are read.  A frozen record per row costs about four times a plain object to build
in CPython 3.11 (its ``__init__`` stores each field through ``object.__setattr__``), and most rows of a fit are
read by its JSON alone, which reads the columns (issue 20: bench/README.md, fifteenth and sixteenth rounds)."""

from __future__ import annotations

from collections.abc import Sequence


class HeldRows(Sequence):
    """The rows of a record of columns as a sequence: ``len``, indexing (a slice gives a tuple of rows), iteration
    and equality with any sequence of the same rows.  A subclass is a frozen dataclass declared with ``eq=False``
    (this equality kept), whose ``_row(j)`` builds row ``j`` and whose ``rows`` holds one value per row."""

    rows: Sequence

    def __len__(self) -> int:
        return len(self.rows)

    def __getitem__(self, k):
        if isinstance(k, slice):
            return tuple(self._row(j) for j in range(len(self))[k])
        return self._row(range(len(self))[k])

    def __iter__(self):
        return (self._row(j) for j in range(len(self)))

    def __eq__(self, other) -> bool:
        return tuple(self) == tuple(other) if isinstance(other, Sequence) else NotImplemented

    __hash__ = None

    def _row(self, j: int):
        raise NotImplementedError
