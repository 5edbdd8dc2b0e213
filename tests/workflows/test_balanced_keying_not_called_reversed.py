"""A scale of as many reverse-worded items as others is not 'coded the other way round' in a group (new-user trial
s24, finding 1: eight openness items, four worded against the trait and not recoded, in two languages; invariance put
eight cautions first, 'the standardized loading of ope1 on openness is .50 in group EN and .37 in group ES ... the
item is probably coded the other way round in one of the groups', for loadings of one sign in both groups).

The rule read each factor's direction from the signs of its loadings within each group, ties by their sum: with four
items each way the sum decided, and a sum of +.49 in one group and -.10 in the other turned the second group round and
every item with it.  A factor's direction in one solution relative to another is decided by the items together
(assessment.directions.relative_direction): an item recoded in one group is the one whose sign alone changes.

Data: simulated here from a known population (one factor, variance 1; items of unit variance whose loadings are
their standardized loadings), with every item of one sign in both groups, by construction; seeds fixed."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.assessment.directions import relative_direction
from tests.conftest import run_cli

ITEMS = [f"ope{i}" for i in range(1, 9)]
# the population's standardized loadings: items 2, 4, 6 and 8 worded against the trait; the positively worded ones
# load more strongly in group A, the reverse-worded ones in group B, so that the sum of the loadings is +1.2 in A and
# -1.2 in B while no item changes sign (by construction)
LOADINGS = {"A": np.array([0.7, -0.4] * 4), "B": np.array([0.4, -0.7] * 4)}


def _group(name: str, n: int, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    lam = LOADINGS[name]
    f = rng.standard_normal((n, 1))
    x = f * lam + rng.standard_normal((n, len(lam))) * np.sqrt(1.0 - lam**2)
    frame = pd.DataFrame(x, columns=ITEMS)
    frame.insert(0, "language", name)
    return frame


def _data(tmp_path, recode: str | None = None):
    data = pd.concat([_group("A", 600, 20261205), _group("B", 600, 20261206)], ignore_index=True)
    if recode is not None:  # an item answered the other way round in group B only (its sign turned)
        b = data["language"] == "B"
        data.loc[b, recode] = -data.loc[b, recode]
    path = tmp_path / "d.csv"
    data.to_csv(path, index=False)
    model = tmp_path / "m.cfa"
    model.write_text("factor openness: ope1..ope8\n")
    return model, path


def _flat(text: str) -> str:
    return " ".join(text.replace("\u2503", " ").replace("\u2502", " ").split())


def test_balanced_keying_names_no_item_coded_the_other_way(tmp_path, capsys):
    model, data = _data(tmp_path)
    code, out, err = run_cli(["invariance", model, "--data", data, "--group-column", "language"], capsys)
    assert code == 0, err
    assert "coded the other way round" not in _flat(out)


def test_an_item_recoded_in_one_group_of_a_balanced_scale_is_named_alone(tmp_path, capsys):
    model, data = _data(tmp_path, recode="ope3")
    code, out, err = run_cli(["invariance", model, "--data", data, "--group-column", "language"], capsys)
    assert code == 0, err
    flat = _flat(out)
    assert "The standardized loading of ope3 on openness is" in flat
    assert flat.count("probably coded the other way round") == 1  # ope3 alone


def test_replicate_of_balanced_samples_names_no_item(tmp_path, capsys):
    model, _ = _data(tmp_path)
    _group("A", 600, 20261205).drop(columns="language").to_csv(tmp_path / "cal.csv", index=False)
    _group("B", 600, 20261206).drop(columns="language").to_csv(tmp_path / "val.csv", index=False)
    code, out, err = run_cli(["replicate", model, "--calibration", tmp_path / "cal.csv", "--validation",
                              tmp_path / "val.csv"], capsys)
    assert code == 0, err
    flat = _flat(out)
    assert "coded the other way round" not in flat and "opposite signs" not in flat


def test_the_direction_is_decided_by_the_items_together():
    # the loadings of the population above (signs by construction): a factor turned as a whole in the second
    # solution is -1, the same factor +1 whatever the sums of its loadings, one item turned of eight +1
    a, b = LOADINGS["A"], LOADINGS["B"]
    assert relative_direction(a, b) == 1.0 and relative_direction(a, -b) == -1.0
    one = b.copy()
    one[2] = -one[2]
    assert relative_direction(a, one) == 1.0
