"""Partial invariance in one group (twentieth session): 'in group audit: noninvariant intercept(x2)' gives the intercept
of x2 its own free value in group audit while the other groups' stay held equal among themselves.  Before, the
statement was a syntax error, and 'in group audit: free intercept(x2)' was refused in favour of 'noninvariant', which
lets the intercept differ in every group (new-user trial, nineteenth session: a researcher whose scalar step fails
because one language version answers one item differently wants that item set apart in that version only).

Check values: the chi-square and degrees of freedom of a three-group model with an intercept set apart in one group
and a loading in another, refitted by an independent scipy minimisation of the multi-group normal-theory discrepancy
(Joreskog 1971; Sorbom 1974 for the mean structure), written here from the formula with the equalities built by hand;
the degrees of freedom are counted by hand (3 x (4 + 10) moments less the free parameters listed beside the count).
The data are simulated with a fixed seed (an invented three-site survey)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy.optimize import minimize

import cfa_tool
from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.model.parameters import build_parameter_table

GROUPS = ("audit", "east", "north")  # the first group is 'audit' (labels in order)
ITEMS = ["x1", "x2", "x3", "x4"]
SCALAR = "factor f: x1, x2, x3, x4\ninvariance scalar\n"  # lines 1 and 2


def _sites(seed: int = 7) -> pd.DataFrame:
    """Three sites answering four items of one factor; at site 'east' item x2 reads 0.6 higher at every level of the
    factor (an intercept that differs), and item x3 loads 0.5 at site 'north' rather than 0.9."""
    rng = np.random.default_rng(seed)
    nu = np.array([3.0, 2.5, 3.2, 2.8])
    frames = []
    for label, n, mean, sd in (("audit", 220, 0.0, 1.0), ("east", 180, 0.3, 0.9), ("north", 200, -0.2, 1.1)):
        lam = np.array([1.0, 0.8, 0.5 if label == "north" else 0.9, 0.7])
        shift = np.array([0.0, 0.6 if label == "east" else 0.0, 0.0, 0.0])
        eta = rng.normal(mean, sd, size=n)
        x = nu + shift + np.outer(eta, lam) + rng.normal(0, 0.6, size=(n, 4))
        frame = pd.DataFrame(x, columns=ITEMS)
        frame["site"] = label
        frames.append(frame)
    return pd.concat(frames, ignore_index=True)


def _independent_fit(frame: pd.DataFrame) -> float:
    """The minimum of sum_g n_g [log|S_g| + tr(S S_g^-1) - log|S| - p + (m - mu_g)' S_g^-1 (m - mu_g)] (covariance
    matrices divided by n_g) for: x1 the marker (loading 1 in every site); the loadings of x2, x4 shared by the three
    sites, that of x3 shared by audit and east and its own at north; the four intercepts shared, except x2's at east,
    its own; per site a factor variance and four residual variances (by their logarithms); factor means 0 at audit
    (the first group) and free at east and north.  26 free parameters: 3 + 1 shared and own loadings, 4 + 1
    intercepts, 3 factor variances, 12 residual variances, 2 means.  Minimised by BFGS from rough starts."""
    data = [frame.loc[frame["site"] == g, ITEMS].to_numpy(float) for g in GROUPS]
    moments = [(len(x), x.mean(axis=0), np.cov(x, rowvar=False, bias=True)) for x in data]

    def implied(theta, g):
        l2, l3, l4, l3_north = theta[:4]
        nu = theta[4:8].copy()
        if GROUPS[g] == "east":
            nu[1] = theta[8]
        lam = np.array([1.0, l2, l3_north if GROUPS[g] == "north" else l3, l4])
        own = theta[9 + 5 * g: 14 + 5 * g]
        phi, psi = np.exp(own[0]), np.exp(own[1:])
        mean = 0.0 if g == 0 else theta[24 + g - 1]
        return np.outer(lam, lam) * phi + np.diag(psi), nu + lam * mean

    def discrepancy(theta):
        total = 0.0
        for g, (n, m, s) in enumerate(moments):
            sigma, mu = implied(theta, g)
            inv = np.linalg.inv(sigma)
            d = m - mu
            total += n * (np.linalg.slogdet(sigma)[1] + np.trace(s @ inv) - np.linalg.slogdet(s)[1] - 4 + d @ inv @ d)
        return total

    pooled = np.vstack(data)
    own = np.concatenate([[0.0], np.log(pooled.var(axis=0) / 2)])
    start = np.concatenate([[0.8, 0.8, 0.8, 0.8], pooled.mean(axis=0), [pooled[:, 1].mean()], own, own, own, [0, 0]])
    found = minimize(discrepancy, start, method="BFGS", options={"gtol": 1e-8, "maxiter": 20000})
    found = minimize(discrepancy, found.x, method="BFGS", options={"gtol": 1e-9, "maxiter": 20000})
    return found.fun


MODEL = SCALAR + "in group east: noninvariant intercept(x2)\nin group north: noninvariant loading(f, x3)\n"


def test_the_statement_parses_and_sets_the_parameter_apart_in_its_group_only():
    """A syntax error before this session; now the intercept of x2 in group east is its own free parameter and the
    other two groups' share one."""
    table = build_parameter_table(parse_model(MODEL, "m.cfa"), GROUPS)
    index = {p.group: p.terms for p in table.parameters if p.kind == "intercept" and p.variables == ("x2",)}
    audit, east, north = (index[GROUPS.index(g)] for g in GROUPS)
    assert audit == north and len(audit) == 1  # one free parameter, shared
    assert east != audit and len(east) == 1  # its own
    scalar = build_parameter_table(parse_model(SCALAR, "m.cfa"), GROUPS)
    assert table.n_free == scalar.n_free + 2  # one more intercept and one more loading, counted by hand


def test_chi_square_and_degrees_of_freedom_match_an_independent_fit():
    frame = _sites()
    result = cfa_tool.fit(MODEL, frame, group="site")
    assert result.fit.df == 3 * (4 + 10) - 26  # 16: 42 moments, 26 free parameters (counted in _independent_fit)
    assert result.fit.chi_square == pytest.approx(_independent_fit(frame), rel=1e-5)  # independent scipy fit
    # the estimates: x2's intercept at east apart from the shared one by about the simulated 0.6 (rough: a sample)
    intercepts = {e.group: e.estimate for e in result.estimates if e.kind == "intercept" and e.variables == ("x2",)}
    assert intercepts["audit"] == intercepts["north"]
    assert 0.3 < intercepts["east"] - intercepts["audit"] < 0.9


def test_with_two_groups_setting_apart_in_one_is_letting_differ_in_both():
    """With two groups, the parameter set apart in one leaves the other alone: the same model as 'noninvariant' in
    every group (same minimum and degrees of freedom, by counting)."""
    frame = _sites()
    frame = frame[frame["site"] != "north"]
    one = cfa_tool.fit(SCALAR + "in group east: noninvariant intercept(x2)\n", frame, group="site")
    every = cfa_tool.fit(SCALAR + "noninvariant intercept(x2)\n", frame, group="site")
    assert one.fit.df == every.fit.df
    assert one.fit.chi_square == pytest.approx(every.fit.chi_square, rel=1e-6, abs=1e-8)


def test_set_apart_in_all_groups_but_one_is_letting_differ_in_every_group():
    frame = _sites()
    two = cfa_tool.fit(SCALAR + "in group east: noninvariant intercept(x2)\nin group audit: noninvariant intercept(x2)\n",
                       frame, group="site")
    every = cfa_tool.fit(SCALAR + "noninvariant intercept(x2)\n", frame, group="site")
    assert two.fit.df == every.fit.df
    assert two.fit.chi_square == pytest.approx(every.fit.chi_square, rel=1e-6, abs=1e-8)


def _refused(statements: str) -> ModelError:
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(SCALAR + statements, "m.cfa"), GROUPS)
    return info.value


@pytest.mark.parametrize("statements, place, words", [
    # a later group: its factor mean has no intercept held equal (with its loading) left to be estimated from
    ("in group east: noninvariant intercept(x1), intercept(x2)\nin group east: noninvariant intercept(x3), "
     "intercept(x4)\n", (4, 44), "set apart every intercept of the indicators of 'f' that was held equal in group east "
     "(with its loading), so the mean of 'f' in group east can no longer be compared with the other groups' and is "
     "not identified; keep at least one intercept of 'f' held equal in group east"),
    # the first group, whose mean (0) is the origin of the others'
    ("in group audit: noninvariant intercept(x1), intercept(x2), intercept(x3), intercept(x4)\n", (3, 75),
     "so the mean of 'f' in the other groups can no longer be compared with group audit's"),
    # the marker: refused, not rescaled in that group
    ("in group east: noninvariant loading(f, x1)\n", (3, 29),
     "loading(f, x1) is the marker that sets the scale of 'f' in every group, so it cannot be set apart in group "
     "east alone; make another indicator the marker ('free loading(f, x1)': the next indicator then sets the scale, "
     "and this loading may be set apart) or scale 'f' by its variance ('scale f by variance')"),
    ("in group east: noninvariant threshold(x2)\n", (3, 29),
     "setting the thresholds of 'x2' apart in group east alone is not available yet; write 'noninvariant "
     "threshold(x2)' to let them differ in every group"),
    ("noninvariant intercept(x2)\nin group east: noninvariant intercept(x2)\n", (4, 29),
     "'in group east: noninvariant intercept(x2)' sets apart in one group what 'noninvariant intercept(x2)' on line 3 "
     "already lets differ in every group; keep one of the two"),
    ("in group east: noninvariant variance(x2)\n", (3, 29),
     "'in group east: noninvariant variance(x2)' exempts a parameter from being held equal across groups, but error "
     "variances are not held equal"),
    ("in group west: noninvariant intercept(x2)\n", (3, 29), "there is no group west"),
])
def test_what_cannot_be_set_apart_is_refused_at_its_line(statements, place, words):
    error = _refused(statements)
    assert (error.location.line, error.location.column) == place
    assert words in str(error)


def test_a_first_groups_loadings_all_set_apart_under_the_variance_scaling_is_refused():
    """The first group's variance (1) gives the others their unit through a shared loading: with none left, the later
    groups' variances, each at 1, would be held equal among them without the model saying so."""
    error = _refused("scale f by variance\nin group audit: noninvariant loading(f, x1), loading(f, x2), loading(f, x3), "
                     "loading(f, x4)\n")
    assert error.location.line == 4
    assert "set apart every loading of 'f' held equal in group audit, the first group" in str(error)
    # a later group's (with the loadings alone held equal): that group's variance is 1, its loadings its own
    metric = "factor f: x1, x2, x3, x4\ninvariance metric\nscale f by variance\n"
    table = build_parameter_table(parse_model(metric + "in group east: noninvariant loading(f, x1), loading(f, x2), "
                                              "loading(f, x3), loading(f, x4)\n", "m.cfa"), GROUPS)
    variances = {p.group: p.free for p in table.parameters if p.kind == "factor_variance"}
    assert variances == {0: False, 1: False, 2: True}  # audit's sets the unit, east's own, north's free


def test_an_ordinal_items_parameter_set_apart_in_one_group_is_not_available_yet():
    spec = parse_model("factor f: x1, x2, x3, x4\ninvariance scalar\nin group east: noninvariant intercept(x2)\n", "m.cfa")
    with pytest.raises(ModelError) as info:
        build_parameter_table(spec, GROUPS, ordinal={"x2": 2})
    assert (info.value.location.line, info.value.location.column) == (3, 29)
    assert ("setting intercept(x2) apart in group east alone is not available yet, as 'x2' is ordinal"
            in str(info.value))
