"""The fit command explore prints for the confirmation half reads the data file as the exploration did (hostile trial
s20: it carried --keep only, so run as printed it read the missing codes as answers, silently): the printed command,
run as a shell would split it, reads the same rows, codes, names and filters."""

from __future__ import annotations

import shlex

import numpy as np

from cfa_tool.cli import build_parser
from cfa_tool.commands.options import reading_args
from tests.conftest import run_cli


def test_the_printed_fit_command_reads_the_file_as_the_exploration(tmp_path, capsys):
    rng = np.random.default_rng(20)
    n = 240
    trait = rng.normal(size=(n, 2))
    answers = np.column_stack([np.clip(np.round(3 + trait[:, j // 4] + rng.normal(scale=.8, size=n)), 1, 5)
                               for j in range(8)]).astype(int).astype(object)
    answers[rng.random(answers.shape) < .03] = 0  # the code for no answer
    answers[5, 2] = "No, not asked"
    lines = ["Rider survey export,,,,,,,,,", "q1,q2,q3,q4,q5,q6,q7,old_q8,site,id"]
    lines += [",".join(f'"{v}"' if isinstance(v, str) else str(v) for v in row) + f",{'ab'[i % 2]},{i}"
              for i, row in enumerate(answers)]
    data = tmp_path / "survey data.csv"
    data.write_text("\n".join(lines) + "\n")
    halves = tmp_path / "halves.csv"
    explore = ["explore", "--data", data, "--items", "q1,q2,q3,q4,q5,q6,q7,q8", "--names-row", "2",
               "--missing-codes", '0,"No, not asked"', "--rename", "old_q8=q8", "--keep", "site != b",
               "--split", "3", "--halves-file", halves]
    code, out, err = run_cli(explore, capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    printed = flat.split("confirmation half alone with ", 1)[1].split(" confirmation", 1)[0] + " confirmation"
    words = shlex.split(printed)
    assert words[:3] == ["cfa-tool", "fit", "MODEL"]
    fit_args = build_parser().parse_args(words[1:])
    explore_args = build_parser().parse_args([str(a) for a in explore])
    expected = reading_args(explore_args)
    got = reading_args(fit_args)
    for key in ("sheet", "names_row", "first_data_row", "missing_codes", "rename"):
        assert got[key] == expected[key], key
    assert [f for f in got["keep"] if "site" in str(f)] == [f for f in expected["keep"] if "site" in str(f)]
    assert fit_args.missing_codes == explore_args.missing_codes == (0.0, "No, not asked")
