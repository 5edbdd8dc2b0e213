"""A declared method factor on every item makes no trait method-like (new-user trial s24, finding 3: with an
acquiescence factor on all 40 items, declared 'method', the paragraph said of each of the five traits 'The factor
extraversion loads only on items that load on other factors too ..., as a method factor does ...; it was not declared
a method factor, so it was treated as a trait', in fit, compare, invariance and scores).  The rule
(assessment.method_factors.cross_cutting_factors) counted the method factor among the 'other factors'; compare's
reading of nested models (workflows.nesting) took the same rule and called two traits merged into one 'left out'.

Data: simulated here from a known population: two correlated traits (r = .3) of four items each, items 2 and 4
worded against the trait (loadings .70, -.60, .65, -.55), and an acquiescence factor loading .30 on every item,
uncorrelated with the traits (the layout of Billiet & McClendon 2000's acquiescence model); seed fixed."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

from cfa_tool.assessment.method_factors import cross_cutting_factors
from tests.conftest import run_cli

WARM = [f"warm{i}" for i in range(1, 5)]
CALM = [f"calm{i}" for i in range(1, 5)]
ACQ_EQUAL = "equal " + ", ".join(f"loading(acq, {x})" for x in WARM + CALM) + "\n"
MODEL = ("factor warm: warm1..warm4\nfactor calm: calm1..calm4\nfactor acq: warm1..warm4, calm1..calm4\nmethod acq\n"
         "uncorrelated acq, warm\nuncorrelated acq, calm\n" + ACQ_EQUAL)
ONE_TRAIT = ("factor both: warm1..warm4, calm1..calm4\nfactor acq: warm1..warm4, calm1..calm4\nmethod acq\n"
             "uncorrelated acq, both\n" + ACQ_EQUAL)
METHOD_LIKE = "loads only on items that load on other factors too"


def _data(tmp_path, n: int = 800):
    rng = np.random.default_rng(11)
    traits = rng.multivariate_normal([0, 0], [[1, .3], [.3, 1]], n)
    acq = rng.standard_normal(n)
    lam = [.7, -.6, .65, -.55]
    columns = {}
    for t, names in enumerate((WARM, CALM)):
        for name, loading in zip(names, lam):
            columns[name] = (loading * traits[:, t] + .3 * acq
                             + np.sqrt(1 - loading**2 - .09) * rng.standard_normal(n))
    frame = pd.DataFrame(columns)
    frame["site"] = np.where(np.arange(n) % 2 == 0, "east", "west")
    path = tmp_path / "d.csv"
    frame.to_csv(path, index=False)
    return path


def _model(tmp_path, text: str, name: str = "m.cfa"):
    path = tmp_path / name
    path.write_text(text)
    return path


def _flat(text: str) -> str:
    return " ".join(text.replace("\u2502", " ").split())


def test_the_rule_sets_a_declared_method_factor_aside():
    loadings = {"warm": set(WARM), "calm": set(CALM), "acq": set(WARM + CALM)}
    assert cross_cutting_factors(loadings, frozenset({"acq"})) == ["acq"]
    # a wording factor on the reverse-worded items, not declared, still stands beside the traits
    loadings["neg"] = {"warm2", "warm4", "calm2", "calm4"}
    assert cross_cutting_factors(loadings, frozenset({"acq"})) == ["acq", "neg"]


def test_fit_calls_no_trait_method_like(tmp_path, capsys):
    data = _data(tmp_path)
    code, out, err = run_cli(["fit", _model(tmp_path, MODEL), "--data", data, "--json", tmp_path / "r.json"], capsys)
    assert code == 0, err
    paragraph = json.dumps(json.loads((tmp_path / "r.json").read_text())["report"]["paragraph"])
    assert "The factor acq stands for a way of answering" in paragraph
    assert METHOD_LIKE not in paragraph and "not declared a method factor" not in paragraph
    assert METHOD_LIKE not in _flat(out)


def test_invariance_calls_no_trait_method_like(tmp_path, capsys):
    data = _data(tmp_path)
    code, out, err = run_cli(["invariance", _model(tmp_path, MODEL), "--data", data, "--group-column", "site"],
                             capsys)
    assert code == 0, err
    assert METHOD_LIKE not in _flat(out)


def test_compare_reads_two_traits_merged_beside_a_method_factor(tmp_path, capsys):
    data = _data(tmp_path)
    code, out, err = run_cli(["compare", _model(tmp_path, MODEL, "two.cfa"), _model(tmp_path, ONE_TRAIT, "one.cfa"),
                              "--data", data], capsys)
    assert code == 0, err
    flat = _flat(out)
    assert METHOD_LIKE not in flat
    # two factors merged: their correlation at 1, one parameter on the boundary (Stoel et al. 2006), not two
    # factors left out
    assert "factors warm and calm merged into both" in flat and "factor warm left out" not in flat
    # the merge is not held inside the boundary by the fit (a correlation may pass 1), so the plain chi-square is the
    # reading (boundary-s24; Savalei & Kolenikov 2008, recalled), not the 50:50 mixture
    assert "as printed" in flat and "read the 50:50 mixture" not in flat
