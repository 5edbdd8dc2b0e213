"""A value outside the run of an item's other answers (7 among answers 1 to 5) is a caution, unless the model file
declares a scale that holds it ('reversed on_time on 1 to 7'): then it is an answer the model names, not a typing
error (review s13: the caution ignored the declared scale).  Demo data of the fictional rider survey, two answers
of on_time set to 7."""

from __future__ import annotations

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def _outside(result) -> list:
    return [p for p in result.problems if "outside the answer scale" in p.explanation]


def test_a_value_on_the_declared_scale_is_no_typing_error():
    import pandas as pd

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data.loc[[3, 50], "on_time"] = 7
    assert set(data["on_time"].dropna()) == {1, 2, 3, 4, 5, 7}
    plain = cfa_tool.fit(MODEL, data)
    assert len(_outside(plain)) == 1 and _outside(plain)[0].kind is ProblemKind.VALUES_NOT_ANSWERS
    declared = cfa_tool.fit(MODEL + "reversed on_time on 1 to 7\n", data)
    assert _outside(declared) == []


def test_the_declared_scale_holds_also_for_the_rows_with_a_group_label():
    # the rows with a group label are screened again (a row without one is left out); that screen ignored the
    # declared scale, so the 7s were flagged again as soon as one row had no group (reread of s13)
    import pandas as pd

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data.loc[[3, 50], "on_time"] = 7
    data.loc[100, "district"] = None
    data.loc[[7, 60, 90], "clean"] = -99  # another finding, so that the rows with a group label are screened again
    declared = cfa_tool.fit(MODEL + "reversed on_time on 1 to 7\n", data, group="district")
    assert _outside(declared) == []
    assert len(_outside(cfa_tool.fit(MODEL, data, group="district"))) == 1


def test_compare_checks_every_models_declared_scale():
    # the demo's answers run 1 to 5: a second model declaring short_wait on 1 to 4 was not checked (only the first
    # model's scales were), so the comparison ran and its methods text repeated the wrong scale (hostile tester s14)
    import pandas as pd
    import pytest

    from cfa_tool.errors import ModelError

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    assert data["short_wait"].max() == 5
    narrow = MODEL + "reversed short_wait on 1 to 4\n"
    for models in ([MODEL, narrow], [narrow, MODEL]):
        with pytest.raises(ModelError, match="holds answers outside the scale 1 to 4 declared here: 'short_wait' 5"):
            cfa_tool.compare(models, data)


def test_an_item_not_on_the_declared_scale_is_named_without_a_list_of_codes():
    # a 0-100 slider (or a standardized item) under 'reversed clean on 1 to 5': the refusal advised every distinct
    # value outside 1 to 5 as --missing-codes (331 values on one line; following it deletes nearly every answer;
    # hostile tester s24); it names the item as not answered on that scale in one short line instead
    import numpy as np
    import pandas as pd
    import pytest

    from cfa_tool.errors import ModelError

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rng = np.random.default_rng(1)
    slider = data.copy()
    slider["clean"] = np.round((data["clean"] - 1) * 25 + rng.uniform(-10, 10, len(data)), 1).clip(0, 100)
    standardized = data.copy()
    standardized["clean"] = (data["clean"] - data["clean"].mean()) / data["clean"].std()
    for frame in (slider, standardized):
        with pytest.raises(ModelError) as caught:
            cfa_tool.fit(MODEL + "reversed clean on 1 to 5\n", frame)
        message = str(caught.value)
        assert "'clean' is not answered on the scale 1 to 5 declared here" in message
        assert "missing-codes" not in message and "missing_codes" not in message and len(message) < 600
    # a few codes are still offered as codes: two values outside the scale, each a code for no answer
    coded = data.copy()
    coded.loc[[3, 50], "clean"] = -9
    coded.loc[[7], "clean"] = 99
    with pytest.raises(ModelError, match=r"holds answers outside the scale 1 to 5 declared here: 'clean' -9 .*"
                                         r"missing_codes=\[-9, 99\]"):
        cfa_tool.fit(MODEL + "reversed clean on 1 to 5\n", coded)
