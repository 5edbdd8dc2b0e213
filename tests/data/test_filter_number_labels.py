"""A row filter whose number is a value label of another code of its column is refused, naming both readings (hostile
trial s15, finding 4: grade coded 1 to 5 with the labels '6' to '10', shown as groups "6" to "10"; 'grade != 6'
compared codes and kept every row).  The data are the bundled demo (a fictional transit agency's rider survey) with
an invented grade column, written as an SPSS file by pyreadstat, an independent writer of the format; the rows each
filter keeps are counted here by pandas."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.filters import apply_filters, parse_filter
from cfa_tool.errors import OptionError
from cfa_tool.resources import resource_dir

GRADES = {1.0: "6", 2.0: "7", 3.0: "8", 4.0: "9", 5.0: "10"}


def _frame() -> pd.DataFrame:
    return pd.DataFrame({"grade": [1.0, 2.0, 3.0, 4.0, 5.0, 1.0, 2.0], "q": [1.0] * 7})


def _refusal(text: str, labels: dict) -> str:
    with pytest.raises(OptionError) as caught:
        apply_filters(_frame(), [parse_filter(text)], "g.sav", {"grade": labels})
    return str(caught.value)


def test_a_number_that_is_the_label_of_another_code_is_refused_naming_both_readings():
    message = _refusal("grade != 6", GRADES)
    assert message == (
        "row filter 'grade != 6': in g.sav, 'grade' holds codes with value labels, and 6 could mean the code 6 (no "
        "row holds it) or the value label '6' of code 1 (2 rows), which the groups and reports show; to compare with "
        "the label, write its code: 'grade != 1' (or the label in quotes: 'grade != \"6\"')")
    # an order of codes: the label's code, with the condition that the codes run in the labels' order
    assert "write the code it labels: 'grade >= 3', if the codes run in the order of their labels" in _refusal(
        "grade >= 8", GRADES)
    # a code that is also another code's label: both counted, the code written by its own label when it has one
    labels = {1.0: "2", 2.0: "low", 3.0: "high"}
    assert "2 could mean the code 2 (2 rows) or the value label '2' of code 1 (2 rows)" in _refusal("grade = 2", labels)
    assert "to compare with the code 2, write its label: 'grade = \"low\"'" in _refusal("grade = 2", labels)


def test_both_ways_of_writing_the_label_keep_the_same_rows_and_other_filters_work_as_before():
    frame = _frame()
    expected = int((frame.grade != 1).sum())  # counted by pandas
    for text in ("grade != 1", 'grade != "6"'):
        kept, _, _ = apply_filters(frame, [parse_filter(text)], "g.sav", {"grade": GRADES})
        assert len(kept) == expected == 5
    # a number that is no label compares codes; a label equal to its own code is no second reading
    kept, _, _ = apply_filters(frame, [parse_filter("grade = 2")], "g.sav", {"grade": GRADES})
    assert len(kept) == int((frame.grade == 2).sum())
    kept, _, _ = apply_filters(frame, [parse_filter("grade = 2")], "g.sav", {"grade": {1.0: "1", 2.0: "2"}})
    assert len(kept) == 2
    # text labels are compared with the labels, as before
    kept, _, _ = apply_filters(frame, [parse_filter("grade = north")], "g.sav",
                               {"grade": {1.0: "north", 2.0: "south", 3.0: "east", 4.0: "west", 5.0: "centre"}})
    assert len(kept) == int((frame.grade == 1).sum())


def test_the_fit_of_an_spss_file_refuses_the_filter(tmp_path):
    import pyreadstat

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv").drop(columns="district")
    data["grade"] = (data.index % 5 + 1).astype(float)
    path = tmp_path / "g.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={"grade": GRADES})
    model = (resource_dir("models") / "rider_three_factors.cfa").read_text()
    with pytest.raises(OptionError, match="could mean the code 6 .no row holds it. or the value label '6' of code 1"):
        cfa_tool.fit(model, path, keep=["grade != 6"])
    result = cfa_tool.fit(model, path, keep=['grade != "6"'])
    assert result.n_obs == int((data.grade != 1).sum()) == 384


def test_the_command_line_refuses_it_in_one_line_and_writes_nothing(tmp_path, capsys):
    import pyreadstat

    from cfa_tool.cli import main

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv").drop(columns="district")
    data["grade"] = (data.index % 5 + 1).astype(float)
    path = tmp_path / "g.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={"grade": GRADES})
    out = tmp_path / "r.json"
    code = main(["fit", str(resource_dir("models") / "rider_three_factors.cfa"), "--data", str(path),
                 "--group-column", "grade", "--keep", "grade != 6", "--json", str(out)])
    err = capsys.readouterr().err
    assert code == 2 and not out.exists() and len(err.strip().splitlines()) == 1
    assert "to compare with the label, write its code: 'grade != 1'" in err


def test_a_code_whose_own_label_is_a_number_is_written_by_that_label():
    """Re-check s15 (R2): codes 1-5 labelled '2'-'6': 'grade != 3' was refused with 'the code 3 has no label of its own
    to compare with', while its label '4' in quotes keeps the rows wanted."""
    labels = {1.0: "2", 2.0: "3", 3.0: "4", 4.0: "5", 5.0: "6"}
    message = _refusal("grade != 3", labels)
    assert "to compare with the code 3, write its label: 'grade != \"4\"'" in message
    assert "has no label of its own" not in message
    kept, _, _ = apply_filters(_frame(), [parse_filter('grade != "4"')], "g.sav", {"grade": labels})
    assert list(kept["grade"]) == [1.0, 2.0, 4.0, 5.0, 1.0, 2.0]
