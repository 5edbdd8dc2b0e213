"""The part a column plays in the data by its name (the sampling design, ids, groups, who answered), declared once:
explore leaves such columns out of its default items, and the cautions on rows take a column named as an id for the
rows' id when none was given (:func:`id_named_column`)."""

from __future__ import annotations

import re

import pandas as pd

from cfa_tool.data.kept_rows import FINISHED_COLUMNS

#: words that name a column's part in the data other than answers (the sampling design, ids, groups, who answered): a column
#: whose name is one of them, or has one as a word of its own ('final_weight', 'respondent_id'; 'w1' has none), is
#: left out of explore's default items
COLUMN_ROLE_WORDS = {
    "weights": ("weight", "weights", "wt", "wgt", "w", "fw", "pw", "pweight", "fweight", "freq", "frequency"),
    "clusters": ("cluster", "clusters", "psu"),
    "strata": ("stratum", "strata"),
    "ids": ("id", "ids", "identifier"),
    "groups": ("group", "grp"),
    # who answered (new-user trial s11: a clinic's age column was explored as an item)
    "the respondents' particulars": ("age", "sex", "gender", "dob", "birthyear"),
    # the records a survey platform adds to an export: how far and how long a respondent answered, where from
    "survey records": ("progress", *FINISHED_COLUMNS, "duration", "latitude", "longitude", "locationlatitude",
                       "locationlongitude"),
}
_ROLE_OF_WORD = {word: role for role, words in COLUMN_ROLE_WORDS.items() for word in words}

#: the key of COLUMN_ROLE_WORDS of a column named as an id
IDS = "ids"


def column_role(name: str) -> str | None:
    """The part a column plays by its name (a key of COLUMN_ROLE_WORDS), or None for a column that may hold
    answers.  The name is split into words at spaces, underscores, dots and hyphens."""
    for word in re.split(r"[\s_.\-]+", name.casefold()):
        if word in _ROLE_OF_WORD:
            return _ROLE_OF_WORD[word]
    return None


def id_named_column(frame: pd.DataFrame, skip) -> str | None:
    """The column of ``frame`` (the rows analysed) that the tool takes for the rows' id when none was given, by the
    one rule of names explore leaves out as ids (:func:`column_role`: 'employee_id', 'respondent id'), when its ids
    repeat among the rows: None when no column outside ``skip`` (the model's variables, the group column) is named
    so, or one of them holds a different value in every row that has one (the rows' id: a repeated 'team_id' beside
    a unique 'employee_id' names teams, not rows).  Of several so named, all repeating, the one of most distinct
    values (the people's id before the teams')."""
    named = [c for c in frame.columns if isinstance(c, str) and c not in skip and column_role(c) == IDS]
    counts = []
    for name in named:
        values = frame[name].dropna()
        if not len(values):
            continue
        try:
            distinct = values.nunique()
        except TypeError:  # cells pandas cannot hash: compared as text
            distinct = values.astype(str).nunique()
        if distinct == len(values):
            return None
        counts.append((distinct, name))
    return max(counts, key=lambda c: c[0])[1] if counts else None
