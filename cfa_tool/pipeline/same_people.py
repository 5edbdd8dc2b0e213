"""Rows that share an id in the analysis: the same people's rows taken as independent cases, and what the sampling
design already allows for.  The words of the caution on repeated ids (pipeline.inputs.repeated_id_problems) that
say what the fit does with them: a fit of several rows of one person as independent rows gives standard errors and
tests that are too small (the rows' answers correlate, as clustered rows do: Kish 1965, the design effect),
unless each person's rows lie in one cluster of the design, whose sandwich sums a cluster's rows together before it
squares them (Williams 2000; Muthen & Satorra 1995) and so allows for any dependence within a cluster."""

from __future__ import annotations

import pandas as pd

from cfa_tool.data.filter_text import filter_text
from cfa_tool.data.moments import row_numbers
from cfa_tool.errors import printable
from cfa_tool.note_parts import Command, Note
from cfa_tool.numbers import count_text
from cfa_tool.options import Option, taken_by

#: the most values a column telling the occasions apart may hold among the rows analysed (waves, times, sessions)
OCCASIONS_AT_MOST = 20


def ids_outside_one_cluster(found: tuple, frame: pd.DataFrame, cluster: str | None) -> int | None:
    """How many of the repeated ids ``found`` (id, its rows' numbers) have rows in more than one cluster of
    ``cluster`` or a row without one; None without a cluster column (nothing is then allowed for)."""
    if cluster is None or cluster not in frame.columns:
        return None
    label = dict(zip(row_numbers(frame).tolist(), frame[cluster].tolist()))
    out = 0
    for _, rows in found:
        labels = [label.get(r) for r in rows]
        if any(v is None or v != v for v in labels) or len(set(labels)) > 1:
            out += 1
    return out


def occasion_filter(found: tuple, frame: pd.DataFrame, skip) -> str | None:
    """The row filter that keeps one occasion of the repeated ids ('wave = 1'): by the first column outside ``skip``
    (the id, the items, the group and design columns) with a value in every row of ``found``'s ids, at most
    :data:`OCCASIONS_AT_MOST` values among the rows, and no id twice at one value, the value of most rows; None when
    no column tells the occasions apart so (or its filter cannot be written: data.filter_text)."""
    numbers = row_numbers(frame)
    place = pd.Series(range(len(frame)), index=numbers)
    if not place.index.is_unique:
        return None
    ids = pd.Series([None] * len(frame), dtype=object)
    for value, rows in found:
        ids.iloc[place.reindex(list(rows)).dropna().astype(int).to_numpy()] = value
    at = ids.notna().to_numpy()
    for column in frame.columns:
        if column in skip or frame[column].dtype.kind not in "OUiuf":
            continue
        values = frame[column]
        chosen = values[at]
        if chosen.isna().any():
            continue
        try:
            distinct = values.dropna().nunique()
            twice = pd.DataFrame({"id": ids[at].to_numpy(), "at": chosen.to_numpy()}).duplicated().any()
        except TypeError:  # cells pandas cannot hash
            continue
        if not 2 <= distinct <= OCCASIONS_AT_MOST or twice:
            continue
        most = values.value_counts().index[0]
        written = filter_text(str(column), "=", most.item() if hasattr(most, "item") else most)
        if written is not None:
            return written
    return None


def taken_as_independent(outside: int | None, cluster: str | None, several: bool) -> str:
    """The sentence on what a fit does with the rows of the repeated ids in one group (``outside``: how many ids
    have rows in more than one cluster of ``cluster``, None without clusters; ``several``: more than one id)."""
    they = "these ids" if several else "this id"
    if outside == 0:
        return (f" The rows of each of {they} lie in one cluster of '{printable(cluster)}', so the cluster-robust "
                f"standard errors and scaled test allow for the rows of one id answering alike; the estimates count "
                f"each row as a case.")
    spread = (f" (the rows of {count_text(outside)} of {they} lie in more than one cluster of "
              f"'{printable(cluster)}', which the cluster-robust standard errors do not join)") if outside else ""
    return (f" If these rows are the same people's (answers at several times, say), or of one team or site whose "
            f"members answer alike, the analysis takes them as independent cases{spread}: the standard errors are "
            f"then too small and the tests reject too readily.")


def groups_taken_as_independent(across: int, several: bool, outside: int | None, cluster: str | None) -> str:
    """The sentence on the multi-group fit of ids whose rows lie in several groups (``across`` of them), which the
    groups' tests take for independent samples unless each id's rows lie in one cluster shared by the groups
    (``outside``: how many of the repeated ids do not, None without clusters): the design's sandwich then sums each
    cluster's rows of every group together (inference.design.groups_meat)."""
    if outside == 0:
        return (f" The groups share the clusters of '{printable(cluster)}', and the rows of each of "
                f"{'these ids' if several else 'this id'} lie in one cluster, so the cluster-robust standard errors "
                f"and scaled difference tests allow for the same people answering in several groups (each cluster's "
                f"rows of every group are summed together); the estimates count each row as a case.")
    spread = (f" (the rows of {count_text(outside)} of them lie in more than one cluster of '{printable(cluster)}', "
              f"which the cluster-robust standard errors do not join)") if outside else ""
    return (f" The multi-group fit and its tests take the groups for independent samples, which the same people "
            f"answering twice are not{spread}: the standard errors and difference tests are then wrong.")


def allow_for_them(id_column: str, occasions: str | None, outside: int | None, design: bool = True) -> Note:
    """The advice for rows that share an id in one group: one row per person by a row filter (``occasions``, the
    filter that keeps one occasion, when a column tells them apart: :func:`occasion_filter`), the id as the cluster
    (unless a cluster column already holds each id's rows, ``outside`` 0, or the command takes no sampling design,
    ``design`` False: replicate and explore, whose --cluster only draws the halves; hostile s25b: replicate --cluster
    respondent_id was advised '(--cluster respondent_id)'), or a model of the occasions side by side."""
    keep = (("keep one row per person with a row filter", Command(f" ({Option.KEEP.given(occasions)})"), ", or ")
            if occasions else ())
    cluster = (() if outside == 0 or not design else
               ("take the id for the cluster", Command(f" ({Option.CLUSTER.given(id_column)})", takes=taken_by(Option.CLUSTER),
                                                       elsewhere=f" (a fit of the model with {Option.CLUSTER.given(id_column)})"),
                " so that the standard errors and tests allow for the rows of one id, or "))
    return Note(keep + cluster + ("for the same people at several times, put each time's answers side by side in one "
                                  "row per person and fit one model of the times together (each item at each time "
                                  "its own indicator)",))
