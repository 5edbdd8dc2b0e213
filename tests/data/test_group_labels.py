"""Group labels that differ only by spaces at their ends (or Unicode form) are one group, and every command with
groups says so once, in one note naming the labels merged."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.data.labels import label_notes

MODEL = "factor f: y1, y2, y3, y4\n"
NOTE = ("labels that differ only by spaces at their ends, by invisible format characters or by Unicode form were read "
        "as one group")


@pytest.fixture(scope="module")
def spaced() -> pd.DataFrame:
    """Three groups of 150 simulated rows (seed 11); every fifth label of 'north' and 'south' carries a trailing
    space, as exports from forms often do."""
    rng = np.random.default_rng(11)
    f = rng.normal(size=450)
    frame = pd.DataFrame({f"y{j}": np.round(0.8 * f + rng.normal(scale=0.6, size=450), 2) for j in range(1, 5)})
    labels = np.repeat(["north", "south", "west"], 150).astype(object)
    labels[(np.arange(450) % 5 == 0) & (labels != "west")] += " "
    frame["area"] = labels
    return frame


def _merged(notes) -> list[str]:
    found = [n for n in notes if NOTE in n]
    assert len(found) == 1, notes  # said once
    assert "'north' (120 rows) and 'north ' (30 rows) as 'north'; 'south' (120 rows) and 'south ' (30 rows) as 'south'" in found[0]
    return found


def test_the_note_names_every_merged_label_once(spaced):
    # 150 rows of each label, every fifth of 'north' and 'south' written with a space (the fixture): 30 and 120
    assert label_notes(spaced, "area")[0] == (f"in the group column 'area', {NOTE}: 'north' (120 rows) and 'north ' "
                                              "(30 rows) as 'north'; 'south' (120 rows) and 'south ' (30 rows) as 'south'")
    assert label_notes(spaced.assign(area=spaced["area"].str.strip()), "area") == []


def test_fit_check_and_compare_say_which_labels_were_merged(spaced):
    fitted = cfa_tool.fit(MODEL, spaced, group="area")
    assert [g.label for g in fitted.groups] == ["north", "south", "west"]
    assert [g.data.n_obs for g in fitted.groups] == [150, 150, 150]
    _merged(fitted.warnings)
    checked = cfa_tool.check(MODEL, spaced, group="area")
    assert checked.groups == ("north", "south", "west")
    _merged(checked.notes)
    assert NOTE in checked.summary()
    compared = cfa_tool.compare([MODEL, "factor f: y1, y2, y3, y4\nequal loading(f, y1), loading(f, y2)\n"], spaced,
                                group="area")
    _merged(compared.notes)


def test_ordinal_and_invariance_paths_say_it_too(spaced):
    answers = spaced.assign(**{c: pd.cut(spaced[c], [-np.inf, -0.5, 0.5, np.inf], labels=False) + 1
                               for c in ["y1", "y2", "y3", "y4"]})
    _merged(cfa_tool.fit(MODEL, answers, group="area", ordinal="all").warnings)
    _merged(cfa_tool.compare([MODEL, MODEL.replace("factor f", "factor g")], answers, group="area",
                             ordinal="all").notes)
    ladder = cfa_tool.invariance(MODEL, spaced, group="area")
    assert ladder.groups == ("north", "south", "west")
    _merged(ladder.notes)  # a note, not a caution


def test_a_reference_group_is_read_as_the_labels_are(spaced):
    fitted = cfa_tool.fit(MODEL + "invariance scalar\n", spaced, group="area", reference_group="south ")
    assert fitted.groups[0].label == "south"


def test_cluster_and_stratum_labels_are_read_as_group_labels_are(spaced):
    # 30 clusters in 3 strata; every seventh row's cluster and stratum written with a trailing space: the same
    # design (30 clusters, the same sandwich standard errors) as the clean labels, and a note for each column
    clean = spaced.assign(school=[f"s{i % 30}" for i in range(len(spaced))],
                          region=[f"r{i % 3}" for i in range(len(spaced))])
    messy = clean.copy()
    messy.loc[messy.index[::7], "school"] += " "
    messy.loc[messy.index[1::7], "region"] += " "
    a = cfa_tool.fit(MODEL, clean, cluster="school", strata="region")
    b = cfa_tool.fit(MODEL, messy, cluster="school", strata="region")
    assert (b.design.clusters, b.design.strata) == (a.design.clusters, a.design.strata) == (30, 3)
    assert [r.se for r in b.estimates] == pytest.approx([r.se for r in a.estimates], rel=1e-12, nan_ok=True)
    notes = [w for w in b.warnings if "were read as one" in w]
    assert len(notes) == 2
    assert notes[0].startswith("in the cluster column 'school', labels that differ only by spaces at their ends, by "
                               "invisible format characters or by Unicode form were read as one cluster: 's0' (12 "
                               "rows) and 's0 ' (3 rows) as 's0'")
    # (rows 0, 210 and 420 of the 15 of cluster s0 are multiples of 7)
    assert notes[1].startswith("in the strata column 'region'") and "were read as one stratum" in notes[1]


SPELLED = "numbers written in different ways were read as one group: '01' and '1' as '1'; '2' and '2.0' as '2'"


@pytest.fixture(scope="module")
def spelled_file(spaced, tmp_path_factory):
    """The same rows in a CSV file whose group column writes its numbers in several ways: group 1 as '1' and (every
    fifth row) '01', group 2 as '2' and '2.0', group 3 always as '3'."""
    labels = np.repeat(["1", "2", "3"], 150).astype(object)
    fifth = np.arange(450) % 5 == 0
    labels[fifth & (labels == "1")] = "01"
    labels[fifth & (labels == "2")] = "2.0"
    path = tmp_path_factory.mktemp("spelled") / "spelled.csv"
    spaced.drop(columns="area").assign(area=labels).to_csv(path, index=False)
    return path


def test_numbers_written_in_different_ways_are_one_group_and_every_command_says_so(spaced, spelled_file):
    # '01' and '1' are the number 1 in a column of numbers: one group of 150 rows, as the clean labels give, and a
    # note naming the ways it was written (the reader keeps them as written: pandas reads the column as numbers)
    fitted = cfa_tool.fit(MODEL, spelled_file, group="area")
    assert [(g.label, g.data.n_obs) for g in fitted.groups] == [("1", 150), ("2", 150), ("3", 150)]
    assert [w for w in fitted.warnings if SPELLED in w]
    assert [n for n in cfa_tool.check(MODEL, spelled_file, group="area").notes if SPELLED in n]
    assert [w for w in cfa_tool.invariance(MODEL, spelled_file, group="area").notes if SPELLED in w]
    cluster = cfa_tool.fit(MODEL, spelled_file, cluster="area")
    assert [w for w in cluster.warnings if "numbers written in different ways were read as one cluster" in w]
    # a filter that leaves only the labels written one way leaves no note
    kept = cfa_tool.fit(MODEL, spelled_file, group="area", keep=["area != 1"])
    assert [g.label for g in kept.groups] == ["2", "3"]
    assert [w for w in kept.warnings if "'2' and '2.0' as '2'" in w] and not [w for w in kept.warnings if "'01'" in w]


def test_labels_that_differ_only_in_case_are_named_first_and_kept_apart(spaced):
    # a hostile trial: 'north' and 'North' became two groups with no word, while 'south ' was merged with a note
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.data.labels import case_variants
    from cfa_tool.workflows.invariance import invariance

    cased = spaced.assign(area=spaced["area"].str.strip())
    cased.loc[cased.index[:40], "area"] = "North"  # 40 of north's 150 rows; counted by hand: 110 'north' remain
    assert case_variants(cased["area"]) == [[("North", 40), ("north", 110)]]
    assert case_variants(spaced["area"]) == []  # spaces at the ends are not case
    said = ("labels that differ only in upper and lower case are analysed as different groups: 'North' (40 rows) and "
            "'north' (110 rows)")
    fitted = cfa_tool.fit(MODEL, cased, group="area")
    assert [g.label for g in fitted.groups] == ["North", "north", "south", "west"]  # not merged: the user decides
    first = fitted.problems[0]
    assert first.kind is ProblemKind.GROUP_LABELS_BY_CASE and said in first.explanation
    assert not first.kind.inadmissible
    assert any(p.kind is ProblemKind.GROUP_LABELS_BY_CASE for p in cfa_tool.check(MODEL, cased, group="area").problems)
    assert said in invariance(MODEL, cased, "area").warnings[0]
    assert not any(p.kind is ProblemKind.GROUP_LABELS_BY_CASE for p in cfa_tool.fit(MODEL, spaced, group="area").problems)


def test_a_reference_group_that_sets_nothing_is_an_error(spaced):
    """Without equal intercepts every group's factor means are fixed at zero, so a reference group sets nothing
    (hostile trial 9: it was accepted and only reordered the groups); fit and compare refuse it."""
    with pytest.raises(OptionError, match="reference_group='south' sets nothing in this model"):
        cfa_tool.fit(MODEL, spaced, group="area", reference_group="south")
    with pytest.raises(OptionError, match="sets nothing in these models"):
        cfa_tool.compare([MODEL, MODEL + "covary y1, y2\n"], spaced, group="area", reference_group="south")
    with pytest.raises(OptionError, match="reference_group='south' sets nothing in this model"):
        cfa_tool.scores(MODEL, spaced, group="area", reference_group="south")
    scalar = cfa_tool.fit(MODEL + "invariance scalar\n", spaced, group="area", reference_group="south")
    means = [r for r in scalar.estimates if r.kind == "mean"]
    assert all(not r.free for r in means if r.group == "south") and any(r.free for r in means if r.group != "south")


def test_a_label_written_with_spaces_alone_is_named_with_its_rows(spaced):
    # new-user trial, session 12: 'manager ' (with a trailing space, and no 'manager' without one) was read as
    # 'manager' without a word, beside 'Manager' (a case variant, which a caution names)
    roles = spaced.assign(area=np.where(np.arange(450) % 3 == 0, "manager ", np.where(np.arange(450) % 3 == 1,
                                                                                      "Manager", "staff")))
    written = int((roles["area"] == "manager ").sum())  # pandas, from the cells written
    said = (f"in the group column 'area', labels written with spaces at their ends, with invisible format characters "
            f"or in another Unicode form were read without them: 'manager ' ({written} rows) as 'manager'")
    assert label_notes(roles, "area") == [said]
    fitted = cfa_tool.fit(MODEL, roles, group="area")
    assert [g.label for g in fitted.groups] == ["Manager", "manager", "staff"]
    assert said in fitted.warnings
    assert said in cfa_tool.invariance(MODEL, roles, group="area").notes
