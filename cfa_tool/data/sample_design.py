"""The sampling design of a data set: weights, clusters and strata, read and checked.

Sampling weights are rescaled to sum to the number of rows analysed (in each group), so that
weights all equal to one constant give exactly the unweighted estimates and N stays the number
of rows for the test statistic (pseudo-maximum likelihood; Muthen & Satorra 1995).  Frequency
weights are counts: a row of weight 3 stands for three identical rows, and N is the sum of the
weights.  The effective sample size is Kish's (1965) (sum w)^2 / sum w^2.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from cfa_tool.errors import DataError, OptionError, printable
from cfa_tool.method import MissingData, WeightKind
from cfa_tool.suggest import close_names

SMALL_NUMBER_OF_CLUSTERS = 30  # below about 30-50 clusters cluster-robust errors are too small (common practice)


@dataclass(frozen=True)
class DesignColumns:
    """The columns a user named for the design (any of them may be None)."""

    weights: str | None = None
    cluster: str | None = None
    strata: str | None = None
    kind: WeightKind = WeightKind.SAMPLING

    @property
    def names(self) -> tuple[tuple[str, str], ...]:
        return tuple((what, name) for what, name in (("weights", self.weights), ("cluster", self.cluster),
                                                      ("strata", self.strata)) if name is not None)

    @property
    def robust(self) -> bool:
        """Whether the design calls for sandwich standard errors and a scaled test (everything but frequency
        weights alone, which are the same as repeated rows)."""
        return self.cluster is not None or self.strata is not None or (
            self.weights is not None and self.kind is WeightKind.SAMPLING)


@dataclass(frozen=True)
class RowDesign:
    """Weight, cluster and stratum of each row analysed, in the order of the rows."""

    weights: np.ndarray  # sampling weights rescaled to sum to the rows; frequency weights as given
    kind: WeightKind
    clusters: np.ndarray | None = field(default=None)  # integer code of each row's cluster
    strata: np.ndarray | None = field(default=None)  # integer code of each row's stratum
    given: tuple[float, float] = (0.0, 0.0)  # sum and sum of squares of the weights as given (before rescaling)

    @property
    def total(self) -> float:
        return float(self.weights.sum())


@dataclass(frozen=True)
class SampleDesign:
    """What the report states about the design used."""

    columns: DesignColumns
    rows: int
    sum_of_weights: float | None  # of the weights as given (before rescaling)
    effective_n: float | None  # Kish (1965)
    clusters: int | None
    strata: int | None
    group_rows: tuple[int, ...] = ()  # rows of each group when there are several (sampling weights rescaled in each)

    def to_dict(self) -> dict:
        c = self.columns
        return {"weights": c.weights, "weight_kind": c.kind.value if c.weights else None,
                "sum_of_weights": self.sum_of_weights, "effective_sample_size": self.effective_n,
                "cluster": c.cluster, "clusters": self.clusters, "strata_column": c.strata, "strata": self.strata,
                "rows": self.rows, "rows_per_group": list(self.group_rows) or None, "sandwich": c.robust}

    def sentence(self, full_information: bool = False, ordinal: bool = False,
                 correlations: str = "polychoric correlations", weighted_least_squares: bool = True) -> str:
        """The design in the words of a methods paragraph, as the code uses it (``ordinal``: of a fit to thresholds
        and ``correlations``, e.g. 'tetrachoric correlations', whose least-squares weights, when
        ``weighted_least_squares``, come from their design-based covariance)."""
        c = self.columns
        parts = []
        if c.weights is not None:
            if c.kind is WeightKind.FREQUENCY:
                parts.append(f"frequency weights from the column {c.weights} (sum {self.sum_of_weights:g}, taken as N)")
            else:
                within = (f"rescaled within each group to sum to its rows ({', '.join(map(str, self.group_rows))})"
                          if self.group_rows
                          else f"rescaled to sum to the {self.rows} rows")
                parts.append(f"sampling weights from the column {c.weights} (sum {self.sum_of_weights:.6g}, {within}; "
                             f"Kish's effective sample size {self.effective_n:.1f}), by "
                             + ("the weighted full-information likelihood (Asparouhov 2005)" if full_information else
                                f"weighted thresholds and {correlations} (pseudo-maximum likelihood; Muthen & "
                                f"Satorra 1995; Asparouhov 2005)" if ordinal else
                                "pseudo-maximum likelihood on weighted moments (Muthen & Satorra 1995)"))
        if c.cluster is not None:
            parts.append(f"{self.clusters} clusters defined by {c.cluster}")
        if c.strata is not None:
            parts.append(f"{self.strata} strata defined by {c.strata}")
        text = "The sampling design was taken into account: " + "; ".join(parts) + "."
        if not c.robust:
            return text
        # inference/design.design_meat: weighted sums per cluster (or per row), centred within strata, C/(C - 1)
        units = "clusters" if c.cluster else "rows"
        if c.strata is not None:
            spread = (f"the {units}' weighted sums centred within each stratum (the variance between {units} within "
                      f"strata, times C_h/(C_h - 1) for the C_h {units} of stratum h; Binder 1983)")
        else:
            spread = f"the {units}' weighted sums" + (" (times C/(C - 1) for C clusters; Binder 1983)" if c.cluster else "")
        if ordinal:
            weights = ("The least-squares weights come from the design-based covariance of the thresholds and "
                       "correlations; the standard errors and the scale-shifted test come from it too" if
                       weighted_least_squares else
                       "The standard errors and the scale-shifted test come from the design-based covariance of the "
                       "thresholds and correlations")
            return text + (f" {weights}: the covariance of their influence functions (the rows' contributions to their "
                           f"estimating equations) over {spread}.")
        return text + (f" Standard errors are sandwich estimates from the rows' score contributions over {spread}, and "
                       f"the chi-square is scaled accordingly.")

    def status(self) -> str:
        """The design in the status line: 'design: sampling weights (w; sum 912, Kish's effective N 783.2),
        clusters (school; 60)'."""
        c = self.columns
        parts = []
        if c.weights is not None:
            extra = (f"; sum {self.sum_of_weights:.6g}" + (f", Kish's effective N {self.effective_n:.1f}"
                                                           if c.kind is WeightKind.SAMPLING else ""))
            parts.append(f"{c.kind.label} ({c.weights}{extra})")
        if c.cluster is not None:
            parts.append(f"clusters ({c.cluster}; {self.clusters})")
        if c.strata is not None:
            parts.append(f"strata ({c.strata}; {self.strata})")
        return "design: " + ", ".join(parts)

    def weight_caution(self, free_parameters: int) -> str | None:
        """Why estimates and tests are in doubt when the weights are so uneven that Kish's effective sample size
        (Kish 1965) is small for the free parameters (None otherwise)."""
        if (self.columns.weights is None or self.columns.kind is not WeightKind.SAMPLING or self.effective_n is None
                or self.effective_n >= ROWS_PER_PARAMETER * free_parameters):
            return None
        return (f"The weights in '{self.columns.weights}' are so uneven that the {self.rows} rows count as about "
                f"{self.effective_n:.1f} (Kish's effective sample size) for {free_parameters} free parameters, fewer "
                f"than {ROWS_PER_PARAMETER} per parameter (common practice): the estimates rest on a few heavily weighted "
                f"rows, and the sandwich standard errors and scaled test mean little.")

    def caution(self, free_parameters: int) -> str | None:
        """Why cluster-robust standard errors are in doubt with this few clusters (None with enough of them): too
        optimistic below about 30-50 clusters (common practice), and singular with no more clusters than free
        parameters (the clusters' score sums then span too few dimensions)."""
        if self.clusters is None or self.clusters >= SMALL_NUMBER_OF_CLUSTERS:
            return None
        where = f"Only {self.clusters} clusters in '{self.columns.cluster}'"
        if self.clusters <= free_parameters:
            return (f"{where}, no more than the {free_parameters} free parameters: the cluster-robust covariance of "
                    f"the estimates is singular, so its standard errors and scaled test mean little.")
        return (f"{where}: cluster-robust standard errors and tests are too optimistic with fewer than about 30-50 "
                f"clusters (common practice).")


#: fewer effective rows per free parameter than this under sampling weights: a caution (at least 5 cases per
#: free parameter, Bentler & Chou 1987; common practice, a rule of thumb)
ROWS_PER_PARAMETER = 5


def design_columns(weights: str | None = None, cluster: str | None = None, strata: str | None = None,
                   weight_kind: WeightKind | str | None = None) -> DesignColumns | None:
    """The design options checked for type (None when none is given)."""
    for what, value in (("weights", weights), ("cluster", cluster), ("strata", strata)):
        if value is not None and not isinstance(value, str):
            raise OptionError(f"{what} must name a column (text), not {type(value).__name__}")
    if weight_kind is not None and weights is None:
        raise OptionError("a kind of weights is given but no weights column, so it cannot apply; name the column")
    kind = WeightKind.parse(weight_kind, "the kind of weights") if weight_kind is not None else WeightKind.SAMPLING
    if weights is None and cluster is None and strata is None:
        return None
    return DesignColumns(weights, cluster, strata, kind)


def check_design(frame: pd.DataFrame, columns: DesignColumns, model_variables: tuple[str, ...], group: str | None,
                 source: str) -> tuple[pd.DataFrame, list[str]]:
    """The rows to analyse (rows of weight zero left out, with a note) after every check of the design
    columns; each problem is an error naming the column and a data row."""
    names = [n for _, n in columns.names]
    if len(set(names)) != len(names):
        twice = next(n for n in names if names.count(n) > 1)
        raise OptionError(f"the column '{printable(twice)}' is named for two parts of the design; each needs its own")
    for what, name in columns.names:
        if name not in frame.columns:
            near = close_names(name, frame.columns)
            raise OptionError(f"{source}: there is no {what} column '{printable(name)}'"
                              + (f"; did you mean '{printable(near[0])}'?" if near else ""))
        if name in model_variables:
            raise OptionError(f"'{printable(name)}' is an item in the model and cannot also be the {what} column")
        if name == group:
            raise OptionError(f"'{printable(name)}' is the group column and cannot also be the {what} column")
    rows = _data_rows(frame)
    notes: list[str] = []
    if columns.weights is not None:
        w = _weights(frame, columns, source, rows)
        zero = w == 0
        if zero.all():
            raise DataError(f"{source}: every weight in column '{printable(columns.weights)}' is zero, so no row counts")
        if zero.any():
            before = frame
            frame = frame.loc[~zero]
            notes.append(f"{int(zero.sum())} rows have weight 0 in '{columns.weights}' and were left out of the "
                         f"estimation")
            rows = rows[~zero]
            if group is not None and group in frame.columns:
                gone = sorted(set(_labels(before[group]).dropna()) - set(_labels(frame[group]).dropna()))
                if gone:
                    notes.insert(0, f"every row of group{'s' if len(gone) > 1 else ''} "
                                    f"{', '.join(repr(g) for g in gone)} of '{group}' has weight 0, so "
                                    f"{'they are' if len(gone) > 1 else 'it is'} not in the analysis")
    for what, name in (("cluster", columns.cluster), ("stratum", columns.strata)):
        if name is not None:
            absent = frame[name].isna().to_numpy()
            if absent.any():
                raise DataError(f"{source}: column '{printable(name)}', data row {rows[np.argmax(absent)]}: no {what} "
                                f"given; every row needs one (a row filter, --keep, can leave such rows out)")
    if columns.cluster is not None and columns.strata is not None:
        pairs = pd.DataFrame({columns.cluster: _labels(frame[columns.cluster]),
                              columns.strata: _labels(frame[columns.strata])}).drop_duplicates()
        shared = pairs[columns.cluster].duplicated()
        if shared.any():
            cluster = pairs[columns.cluster][shared.to_numpy()].iloc[0]
            raise DataError(f"{source}: cluster '{printable(cluster)}' of column '{printable(columns.cluster)}' lies in "
                            f"more than one stratum of '{printable(columns.strata)}'; clusters must be nested in strata")
    if columns.cluster is not None and group is not None:
        labelled = frame.loc[frame[group].notna()]
        pairs = pd.DataFrame({columns.cluster: _labels(labelled[columns.cluster]),
                              group: _labels(labelled[group])}).drop_duplicates()
        shared = pairs[columns.cluster].duplicated()
        if shared.any():
            cluster = pairs[columns.cluster][shared.to_numpy()].iloc[0]
            raise DataError(f"{source}: cluster '{printable(cluster)}' of column '{printable(columns.cluster)}' has rows in "
                            f"more than one group of '{printable(group)}'; the groups are fitted as independent samples, "
                            f"so every cluster must lie within one group (groups that cross clusters, domains of the "
                            f"sample, are not yet analysed with their clusters): fit each group alone with its clusters "
                            f"(--keep \"{printable(group)} = ...\"), or group by a column that clusters nest in")
    if columns.cluster is not None:
        names = pd.unique(_labels(frame[columns.cluster]))
        if len(names) < 2:
            raise DataError(f"{source}: column '{printable(columns.cluster)}' names a single cluster "
                            f"('{printable(names[0])}'), and cluster-robust standard errors need at least two (and "
                            f"about 30 or more to be trusted); remove the cluster column or give the right one")
    if columns.strata is not None:
        units = _labels(frame[columns.cluster]) if columns.cluster is not None else pd.Series(np.arange(len(frame)),
                                                                                             index=frame.index)
        per_stratum = units.groupby(_labels(frame[columns.strata]).to_numpy()).nunique()
        single = per_stratum[per_stratum < 2]
        if len(single):
            raise DataError(f"{source}: stratum '{printable(single.index[0])}' of column '{printable(columns.strata)}' "
                            f"has a single {'cluster' if columns.cluster else 'row'}, so its variance cannot be estimated; "
                            f"merge it with a neighbouring stratum")
    from cfa_tool.data.labels import label_notes

    for part, unit, name in (("cluster", "cluster", columns.cluster), ("strata", "stratum", columns.strata)):
        if name is not None:
            notes += label_notes(frame, name, part=part, unit=unit)
    return frame, notes


def _labels(column: pd.Series) -> pd.Series:
    """A column of cluster, stratum or group names read as labels are read everywhere (spaces at the ends and
    Unicode forms ignored; cfa_tool.data.labels), missing values kept missing."""
    from cfa_tool.data.labels import label_text

    return column.map({v: label_text(v) for v in pd.unique(column.dropna())})  # each different name once


def _data_rows(frame: pd.DataFrame) -> np.ndarray:
    from cfa_tool.data.moments import row_numbers

    return row_numbers(frame)


def _weights(frame: pd.DataFrame, columns: DesignColumns, source: str, rows: np.ndarray) -> np.ndarray:
    name = columns.weights
    where = f"{source}: weights column '{printable(name)}', data row"
    column = frame[name]
    truth = (np.ones(len(column), dtype=bool) if column.dtype.kind == "b" or str(column.dtype) == "boolean"
             else column.map(lambda v: isinstance(v, (bool, np.bool_))).to_numpy(dtype=bool))
    truth = truth & column.notna().to_numpy()
    if truth.any():  # TRUE/FALSE would be read as 1/0: weights must be numbers
        first = int(np.argmax(truth))
        raise DataError(f"{where} {rows[first]}: holds {str(column.iloc[first]).upper()}, a TRUE/FALSE value; weights "
                        f"must be numbers (is it the right column?)")
    values = pd.to_numeric(column, errors="coerce").to_numpy(dtype=float)
    text = np.isnan(values) & frame[name].notna().to_numpy()
    if text.any():
        raise DataError(f"{where} {rows[np.argmax(text)]}: '{printable(str(column.iloc[np.argmax(text)]))[:40]}' "
                        f"is not a number")
    for bad, what in ((np.isnan(values), "no weight (every row needs one; leave such rows out with --keep)"),
                      (np.isinf(values), "an infinite weight"), (values < 0, "a negative weight")):
        if bad.any():
            raise DataError(f"{where} {rows[np.argmax(bad)]}: {what}")
    if columns.kind is WeightKind.FREQUENCY:
        fraction = values != np.round(values)
        if fraction.any():
            raise DataError(f"{where} {rows[np.argmax(fraction)]}: frequency weights count rows and must be whole "
                            f"numbers, not {values[np.argmax(fraction)]:g} (for sampling weights leave out the kind)")
        if values.sum() > MAX_FREQUENCY_TOTAL:
            raise DataError(f"{source}: the frequency weights in column '{printable(name)}' count {values.sum():.3g} rows, "
                            f"more than the {MAX_FREQUENCY_TOTAL:,.0f} the tool computes with")
    elif values.max(initial=0.0) > 0 and not WEIGHT_RANGE[0] <= values.max() <= WEIGHT_RANGE[1]:
        raise DataError(f"{source}: the sampling weights in column '{printable(name)}' reach {values.max():.3g}, outside "
                        f"the range the tool computes with ({WEIGHT_RANGE[0]:g} to {WEIGHT_RANGE[1]:g}); sampling weights "
                        f"count only relative to each other, so divide the column by its mean")
    return values


#: the largest sampling weight must lie in this range (the weights are rescaled, but sums of squares of far
#: smaller or larger numbers leave the range of floating-point numbers)
WEIGHT_RANGE = (1e-100, 1e100)
#: frequency weights may count at most this many rows (fit indices of larger N are not computed reliably)
MAX_FREQUENCY_TOTAL = 1e9


def row_design(frame: pd.DataFrame, columns: DesignColumns, kept: np.ndarray) -> RowDesign:
    """The design of the rows ``kept`` (a mask over ``frame``), sampling weights rescaled to sum to their number."""
    if columns.weights is not None:
        w = pd.to_numeric(frame[columns.weights]).to_numpy(dtype=float)[kept]
    else:
        w = np.ones(int(kept.sum()))
    given = (float(w.sum()), float(w @ w))
    if columns.kind is WeightKind.SAMPLING:
        w = w * (len(w) / w.sum())
    codes = [pd.factorize(_labels(frame[name]).to_numpy()[kept])[0] if name is not None else None
             for name in (columns.cluster, columns.strata)]
    return RowDesign(w, columns.kind, *codes, given=given)


def kept_rows(frame: pd.DataFrame, names: tuple[str, ...], source: str, missing) -> np.ndarray:
    """The rows sample moments use: complete rows (listwise) or rows with any answer (full information)."""
    from cfa_tool.data.moments import numeric_columns

    answered = ~np.isnan(numeric_columns(frame, names, source))
    if missing == MissingData.FULL_INFORMATION:
        return answered.any(axis=1)
    return answered.all(axis=1)


def with_row_design(moments, design: RowDesign):
    """``moments`` (SampleMoments of the same rows, already weighted by :func:`cfa_tool.data.moments.sample_moments`)
    with the design attached; with frequency weights N is the sum of the weights."""
    n_obs = int(round(design.total)) if design.kind is WeightKind.FREQUENCY else moments.n_obs
    return replace(moments, n_obs=n_obs, design=design)


def design_summary(frame: pd.DataFrame, columns: DesignColumns, moments: list) -> SampleDesign:
    """The design as the report states it, over the rows analysed in every group (``moments``: each group's
    SampleMoments or OrdinalMoments, carrying its RowDesign)."""
    rows = sum(len(m.design.weights) for m in moments)
    total = square = None
    if columns.weights is not None:
        total = sum(m.design.given[0] for m in moments)
        square = sum(m.design.given[1] for m in moments)
    kish = total ** 2 / square if total is not None and columns.kind is WeightKind.SAMPLING else total
    clusters = sum(len(np.unique(m.design.clusters)) for m in moments) if columns.cluster else None
    strata = len(pd.unique(_labels(frame[columns.strata]))) if columns.strata else None
    group_rows = tuple(len(m.design.weights) for m in moments) if len(moments) > 1 else ()
    return SampleDesign(columns, rows, total, kish, clusters, strata, group_rows)



def apply_design(groups: list, frame: pd.DataFrame, group_column: str | None, names: tuple[str, ...], source: str,
                 columns: DesignColumns, missing) -> list:
    """Each group's (label, SampleMoments) with the design of its rows attached."""
    out = []
    for label, moments in groups:
        part = frame
        if group_column is not None:
            keys = _labels(frame[group_column])
            part = frame.loc[(keys == label).to_numpy()]
        kept = kept_rows(part, names, source, missing)
        out.append((label, with_row_design(moments, row_design(part, columns, kept))))
    return out
