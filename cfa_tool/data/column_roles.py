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

#: words that name a unit holding many respondents: a column named as an id with one of them as a word of its own
#: ('team_id', 'School ID', 'class.id') names such units, whose members' rows share it by design, and is never taken
#: for the rows' id, whose repeats would be a person answering twice (s26: a file with a team id alone was told its
#: rows were perhaps the same people's); its rows are the sampling design's clusters, if anything (:func:`unit_id_column`)
UNIT_WORDS = ("team", "school", "class", "classroom", "site", "clinic", "hospital", "ward", "practice", "department",
              "dept", "unit", "branch", "store", "shop", "office", "depot", "plant", "household", "family", "company",
              "firm", "organisation", "organization", "village", "district", "region", "country", "interviewer")


def unit_word(name: str) -> str | None:
    """The word of :data:`UNIT_WORDS` that a column named as an id has as a word of its own ('team' for 'team_id'),
    else None (also for a column not named as an id: 'team_size')."""
    if column_role(name) != IDS:
        return None
    return next((w for w in re.split(r"[\s_.\-]+", name.casefold()) if w in UNIT_WORDS), None)


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
    values (the people's id before the teams'); never a column named as the id of a unit of many respondents
    (:data:`UNIT_WORDS`: 'team_id', 'school_id'), whose repeats are its members (:func:`unit_id_column`)."""
    named = [c for c in frame.columns.tolist() if isinstance(c, str) and c not in skip and column_role(c) == IDS
             and unit_word(c) is None]  # a team's or a school's id names no row (:data:`UNIT_WORDS`)
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


def unit_id_column(frame: pd.DataFrame, skip) -> tuple[str, str] | None:
    """(the column, its unit's word) of the first column of ``frame`` outside ``skip`` named as the id of a unit of
    many respondents (:func:`unit_word`: 'team_id', 'team') whose values repeat among the rows, else None: the rows
    of one unit, which a fit takes for independent cases unless the units are the design's clusters."""
    for name in frame.columns.tolist():
        if isinstance(name, str) and name not in skip and (word := unit_word(name)) is not None:
            values = frame[name].dropna()
            try:
                distinct = values.nunique()
            except TypeError:  # cells pandas cannot hash: compared as text
                distinct = values.astype(str).nunique()
            if 0 < distinct < len(values):
                return name, word
    return None
