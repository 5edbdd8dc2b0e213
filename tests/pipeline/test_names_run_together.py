"""Column names run together as survey platforms write them (new-user trial s27, findings 1 and 3).

A long file of two waves of one staff, its id column 'RespondentID', was fitted across the waves as independent
groups without a word, while 'respondent_id' got the caution that points to the model of both times side by side;
a column 'Team' or 'TeamID' got no word of clusters while 'team_id' did.  The rule of names (data.column_roles) split
a name at spaces, underscores, dots and hyphens only; it now splits a word run together where a capital starts a
new word, and a column whose values name one row of each group and recur across the groups is taken for the id
whatever its name.  Invented data of a fictional transit agency's staff, simulated with a fixed seed.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.column_roles import column_role, id_across_groups, name_words, unit_word
from cfa_tool.note_parts import Command
from cfa_tool.options import Option

MODEL = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")


def _waves(n: int = 200, again: int = 120, seed: int = 27) -> pd.DataFrame:
    """Two waves of one staff in long form (the second of ``again`` of them), each in one of 10 teams."""
    rng = np.random.default_rng(seed)
    traits = rng.normal(size=(n, 2))

    def wave(rows, label):
        frame = pd.DataFrame(.7 * traits[rows][:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .6, (len(rows), 6)),
                             columns=ITEMS)
        frame.insert(0, "RespondentID", [f"E{5000 + k}" for k in rows])
        frame.insert(1, "Team", [f"T{k % 10:02d}" for k in rows])
        frame.insert(2, "wave", label)
        return frame

    return pd.concat([wave(np.arange(n), 1), wave(np.arange(again), 2)], ignore_index=True)


def _flat(text) -> str:
    return " ".join(str(text).split())


@pytest.mark.parametrize("name, words", [
    ("RespondentID", ("respondent", "id")), ("ResponseId", ("response", "id")), ("EmployeeID", ("employee", "id")),
    ("TeamID", ("team", "id")), ("IDNumber", ("id", "number")), ("finalWeight", ("final", "weight")),
    ("team_id", ("team", "id")), ("Respondent ID", ("respondent", "id")),
    # an item's code stays one word: no 'w' (a weight's word) out of 'wA1', no 'id' out of 'Q1ID'
    ("wA1", ("wa1",)), ("w1", ("w1",)), ("Q1ID", ("q1id",)), ("SWLS3", ("swls3",))])
def test_a_name_is_read_as_words_also_where_they_run_together(name, words):
    assert name_words(name) == words  # by hand: where a capital starts a word after two letters or digits


@pytest.mark.parametrize("name, role, unit", [
    ("RespondentID", "ids", None), ("ResponseId", "ids", None), ("EmployeeID", "ids", None), ("TeamID", "ids", "team"),
    ("Team", None, "team"), ("SiteCode", None, "site"), ("team_id", "ids", "team"), ("TeamSize", None, None),
    ("wA1", None, None)])
def test_roles_and_units_by_the_words(name, role, unit):
    assert column_role(name) == role and unit_word(name) == unit


def test_invariance_across_waves_with_a_run_together_id_says_the_same_people():
    stacked = _waves()
    held = cfa_tool.invariance(MODEL, stacked, group="wave")
    [said] = [_flat(w) for w in held.warnings if "more than one group of 'wave'" in _flat(w)]
    assert said.startswith("The column 'RespondentID', an id by its name, gives 120 ids each to more than one row")
    assert Option.OCCASION_COLUMN.given("wave") in said and Option.ID_COLUMN.given("RespondentID") in said


def test_an_id_by_its_values_across_the_groups_whatever_its_name():
    stacked = _waves().rename(columns={"RespondentID": "Code"})
    assert id_across_groups(stacked, "wave", set(ITEMS)) == "Code"  # 120 codes in both waves, none twice in one
    assert id_across_groups(stacked, "wave", set(ITEMS) | {"Code"}) is None  # 'Team' repeats within a wave
    held = cfa_tool.invariance(MODEL, stacked, group="wave")
    [said] = [_flat(w) for w in held.warnings if "more than one group of 'wave'" in _flat(w)]
    assert said.startswith("The column 'Code', an id by its values (none twice in one group), gives 120 ids")
    # different people in the two waves (codes not shared): nothing is said
    other = stacked.assign(Code=[f"{c}-{w}" for c, w in zip(stacked["Code"], stacked["wave"])])
    assert id_across_groups(other, "wave", set(ITEMS)) is None
    assert not [w for w in cfa_tool.invariance(MODEL, other, group="wave").warnings
                if "more than one group" in _flat(w)]


@pytest.mark.parametrize("name", ["Team", "TeamID"])
def test_a_team_column_named_plainly_gets_the_clusters_caution(name):
    one = _waves().query("wave == 1").drop(columns=["RespondentID", "wave"]).rename(columns={"Team": name})
    fitted = cfa_tool.fit(MODEL, one)
    [said] = [p for p in fitted.problems if p.kind is ProblemKind.UNIT_ROWS_AS_INDEPENDENT]
    kind = "an id of teams" if name == "TeamID" else "a column of teams"
    assert _flat(said.explanation).startswith(f"The column '{name}', {kind} by its name, gives 10 teams to 200 rows "
                                              f"(20 rows each on average)")  # 200 staff in 10 teams, planted above
    assert [p.text for p in said.advice.parts if isinstance(p, Command)] == [f" ({Option.CLUSTER.given(name)})"]


def test_the_clusters_caution_stays_beside_an_id_that_names_no_person_twice():
    # the teams' caution was given only without an id: an id given (each person once), or one whose only repeat is
    # a copied row (its own caution), left the teams' rows taken as independent without a word
    one = _waves().query("wave == 1").drop(columns=["wave"])
    for result in (cfa_tool.fit(MODEL, one, id_column="RespondentID"),
                   cfa_tool.fit(MODEL, pd.concat([one, one.iloc[[3]]], ignore_index=True))):
        kinds = [p.kind for p in result.problems]
        assert ProblemKind.UNIT_ROWS_AS_INDEPENDENT in kinds and ProblemKind.REPEATED_IDS not in kinds
    # a person's id repeated across waves: its own caution, which names the ways to allow for them, alone as before
    kinds = [p.kind for p in cfa_tool.fit(MODEL, _waves()).problems]
    assert ProblemKind.REPEATED_IDS in kinds and ProblemKind.UNIT_ROWS_AS_INDEPENDENT not in kinds


def test_a_column_named_for_the_unit_alone_needs_some_units():
    # Holzinger & Swineford's (1939) 'school' holds two schools, groups compared rather than clusters sampled: no
    # caution (column_roles.UNITS_NAMED_ALONE_AT_LEAST, a rule of this project); 'school_id' is an id by its name
    from cfa_tool.data.column_roles import UNITS_NAMED_ALONE_AT_LEAST, unit_id_column

    one = _waves().query("wave == 1").drop(columns=["RespondentID", "wave"])
    few = one.assign(Team=[f"T{k % (UNITS_NAMED_ALONE_AT_LEAST - 1)}" for k in range(len(one))])
    assert unit_id_column(few, set(ITEMS)) is None
    assert unit_id_column(few.rename(columns={"Team": "team_id"}), set(ITEMS)) == ("team_id", "team")
    assert unit_id_column(one, set(ITEMS)) == ("Team", "team")  # 10 teams
