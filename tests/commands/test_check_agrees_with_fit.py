"""``check`` refuses what ``fit`` refuses on the model and the data, with the same first line, and accepts what fit
accepts: the corpus of bad inputs walked case by case (every case run as a fit whose options check takes too), and
models with ordinal items combined with invariance statements, with and without groups (plan s23: a model with an
'ordinal' statement and 'invariance metric' across groups was refused by check, 'holding thresholds equal across
groups applies to ordinal items in a multi-group fit, and this fit has none', and fitted by fit; a 'noninvariant
threshold(q2)' with --ordinal all the same).  What is compared is the tool's own behaviour on the same input, two
commands against each other: no number is asserted."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from cfa_tool.cli import main
from tests.commands import test_bad_inputs as bad_inputs
from tests.commands.test_bad_inputs import CASES, CORPUS, _argv

corpus = bad_inputs.corpus  # the fixture: a copy of the corpus, the working folder

OUTPUTS = {"--json", "--html", "--markdown", "--docx", "--tables", "--diagram"}
# the options of a fit that check takes too, each with the number of values it takes
SHARED = {"--data": 1, "--group-column": 1, "--group": 1, "--sheet": 1, "--names-row": 1, "--first-data-row": 1,
          "--missing-codes": 1, "--rename": 1, "--keep": 1, "--half": 2, "--id": 1, "--ordinal": 1, "--weights": 1,
          "--weight-kind": 1, "--cluster": 1, "--strata": 1, "--json": 1, "--html": 1}
# fit's refusals that check cannot make without fitting, each with the reason
NOT_WITHOUT_FITTING = {
    "rotation_not_identified": "the information matrix at the estimates is singular: known only after the search",
}


def _fit_argv(case: dict) -> list[str] | None:
    """A case's fit as the corpus runs it (tests/commands/test_bad_inputs.py), or None for another command and for
    a case about the outputs rather than the model or the data."""
    argv = _argv(case)
    if argv[:1] != ["fit"] or any(a.split("=", 1)[0] in OUTPUTS for a in case.get("args", ()) if a.startswith("--")):
        return None
    return argv


def _check_argv(fit: list[str]) -> list[str] | None:
    """The same command line as a check, or None when it gives an option only fit has."""
    out, i = ["check"], 1
    while i < len(fit):
        word = fit[i]
        if not word.startswith("--"):
            out.append(word)
            i += 1
            continue
        name = word.split("=", 1)[0]
        if name not in SHARED:
            return None
        width = 1 if "=" in word else 1 + SHARED[name]
        out += fit[i:i + width]
        i += width
    return out


def _compared() -> list[tuple[str, list[str], list[str]]]:
    found = []
    for case in CASES:
        fit = _fit_argv(case)
        check = _check_argv(fit) if fit is not None else None
        if check is not None and case["name"] not in NOT_WITHOUT_FITTING:
            found.append((case["name"], fit, check))
    return found


COMPARED = _compared()


def _first_line(argv: list[str], capsys) -> tuple[int, str]:
    try:
        code = main(argv)
    except SystemExit as exc:  # argparse's own exits
        code = exc.code
    err = capsys.readouterr().err
    # an option's refusal by the argument parser names its command
    err = err.replace(f"cfa-tool: {argv[0]}: ", "cfa-tool: ").replace(f"'cfa-tool {argv[0]} --help'", "'--help'")
    return code, (err.splitlines() or [""])[0]


def test_most_of_the_corpus_is_compared():
    assert len(COMPARED) >= 150  # 177 fits of the corpus at plan s23 take only options check takes too
    assert set(NOT_WITHOUT_FITTING) <= {c["name"] for c in CASES}


@pytest.mark.parametrize("name, fit, check", COMPARED, ids=[name for name, _, _ in COMPARED])
@pytest.mark.usefixtures("corpus")
def test_check_refuses_what_fit_refuses(name, fit, check, capsys):
    fit_code, fit_line = _first_line(fit, capsys)
    check_code, check_line = _first_line(check, capsys)
    if fit_code == 0:
        assert check_code == 0, check_line
    else:
        assert check_code != 0, f"fit refused ({fit_line}) and check accepted"
        assert check_line == fit_line


BASE = "factor f: q1, q2, q3\nfactor g: q4, q5, q6\n"
STATEMENTS = {
    "metric": "invariance metric\n",
    "scalar": "invariance scalar\n",
    "strict": "invariance strict\n",
    "scalar, an intercept set apart": "invariance scalar\nnoninvariant intercept(q2)\n",
    "scalar, thresholds set apart": "invariance scalar\nnoninvariant threshold(q2)\n",
    "metric, thresholds set apart": "invariance metric\nnoninvariant threshold(q2)\n",
    "metric, a loading set apart": "invariance metric\nnoninvariant loading(f, q2)\n",
    "thresholds set apart in one group": "invariance scalar\nin group b: noninvariant threshold(q2)\n",
    "a factor mean fixed in one group": "invariance scalar\nin group b: fix mean(f) = 0\n",
    "strict, a residual variance fixed": "invariance strict\nfix variance(q2) = 0.5\n",
    "a residual variance fixed": "fix variance(q2) = 0.5\n",
    "an intercept freed": "free intercept(q2)\n",
    "scaled by variances": "scale latent by variance\n",
}
DECLARED = {"by statement": ("ordinal q1..q6\n", []), "by option": ("", ["--ordinal", "all"])}
COMBINATIONS = [(what, how, groups) for what in STATEMENTS for how in DECLARED for groups in (True, False)]


@pytest.mark.parametrize("what, how, groups", COMBINATIONS,
                         ids=[f"{w} ({h}, {'groups' if g else 'one group'})" for w, h, g in COMBINATIONS])
def test_ordinal_models_checked_by_the_fits_rules(what, how, groups, tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    statement, option = DECLARED[how]
    Path("m.cfa").write_text(BASE + STATEMENTS[what] + statement)
    shutil.copy(CORPUS / "data" / "ordinal_survey.csv", "d.csv")
    given = ["m.cfa", "--data", "d.csv", *option, *(["--group-column", "site"] if groups else [])]
    fit_code, fit_line = _first_line(["fit", *given], capsys)
    check_code, check_line = _first_line(["check", *given], capsys)
    assert (fit_code == 0) == (check_code == 0), (fit_line, check_line)
    assert check_line == fit_line


# a covariance fixed beyond what the variances at the search's start allow (plan s24: check accepted it, which fit
# refuses before its search at the statement's line): the same first line from check and fit, in one group and in
# groups, on complete rows and on rows with gaps (full-information ML), and with ordinal items; where fit begins its
# search (ordinal items, their latent responses of variance 1 at the start), check accepts too
BEYOND = "factor f: q1, q2, q3\nfactor g: q4, q5, q6\nfix covariance(f, g) = 5\n"
WAYS = {"complete rows": ("good.csv", [], "", True), "groups": ("good.csv", ["--group-column", "site"], "", True),
        "rows with gaps": ("gaps", [], "", True), "ordinal items": ("ordinal_survey.csv", [], "ordinal q1..q6\n", False)}


@pytest.mark.parametrize("way", list(WAYS))
def test_a_covariance_beyond_the_start_variances_stops_check_as_fit(way, tmp_path, monkeypatch, capsys):
    import pandas as pd

    monkeypatch.chdir(tmp_path)
    data, option, statement, stops = WAYS[way]
    Path("m.cfa").write_text(BEYOND + statement)
    if data == "gaps":  # every tenth answer of q2 and q5 left out
        frame = pd.read_csv(CORPUS / "data" / "good.csv")
        frame.loc[frame.index % 10 == 0, "q2"] = None
        frame.loc[frame.index % 10 == 5, "q5"] = None
        frame.to_csv("d.csv", index=False)
    else:
        shutil.copy(CORPUS / "data" / data, "d.csv")
    given = ["m.cfa", "--data", "d.csv", *option]
    fit_code, fit_line = _first_line(["fit", *given], capsys)
    check_code, check_line = _first_line(["check", *given], capsys)
    assert (fit_code == 2 and "is fixed at 5, beyond what the variances" in fit_line) if stops else fit_code == 0, fit_line
    assert check_code == fit_code
    assert check_line == fit_line
