"""What a model asks that summary statistics cannot give is refused by one gate (pipeline.inputs.refuse_for_summary),
called once by each route that takes them: fit, check and compare refuse alike, at the statement, ordinal items, an
intercept or a factor mean, and an 'answers' statement, naming the file as it was given (compare named the
'answers' statement's file by the summary's own source, after reading it; the refusals were called as a pair at
three places and the third apart)."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.errors import ModelError

PLAIN = "factor f: q1, q2, q3\nfactor g: q4, q5, q6\n"
STATS = ("correlation,q1,q2,q3,q4,q5,q6\nq1,1\nq2,.5,1\nq3,.5,.5,1\nq4,.3,.3,.3,1\nq5,.3,.3,.3,.5,1\n"
         "q6,.3,.3,.3,.5,.5,1\nn,200\n")  # invented correlations
ASKED = {"ordinal q2, q3\n": "the 'ordinal' statement names 'q2': ordinal items need the raw answers, not summary "
                             "statistics; remove the statement or give the rows of answers",
         "fix intercept(q1) = 0\n": "intercept(q1): intercepts and factor means are estimated only in a fit with a "
                                    "mean structure, and summary statistics are fitted by their covariances alone",
         'answers "no" = 0, "yes" = 1 for q1\n': "holds summary statistics, not answers; remove the statement or give "
                                                 "the rows of answers"}


@pytest.mark.parametrize("statement", list(ASKED))
@pytest.mark.parametrize("route", ["fit", "check", "compare"])
def test_every_route_refuses_alike_at_the_statement(tmp_path, route, statement):
    stats = tmp_path / "corr.stats"
    stats.write_text(STATS)
    model = PLAIN + statement
    with pytest.raises(ModelError) as raised:
        if route == "compare":
            cfa_tool.compare([model, model + "covary q1, q4\n"], str(stats))
        else:
            getattr(cfa_tool, route)(model, str(stats))
    said = str(raised.value)
    assert ASKED[statement] in said and ":3:" in said  # at the statement's line
    if statement.startswith("answers"):
        assert f"'{stats}' holds summary statistics" in said

