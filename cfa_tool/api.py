"""The Python entry points: ``fit`` and ``check``."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pandas as pd

from cfa_tool.data.groups import split_moments
from cfa_tool.data.matching import check_columns
from cfa_tool.data.moments import SampleMoments, missing_summary, sample_moments
from cfa_tool.data.readers import read_table
from cfa_tool.errors import OptionError
from cfa_tool.fitting import FitOptions, fit_moments
from cfa_tool.language.parser import parse_model, read_model_file
from cfa_tool.language.spec import Spec
from cfa_tool.results import FitResult


def load_spec(model: str | Path | Spec) -> Spec:
    """A Spec from model text, a path to a model file, or a Spec."""
    if isinstance(model, Spec):
        return model
    if isinstance(model, Path):
        return read_model_file(model)
    if isinstance(model, str):
        if "\n" not in model and (model.endswith(".cfa") or Path(model).is_file()):
            return read_model_file(model)
        return parse_model(model, source="<model text>")
    raise OptionError(f"model must be model text, a path or a parsed specification, not {type(model).__name__}")


def load_frame(data: pd.DataFrame | str | Path) -> tuple[pd.DataFrame, str]:
    if isinstance(data, pd.DataFrame):
        return data, "<data frame>"
    if isinstance(data, (str, Path)):
        return read_table(data), str(data)
    raise OptionError(f"data must be a data frame or a path to a data file, not {type(data).__name__}")


def read_inputs(model: str | Path | Spec, data: pd.DataFrame | str | Path) -> tuple[Spec, pd.DataFrame, str]:
    """Parse the model, read the data and check one against the other."""
    spec = load_spec(model)
    frame, source = load_frame(data)
    columns = [str(c) for c in frame.columns]
    if len(set(columns)) != len(columns):
        dup = next(c for c in columns if columns.count(c) > 1)
        raise OptionError(f"{source}: the column name '{dup}' appears more than once")
    frame = frame.set_axis(columns, axis=1)
    check_columns(spec, columns, source)
    return spec, frame, source


def moments_for(spec: Spec, frame: pd.DataFrame, source: str, group: str | None = None,
                reference_group: str | None = None, missing: str = "listwise") -> tuple[list[tuple[str | None, SampleMoments]], list[str]]:
    """Per-group (or single) sample moments of the model variables, with notes on rows left out."""
    notes: list[str] = []
    if group is None:
        if reference_group is not None:
            raise OptionError("a reference group needs a group column")
        return [(None, sample_moments(frame, spec.observed_names, source, missing=missing))], notes
    if group in spec.observed_names:
        raise OptionError(f"'{group}' is an indicator in the model and cannot also be the group column")
    groups, no_group = split_moments(frame, group, spec.observed_names, source, reference_group, missing)
    if no_group:
        notes.append(f"{no_group} rows have no value in the group column '{group}' and were left out")
    return groups, notes


def prepare(model: str | Path | Spec, data: pd.DataFrame | str | Path) -> tuple[Spec, SampleMoments]:
    """Single-group moments of a model's variables (see :func:`moments_for` for groups)."""
    spec, frame, source = read_inputs(model, data)
    return spec, sample_moments(frame, spec.observed_names, source)


def fit(model: str | Path | Spec, data: pd.DataFrame | str | Path, group: str | None = None,
        reference_group: str | None = None, **options) -> FitResult:
    """Fit a confirmatory factor model by maximum likelihood.

    ``model``: model text, a path to a model file, or a parsed Spec.
    ``data``: a DataFrame or a path to a CSV file.
    ``group``: a column whose values define groups (multi-group fit with a mean
    structure); ``reference_group``: the group whose factor means are fixed at
    zero (default: the first label in sorted order).
    ``options``: ``information`` ('expected' or 'observed'), ``mi_threshold``,
    ``mi_top``, ``max_iterations``.
    """
    fit_options = make_options(options)
    spec, frame, source = read_inputs(model, data)
    groups, notes = moments_for(spec, frame, source, group, reference_group, fit_options.missing)
    result = fit_moments(spec, groups, fit_options, group_column=group)
    summary = missing_summary(frame, spec.observed_names)
    if fit_options.missing == "full-information":
        dropped = sum(m.rows_dropped for _, m in groups)
        if dropped:
            notes.append(f"{dropped} rows answered none of the model variables and were left out")
    return replace(result, warnings=tuple(notes) + result.warnings,
                   missing_data=summary if summary["n_patterns"] > 1 or not all(summary["coverage"].values()) else None)


def make_options(options: dict) -> FitOptions:
    try:
        return FitOptions(**options)
    except TypeError as exc:
        raise OptionError(f"unknown option: {exc}") from None


def check(model: str | Path | Spec, data: pd.DataFrame | str | Path, group: str | None = None) -> Spec:
    """Parse and validate a model against data without fitting it."""
    from cfa_tool.assessment.identification import check_counting_rule
    from cfa_tool.model.parameters import build_parameter_table

    spec, frame, source = read_inputs(model, data)
    groups, _ = moments_for(spec, frame, source, group)
    labels = tuple(label for label, _ in groups) if group is not None else None
    check_counting_rule(spec, build_parameter_table(spec, labels))
    return spec
