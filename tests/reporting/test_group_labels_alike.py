"""Every text that names a group writes its label by one rule (language.names.written_group): as it is when every
label of the fit is one word or number, else every label of the fit in double quotes, so that a group labelled '2',
'men, 40+' or 'north' beside them reads alike in the group list, the scale sentence, a parameter's words, the notes
and the cautions (session note s14: 'In group X,' of the scale sentence and the parameters' 'in group X' were not
quoted by the list's rule).  The small-sample caution and note are worded from one record of facts
(assessment.admissibility.RowsPerParameter) in the report's voice and the paper's.

Parameter counts by hand: two factors of three items (tests.workflows.test_invariance_decisions.MODEL) in groups,
4 free loadings + 6 residual variances + 2 factor variances + 1 covariance + 6 intercepts = 19 per group (factor
means fixed at zero), as the existing scaling test counts them (2 x (27 moments - 19 parameters) = 16 df); the rule
of rows per parameter counts 13 of them, leaving out the 6 intercepts as a one-group fit leaves out its item means
(new-user trial s17)."""

from __future__ import annotations

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind, RowsPerParameter, sample_size_problems
from cfa_tool.language.names import written_group
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import problem_notice
from tests.workflows.test_invariance_decisions import MODEL, groups_data


def test_one_rule_for_a_label_among_the_fits_labels():
    assert [written_group(x, ("north", "south")) for x in ("north", "south")] == ["north", "south"]
    # one word or number each: as they are (new-user trial s20; s22 folded the paragraph's rule into this one)
    assert [written_group(x, ("2", "north")) for x in ("2", "north")] == ["2", "north"]
    assert written_group("men, 40+", ("men, 40+", "women")) == '"men, 40+"'
    assert written_group("A, B") == '"A, B"' and written_group("north") == "north"  # alone: the label decides
    # a label the model language cannot write keeps its own double quotes inside single ones
    assert written_group('"x"', ('"x"', "a")) == "'\"x\"'" and written_group("a", ('"x"', "a")) == '"a"'


def _odd_groups(small: int):
    data = groups_data(51, n=200, groups=3)
    data["grp"] = data["grp"].map({"g1": "2", "g2": "men, 40+", "g3": "north"})
    return data.drop(data.index[data["grp"] == "north"][:200 - small])  # 'north' keeps ``small`` rows


def test_a_fit_names_odd_group_labels_alike_in_every_sentence():
    model = MODEL + 'in group "men, 40+": fix variance(f) = 1\n'
    result = cfa_tool.fit(model, _odd_groups(30), group="grp")
    text = methods_paragraph(result)
    assert '("2", n = 200; "men, 40+", n = 200; "north", n = 30)' in text
    assert 'In group "2", the scale of f was set by fixing the loading of one indicator to 1 (y1).' in text
    assert 'In group "men, 40+", the scale of f was set by parameters the model fixes.' in text
    assert 'In group "north", the scale of f' in text  # plain on its own, quoted beside '2' and 'men, 40+'
    assert 'The variance of factor f in group "men, 40+" was fixed at 1.' in text
    assert "In group 2," not in text and "in group north" not in text
    # the note on few rows per parameter: the same rule, and the figures plainly (30 / 13 = 2.31, cut to 2.3)
    [note] = [w for w in result.warnings if "rows per free parameter" in w]
    assert note.startswith('group "north" (30 rows for 13 parameters, 2.3 per parameter): fewer than 5 rows per')
    summary = result.summary()
    assert 'Multivariate normality in group "2" (Mardia 1970)' in summary  # a table's note, by the same rule


def test_the_small_group_caution_and_the_paper_word_the_same_facts():
    result = cfa_tool.fit(MODEL, _odd_groups(12), group="grp")
    [small] = [p for p in result.problems if p.kind is ProblemKind.SMALL_GROUP]
    assert small.rows_per_parameter == RowsPerParameter(12, 13, "north", 6)  # 13 by hand (module docstring)
    assert small.explanation.startswith("12 rows for the 13 free parameters of this group's model (not counting its 6 "
                                        "item intercepts)")
    assert any(str(line).startswith('Group "north": 12 rows for the 13 free parameters')
               for line in problem_notice(result).lines)
    text = " ".join(methods_paragraph(result).split())
    assert ('Group "north" had 12 rows for the 13 free parameters of its model (not counting its 6 item intercepts), '
            'so its estimates, and every comparison with the other groups, rest on too few answers.') in text
    # the facts travel with a saved result's problems
    assert small.to_dict()["rows_per_parameter"] == {"rows": 12.0, "parameters": 13, "group": "north", "uncounted": 6,
                                                              "thresholds": 0}


def test_rows_per_parameter_are_cut_not_rounded_up_to_the_rule():
    """104 rows for 21 parameters are 4.95 per parameter: below 5, so the figure must not read 5.0."""
    assert RowsPerParameter(104, 21).ratio() == "4.9"
    _, notes = sample_size_problems((104,), (21,))
    assert "fewer than 5 per parameter (4.9 per parameter;" in notes[0]
