"""A saved fit's estimate rows read back: the one reader of the 'estimates' of a ``fit --json`` result.

Each row of a saved fit names a parameter (kind, variables, group) and gives its estimate.  Every command that
uses a saved fit's values (scores from a saved fit, simulation and power simulation from a fitted population,
the report's re-check of a saved result) reads the rows here, by one rule:

* :func:`saved_rows` reads the rows alone: each one must be a row (a kind, a list of variables, a group or
  none) whose estimate is a finite number, and no parameter may have two rows;
* :func:`values_on_model` places them on a model's parameter table: every parameter of the model needs its row,
  every row needs its parameter (kinds the caller sets aside, as intercepts a population does not use, apart), a
  value the model fixes must be the one the row gives, and the values the model holds equal must be equal.  The
  free parameters are read back from the rows and every value is recomputed from them (a parameter's value is
  offset + sum of coefficient x free parameter, the table's linear map), so the numbers are the fit's own.

Whatever cannot be placed is named in a one-line error (exit 2: the saved file is the input that cannot be used).
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field

import numpy as np

from cfa_tool.numbers import user_number
from cfa_tool.errors import OptionError, clipped
from cfa_tool.version import check_written_version
from cfa_tool.model.description import parameter_words
from cfa_tool.model.parameters import ParameterTable

_COVARIANCES = ("factor_covariance", "residual_covariance")

#: how far a saved value may lie from the model's fixed value or from its recomputation (relative to 1 + |value|)
TOLERANCE = 1e-8

AGAIN = "fit the model again rather than edit its result"


def saved_fit_payload(payload: object, source: str, marked: bool = True) -> dict:
    """``payload`` when it is a fit's JSON result (``fit --json``: a dict with an 'estimates' list and, when
    ``marked``, cfa-tool's mark; a fit result's to_dict() has no mark), else the one error every command that reads
    a saved fit gives (scores --from-fit, simulate and power-simulation --population-from), naming ``source``."""
    if (not isinstance(payload, dict) or not isinstance(payload.get("estimates"), list)
            or marked and payload.get("tool") != "cfa-tool"):
        raise OptionError(f"{source} is not the JSON result of a fit by cfa-tool (fit --json, or a fit result's "
                          f"to_dict() saved as JSON)")
    if payload.get("tool") == "cfa-tool":  # a file fit --json wrote (a fit result's to_dict() names no version)
        check_written_version(payload, source)
    return payload


@dataclass(frozen=True)
class SavedRow:
    """One estimate row of a saved fit: the parameter it names and its value; ``number`` is its place (from 1)."""

    kind: str
    variables: tuple[str, ...]
    group: str | None
    estimate: float
    number: int

    @property
    def key(self) -> tuple:
        """The parameter the row names: a covariance's two variables in either order are one parameter."""
        return key_of(self.kind, self.variables, self.group)

    def words(self) -> str:
        return parameter_words(self.kind, self.variables, self.group)


def key_of(kind: str, variables: tuple[str, ...], group: str | None) -> tuple:
    return kind, tuple(sorted(variables)) if kind in _COVARIANCES else tuple(variables), group


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool) and bool(np.isfinite(value))


def _shown(value) -> str:
    return clipped(json.dumps(value, allow_nan=True), 30)


def saved_rows(rows, source: str) -> tuple[SavedRow, ...]:
    """The rows of a saved fit's 'estimates', each checked to be readable: an error naming the first row that is
    not a row of kind, variables and estimate, whose estimate is not a finite number (text such as "0.8", true,
    null, NaN, Infinity), or that repeats a parameter another row gave."""
    if not isinstance(rows, list):
        raise OptionError(f"{source}: its 'estimates' is not a list of rows; {AGAIN}")
    out, seen = [], {}
    for number, row in enumerate(rows, 1):
        names = row.get("variables") if isinstance(row, dict) else None
        group = row.get("group") if isinstance(row, dict) else None
        if not isinstance(row, dict) or not isinstance(row.get("kind"), str) or not isinstance(names, list) \
                or not names or not all(isinstance(v, str) for v in names) or not isinstance(group, (str, type(None))):
            raise OptionError(f"{source}: estimate row {number} lacks its kind, variables or group; {AGAIN}")
        value = row.get("estimate")
        words = parameter_words(row["kind"], tuple(names), group)
        if not _is_number(value):
            raise OptionError(f"{source}: the estimate of {words} is {_shown(value)}, not a number; write numbers "
                              f"without quotes, or {AGAIN}")
        saved = SavedRow(row["kind"], tuple(names), group, float(value), number)
        if saved.key in seen:
            raise OptionError(f"{source}: estimate rows {seen[saved.key]} and {number} both give {words}; {AGAIN}")
        seen[saved.key] = number
        out.append(saved)
    return tuple(out)


@dataclass(frozen=True, eq=False)
class SavedValues:
    """A saved fit's values on a model's parameter table: ``theta`` its free parameters, ``values`` every
    parameter's value in table order (free and fixed), ``derived`` the positions of fixed parameters whose saved
    value follows from the others (an ordinal fit's residual variances, not checked against the model's fixed
    value), and ``aside`` the rows of the kinds the caller set aside, by :func:`key_of`."""

    table: ParameterTable
    theta: np.ndarray
    values: np.ndarray
    derived: frozenset
    aside: dict = field(repr=False)

    def aside_value(self, kind: str, variables: tuple[str, ...], group: str | None = None) -> float | None:
        row = self.aside.get(key_of(kind, variables, group))
        return None if row is None else row.estimate

    def thresholds(self, group: str | None = None) -> dict[str, np.ndarray]:
        """The threshold rows set aside, per item in step order (steps '1', '2', ...); an error when an item's
        steps are not numbered from 1 without gaps."""
        steps: dict[str, dict[int, float]] = {}
        for (kind, names, g), row in self.aside.items():
            if kind == "threshold" and g == group:
                step = int(names[1]) if len(names) == 2 and names[1].isdigit() else 0
                steps.setdefault(names[0], {})[step] = row.estimate
        out = {}
        for item, by_step in steps.items():
            if sorted(by_step) != list(range(1, len(by_step) + 1)):
                raise OptionError(f"the thresholds of {item} are not numbered 1, 2, ... in the saved fit; {AGAIN}")
            out[item] = np.array([by_step[s] for s in range(1, len(by_step) + 1)])
        return out


def values_on_model(rows: tuple[SavedRow, ...], table: ParameterTable, source: str, model: str, *,
                    derived: frozenset = frozenset(), aside: tuple[str, ...] = ()) -> SavedValues:
    """The saved rows (:func:`saved_rows`) placed on ``table``, the parameter table of the model file ``model``:
    an error naming the first parameter without a row, row without a parameter (rows of the kinds in ``aside``
    apart; thresholds only of the model's items), value the model fixes differently (positions in ``derived``
    apart) or free value that the model's equalities contradict.  Rows of another group than the table's are
    rows without a parameter."""
    by_key = {row.key: row for row in rows}
    groups = table.groups if table.multigroup else (None,)
    placed: set = set()
    theta = np.full(table.n_free, np.nan)
    values = np.full(len(table.parameters), np.nan)
    other = "give the model file the fit was made with"
    for k, par in enumerate(table.parameters):
        group = groups[par.group]
        key = key_of(par.kind, par.variables, group)
        row = by_key.get(key)
        words = parameter_words(par.kind, par.variables, group)
        if row is None:
            raise OptionError(f"{source} has no estimate of {words}, a parameter of the model {model}: the fit is of "
                              f"another model; {other}")
        placed.add(key)
        values[k] = value = row.estimate
        if not par.terms and k not in derived and abs(value - par.offset) > TOLERANCE * (1.0 + abs(value)):
            raise OptionError(f"{source} gives {user_number(value)} for {words} where the model file {model} fixes it at "
                              f"{user_number(par.offset)}: the fit was made with another scale or other fixed values (a factor's "
                              f"automatic marker is its first item not declared reversed); fit the model again and "
                              f"use that result")
        if len(par.terms) == 1 and par.terms[0][1] != 0 and np.isnan(theta[par.terms[0][0]]):
            index, coefficient = par.terms[0]
            theta[index] = (value - par.offset) / coefficient
    kept = {}
    for row in rows:
        if row.key in placed:
            continue
        if row.kind in aside and (row.kind != "threshold" or row.variables[0] in table.observed):
            kept[row.key] = row
            continue
        raise OptionError(f"{source} gives {row.words()} (estimate row {row.number}), which the model {model} does "
                          f"not have: the fit is of another model; {other}")
    if np.isnan(theta).any():  # a free parameter that appears only in sums of others (not written by fits)
        missing = next(label for label, v in zip(table.free_labels, theta) if np.isnan(v))
        raise OptionError(f"{source}: the value of {missing} cannot be read from its estimates; {other}")
    for k, par in enumerate(table.parameters):
        again = par.offset + sum(c * theta[i] for i, c in par.terms)
        if k not in derived and abs(again - values[k]) > TOLERANCE * (1.0 + abs(values[k])):
            words = parameter_words(par.kind, par.variables, groups[par.group])
            raise OptionError(f"{source} gives {user_number(values[k])} for {words} where the model {model} makes it {user_number(again)} "
                              f"(it holds it equal to another parameter): the fit is of another model; {other}")
    return SavedValues(table, theta, values, derived, kept)
