"""A workbook read without a sheet named whose other sheets hold the model's items too (a survey split over sheets,
Wave1 and Wave2) is a caution first naming those sheets (hostile trial s13, H8): the first sheet alone was analysed
with only a plain note that the workbook 'also has' another sheet.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), split in two
sheets by pandas; the rows analysed are counted with pandas."""

from __future__ import annotations

import json

import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import run_cli


def test_other_sheets_with_the_items_are_named_first(rider_demo, rider_model, tmp_path, capsys):
    book = tmp_path / "waves.xlsx"
    with pd.ExcelWriter(book) as writer:
        rider_demo.iloc[:240].to_excel(writer, sheet_name="Wave1", index=False)
        rider_demo.iloc[240:].to_excel(writer, sheet_name="Wave2", index=False)
        pd.DataFrame({"note": ["fictional survey"]}).to_excel(writer, sheet_name="Notes", index=False)
    result = cfa_tool.fit(rider_model, book)
    assert result.n_obs == 240  # the first sheet, as before
    first = result.problems[0]
    assert first.kind is ProblemKind.OTHER_SHEETS_WITH_ITEMS
    assert first.explanation == ("waves.xlsx: only the sheet 'Wave1' was read, and the workbook's sheet 'Wave2' "
                                 "holds columns named as every item of the model too.")  # not 'Notes'
    # the advice pools the sheets only if they are parts of one sample (new-user trial s23: one sheet per wave of the
    # same people, whose rows pooled would be taken for other people)
    advice = " ".join(str(first.advice).split())
    assert advice.startswith("If the sheets hold parts of one sample, put their rows in one sheet")
    assert "the same people at another time (a wave), do not pool them" in advice
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, out, _ = run_cli(["fit", model, "--data", book, "--json", tmp_path / "r.json"], capsys)
    assert code == 0
    plain = " ".join(out.replace("│", " ").split())
    assert plain.index("only the sheet 'Wave1' was read") < 200
    assert json.loads((tmp_path / "r.json").read_text())["problems"][0]["kind"] == ProblemKind.OTHER_SHEETS_WITH_ITEMS.value
    # a sheet named says nothing of the kind, nor does a workbook whose other sheet holds other columns
    named = cfa_tool.fit(rider_model, book, sheet="Wave2")
    assert ProblemKind.OTHER_SHEETS_WITH_ITEMS not in [p.kind for p in named.problems]
    other = tmp_path / "notes.xlsx"
    with pd.ExcelWriter(other) as writer:
        rider_demo.to_excel(writer, sheet_name="Data", index=False)
        rider_demo[["rider_id", "district"]].to_excel(writer, sheet_name="Riders", index=False)
    assert ProblemKind.OTHER_SHEETS_WITH_ITEMS not in [p.kind for p in cfa_tool.fit(rider_model, other).problems]


def test_a_sheet_of_question_texts_under_the_item_names_is_no_second_sheet_of_answers(rider_demo, rider_model,
                                                                                         tmp_path):
    # review s13: a 'Labels' sheet (the item names and one row of question texts) was called a sheet of answers
    book = tmp_path / "labelled.xlsx"
    labels = pd.DataFrame([{c: f"How do you rate: {c}?" for c in rider_demo.columns}])
    with pd.ExcelWriter(book) as writer:
        rider_demo.to_excel(writer, sheet_name="Data", index=False)
        labels.to_excel(writer, sheet_name="Labels", index=False)
    assert ProblemKind.OTHER_SHEETS_WITH_ITEMS not in [p.kind for p in cfa_tool.fit(rider_model, book).problems]


def test_other_data_scored_with_the_fit_get_its_other_sheets_caution_as_about_the_fit(rider_demo, rider_model,
                                                                                     tmp_path, capsys):
    """scores --from-fit of other data carried the fit's other-sheets caution with its advice, whose --sheet this run
    takes too and would apply to the data scored (new-user trial s23; session note s23, 'Noticed, left alone'): the
    caution is said to be about the fit, with advice about the fit and no option; scoring the fit's own workbook
    again says it once, of the scored file, with the --sheet advice."""
    book = tmp_path / "waves.xlsx"
    with pd.ExcelWriter(book) as writer:
        rider_demo.iloc[:240].to_excel(writer, sheet_name="Wave1", index=False)
        rider_demo.iloc[240:].to_excel(writer, sheet_name="Wave2", index=False)
    other = tmp_path / "other.csv"
    rider_demo.iloc[240:].to_csv(other, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, _, _ = run_cli(["fit", model, "--data", book, "--json", tmp_path / "fit.json"], capsys)
    assert code == 0
    code, out, _ = run_cli(["scores", model, "--from-fit", tmp_path / "fit.json", "--data", other, "--output",
                            tmp_path / "s.csv", "--json", tmp_path / "s.json"], capsys)
    assert code == 0
    sheets = [p for p in json.loads((tmp_path / "s.json").read_text())["problems"]
              if p["kind"] == ProblemKind.OTHER_SHEETS_WITH_ITEMS.value]
    assert len(sheets) == 1
    assert sheets[0]["explanation"].startswith("About the fit (not the scored data): waves.xlsx: only the sheet "
                                               "'Wave1' was read")
    assert "--sheet" not in sheets[0]["advice"] and "fit the model again" in sheets[0]["advice"]
    box = " ".join(out.split("Factor scores:")[0].replace("│", " ").split())
    assert "--sheet" not in box and "the rows the fit's parameters come from, not the data scored here" in box
    code, out, _ = run_cli(["scores", model, "--from-fit", tmp_path / "fit.json", "--data", book, "--output",
                            tmp_path / "again.csv"], capsys)
    box = " ".join(out.split("Factor scores:")[0].replace("│", " ").split())
    assert code == 0 and box.count("only the sheet 'Wave1' was read") == 1 and "About the fit" not in box
    assert "name it with --sheet" in box
