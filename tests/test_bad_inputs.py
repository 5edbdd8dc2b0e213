"""The corpus of bad inputs in tests/bad_inputs/: every case must end with one line on
standard error naming the problem and where, exit code 2 (3 when the model cannot be
estimated), no traceback, and no file created or changed."""

from __future__ import annotations

import hashlib
import shutil
import tomllib
from pathlib import Path

import pytest

from cfa_tool.cli import main

CORPUS = Path(__file__).parent / "bad_inputs"
CASES = tomllib.loads((CORPUS / "cases.toml").read_text())["case"]


def _snapshot(folder: Path) -> dict[str, str]:
    return {str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.rglob("*")) if p.is_file()}


def _run(argv: list[str], capsys) -> tuple[int, str, str]:
    try:
        code = main(argv)
    except SystemExit as exc:  # argparse's own exits
        code = exc.code
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.fixture()
def corpus(tmp_path, monkeypatch) -> Path:
    work = tmp_path / "corpus"
    shutil.copytree(CORPUS, work)
    monkeypatch.chdir(work)
    return work


def _check(code, err, expected_code, words, before, work):
    assert code == expected_code, err
    assert "Traceback" not in err
    first = err.splitlines()[0]
    assert first.startswith("cfa-tool"), first
    for word in words:
        assert word in first, (word, first)
    assert _snapshot(work) == before, "a file was created or changed"


def test_the_corpus_is_large_enough():
    assert len(CASES) >= 40
    assert len({c["name"] for c in CASES}) == len(CASES)


def _argv(case: dict) -> list[str]:
    """A case gives either ``args`` added to a fit of ``model`` on ``data`` that also asks for JSON
    and HTML, or the whole ``argv`` of any command; {data} and {model} stand for their paths."""
    data = f"data/{case.get('data', 'good.csv')}"
    model = f"models/{case.get('model', 'good.cfa')}"
    if "argv" in case:
        return [a.replace("{data}", data).replace("{model}", model) for a in case["argv"]]
    args = [a.replace("{data}", data).replace("{model}", model) for a in case["args"]]
    return ["fit", model, "--data", data, "--json", "out.json", "--html", "out.html", *args]


@pytest.mark.parametrize("case", CASES, ids=[c["name"] for c in CASES])
def test_bad_input(case, corpus, capsys):
    before = _snapshot(corpus)
    code, _, err = _run(_argv(case), capsys)
    _check(code, err, case["exit"], case["words"], before, corpus)


def test_ten_megabyte_model_file(corpus, capsys):
    huge = corpus / "models" / "huge.cfa"
    huge.write_text("factor f: q1, q2, q3\n" + "# padding\n" * 1_100_000)
    before = _snapshot(corpus)
    code, _, err = _run(["fit", "models/huge.cfa", "--data", "data/good.csv", "--json", "out.json"], capsys)
    _check(code, err, 2, ["huge.cfa", "a model file is at most"], before, corpus)


def test_excel_file_with_a_merged_header(corpus, capsys):
    import openpyxl

    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["Items", None, None, "group"])
    sheet.append(["q1", "q2", "q3", "site"])
    sheet.merge_cells("A1:C1")
    book.save(corpus / "data" / "merged.xlsx")
    before = _snapshot(corpus)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/merged.xlsx", "--json", "out.json"], capsys)
    _check(code, err, 2, ["merged.xlsx", "merged cells (A1:C1)"], before, corpus)


def test_values_far_apart_in_scale_are_handled(corpus, capsys):
    # items scored in millionths beside items scored in millions: not an error, and the same fit
    code, out, err = _run(["fit", "models/good.cfa", "--data", "data/far_apart_scales.csv", "--json", "-"], capsys)
    assert code == 0, err
    scaled = __import__("json").loads(out)
    code, out, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "-"], capsys)
    plain = __import__("json").loads(out)
    assert scaled["fit"]["chi_square"] == pytest.approx(plain["fit"]["chi_square"], rel=1e-6)


def test_starting_values_far_off_still_converge(corpus, capsys):
    model = corpus / "models" / "far_start.cfa"
    model.write_text("factor f: q1, q2, q3\nfactor g: q4, q5, q6\nstart loading(f, q2) = 40\nstart variance(q5) = 0.0001\n")
    code, out, err = _run(["fit", "models/far_start.cfa", "--data", "data/good.csv", "--json", "-"], capsys)
    assert code == 0, err
    code, good, _ = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "-"], capsys)
    import json

    assert json.loads(out)["fit"]["chi_square"] == pytest.approx(json.loads(good)["fit"]["chi_square"], rel=1e-6)


@pytest.mark.parametrize("command", [["bootstrap", "models/ordinal_in_compare.cfa", "--replications", "10"],
                                     ["replicate", "models/ordinal_in_compare.cfa", "--calibration", "data/good.csv",
                                      "--validation", "data/good.csv"]])
def test_workflows_for_continuous_items_refuse_ordinal_declarations(command, corpus, capsys):
    before = _snapshot(corpus)
    argv = command + (["--data", "data/good.csv"] if command[0] != "replicate" else [])
    code, _, err = _run(argv, capsys)
    _check(code, err, 2, ["ordinal_in_compare.cfa:3:9:", f"'{command[0]}' treats every item as continuous"], before, corpus)
