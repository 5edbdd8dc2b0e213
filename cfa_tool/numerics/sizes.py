"""The largest matrix the tool allocates, one rule for every route that would need a larger one (matrices of the
statistics by the statistics at many items: the full-information likelihood's weights of the patterns, the
full-information robust route's moments, the ordinal statistics' asymptotic covariance; and the stacks of one
matrix of the items by themselves for each pattern of missing answers, which full-information ML holds).  A route
beyond it is refused in one line before anything is made: never a MemoryError after minutes of work."""

from __future__ import annotations

from collections.abc import Callable

#: the largest matrix (in bytes, 8 a number) a route makes; 512 MiB, about 125 items for the full-information robust
#: route's k x k moments (k = p + p(p+1)/2)
MATRIX_BYTES = 1 << 29


def fits(side: int) -> bool:
    """Whether a side x side matrix of numbers is within :data:`MATRIX_BYTES` (read at each call)."""
    return side * side * 8 <= MATRIX_BYTES


def too_large_words(side: int, side_of: Callable[[int], int]) -> str:
    """'<size> GiB, more than the <limit> GiB this tool allocates to a matrix (about <n> items)' for a side x side
    matrix, n the most items whose ``side_of(items)`` still :func:`fits`."""
    most = 1
    while fits(side_of(most + 1)):
        most += 1
    return (f"{side * side * 8 / 2 ** 30:.1f} GiB, more than the {MATRIX_BYTES / 2 ** 30:.1f} GiB this tool "
            f"allocates to a matrix (about {most} items)")


def stack_fits(count: int, side: int) -> bool:
    """Whether a stack of ``count`` side x side matrices (one array) is within :data:`MATRIX_BYTES` (read at each
    call)."""
    return count * side * side * 8 <= MATRIX_BYTES


def stack_too_large_words(count: int, side: int) -> str:
    """'<size> GiB, more than the <limit> GiB this tool allocates to one array (at most <n> such matrices)' for a
    stack of ``count`` side x side matrices."""
    most = MATRIX_BYTES // (8 * side * side)
    return (f"{count * side * side * 8 / 2 ** 30:.1f} GiB, more than the {MATRIX_BYTES / 2 ** 30:.1f} GiB this tool "
            f"allocates to one array (at most {most:,} such matrices)")
