"""The same people answering twice, taken for two samples (new-user trial s23, findings 2 and 3).

Two waves of one staff survey stacked in one file and compared as groups, or the second wave given to `replicate`
as new data: the multi-group fit, the invariance ladder and replicate's test of one solution take the samples for
independent ones, which the same people are not, and nothing said so.  With --id, ids whose rows lie in more than one
group are now a caution first (in the repeated ids' caution, with the model of both times side by side as the way
to test invariance over time), and replicate cautions on validation ids that are the calibration's.  The data are
invented (a fictional transit agency's rider survey asked twice), simulated with a fixed seed.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind

MODEL = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")


def _wave(seed: int, ids, n: int = 300) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    frame = pd.DataFrame(.7 * traits[:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .7, (n, 6)), columns=ITEMS)
    frame.insert(0, "rider", ids)
    return frame


def _flat(text) -> str:
    return " ".join(str(text).split())


def test_ids_in_both_groups_are_said_to_be_the_same_people(tmp_path):
    ids = [f"R{k:04d}" for k in range(300)]
    stacked = pd.concat([_wave(1, ids).assign(wave="first"), _wave(2, ids[:200], 200).assign(wave="second")],
                        ignore_index=True)
    ladder = cfa_tool.invariance(MODEL, stacked, group="wave", id_column="rider")
    first = _flat(ladder.warnings[0])
    assert "200 of these ids name rows in more than one group of 'wave': the same people in several groups?" in first
    assert "take the groups for independent samples" in first and "one model of both times" in first
    # the ladder over occasions is the way to test invariance over time (workflows.occasions)
    assert "test invariance over time in one group" in first and "occasion_column='wave' id_column='rider'" in first
    fitted = cfa_tool.fit(MODEL, stacked, group="wave", id_column="rider")
    said = next(p for p in fitted.problems if p.kind is ProblemKind.REPEATED_IDS)
    assert "in more than one group of 'wave'" in _flat(said.explanation)
    # different people who share an id by a typing error within one group: the caution of repeated ids as before
    one = stacked.assign(rider=[f"S{k}" for k in range(len(stacked))])
    one.loc[5, "rider"] = one.loc[6, "rider"]
    said = next(p for p in cfa_tool.fit(MODEL, one, group="wave", id_column="rider").problems
                if p.kind is ProblemKind.REPEATED_IDS)
    assert "more than one group" not in _flat(said.explanation) and "merge by the id and the time" in _flat(said.advice)


def test_replicate_on_the_calibrations_people_says_so(tmp_path):
    ids = [f"R{k:04d}" for k in range(300)]
    first, second = tmp_path / "first.csv", tmp_path / "second.csv"
    _wave(1, ids).to_csv(first, index=False)
    _wave(2, ids[50:] + [f"N{k}" for k in range(50)]).to_csv(second, index=False)
    found = cfa_tool.replicate(MODEL, first, second, id_column="rider")
    said = next(_flat(p.explanation) for p in found.data_problems if "same people" in _flat(p.explanation))
    assert said.startswith(f"250 of the 300 ids of the validation data ({second}) are ids of the calibration data "
                           f"({first}) too, such as 'R0050': the same people in both samples?")
    other = tmp_path / "other.csv"
    _wave(3, [f"N{k}" for k in range(300)]).to_csv(other, index=False)
    assert not any("same people" in _flat(p.explanation)
                   for p in cfa_tool.replicate(MODEL, first, other, id_column="rider").data_problems)
    # without --id nothing is known of who answered: no such caution
    assert not any("same people" in _flat(p.explanation) for p in cfa_tool.replicate(MODEL, first, second).data_problems)
