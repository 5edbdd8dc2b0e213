"""explore names factors that correlate negatively as a possible split by keying, and points to method factors
(new-user trial s24, finding 8: two traits of four items, two of them reverse-worded and not recoded, with an
acquiescence factor on every item; explore drafted one trait as two factors of two items each, its positively worded
and its reverse-worded items, marked only 'reverse-worded item?', and said nothing of the known keying and
acquiescence pattern, Marsh 1996, nor of the model language's method factors).

Data: simulated here from a known population: two traits correlating .3, loadings .70, -.60, .65, -.55 (items 2 and 4
worded against the trait), an acquiescence factor loading .30 on every item, five answer categories (the generator of
the trial's repro, seed 11)."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

from cfa_tool.exploration.draft import keying_sentence
from tests.conftest import run_cli


def _data(path, n: int = 1500):
    rng = np.random.default_rng(11)
    traits = rng.multivariate_normal([0, 0], [[1, .3], [.3, 1]], n)
    acq = rng.normal(0, 1, n)
    columns = {}
    for t, name in enumerate(("warm", "calm")):
        for i, loading in enumerate((.7, -.6, .65, -.55)):
            x = loading * traits[:, t] + .3 * acq + np.sqrt(1 - loading**2 - .09) * rng.normal(0, 1, n)
            columns[f"{name}{i + 1}"] = 1 + (x[:, None] > np.array([-1.5, -.5, .4, 1.3])).sum(1)
    pd.DataFrame(columns).to_csv(path, index=False)


def test_the_sentence_names_the_negative_pairs_only():
    phi = np.array([[1.0, -.27, .13], [-.27, 1.0, -.05], [.13, -.05, 1.0]])
    before, after = keying_sentence(("f1", "f2", "f3"), phi)
    assert before.startswith("Factors that correlate negatively (f1 and f2, -.27) hold items that run against")
    assert "keying and acquiescence" in before and "Marsh 1996" in before and "method factor" in before
    assert after == " and compare the two models on other data."
    assert keying_sentence(("f1", "f2"), np.array([[1.0, .4], [.4, 1.0]])) == ("", "")
    assert keying_sentence(("f1",), None) == ("", "")


def test_explore_says_it_in_the_report_and_the_draft(tmp_path, capsys):
    _data(tmp_path / "d.csv")
    code, out, err = run_cli(["explore", "--data", tmp_path / "d.csv", "--replications", "30", "--draft",
                              tmp_path / "draft.cfa", "--json", tmp_path / "e.json"], capsys)
    assert code == 0, err
    flat = " ".join(out.replace("\u2502", " ").split())
    draft = " ".join(line.lstrip("# ") for line in (tmp_path / "draft.cfa").read_text().splitlines())
    for text in (flat, draft):
        assert "Factors that correlate negatively (" in text
        assert "the known pattern of keying and acquiescence" in text and "method factor beside it" in text
    assert "'method NAME' in the model file" in flat
    assert "keying and acquiescence" in json.dumps(json.loads((tmp_path / "e.json").read_text()))
