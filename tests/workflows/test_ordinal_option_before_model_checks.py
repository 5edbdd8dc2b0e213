"""Ordinal items named by --ordinal (``ordinal='all'``) make the same model as an 'ordinal' statement naming them, in
every command, before anything checks the model (pipeline.inputs.ordinal_model): with ordinal items every invariance
level from metric on holds the thresholds equal too (Wu & Estabrook 2016; docs/model-language.md).

New-user trial s22: 'scores --ordinal all' refused 'invariance scalar' with 'noninvariant intercept(doctor3)' (the
model the invariance search had found), which 'fit --ordinal all' fits and which passed with an 'ordinal' statement
instead; with 'invariance scalar' alone it stopped on an internal error.  bootstrap, cutoffs and replicate checked
the model's groups before --ordinal applied, so their refusal named other parameters than with the statement.

The data are simulated here with a fixed seed (two sites, two factors of three items with five answers, the factors'
means and variances equal in both sites): in the south site item q3 is answered lower at the same level of its factor
(its cuts moved up by 0.8), the simulated truth the partial-invariance model's scores are checked against."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import ModelError

ITEMS = "factor f1: q1, q2, q3\nfactor f2: q4, q5, q6\n"
STATEMENT = "ordinal q1..q6\n"
SCALAR = "invariance scalar\n"
CUTS = (-1.2, -0.3, 0.5, 1.3)


def _site(n: int, seed: int, shift: float = 0.0) -> pd.DataFrame:
    """Items on two factors correlated .4 (loadings .7 on the latent responses), cut into five answers; item q3's
    cuts moved by ``shift``."""
    rng = np.random.default_rng(seed)
    eta = rng.multivariate_normal([0, 0], [[1, 0.4], [0.4, 1]], n)
    loadings = np.zeros((6, 2))
    loadings[:3, 0] = loadings[3:, 1] = 0.7
    x = eta @ loadings.T + rng.normal(size=(n, 6)) * np.sqrt(1 - 0.49)
    cols = {f"q{j + 1}": np.searchsorted(np.asarray(CUTS) + (shift if j == 2 else 0.0), x[:, j]) + 1
            for j in range(6)}
    return pd.DataFrame(cols)


@pytest.fixture(scope="module")
def sites() -> pd.DataFrame:
    return pd.concat([_site(600, 11).assign(site="north"), _site(600, 12, shift=0.8).assign(site="south")],
                     ignore_index=True)


def _south_gap(result, data) -> float:
    """The south site's mean f1 score less the north's."""
    score = result.table["f1_posterior_mean"].to_numpy()
    south = (data["site"] == "south").to_numpy()
    return float(np.nanmean(score[south]) - np.nanmean(score[~south]))


@pytest.mark.parametrize("exemption", ["noninvariant intercept(q3)\n", "noninvariant threshold(q3)\n", ""])
def test_scores_with_the_option_scores_the_model_fit_fits(sites, exemption):
    """The model with --ordinal is the model with the statement: scores accepts what fit accepts, fits it to the same
    chi-square and writes the same scores."""
    model = ITEMS + SCALAR + exemption
    fitted = cfa_tool.fit(model, sites, group="site", ordinal="all")
    by_option = cfa_tool.scores(model, sites, group="site", ordinal="all")
    by_statement = cfa_tool.scores(model + STATEMENT, sites, group="site")
    assert by_option.fit.fit.chi_square == pytest.approx(fitted.fit.chi_square, rel=1e-9)
    assert by_option.fit.fit.df == fitted.fit.df == by_statement.fit.fit.df
    np.testing.assert_allclose(by_option.table["f1_posterior_mean"], by_statement.table["f1_posterior_mean"],
                               atol=1e-10)


def test_the_partial_invariance_scores_find_the_simulated_equal_means(sites):
    """The simulated sites have equal factor means: the scores of the model that holds q3's intercept equal put the
    south site lower, by q3's own shift; with that intercept set apart (the model the invariance search finds) the
    gap is near 0 (within 0.15 of the scores' units, about 2.5 standard errors of a difference of means of 600 rows
    each; common practice)."""
    full = cfa_tool.scores(ITEMS + SCALAR, sites, group="site", ordinal="all")
    partial = cfa_tool.scores(ITEMS + SCALAR + "noninvariant intercept(q3)\n", sites, group="site", ordinal="all")
    assert _south_gap(full, sites) < -0.1
    assert abs(_south_gap(partial, sites)) < 0.15
    assert abs(_south_gap(partial, sites)) < abs(_south_gap(full, sites))


def test_the_command_line_scores_the_model_it_fits(sites, tmp_path, capsys):
    """The new user's command: 'scores ... --group-column site --ordinal all' exits 0 and writes the scores."""
    from cfa_tool.cli import main

    model = tmp_path / "m.cfa"
    model.write_text(ITEMS + SCALAR + "noninvariant intercept(q3)\n")
    data = tmp_path / "d.csv"
    sites.to_csv(data, index=False)
    argv = [str(model), "--data", str(data), "--group-column", "site", "--ordinal", "all"]
    assert main(["fit", *argv]) == 0
    code = main(["scores", *argv, "--output", str(tmp_path / "s.csv")])
    err = capsys.readouterr().err
    assert code == 0, err
    assert len(pd.read_csv(tmp_path / "s.csv")) == len(sites)


@pytest.mark.parametrize("command", ["bootstrap", "cutoffs", "replicate", "split_half"])
def test_one_group_commands_check_the_model_with_the_options_ordinal_items(sites, command):
    """A model holding parameters equal across groups is refused by the one-group commands; with --ordinal the
    refusal names the thresholds it holds equal, as with the 'ordinal' statement (the model is checked after the
    ordinal items apply, as fit checks it)."""
    from cfa_tool.workflows.bootstrap import bootstrap
    from cfa_tool.workflows.cutoffs import cutoffs
    from cfa_tool.workflows.replication import replicate, split_half

    data = sites.drop(columns="site")
    run = {"bootstrap": lambda m, **o: bootstrap(m, data, replications=20, **o),
           "cutoffs": lambda m, **o: cutoffs(m, data, replications=20, **o),
           "replicate": lambda m, **o: replicate(m, data.iloc[:600], data.iloc[600:], **o),
           "split_half": lambda m, **o: split_half(m, data, **o)}[command]
    with pytest.raises(ModelError) as by_statement:
        run(ITEMS + SCALAR + STATEMENT)
    with pytest.raises(ModelError) as by_option:
        run(ITEMS + SCALAR, ordinal="all")
    assert "the model has thresholds, loadings, intercepts equal across groups" in str(by_statement.value)
    assert str(by_option.value).splitlines()[0] == str(by_statement.value).splitlines()[0]
