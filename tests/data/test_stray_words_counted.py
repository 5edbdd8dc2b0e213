"""Text among numbers in several cells is one error that counts them and names each different word (new-user trial
s13, U4: 'Ne sait pas', French for "don't know", in 11 cells of 8 items, of which the error named the first only).
One such cell keeps its own message.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) with words written
into some cells here; the cells are counted with pandas."""

from __future__ import annotations

import pytest

from tests.conftest import run_cli


@pytest.mark.parametrize("cells", [{(47, "on_time"): "Ne sait pas", (60, "clean"): "Ne sait pas",
                                    (61, "clean"): "Ne sait pas", (90, "helpful"): "Sans avis"}])
def test_several_stray_words_are_counted_and_named(cells, rider_demo, rider_model, tmp_path, capsys):
    frame = rider_demo.astype(object)
    for (row, column), text in cells.items():
        frame.loc[row, column] = text
    data = tmp_path / "survey.csv"
    frame.to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, _, err = run_cli(["check", model, "--data", data], capsys)
    assert code == 2
    said = frame.isin(["Ne sait pas"]).to_numpy().sum(), frame.isin(["Sans avis"]).to_numpy().sum()  # by pandas
    assert (f"survey.csv: 4 cells of 3 columns ('on_time', 'clean', 'helpful') hold text among numbers: 'Ne sait pas' "
            f"({said[0]} cells), 'Sans avis' ({said[1]} cell); the first is 'Ne sait pas' in column 'on_time', row 49"
            ) in err  # the file's row 49: the header is row 1
    assert 'if the words mean no answer, give them with --missing-codes "Ne sait pas,Sans avis"' in err
    one = rider_demo.astype(object)
    one.loc[47, "on_time"] = "Ne sait pas"
    one.to_csv(data, index=False)
    code, _, err = run_cli(["check", model, "--data", data], capsys)
    assert code == 2 and "column 'on_time' holds text ('Ne sait pas' in row 49) among numbers" in err
    assert 'if the word means no answer, give it with --missing-codes "Ne sait pas"' in err
    code, _, err = run_cli(["check", model, "--data", data, "--missing-codes", "Ne sait pas"], capsys)
    assert code == 0, err  # the advice followed: the cell read as no answer


@pytest.mark.parametrize("command", ["check", "explore"])
def test_a_word_of_no_answer_in_more_cells_than_a_slip_gets_the_option_that_reads_it(command, rider_demo, rider_model,
                                                                                     tmp_path, capsys):
    # s26: 'Weiß nicht' (German for "don't know") in 5 cells of one item, more than the 3 cells (or 1%) of a slip, was
    # refused with 'recode the answers as numbers' (explore left the item out as 'answers recorded as words'), and no
    # word of the option that reads it as no answer
    frame = rider_demo.astype(object)
    rows = [3, 10, 50, 80, 120]
    frame.loc[rows, "clean"] = "Weiß nicht"
    data = tmp_path / "survey.csv"
    frame.to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, _, err = run_cli([command, model, "--data", data] if command == "check" else [command, "--data", data],
                           capsys)
    assert code == 2 and "recode the answers as numbers" not in err
    assert 'if the word means no answer, give it with --missing-codes "Weiß nicht"' in err
    if command == "check":
        assert f"{len(rows)} cells of 1 column ('clean') hold text among numbers: 'Weiß nicht' ({len(rows)} cells)" in err
    code, _, err = run_cli([command, model, "--data", data, "--missing-codes", "Weiß nicht"] if command == "check" else
                           [command, "--data", data, "--missing-codes", "Weiß nicht"], capsys)
    assert code == 0, err  # the advice followed: the cells read as no answer
