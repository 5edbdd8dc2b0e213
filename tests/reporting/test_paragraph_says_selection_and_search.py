"""The methods paragraph says what the cautions and tables say (session 13):

* a row filter on a model item (range restriction: the report's first caution says it) gets one sentence in the
  paragraph of fit, compare, invariance and replicate, from the filters the caution counted
  (pipeline.row_filter_cautions.selections_on_items), and none for a filter on another column;
* which score tests guided a partial-invariance search (normal-theory or Satorra's 1989 robust ones: the table of
  freed parameters and the JSON name them) is said in the paragraph when the search freed something;
* replicate with two files and --keep names the filter and the rows it kept in each file's sample, as the split-half
  paragraph does, and each file's range-restriction caution names its file (calibration or validation): they read
  alike without it.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), the rows each filter
leaves out counted with pandas; Holzinger & Swineford (1939) for the partial search (x3's intercept freed at the
scalar step, as tests/workflows/test_invariance_robust_reference.py checks against a numpy computation)."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.paragraph import (comparison_paragraph, invariance_paragraph, methods_paragraph,
                                          replication_paragraph)
from cfa_tool.workflows.invariance import LEVELS, ScoreTests
from cfa_tool.workflows.replication import Replications, replicate, split_half
from tests.conftest import THREE_FACTORS, holzinger_swineford

FOUR = "factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
RESTRICTED = "had a restricted range among the rows analysed (range restriction)"


def _flat(text: str) -> str:
    return " ".join(text.split())


def _left_out(frame: pd.DataFrame) -> int:
    """Rows with an answer to on_time that 'on_time >= 3' leaves out, by pandas."""
    return int((frame["on_time"] < 3).sum())


def test_fit_says_the_selection_on_an_item(rider_demo, rider_model):
    text = _flat(methods_paragraph(cfa_tool.fit(rider_model, rider_demo, keep="on_time >= 3")))
    assert (f"The rows were selected by their answers to on_time, keeping those where on_time was at least 3 (an item "
            f"of punctuality; {_left_out(rider_demo)} rows with an answer to it left out), so that item {RESTRICTED}: "
            f"the loading of on_time, the variance of punctuality and its reliability describe the rows kept") in text
    # right after the sentence that names the rows the filter chose
    assert text.index("those where on_time was at least 3") < text.index("The rows were selected") < \
        text.index("The scale of each factor")
    # a filter on a column that is not an item, or one that leaves out no answer: no such sentence
    for keep in ("district = north", "on_time >= 1"):
        assert "range restriction" not in methods_paragraph(cfa_tool.fit(rider_model, rider_demo, keep=keep))


def test_several_filters_on_items_are_one_sentence_naming_each_items_kept_range(rider_demo, rider_model):
    """s20: the sentence went filter by filter ('on_time (...left out by 'on_time > 1'), on_time (... 'on_time !=
    3')'); now each item once, with the range its filters keep, the bounds the tightest ('>= 1' and '> 1': above 1)
    and a filter that left out no answer ('<= 6' on answers 1 to 5) not named.  The rows left out counted with pandas."""
    keep = ["on_time >= 1", "on_time <= 6", "on_time > 1", "on_time != 3", "on_time != 4", "short_wait < 5"]
    fitted = cfa_tool.fit(rider_model, rider_demo, keep=keep)
    text = _flat(methods_paragraph(fitted))
    on_time = int(rider_demo["on_time"].isin([1, 3, 4]).sum())  # answers 1, 3 and 4 left out
    kept = rider_demo[rider_demo["on_time"].isin([2, 5])]
    short_wait = int((kept["short_wait"] >= 5).sum())  # then short_wait's answers of 5 and more among the rows left
    assert (f"The rows were selected by their answers to on_time and short_wait, keeping those where on_time was above 1 "
            f"and none of 3, 4 (an item of punctuality; {on_time} rows with an answer to it left out) and short_wait was "
            f"below 5 (an item of punctuality; {short_wait} rows with an answer to it left out), so those items "
            f"{RESTRICTED}") in text
    assert text.count("range restriction") == 1  # one sentence
    # the report's caution likewise: one per item, its filters named with the range they keep
    cautions = [str(p.explanation) for p in fitted.problems if p.kind is ProblemKind.SELECTED_ON_ITEM]
    assert len(cautions) == 2
    assert cautions[0].startswith("Row filters 'on_time > 1' and 'on_time not in 3, 4' select rows by their answers to "
                                  "'on_time', an item of punctuality, keeping those where on_time was above 1 and none "
                                  f"of 3, 4: they left out {on_time} rows with an answer to it.")
    assert cautions[1].startswith("Row filter 'short_wait < 5' selects rows by their answers to 'short_wait', an item "
                                  f"of punctuality: it left out {short_wait} rows with an answer to it.")


def test_the_kept_range_of_one_column_takes_the_tightest_bounds():
    from cfa_tool.data.filters import kept_range_words, parse_filter

    def words(*texts):
        return kept_range_words([parse_filter(t) for t in texts])

    assert words("x >= 2", "x <= 4") == "x was at least 2 and at most 4"
    assert words("x >= 2", "x > 2", "x < 5", "x <= 5") == "x was above 2 and below 5"  # strict at the same value
    assert words("x > 1", "x >= 3", "x <= 9", "x < 7") == "x was at least 3 and below 7"
    assert words("x != 3") == "x was not 3"
    assert words("x < 5", "x != 1", "x != 2") == "x was below 5 and none of 1, 2"


def test_compare_and_invariance_say_it_too(rider_demo, rider_model):
    compared = _flat(comparison_paragraph(cfa_tool.compare([rider_model, rider_model + "covary on_time, short_wait\n"],
                                                           rider_demo, keep="on_time >= 3")))
    # the models may place the item differently: its factor is not named
    assert (f"The rows were selected by their answers to on_time, keeping those where on_time was at least 3 "
            f"({_left_out(rider_demo)} rows with an answer to it left out), so that item {RESTRICTED}: the loading of "
            f"on_time, the variances of the factors it measures and their reliability") in compared
    ladder = _flat(invariance_paragraph(cfa_tool.invariance(rider_model, rider_demo, "district", keep="on_time >= 3"),
                                        LEVELS))
    assert f"on_time was at least 3 (an item of punctuality; {_left_out(rider_demo)} rows" in ladder and RESTRICTED in ladder


def test_the_paragraph_names_the_score_tests_of_the_partial_search():
    data = holzinger_swineford()
    for test, kind in (("normal", ScoreTests.NORMAL), ("robust", ScoreTests.ROBUST)):
        ladder = cfa_tool.invariance(THREE_FACTORS, data, "school", partial="auto", test=test)
        assert ladder.freed and ladder.score_tests is kind
        text = _flat(invariance_paragraph(ladder, LEVELS))
        assert f"The partial-invariance search was guided by {kind.phrase}." in text
        # said once, before the steps' results that name what the search freed
        assert text.count("was guided by") == 1
        assert text.index("was guided by") < text.index("chosen one at a time by score tests")
    robust = _flat(invariance_paragraph(cfa_tool.invariance(THREE_FACTORS, data, "school", partial="auto",
                                                            test="robust"), LEVELS))
    assert "generalized score test of Satorra 1989" in robust
    # no search freed anything: nothing to say
    assert "was guided by" not in invariance_paragraph(cfa_tool.invariance(THREE_FACTORS, data, "school"), LEVELS)


def _two_files(rider_demo, tmp_path):
    half = len(rider_demo) // 2
    first, second = rider_demo.iloc[:half], rider_demo.iloc[half:]
    paths = [tmp_path / "spring.csv", tmp_path / "autumn.csv"]
    for frame, path in zip((first, second), paths):
        frame.to_csv(path, index=False)
    return (first, second), paths


def test_replicate_with_two_files_names_each_files_filter(rider_demo, rider_model, tmp_path):
    (first, second), paths = _two_files(rider_demo, tmp_path)
    rep = replicate(rider_model, *paths, keep="on_time >= 3")
    text = _flat(replication_paragraph(Replications((rep,))))
    for frame, path, name in zip((first, second), paths, ("calibration", "validation")):
        kept = int((frame["on_time"] >= 3).sum())  # pandas: the rows the filter keeps
        empty = int(frame["on_time"].isna().sum())
        rows = f"of the {len(frame)} rows in {path}, those where on_time was at least 3" + (
            f"; {empty} row{'s' if empty != 1 else ''} with no value of on_time {'was' if empty == 1 else 'were'} "
            "left out" if empty else "")
        assert f"a {name} sample (N = {kept} {rows}" in text
        assert (f"In the {name} sample, the rows were selected by their answers to on_time, keeping those where "
                f"on_time was at least 3 (an item of punctuality; {_left_out(frame)} rows with an answer to it") in text
        caution = [p.explanation for p in rep.data_problems
                   if p.explanation.startswith(f"Row filter 'on_time >= 3' on the {name} data ({path}) selects rows")]
        assert len(caution) == 1 and f"it left out {_left_out(frame)} rows with an answer to it" in caution[0]
    # a filter on another column: the rows named, no range restriction
    other = _flat(replication_paragraph(Replications((replicate(rider_model, *paths, keep="district = north"),))))
    assert f"those where district was north" in other and "range restriction" not in other


def test_split_half_says_the_selection_too(rider_demo, rider_model):
    pair = split_half(rider_model, rider_demo, seed=5, keep="on_time >= 3")
    text = _flat(replication_paragraph(Replications(pair)))
    assert (f"The rows were selected by their answers to on_time, keeping those where on_time was at least 3 (an item "
            f"of punctuality; {_left_out(rider_demo)} rows with an answer to it left out)") in text
    assert f"selects rows by their answers to 'on_time'" in pair[0].data_problems[0].explanation


def test_the_one_file_advice_takes_the_flag_from_the_option_vocabulary(rider_demo, tmp_path, monkeypatch):
    """replicate's refusal of the same file twice names the option of one file as options.Option declares it (on the
    command line its flag, from Python the function), not as text of its own."""
    from cfa_tool.errors import OptionError
    from cfa_tool.options import Option, on_command_line

    path = tmp_path / "riders.csv"
    rider_demo.to_csv(path, index=False)
    monkeypatch.setattr(Option.DATA, "flag", "--one-data-file")  # a renamed flag: the advice follows it
    with on_command_line():
        try:
            replicate(FOUR, path, path)
        except OptionError as error:
            said = str(error)
        else:
            raise AssertionError("the same file twice was not refused")
    assert "or give one file as --one-data-file to split it in two random halves" in said
    try:
        replicate(FOUR, path, path)
    except OptionError as error:
        assert "with split_half" in str(error)
