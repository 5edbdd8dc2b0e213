"""The Python entry points: ``fit`` and ``check``."""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from cfa_tool.data.matching import check_columns
from cfa_tool.data.moments import SampleMoments, sample_moments
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


def prepare(model: str | Path | Spec, data: pd.DataFrame | str | Path) -> tuple[Spec, SampleMoments]:
    """Parse the model, read the data, check one against the other and compute the moments."""
    spec = load_spec(model)
    frame, source = load_frame(data)
    columns = [str(c) for c in frame.columns]
    if len(set(columns)) != len(columns):
        dup = next(c for c in columns if columns.count(c) > 1)
        raise OptionError(f"{source}: the column name '{dup}' appears more than once")
    frame = frame.set_axis(columns, axis=1)
    check_columns(spec, columns, source)
    return spec, sample_moments(frame, spec.observed_names, source)


def fit(model: str | Path | Spec, data: pd.DataFrame | str | Path, **options) -> FitResult:
    """Fit a confirmatory factor model by maximum likelihood.

    ``model``: model text, a path to a model file, or a parsed Spec.
    ``data``: a DataFrame or a path to a CSV file.
    ``options``: ``information`` ('expected' or 'observed'), ``mi_threshold``,
    ``mi_top``, ``max_iterations``.
    """
    try:
        fit_options = FitOptions(**options)
    except TypeError as exc:
        raise OptionError(f"unknown option: {exc}") from None
    spec, moments = prepare(model, data)
    return fit_moments(spec, moments, fit_options)


def check(model: str | Path | Spec, data: pd.DataFrame | str | Path) -> Spec:
    """Parse and validate a model against data without fitting it."""
    from cfa_tool.assessment.identification import check_counting_rule
    from cfa_tool.model.parameters import build_parameter_table

    spec, _ = prepare(model, data)
    check_counting_rule(spec, build_parameter_table(spec))
    return spec
