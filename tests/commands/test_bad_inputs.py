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


def _check(code, err, expected_code, words, before, work, absent=()):
    assert code == expected_code, err
    assert "Traceback" not in err
    first = err.splitlines()[0]
    assert first.startswith("cfa-tool"), first
    for word in words:
        assert word in first, (word, first)
    for word in absent:  # advice that cannot apply to this command
        assert word not in first, (word, first)
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
    _check(code, err, case["exit"], case["words"], before, corpus, case.get("absent", ()))


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
    _check(code, err, 2, ["merged.xlsx", "merged cells (A1:C1 'Items')"], before, corpus)


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


@pytest.mark.parametrize("command", [["align", "models/ordinal_in_compare.cfa", "--group-column", "site"]])
def test_workflows_for_continuous_items_refuse_ordinal_declarations(command, corpus, capsys):
    before = _snapshot(corpus)
    argv = command + (["--data", "data/good.csv"] if command[0] != "replicate" else [])
    code, _, err = _run(argv, capsys)
    _check(code, err, 2, ["ordinal_in_compare.cfa:3:9:", f"'{command[0]}' treats every item as continuous"], before, corpus)


# ---------------------------------------------------------------- cases that need a file made at run time


def test_json_to_a_symbolic_link_replaces_the_target_and_keeps_the_link(corpus, capsys):
    (corpus / "target.json").write_text("old")
    (corpus / "link.json").symlink_to("target.json")
    command = ["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "link.json"]
    code, _, err = _run(command, capsys)  # the target is a file the tool did not write: left alone
    assert code == 2 and "'link.json' is a symbolic link to '" in err and "target.json', which was not written by" in err
    assert (corpus / "target.json").read_text() == "old"
    (corpus / "target.json").unlink()
    for _ in range(2):  # written through the link, then replaced: the tool wrote it
        code, _, err = _run(command, capsys)
        assert code == 0, err
        assert (corpus / "link.json").is_symlink()
        assert __import__("json").loads((corpus / "target.json").read_text())["converged"] is True


def test_outputs_replace_only_files_the_tool_wrote_unchanged(corpus, capsys):
    # a typo naming someone's file, a read-only report and a report edited by hand are never replaced; a
    # report the tool wrote is replaced on the next run, and rows of data never are
    (corpus / "notes.md").write_text("my notes")
    command = ["fit", "models/good.cfa", "--data", "data/good.csv", "--markdown"]
    code, _, err = _run(command + ["notes.md"], capsys)
    assert code == 2 and "'notes.md' exists and was not written by cfa-tool" in err
    assert (corpus / "notes.md").read_text() == "my notes"
    for _ in range(2):
        code, _, err = _run(command + ["report.md"], capsys)
        assert code == 0, err
    (corpus / "report.md").write_text((corpus / "report.md").read_text() + "\nmy edit\n")
    code, _, err = _run(command + ["report.md"], capsys)
    assert code == 2 and "or was changed since" in err and "my edit" in (corpus / "report.md").read_text()
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", ".cfa-tool-files.json"], capsys)
    assert code == 2 and "record of the files it wrote" in err


def test_json_to_a_symbolic_link_to_the_data_is_refused(corpus, capsys):
    (corpus / "link.csv").symlink_to("data/good.csv")
    before = _snapshot(corpus)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "link.csv"], capsys)
    _check(code, err, 2, ["--json: refusing to write to 'link.csv': it is the input file 'data/good.csv'"], before, corpus)


def test_json_to_a_hard_link_of_the_model_is_refused(corpus, capsys):
    import os

    os.link(corpus / "models" / "good.cfa", corpus / "same.cfa")
    before = _snapshot(corpus)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "same.cfa"], capsys)
    _check(code, err, 2, ["refusing to write to 'same.cfa'"], before, corpus)


@pytest.mark.parametrize("command", [["fit", "models/good.cfa", "--data", "data/good.csv"],
                                     ["invariance", "models/good.cfa", "--data", "data/good.csv", "--group-column",
                                      "site"], ["report", "saved.json"]])
def test_a_report_under_another_kinds_ending_leaves_the_file_there(corpus, capsys, command):
    # hostile trial s27, case 15: '--docx r1.json' replaced a JSON result this tool had saved with a Word file
    for saved in ("saved.json", "r1.json"):
        code, _, _ = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", saved], capsys)
        assert code == 0
    for option, name in (("--docx", "r1.json"), ("--html", "r1.json"), ("--markdown", "new.csv"),
                         ("--docx", "new.txt"), *((("--json", "new.docx"),) if command[0] != "report" else ())):
        before = _snapshot(corpus)
        code, _, err = _run(command + [option, name], capsys)
        ending = name[name.rindex("."):]
        _check(code, err, 2, [f"{option}: '{name}' ends in {ending}, the ending of another kind of file"], before,
               corpus)


def test_named_pipe_and_character_device_are_written_in_place(corpus, capsys):
    import os

    fifo = corpus / "pipe"
    os.mkfifo(fifo)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "pipe"], capsys)
    assert code == 2 and "no program is reading from the named pipe 'pipe'" in err  # instead of waiting forever
    import threading
    import time

    reader = os.open(fifo, os.O_RDONLY | os.O_NONBLOCK)  # a reader first, which reads as the fit writes: the JSON
    chunks: list[bytes] = []  # is larger than the pipe's buffer (64 KiB here), and a writer waits for room

    def read_all() -> None:
        import select

        while True:
            select.select([reader], [], [], 0.05)
            try:
                chunk = os.read(reader, 1 << 16)
            except BlockingIOError:
                continue
            if chunk:
                chunks.append(chunk)
            elif chunks:  # end of file: the writer closed the pipe
                return
            else:  # no writer yet
                time.sleep(0.01)

    thread = threading.Thread(target=read_all, daemon=True)
    thread.start()
    try:
        code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "pipe"], capsys)
        thread.join(timeout=60)
    finally:
        os.close(reader)
    received = b"".join(chunks).decode()
    assert code == 0, err
    assert '"converged": true' in received
    assert fifo.is_fifo()  # never renamed over
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "/dev/null"], capsys)
    assert code == 0, err
    assert Path("/dev/null").is_char_device()


def test_a_named_pipe_without_a_writer_as_data(corpus, capsys):
    import os

    os.mkfifo(corpus / "data" / "pipe.csv")
    before = _snapshot(corpus)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/pipe.csv"], capsys)
    _check(code, err, 2, ["no program wrote to the named pipe 'data/pipe.csv'"], before, corpus)


def test_json_to_standard_output_still_writes_the_other_reports(corpus, capsys):
    code, out, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "-", "--html", "r.html"], capsys)
    assert code == 0, err
    assert __import__("json").loads(out)["converged"] is True  # standard output holds the JSON alone
    assert (corpus / "r.html").read_text().startswith("<!DOCTYPE html>")
    assert "HTML report written to r.html" in err


def test_output_into_a_read_only_folder(corpus, capsys):
    import os

    if os.geteuid() == 0:
        pytest.skip("the superuser may write into read-only folders")
    locked = corpus / "locked"
    locked.mkdir()
    locked.chmod(0o500)
    before = _snapshot(corpus)
    try:
        code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "locked/r.json"], capsys)
    finally:
        locked.chmod(0o700)
    _check(code, err, 2, ["--json: cannot write 'locked/r.json'", "is not writable"], before, corpus)


def test_outputs_follow_the_umask(corpus, capsys):
    import os

    old = os.umask(0o027)
    try:
        code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--json", "r.json", "--tables", "t"], capsys)
    finally:
        os.umask(old)
    assert code == 0, err
    assert (corpus / "r.json").stat().st_mode & 0o777 == 0o640
    assert (corpus / "t" / "fit.csv").stat().st_mode & 0o777 == 0o640


def test_table_folder_is_written_again_but_a_changed_table_is_kept(corpus, capsys):
    argv = ["fit", "models/good.cfa", "--data", "data/good.csv", "--tables", "t"]
    assert _run(argv, capsys)[0] == 0
    assert _run(argv, capsys)[0] == 0  # the tool's own unchanged tables may be replaced
    edited = corpus / "t" / "fit.csv"
    edited.write_text(edited.read_text() + "my note\n")
    before = _snapshot(corpus)
    code, _, err = _run(argv, capsys)
    _check(code, err, 2, ["'t/fit.csv' exists and was not written by cfa-tool (or was changed since)"], before, corpus)


def test_summary_statistics_linked_to_an_endless_device(corpus, capsys):
    (corpus / "data" / "zero.stats").symlink_to("/dev/zero")
    (corpus / "data" / "zero.csv").symlink_to("/dev/zero")
    (corpus / "models" / "zero.cfa").symlink_to("/dev/zero")
    before = _snapshot(corpus)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/zero.stats"], capsys)
    _check(code, err, 2, ["summary-statistics file 'data/zero.stats' holds more than"], before, corpus)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/zero.csv"], capsys)
    _check(code, err, 2, ["data file 'data/zero.csv' holds more than"], before, corpus)
    code, _, err = _run(["fit", "models/zero.cfa", "--data", "data/good.csv"], capsys)
    _check(code, err, 2, ["model file 'models/zero.cfa' holds more than"], before, corpus)


def test_model_path_longer_than_the_system_allows(corpus, capsys):
    before = _snapshot(corpus)
    code, _, err = _run(["fit", "m" * 300 + ".cfa", "--data", "data/good.csv"], capsys)
    _check(code, err, 2, ["the name is too long for the file system"], before, corpus)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "d" * 300 + ".csv"], capsys)
    _check(code, err, 2, ["the name is too long for the file system"], before, corpus)


def test_a_chain_of_higher_order_factors(corpus, capsys):
    lines = ["factor f0: q1, q2, q3"] + [f"factor f{i}: f{i - 1}, q{4 + i % 3}" for i in range(1, 1500)]
    (corpus / "models" / "chain.cfa").write_text("\n".join(lines) + "\n")
    before = _snapshot(corpus)
    code, _, err = _run(["check", "models/chain.cfa", "--data", "data/good.csv"], capsys)
    _check(code, err, 2, ["chain.cfa:501:8:", "the model declares 1,500 factors; this tool fits at most 500"], before, corpus)


def test_bootstrap_whose_resamples_all_fail(corpus, capsys):
    lines = (corpus / "data" / "good.csv").read_text().splitlines()
    # 7 rows for 6 variables: a resample has 7 distinct rows (a covariance matrix of full rank) with
    # probability 7!/7^7 = .006, so with this seed none of the 10 can be fitted
    (corpus / "data" / "few.csv").write_text("\n".join(lines[:8]) + "\n")
    before = _snapshot(corpus)
    code, _, err = _run(["bootstrap", "models/good.cfa", "--data", "data/few.csv", "--replications", "10",
                         "--workers", "1"], capsys)
    _check(code, err, 3, ["0 of 10 bootstrap resamples could be fitted"], before, corpus)


def test_escape_sequences_never_reach_the_terminal(corpus, capsys):
    data = (corpus / "data" / "good.csv").read_text().replace(",b\n", ",\x1b[2Jb\x1b]0;title\x07\n")
    (corpus / "data" / "escapes.csv").write_text(data.replace("q1,", "q1\x1b[31m,", 1))
    model = 'name "\x1b[2Jcleared"\nfactor f: "q1\x1b[31m", q2, q3\nfactor g: q4, q5, q6\n'
    (corpus / "models" / "escapes.cfa").write_text(model)
    code, out, err = _run(["fit", "models/escapes.cfa", "--data", "data/escapes.csv", "--group-column", "site"], capsys)
    assert code == 0, err
    assert "\x1b" not in out and "\x07" not in out
    assert "\\x1b[2Jcleared" in out and "\\x1b[2Jb\\x1b]0;title\\x07" in out
    code, out, err = _run(["fit", "models/escape_in_name.cfa", "--data", "data/good.csv"], capsys)
    assert code == 2 and "\x1b" not in err


def test_a_link_to_a_file_in_a_folder_that_does_not_exist_is_named_with_its_target(corpus, capsys):
    (corpus / "dangling.html").symlink_to("/nonexistent/folder/x.html")
    before = _snapshot(corpus)
    code, _, err = _run(["fit", "models/good.cfa", "--data", "data/good.csv", "--html", "dangling.html"], capsys)
    _check(code, err, 2, ["--html: cannot write 'dangling.html': it is a symbolic link to '/nonexistent/folder/x.html', "
                          "whose folder '/nonexistent/folder' does not exist"], before, corpus)


@pytest.mark.parametrize("command", [["fit", "models/good.cfa"], ["check", "models/good.cfa"],
                                     ["explore", "--items", "q1..q6"]])
def test_a_table_folder_is_made_only_inside_an_existing_folder(corpus, capsys, command):
    # as for every file output, the folder a new table folder goes into must exist: no folders made on the way
    before = _snapshot(corpus)
    code, _, err = _run([*command, "--data", "data/good.csv", "--tables", "new/tables"], capsys)
    _check(code, err, 2, ["--tables: cannot create the folder 'new/tables': the folder 'new' does not exist"], before,
           corpus)
    assert not (corpus / "new").exists()
    (corpus / "gone").symlink_to("/nonexistent/tables")
    code, _, err = _run([*command, "--data", "data/good.csv", "--tables", "gone"], capsys)
    assert code == 2 and "'gone' is a symbolic link to '/nonexistent/tables', which does not exist" in err
    code, _, err = _run([*command, "--data", "data/good.csv", "--tables", "tables"], capsys)
    assert code == 0, err  # a new folder inside an existing one
    assert (corpus / "tables").is_dir()
