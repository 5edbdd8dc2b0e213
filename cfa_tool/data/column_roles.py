"""The part a column plays in the data by its name (the sampling design, ids, groups, who answered), declared once:
explore leaves such columns out of its default items, and the cautions on rows take a column named as an id for the
rows' id when none was given (:func:`id_named_column`)."""

from __future__ import annotations

import re

import numpy as np
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


def unit_plural(word: str) -> str:
    """The plural of a word of :data:`UNIT_WORDS` ('teams', 'classes', 'companies'), as messages name the units."""
    return (f"{word}es" if word.endswith(("s", "sh", "ch", "x")) else
            f"{word[:-1]}ies" if word.endswith("y") and word[-2:-1] not in "aeiou" else f"{word}s")


#: words that, beside a word of :data:`UNIT_WORDS` alone, still name the unit ('Team', 'team name', 'SiteCode')
UNIT_NAMING_WORDS = ("name", "code", "number", "no", "nr")

#: where a name's words meet inside a word run together: a lower-case letter or digit before a capital
#: ('RespondentID', 'finalWeight'), and a run of capitals before a capital that starts a word ('IDNumber'), the word
#: before it of at least two letters so that an item's code such as 'wA1' or 'pA2' stays one word
_CAMEL_JOINT = re.compile(r"(?<=[a-z0-9]{2})(?=[A-Z])|(?<=[A-Z]{2})(?=[A-Z][a-z])")


def name_words(name: str) -> tuple[str, ...]:
    """The words of a column's name, case-folded, as the rules of names here read them: the name split at spaces,
    underscores, dots and hyphens, and inside a word run together where a capital starts a new word
    ('RespondentID' -> respondent, id; 'ResponseId', 'EmployeeID', 'TeamID' alike; new-user trial s27: a survey
    platform's 'RespondentID' was no id), digits kept with the letters before them ('w1' stays one word, no
    weight).  The one place where a column's name is read as words."""
    return tuple(w.casefold() for part in re.split(r"[\s_.\-]+", name) for w in _CAMEL_JOINT.split(part) if w)


def unit_word(name: str) -> str | None:
    """The word of :data:`UNIT_WORDS` that a column named as an id has as a word of its own ('team' for 'team_id',
    'TeamID'), or that is the column's name alone, or with a word of :data:`UNIT_NAMING_WORDS` ('Team', 'site
    code'), else None (also for a column named otherwise: 'team_size')."""
    words = name_words(name)
    unit = next((w for w in words if w in UNIT_WORDS), None)
    if unit is None:
        return None
    if column_role(name) == IDS or all(w == unit or w in UNIT_NAMING_WORDS for w in words):
        return unit
    return None


def column_role(name: str) -> str | None:
    """The part a column plays by its name (a key of COLUMN_ROLE_WORDS), or None for a column that may hold
    answers.  The name is read as words by :func:`name_words`."""
    for word in name_words(name):
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
        distinct, held = distinct_values(frame, name)
        if not held:
            continue
        if distinct == held:
            return None
        counts.append((distinct, name))
    return max(counts, key=lambda c: c[0])[1] if counts else None


def distinct_values(frame: pd.DataFrame, name: str) -> tuple[int, int]:
    """(the different values of ``frame``'s column ``name``, its cells holding a value): pandas' nunique() of the
    column without its empty cells, cells pandas cannot hash compared as text; read from the column's stored array
    where the frame's names are unique (data.moments.stored_column: without the Series and its copies that each
    selection and dropna() build, which cost more than the count on a questionnaire's data)."""
    from cfa_tool.data.moments import stored_column

    if frame.columns.is_unique:
        values = stored_column(frame, frame.columns.get_loc(name))
        values = values[~pd.isna(values)]
        try:
            return len(pd.unique(values)), len(values)
        except TypeError:  # cells pandas cannot hash: compared as text, below
            pass
    values = frame[name].dropna()
    try:
        distinct = values.nunique()
    except TypeError:  # cells pandas cannot hash: compared as text
        distinct = values.astype(str).nunique()
    return distinct, len(values)


#: the fewest units a column named for the unit alone ('Team', 'school') must hold to be taken for units of many
#: respondents (:func:`unit_id_column`): fewer are groups compared rather than clusters sampled (the two schools of
#: Holzinger & Swineford's 1939 data), and too few clusters for a sandwich in any case (a rule of this project)
UNITS_NAMED_ALONE_AT_LEAST = 5


def unit_id_column(frame: pd.DataFrame, skip) -> tuple[str, str] | None:
    """(the column, its unit's word) of the first column of ``frame`` outside ``skip`` named as the id of a unit of
    many respondents (:func:`unit_word`: 'team_id', 'TeamID', or the unit alone, 'Team', then with at least
    :data:`UNITS_NAMED_ALONE_AT_LEAST` units) whose values repeat among the rows, else None: the rows of one unit,
    which a fit takes for independent cases unless the units are the design's clusters."""
    for name in frame.columns.tolist():
        if isinstance(name, str) and name not in skip and (word := unit_word(name)) is not None:
            distinct, held = distinct_values(frame, name)
            fewest = 1 if column_role(name) == IDS else UNITS_NAMED_ALONE_AT_LEAST
            if fewest <= distinct < held:
                return name, word
    return None


#: the fewest values a column must share across the groups to be taken for the people's id by its values
#: (:func:`id_across_groups`), and the least share of its rows they must hold
SHARED_IDS_AT_LEAST = 5
SHARED_ROWS_SHARE = 0.2


def id_across_groups(frame: pd.DataFrame, group: str, skip) -> str | None:
    """The column of ``frame`` outside ``skip`` (the items, the group and design columns) that holds, whatever its
    name, an id of people in each group of ``group``: a different value in every row of one group (no float that
    is not whole), and values that name rows in more than one group, at least :data:`SHARED_IDS_AT_LEAST` of them
    in :data:`SHARED_ROWS_SHARE` of the rows or more (the same people in several groups, as in a long file of two
    waves); None when no column does (new-user trial s27: an id column named as the tool did not read an id went
    unnoticed).  The first such column of the file."""
    if group not in frame.columns:
        return None
    labels = frame[group]
    has = labels.notna().to_numpy()
    for name in frame.columns:
        if name in skip or name == group or not isinstance(name, str):
            continue
        column = frame[name]
        if column.dtype.kind == "f":
            values = column.dropna().to_numpy()
            if not len(values) or not np.all(np.mod(values, 1) == 0):
                continue
        elif column.dtype.kind not in "iuO":
            continue
        pairs = pd.DataFrame({"v": column.to_numpy(), "g": labels.to_numpy()})[has & column.notna().to_numpy()]
        if len(pairs) < 2 * SHARED_IDS_AT_LEAST:
            continue
        try:
            if pairs.duplicated().any():  # a value twice in one group: no id of the group's people
                continue
            groups_of = pairs.groupby("v", sort=False)["g"].nunique()
        except TypeError:  # cells pandas cannot hash: compared as text
            continue
        shared = groups_of[groups_of > 1]
        rows = int(pairs["v"].isin(shared.index).sum())
        if len(shared) >= SHARED_IDS_AT_LEAST and rows >= SHARED_ROWS_SHARE * len(pairs):
            return name
    return None
