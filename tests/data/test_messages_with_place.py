"""Messages say where the problem is (hostile trial s12): a data frame with two levels of column names is refused as
the frame it is (not blamed on the model file), and a statement that needs groups is refused by the commands of one
group at its file, line and column, with a caret, as fit refuses it."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError
from tests.conftest import run_cli


def test_a_frame_with_two_levels_of_column_names_is_refused_as_the_frame(rider_demo, rider_model):
    frame = rider_demo.copy()
    frame.columns = pd.MultiIndex.from_tuples([("a", c) for c in frame.columns])
    with pytest.raises(DataError, match=r"the data frame's columns have 2 levels of names \(such as \('a', "
                                        r"'rider_id'\)\).*flatten them first"):
        cfa_tool.fit(rider_model, frame)
    flat = frame.copy()
    flat.columns = flat.droplevel(0, axis=1).columns  # as the message says: the fit of the demo
    assert cfa_tool.fit(rider_model, flat).n_obs == len(rider_demo)


@pytest.mark.parametrize("line, column", [("noninvariant intercept(clean)", 14),
                                          ("in group south: start variance(clean) = 0.5", 23)])
def test_one_group_commands_refuse_group_statements_at_their_place(line, column, rider_demo, rider_model, tmp_path,
                                                                   capsys):
    model = tmp_path / "m.cfa"
    model.write_text(rider_model.rstrip("\n") + "\n" + line + "\n")
    number = len(rider_model.rstrip("\n").splitlines()) + 1
    data = tmp_path / "d.csv"
    rider_demo.to_csv(data, index=False)
    for argv in (["replicate", model, "--data", data], ["simulate", model, "--n", "100", "--output", tmp_path / "s.csv"],
                 ["bootstrap", model, "--data", data, "--replications", "10"]):
        code, _, err = run_cli(argv, capsys)
        assert code == 2 and err.startswith(f"cfa-tool: {model}:{number}:{column}: "), (argv, err)
        assert "which needs groups" in err and "^" in err
