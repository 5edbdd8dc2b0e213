"""Why a difference test was not computed, as a manuscript reads it (new user s17):

* A1: the reason is words or a Note (note_parts) whose option the Word file and the methods paragraph leave out: the
  test of one solution in replicate wrote a fit's message into a plain string, so the advice to raise
  --max-iterations reached the manuscript;
* A3: compare's methods paragraph gives the whole reason, which it cut at its first ';'.

Data: Holzinger & Swineford (1939), the nine ability tests, in two halves by row order (replicate's own samples are
random halves; any two samples serve here), and with invented sampling weights (a fixed seed)."""

from __future__ import annotations

import dataclasses
import io

import docx
import numpy as np

from cfa_tool.note_parts import WORDS, Note, said
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.paragraph import comparison_paragraph, replication_paragraph
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.workflows.compare import compare
from cfa_tool.workflows.nesting import PSEUDO_LIKELIHOOD
from tests.conftest import THREE_FACTORS

NAMES = tuple(f"x{k}" for k in range(1, 10))


def _word(report) -> str:
    document = docx.Document(io.BytesIO(report_docx(report)))
    return " ".join(" ".join([p.text for p in document.paragraphs]
                             + [c.text for t in document.tables for r in t.rows for c in r.cells]).split())


def test_a_test_of_one_solution_that_did_not_converge_names_no_option_in_a_manuscript(hs_data):
    from cfa_tool.data.moments import sample_moments
    from cfa_tool.language.parser import parse_model
    from cfa_tool.method import MissingData
    from cfa_tool.pipeline.continuous import FitOptions, fit_moments
    from cfa_tool.workflows import replication as R

    spec = parse_model(THREE_FACTORS)
    full = MissingData.FULL_INFORMATION  # the two-sample model of the test is then fitted by full information
    first, second = (sample_moments(part, NAMES, name, missing=full) for part, name in
                     ((hs_data.iloc[:150], "first rows"), (hs_data.iloc[150:], "last rows")))
    cal, loose = (fit_moments(spec, m, FitOptions(missing=full)) for m in (first, second))
    assert cal.converged and loose.converged
    # the two-sample fit stopped after 2 iterations: its message advises raising the limit
    test = R._same_solution(spec, first, second, cal, loose, {"max_iterations": 2, "missing": full})
    assert isinstance(test.not_computed, Note)
    # the program's user reads the option (as a caller from Python writes it; --max-iterations on the command line)
    assert "max_iterations=" in str(test.not_computed)
    assert "max_iterations" not in said(test.not_computed, WORDS)
    assert said(test.not_computed, WORDS).startswith("the two-sample model with one solution did not converge (no "
                                                     "convergence within the limit of 2 iterations")
    assert test.to_dict()["not_computed"] == str(test.not_computed)  # JSON: as the program's user reads it
    # a replication carrying it: the Word file and the methods paragraph without the option, the terminal with it
    replication = R.replicate_moments(spec, first, second)
    replication = dataclasses.replace(replication, same_solution=test)
    report = report_of(replication)
    assert "max_iterations=" in " ".join(report_text(report).split())
    assert "max_iterations" not in _word(report)
    assert "max_iterations" not in replication_paragraph(replication)


def test_compare_says_the_whole_reason_a_difference_was_not_computed_and_no_advice(hs_data):
    moved = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\nfix covariance(visual, speed) = 0\n"
    weights = np.random.default_rng(17).uniform(0.5, 2, len(hs_data))
    found = compare([moved, THREE_FACTORS], hs_data.assign(w=weights), weights="w")
    plain = next(t for t in found.tests if t.not_computed)
    assert plain.not_computed == PSEUDO_LIKELIHOOD and plain.advice == "read the scaled difference"
    paragraph = " ".join(comparison_paragraph(found).split())
    assert f"was not computed: {PSEUDO_LIKELIHOOD}." in paragraph and "read the" not in paragraph
    notes = " ".join(str(n) for n in report_of(found).notes)
    assert f"not computed: {PSEUDO_LIKELIHOOD}; read the scaled difference." in notes  # the tables' reader reads it
    # a reason with a second clause after ';' (the 2001 scaled difference whose correction is not positive, with no
    # strictly positive version either, nesting.scaled_difference_tests): given whole
    reason = ("its scaling correction is not positive (-0.159), so the difference cannot be scaled: this version's "
              "correction can be negative, in small samples or when the restricted model is far from the data "
              "(Satorra & Bentler 2010); the strictly positive version is not available either")
    cut = dataclasses.replace(found, tests=tuple(dataclasses.replace(t, not_computed=reason, advice="")
                                                 if t is plain else t for t in found.tests))
    assert f"was not computed: {reason}." in " ".join(comparison_paragraph(cut).split())
