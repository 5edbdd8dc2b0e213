"""A group column's distinct cells are read once (data.labels.distinct_cells, speed2-s17): the group keys, the labels
and the notes on labels are those of the rule applied cell by cell (written out here as it stood before), on random
columns of text, numbers and Python objects; and a fit reads the labels of a column of 301 cells of two texts a few
times, not 301 times per reading."""

from __future__ import annotations

import unicodedata
from collections import Counter

import numpy as np
import pandas as pd
import pytest

from cfa_tool.data import labels as L
from cfa_tool.data.groups import group_keys, group_labels


def _old_keys(cells: pd.Series) -> pd.Series:
    return cells.map(lambda v: None if pd.isna(v) else (L.label_text(v) or None))


def _old_merged(values):
    raw: dict = {}
    trimmed = set()
    for v in values:
        label = L.label_text(v)
        raw.setdefault(label, Counter())[str(v)] += 1
        if isinstance(v, str) and v != label:
            trimmed.add(label)
    return [(label, sorted(texts.items())) for label, texts in raw.items() if len(texts) > 1 or label in trimmed]


def _old_look_alike(values):
    by_letters: dict = {}
    for label, n in Counter(L.label_text(v) for v in values).items():
        bare = "".join(ch for ch in label if unicodedata.category(ch) != "Cf")
        by_letters.setdefault(bare, []).append((label, n))
    return [sorted(found) for _, found in sorted(by_letters.items()) if len(found) > 1]


def _old_case_variants(values):
    by_fold: dict = {}
    for label, n in Counter(L.label_text(v) for v in values).items():
        by_fold.setdefault(label.casefold(), []).append((label, n))
    return [sorted(found) for _, found in sorted(by_fold.items()) if len(found) > 1]


def _old_no_answer(values):
    from cfa_tool.data.non_answers import says_no_answer

    counts = Counter(L.label_text(v) for v in values if isinstance(v, str))
    return [(label, n) for label, n in counts.items() if says_no_answer(label)]


TEXTS = ["north", "North", "north ", " north", "north\u200b", "\u200b", " ", "", "caf\u00e9", "cafe\u0301", "N/A",
         "south", "2", "2.0", "\u202enorth", "no\u200dnorth", "Refused"]


def _column(rng: np.random.Generator, kind: str, n: int) -> pd.Series:
    if kind == "text":
        cells = [TEXTS[k] for k in rng.integers(0, len(TEXTS), n)]
        return pd.Series(cells, dtype=object)
    if kind == "text with gaps":
        cells = [None if r < 0.2 else np.nan if r < 0.3 else np.str_(TEXTS[k]) if r < 0.5 else TEXTS[k]
                 for r, k in zip(rng.random(n), rng.integers(0, len(TEXTS), n))]
        return pd.Series(cells, dtype=object)
    if kind in ("pandas text", "categories", "nullable text"):  # pandas' own types: 'str' is how pandas 3 reads text
        cells = [None if r < 0.2 else TEXTS[k] for r, k in zip(rng.random(n), rng.integers(0, len(TEXTS), n))]
        return pd.Series(cells, dtype={"pandas text": "str", "categories": "category", "nullable text": "string"}[kind])
    if kind == "nullable numbers":
        return pd.Series(rng.choice([1.0, 2.0, 2.5, np.nan], n)).astype("Float64")
    if kind == "floats":
        return pd.Series(rng.choice([1.0, 2.0, 2.5, np.nan, 0.0, 1e20, -3.0], n))
    if kind == "floats with -0.0":
        return pd.Series(rng.choice([0.0, -0.0, 1.0, np.nan], n))
    if kind == "integers":
        return pd.Series(rng.integers(-2, 4, n))
    if kind == "truth values":
        return pd.Series(rng.random(n) < 0.5)
    # Python objects mixed as a data frame built in Python may hold them: 1, 1.0 and True are one key to a hash table
    pool = [1, 1.0, True, False, 0, -0.0, 0.0, "1", "True", None, pd.NA, np.nan, np.int64(1), np.float64(2.0), "x ",
            "x", 2.5]
    return pd.Series([pool[k] for k in rng.integers(0, len(pool), n)], dtype=object)


KINDS = ["text", "text with gaps", "floats", "floats with -0.0", "integers", "truth values", "mixed objects",
         "pandas text", "categories", "nullable text", "nullable numbers"]


@pytest.mark.parametrize("kind", KINDS)
def test_distinct_cells_give_what_the_rule_gives_cell_by_cell(kind):
    rng = np.random.default_rng(KINDS.index(kind))
    for _ in range(60):
        cells = _column(rng, kind, int(rng.integers(0, 40)))
        cells.index = rng.permutation(len(cells)) + 10  # an index that is not the positions
        cells.attrs["source"] = "data.csv"  # what a reader may keep on a column
        pd.testing.assert_series_equal(group_keys(cells), _old_keys(cells))
        assert group_keys(cells).attrs == _old_keys(cells).attrs
        present = cells.dropna()
        assert L.merged_labels(present) == _old_merged(present)
        assert L.look_alike_labels(present) == _old_look_alike(present)
        assert L.case_variants(present) == _old_case_variants(present)
        assert L.no_answer_labels(present) == _old_no_answer(present)
        distinct, places = L.distinct_cells(cells)
        assert len(places) == len(cells)
        assert all(type(d) is type(v) or isinstance(v, str) for d, v in zip(np.array(distinct, dtype=object)[places]
                                                                             if len(cells) else [], cells))


def test_a_column_of_objects_keeps_one_and_true_apart():
    cells = pd.Series([1, True, 1.0, np.nan, "\u200b"], dtype=object)
    keys = group_keys(cells)
    assert keys.tolist()[:3] == ["1", "True", "1"] and keys.isna().tolist() == [False, False, False, True, True]


def test_labels_of_a_column_of_two_texts_are_read_once_per_distinct_cell(monkeypatch):
    import cfa_tool.data.groups as groups

    frame = pd.DataFrame({"school": ["Pasteur", "Grant-White"] * 150 + ["Pasteur"], "x": np.arange(301.0)})
    calls = []
    original = L.label_text

    def counted(value):
        calls.append(value)
        return original(value)

    monkeypatch.setattr(L, "label_text", counted)
    monkeypatch.setattr(groups, "label_text", counted)
    assert group_labels(frame, "school", "data") == ["Grant-White", "Pasteur"]
    keys = group_keys(frame["school"])
    assert keys.tolist() == frame["school"].tolist()
    assert len(calls) <= 12  # a few readings of two distinct cells (before: 301 per reading, 900 and more)


def test_a_list_in_the_group_column_is_still_refused(hs_data):
    import cfa_tool
    from cfa_tool.errors import DataError

    frame = hs_data.copy()
    frame["school"] = frame["school"].astype(object)
    frame.at[frame.index[3], "school"] = ["Pasteur"]
    with pytest.raises(DataError, match="school"):
        cfa_tool.fit("factor f: x1, x2, x3\n", frame, group="school")
