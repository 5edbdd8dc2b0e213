"""The README and the reference pages in docs/ held against what they describe: their links, the README's two
commands against what CI runs, the options page against the parsers, the commands table against the commands, and
the examples they show against what the tool does with them."""

from __future__ import annotations

import argparse
import importlib.util
import re
import shutil
import unicodedata
from pathlib import Path

import pytest

from cfa_tool.cli import build_parser, main

ROOT = Path(__file__).resolve().parents[2]
PAGES = [ROOT / "README.md", *sorted((ROOT / "docs").glob("*.md"))]
LINK = re.compile(r"\[[^\]]*\]\(([^)\s]+)\)")


def _commands() -> dict[str, argparse.ArgumentParser]:
    sub = next(a for a in build_parser()._actions if isinstance(a, argparse._SubParsersAction))  # noqa: SLF001
    return dict(sub.choices)


def _code_blocks(text: str) -> list[str]:
    return re.findall(r"^```[a-z]*\n(.*?)^```$", text, re.M | re.S)


def _anchor(heading: str) -> str:
    """The anchor a Markdown heading gets on the usual code-hosting sites: lower case, punctuation other than '-' and
    '_' dropped (letters of any script kept), each space a hyphen."""
    words = "".join(c for c in heading.strip().lower()
                    if c in " -_" or unicodedata.category(c)[0] in "LN")
    return words.replace(" ", "-")


def _anchors(page: Path) -> set[str]:
    text = re.sub(r"^```.*?^```$", "", page.read_text(encoding="utf-8"), flags=re.M | re.S)
    return {_anchor(h) for h in re.findall(r"^#+ (.+)$", text, re.M)}


def test_the_pages_are_there_and_link_to_each_other():
    names = {p.name for p in PAGES}
    assert {"README.md", "model-language.md", "data-files.md", "summary-statistics.md", "options.md", "python.md",
            "json.md", "methods.md", "speed.md"} <= names
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    linked = {Path(t).name for t in LINK.findall(readme) if t.startswith("docs/")}
    assert {p.name for p in PAGES if p.parent.name == "docs" and p.name != "README.md"} <= linked


@pytest.mark.parametrize("page", PAGES, ids=lambda p: p.relative_to(ROOT).as_posix())
def test_every_relative_link_points_to_an_existing_file_and_heading(page):
    text = re.sub(r"^```.*?^```$", "", page.read_text(encoding="utf-8"), flags=re.M | re.S)
    for target in LINK.findall(text):
        if re.match(r"[a-z]+:", target):  # a web address: not this repository's to check
            continue
        path, _, anchor = target.partition("#")
        file = (page.parent / path).resolve() if path else page
        assert file.exists(), f"{page.name}: link to {target}: no such file"
        assert ROOT in file.parents or file == ROOT, f"{page.name}: link to {target} leaves the repository"
        if anchor:
            assert file.suffix == ".md" and anchor in _anchors(file), f"{page.name}: link to {target}: no such heading"


def test_the_anchor_rule_reads_headings_as_written():
    # the rule the link check relies on, on headings of these pages (common practice of Markdown renderers)
    assert _anchor("Rows with missing answers") == "rows-with-missing-answers"
    assert _anchor("Population values of `simulate` and `power-simulation`") == \
        "population-values-of-simulate-and-power-simulation"
    assert _anchor("power-simulation") == "power-simulation"


def test_the_readme_gives_the_two_commands_ci_runs():
    # the README opens with exactly two commands: install and run the demo, install and run the tests; .ci/run
    # installs the same package with the same extra, runs the demo and then the same test command
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    opening = readme.split("\n## ", 1)[0]
    blocks = [b.strip() for b in _code_blocks(opening)]
    assert len(blocks) == 2 and all("\n" not in b for b in blocks)
    demo, tests = ([step.strip() for step in b.split("&&")] for b in blocks)
    venv = ["python3 -m venv .venv", ". .venv/bin/activate"]
    assert demo == [*venv, "pip install .", "cfa-tool demo"]
    assert tests == [*venv, 'pip install ".[test]"', "python -m pytest"]
    ci = [line.strip() for line in (ROOT / ".ci" / "run").read_text(encoding="utf-8").splitlines()]
    assert "python3 -m venv .ci-venv" in ci
    assert 'python -m pip install --quiet ".[test]"' in ci  # the test command's install, quietly
    assert any("&& cfa-tool demo " in line for line in ci)
    assert "python -m pytest" in ci


def test_the_options_page_is_written_from_the_parsers(monkeypatch):
    # docs/options.md is what docs/write_options.py writes from the parsers now, whatever the terminal's width
    monkeypatch.setenv("COLUMNS", "37")
    spec = importlib.util.spec_from_file_location("write_options", ROOT / "docs" / "write_options.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    written = (ROOT / "docs" / "options.md").read_text(encoding="utf-8")
    assert written == module.options_markdown(), "run 'python docs/write_options.py' after changing an option"
    for name, parser in _commands().items():
        section = written.split(f"\n## {name}\n", 1)[1].split("\n## ", 1)[0]
        for action in parser._actions:  # noqa: SLF001
            shown = action.help != argparse.SUPPRESS and not isinstance(action, argparse._HelpAction)
            if action.option_strings and shown:
                assert f"| `{action.option_strings[0]}" in section, (name, action.option_strings)


def test_the_readme_table_has_every_command_once_and_the_report_options_as_said():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    table = readme.split("\n## Commands\n", 1)[1].strip().split("\n\n", 1)[0]
    named = re.findall(r"^\| `cfa-tool ([a-z-]+)", table, re.M)
    assert sorted(named) == sorted(_commands()) and len(named) == len(set(named))
    # "Every command but `report` (which reads a saved result) takes `--json`, `--html`, ..."
    sentence = " ".join(readme.split("Every command but `report`", 1)[1].split(";")[0].split())
    said = re.findall(r"`(--[a-z]+)", sentence)
    assert said == ["--json", "--html", "--markdown", "--docx", "--tables"]
    for name, parser in _commands().items():
        has = {flag for flag in said if flag in parser._option_string_actions}  # noqa: SLF001
        assert has == (set(said) - {"--json"} if name == "report" else set(said)), name


def test_the_reports_page_names_the_commands_that_write_report_files():
    page = " ".join((ROOT / "docs" / "reports.md").read_text(encoding="utf-8").split())
    assert "Report files, on `fit` and `demo`:" in page
    listed, options = page.split("Every other command (", 1)[1].split(") takes ", 1)
    named = re.findall(r"`([a-z-]+)`", listed)
    said = re.findall(r"`(--[a-z]+)", options.split(" too:", 1)[0])
    assert said == ["--json", "--html", "--markdown", "--docx", "--tables"]
    assert sorted(named) == sorted(set(_commands()) - {"fit", "demo", "report"})
    for name in named:
        assert set(said) <= set(_commands()[name]._option_string_actions), name  # noqa: SLF001


def test_the_python_page_names_a_function_for_every_command_but_two():
    import cfa_tool

    page = " ".join((ROOT / "docs" / "python.md").read_text(encoding="utf-8").split())
    assert "Every command but `demo` and `report` is a function of the `cfa_tool` package" in page
    for name in set(_commands()) - {"demo", "report"}:
        assert name.replace("-", "_") in cfa_tool.__all__ and callable(getattr(cfa_tool, name.replace("-", "_")))
    assert "invariance_power" in cfa_tool.__all__


def test_the_readmes_first_model_fits_the_demo_and_its_mistake_reads_as_shown(tmp_path, capsys):
    # the README's first model is the demo's three-factor model; the model language page's mistake is what the
    # command prints for that model with 'on_time' misspelt on its line 4
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    model = next(b for b in _code_blocks(readme) if "factor punctuality" in b)
    shipped = (ROOT / "models" / "rider_three_factors.cfa").read_text(encoding="utf-8")
    assert [line for line in model.splitlines() if line.startswith("factor")] == \
        [line for line in shipped.splitlines() if line.startswith("factor")]
    shutil.copy(ROOT / "demo" / "rider_survey.csv", tmp_path / "rider_survey.csv")
    (tmp_path / "rider.cfa").write_text(model.replace("on_time", "on_tme"), encoding="utf-8")
    language = (ROOT / "docs" / "model-language.md").read_text(encoding="utf-8")
    shown = next(b for b in _code_blocks(language) if b.startswith("cfa-tool: rider.cfa"))
    with pytest.MonkeyPatch.context() as patch:
        patch.chdir(tmp_path)
        assert main(["check", "rider.cfa", "--data", "rider_survey.csv"]) == 2
    assert capsys.readouterr().err == shown


def test_the_model_language_example_fits_the_demo():
    import cfa_tool

    language = (ROOT / "docs" / "model-language.md").read_text(encoding="utf-8")
    example = language.split("\n## An example\n", 1)[1]
    model = _code_blocks(example)[0]
    result = cfa_tool.fit(model, ROOT / "demo" / "rider_survey.csv", diagnostics=False, modification_indices=False)
    loaded = {r.variables for r in result.estimates if r.kind == "loading"}
    assert ("service", "punctuality") in loaded and ("comfort", "clean") in loaded and result.fit.df > 0


def test_the_summary_statistics_example_reads_as_said(tmp_path):
    # the page's example file: Holzinger & Swineford (1939) six tests, N = 301 (the correlations as the page
    # prints them); read as a correlation matrix with its standard deviations, and fitted
    import cfa_tool

    page = (ROOT / "docs" / "summary-statistics.md").read_text(encoding="utf-8")
    example = next(b for b in _code_blocks(page) if b.startswith("# Holzinger"))
    path = tmp_path / "six_tests.stats"
    path.write_text(example, encoding="utf-8")
    model = "factor visual: x1, x2, x3\nfactor verbal: x4, x5, x6\n"
    result = cfa_tool.fit(model, path, diagnostics=False, modification_indices=False)
    assert result.n_obs == 301 and result.fit.df == 8  # 21 variances and covariances less 13 free parameters


def test_the_advice_to_write_a_summary_statistics_file_names_the_page_that_shows_it(tmp_path, capsys):
    # a matrix saved without its row names (pandas' DataFrame.cov().to_csv(index=False)) is refused with the advice
    # to write it as summary statistics; the page the advice names exists and shows the layout (it named the
    # README's section, which the README no longer has)
    import pandas as pd

    from cfa_tool.data.summary_stats import LAYOUT_PAGE

    rows = pd.read_csv(ROOT / "demo" / "rider_survey.csv")
    items = ["on_time", "short_wait", "accurate_info", "easy_transfer"]
    rows[items].cov().to_csv(tmp_path / "cov.csv", index=False)
    (tmp_path / "m.cfa").write_text("factor punctuality: " + ", ".join(items) + "\n", encoding="utf-8")
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "cov.csv")]) == 2
    err = " ".join(capsys.readouterr().err.split())
    assert f"(the reference page on summary statistics, {LAYOUT_PAGE}, shows the layout)" in err
    page = (ROOT / LAYOUT_PAGE).read_text(encoding="utf-8")
    assert page.startswith("# Summary statistics") and "\ncorrelation,x1,x2,x3,x4,x5,x6\nx1,1\n" in page
