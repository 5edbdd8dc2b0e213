"""Power and sample size for RMSEA-based tests (MacCallum, Browne & Sugawara 1996).

With n = N - 1 and noncentrality lambda = n df eps^2, the test of H0: eps = eps0
against eps = eps_a uses the noncentral chi-square:

* eps_a > eps0 (tests of close fit, eps0 = .05 vs .08, and of exact fit, 0 vs .05):
  reject when T > c, c the 1 - alpha quantile under eps0; power = P(T > c | eps_a);
* eps_a < eps0 (test of not-close fit, .05 vs .01): reject when T < c, c the alpha
  quantile under eps0; power = P(T < c | eps_a).
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

from cfa_tool.assessment.admissibility import RowsPerParameter, rows_per_parameter
from cfa_tool.numerics import distributions as dist

from cfa_tool import options as check
from cfa_tool.errors import OptionError, clipped
from cfa_tool.numbers import user_number
from cfa_tool.language.spec import Spec
from cfa_tool.views import Presentable

TESTS = {  # name: (eps0, eps_a), the conventions of MacCallum, Browne & Sugawara (1996)
    "close": (0.05, 0.08),
    "not-close": (0.05, 0.01),
    "exact": (0.0, 0.05),
}


def fewest_rows(variables: int) -> int:
    """The fewest rows of ``variables`` items a model is estimated from at all, two more than the items (n centred
    rows have rank n - 1 at most, so the sample covariance matrix of p items needs n >= p + 1, and one row more leaves
    it a margin; a factor analysis needs far more): the least N a plan shows and the least each simulated data set of
    power-simulation takes."""
    return variables + 2


def least_rows(required: int, variables: int | None) -> tuple[int, str | None]:
    """(``required`` raised to :func:`fewest_rows` of ``variables`` where it falls below, the note saying so or None):
    the plan's N of both power routes (the RMSEA's and the nested models')."""
    if variables is None or required >= fewest_rows(variables):
        return required, None
    return fewest_rows(variables), (
        f"the test alone would reach the power at N = {required}, but the model's {variables} variables need more rows "
        f"than that to be estimated at all (and a factor analysis far more); N = {fewest_rows(variables)} is shown as "
        f"the least possible")


@dataclass(frozen=True)
class PowerResult(Presentable):
    """The power of a test of fit by the RMSEA (MacCallum, Browne & Sugawara 1996)."""
    test: str
    df: int
    rmsea_null: float
    rmsea_alternative: float
    alpha: float
    n_obs: int | None
    power: float | None
    required_n: int | None
    target_power: float
    note: str | None = None  # when the test's own answer is below what the model needs
    ordinal: bool = False  # the model declares ordinal items, whose fits use another test than the one planned here
    #: the sample sizes shown (the smallest N, then the N asked about) below the rule of rows per free parameter of
    #: the model (assessment.admissibility.rows_per_parameter), when the model's variables are known: the test's N
    #: is not what estimating the model needs, which the report says first
    below_rows_rule: tuple[RowsPerParameter, ...] = ()
    #: a planned cluster sample (:class:`ClusterPlan`): the rows and clusters the smallest N needs under its design
    #: effect; None without one
    clusters: ClusterPlan | None = None
    #: with a planned cluster sample and an N asked about: the independent rows that N is worth, N / design effect
    #: (Kish 1965), at which ``power`` is computed; None otherwise (hostile tester s24: the power of N independent
    #: rows was shown beside the design)
    effective_n: float | None = None
    #: the model's free parameters of its covariance structure, p(p + 1)/2 - df, when its variables are known (None
    #: else): a planned cluster sample of no more clusters is cautioned (data.sample_design.planned_clusters_caution)
    free_parameters: int | None = None
    #: the model's variables when known (None else): advice names no sample size below :func:`fewest_rows` of them,
    #: which power-simulation would refuse (hostile tester s28: '--n 5,135' for 12 items)
    variables: int | None = None

    def to_dict(self) -> dict:
        return asdict(self)


@dataclass(frozen=True)
class ClusterPlan:
    """The smallest N of a plan under a design effect (Kish 1965: the variance of a cluster sample's statistics
    over that of as many independent rows, so a cluster sample needs deff times the rows; recalled from memory), and
    with clusters of ``cluster_size`` rows the clusters that takes.  ``intraclass``: the intraclass correlation the
    design effect came from, 1 + (m - 1) ICC (data.cluster_similarity.design_effect), None when it was given."""
    design_effect: float
    rows: int  # ceil(required N x design effect)
    cluster_size: float | None = None
    intraclass: float | None = None
    clusters: int | None = None  # ceil(rows / cluster size)


def effective_rows(n_obs: int, clusters) -> float:
    """What ``n_obs`` rows of a planned cluster sample (``clusters``: :class:`ClusterPlan`) are worth as independent
    rows, N / design effect (Kish 1965's effective sample size, recalled from memory): the N a power at N is computed
    for, by every plan (the RMSEA test's and the difference test's); too few for a test (below 2) refused."""
    effective = n_obs / clusters.design_effect
    if effective < 2:
        raise OptionError(f"N = {n_obs} rows of a cluster sample with a design effect of "
                          f"{user_number(round(clusters.design_effect, 4))} are worth about "
                          f"{user_number(round(effective, 2))} independent rows, too few for a test of fit; "
                          f"give a larger N")
    return effective


def effective_shown(rows: float) -> float:
    """The independent rows a planned cluster sample is worth (N / design effect) as every view writes them and the
    rule of rows per parameter judges them: to one decimal (fixleft s26: '42.19 rows for 13 parameters' in the caution
    beside '42.2' in the table, and 13.996 judged apart from a smallest N of 14, naming 14 rows twice)."""
    return round(float(rows), 1)


def rows_rule_judged(free: int, required: int, n_obs: int | None,
                     effective: float | None = None) -> tuple[RowsPerParameter, ...]:
    """The sample sizes of a plan below the rule of rows per free parameter (assessment.admissibility
    .rows_per_parameter), as independent rows: the smallest N, of independent rows, and the N asked about, or under a
    planned cluster sample the ``effective`` rows it is worth, N / design effect (Kish 1965's effective sample size,
    recalled from memory), by which its power is computed too (s25: N = 200 rows under a design effect of
    2.5, worth 80 rows for 27 parameters, passed the rule as 200).  The one judgement of every plan (the RMSEA
    test's and the difference test's)."""
    judged = (required, effective_shown(effective) if effective is not None else n_obs)
    return tuple(facts for n in dict.fromkeys(judged) if n is not None for facts in rows_per_parameter((n,), (free,)))


def cluster_plan(required_n: int, design_effect: float | None = None, cluster_size: float | None = None,
                 intraclass: float | None = None) -> ClusterPlan | None:
    """The rows and clusters a cluster sample needs for the power of ``required_n`` independent rows: under a
    ``design_effect`` given, or one from ``intraclass`` and ``cluster_size`` (1 + (m - 1) ICC, Kish 1965), whose
    figures a fit or check of an earlier cluster sample reports (its design's median intraclass correlation and
    design effect); None without either.  A design effect applies to the whole N, which is an approximation: the fit's
    statistics each have their own (common practice)."""
    from math import ceil

    from cfa_tool.data.cluster_similarity import design_effect as kish
    from cfa_tool.options import Option

    if design_effect is None and intraclass is None:
        if cluster_size is not None:
            raise OptionError(f"a cluster size ({Option.CLUSTER_SIZE}) alone gives no design effect; give with it the "
                              f"items' intraclass correlation ({Option.INTRACLASS}) or the design effect "
                              f"({Option.DESIGN_EFFECT}), both reported by a fit or check of an earlier cluster sample")
        return None
    if design_effect is not None and intraclass is not None:
        raise OptionError(f"give the design effect ({Option.DESIGN_EFFECT}) or the intraclass correlation "
                          f"({Option.INTRACLASS}) with the cluster size, not both: the one follows from the other")
    size = None
    if cluster_size is not None:
        size = check.real_number(f"the cluster size ({Option.CLUSTER_SIZE}, rows per cluster)", cluster_size, 1.0,
                                 10.0**7)
    if intraclass is not None:
        if size is None:
            raise OptionError(f"an intraclass correlation ({Option.INTRACLASS}) gives a design effect only with the "
                              f"number of rows per cluster; give {Option.CLUSTER_SIZE} too")
        rho = check.real_number(f"the intraclass correlation ({Option.INTRACLASS})", intraclass, 0.0, 1.0,
                                open_high=True)
        deff = kish(rho, size)
    else:
        rho = None
        deff = check.real_number(f"the design effect ({Option.DESIGN_EFFECT})", design_effect, 1.0, 10.0**4)
    rows = ceil(required_n * deff - 1e-9)
    return ClusterPlan(deff, rows, size, rho, ceil(rows / size - 1e-9) if size is not None else None)


def rmsea_power(df: int, n_obs: float, rmsea_null: float, rmsea_alt: float, alpha: float = 0.05) -> float:
    """The power at ``n_obs`` rows (an effective N, which need not be whole, for a cluster sample)."""
    if df < 1 or n_obs < 2:
        raise OptionError("power needs at least 1 degree of freedom and 2 observations")
    n = n_obs - 1
    lam0, lama = n * df * rmsea_null**2, n * df * rmsea_alt**2
    if rmsea_alt > rmsea_null:
        return float(dist.ncx2_sf(dist.ncx2_ppf(1 - alpha, df, lam0), df, lama))
    if rmsea_alt < rmsea_null:
        return float(dist.ncx2_cdf(dist.ncx2_ppf(alpha, df, lam0), df, lama))
    raise OptionError("the null and alternative RMSEA must differ")


def required_sample_size(df: int, rmsea_null: float, rmsea_alt: float, power: float = 0.80, alpha: float = 0.05,
                         largest: int = 10_000_000) -> int:
    """Smallest N whose power reaches ``power`` (power rises with N)."""
    if not 0 < power < 1:
        raise OptionError("the target power must be between 0 and 1")
    lo, hi = 2, 4
    while rmsea_power(df, hi, rmsea_null, rmsea_alt, alpha) < power:
        lo, hi = hi, hi * 2
        if hi > largest:
            raise OptionError(f"more than {largest:,} observations would be needed")
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if rmsea_power(df, mid, rmsea_null, rmsea_alt, alpha) >= power:
            hi = mid
        else:
            lo = mid
    return hi


def model_degrees_of_freedom(spec: Spec) -> tuple[int, int]:
    """(degrees of freedom, indicators) of a model's covariance structure in one group:
    p(p + 1)/2 - q (Joreskog 1969).  With ordinal items a statement on a residual variance is an error at its line,
    as the ordinal fit would refuse it (:func:`cfa_tool.pipeline.ordinal.refuse_set_residual_variances`): a fixed
    one would add a degree of freedom to a model that is never fitted."""
    from cfa_tool.data.joined_answers import refuse_joins_without_answers
    from cfa_tool.model.parameters import build_parameter_table, no_mean_statements, one_group_only
    from cfa_tool.pipeline.ordinal import refuse_set_residual_variances

    refuse_joins_without_answers(spec, "power", "plans from the model alone, with no answers to join (the degrees "
                                                "of freedom it tests are the same without the statement)")
    one_group_only(spec, "the power of the RMSEA test is computed for one group's model")
    no_mean_statements(spec, "the RMSEA test planned here is of the covariance structure, which has no intercepts "
                             "or factor means")
    if spec.ordinal:
        refuse_set_residual_variances(spec)
    table = build_parameter_table(spec)
    return table.p * (table.p + 1) // 2 - table.n_free, table.p


def plan(df: int, test: str = "close", n_obs: int | None = None, alpha: float = 0.05, target_power: float = 0.80,
         rmsea_null: float | None = None, rmsea_alt: float | None = None, variables: int | None = None,
         ordinal: bool = False, design_effect: float | None = None, cluster_size: float | None = None,
         intraclass: float | None = None) -> PowerResult:
    """Power of the RMSEA test at ``n_obs`` and the smallest N reaching ``target_power``; with the model's
    number of ``variables``, that N is never below what estimating the model needs (more rows than variables), and
    the sample sizes shown are judged by the rule of rows per free parameter every fit applies (its free parameters
    p(p + 1)/2 - df, the covariance structure's; assessment.admissibility.rows_per_parameter): the test's N says
    nothing of how precisely the model's parameters are estimated (new-user trial s17: N = 96 for 46 parameters).
    ``ordinal``: the model declares ordinal items (the report then says the plan is for the normal-theory test).
    ``design_effect``, or ``intraclass`` with ``cluster_size``: a planned cluster sample, whose rows and clusters
    the plan gives (:func:`cluster_plan`; new-user trial s20: how many schools?), and the power at ``n_obs`` rows of
    that sample is that of the N / design effect independent rows they are worth (Kish 1965's effective sample size,
    recalled from memory)."""
    if test not in TESTS:
        raise OptionError(f"test must be one of {', '.join(TESTS)}, not '{clipped(test, 40)}'")
    ordinal = check.yes_or_no("ordinal", ordinal)  # (hostile s24b: ordinal='no' was read as true)
    df = check.whole_number("the degrees of freedom", df, 1, 10**7)
    if n_obs is not None:
        n_obs = check.observations(n_obs, "the sample size", minimum=2)
    alpha = check.probability("alpha (the significance level)", alpha)
    target_power = check.probability("the target power", target_power)
    if target_power <= alpha:  # the test rejects at rate alpha or more at every N (hostile s20: N = 3 was 'found')
        raise OptionError(f"the target power ({user_number(target_power)}) is not above the significance level "
                          f"({user_number(alpha)}): the test rejects at least that often at any sample size, so no "
                          f"sample size is needed for it; give a target above {user_number(alpha)} (.80 is common practice)")
    eps0, epsa = TESTS[test]
    eps0 = eps0 if rmsea_null is None else check.real_number("the RMSEA of the null hypothesis", rmsea_null, 0.0, 1.0, open_high=True)
    epsa = epsa if rmsea_alt is None else check.real_number("the RMSEA of the alternative", rmsea_alt, 0.0, 1.0, open_high=True)
    power = rmsea_power(df, n_obs, eps0, epsa, alpha) if n_obs is not None else None
    required = required_sample_size(df, eps0, epsa, target_power, alpha)
    clusters = cluster_plan(required, design_effect, cluster_size, intraclass)  # its options checked first
    required, note = least_rows(required, variables)
    effective = None
    if clusters is not None:  # the plan's N is the design's, not that of independent rows
        clusters = cluster_plan(required, design_effect, cluster_size, intraclass)
        if n_obs is not None:  # so is the N asked about: its power is that of the independent rows it is worth
            effective = effective_rows(n_obs, clusters)
            power = rmsea_power(df, effective, eps0, epsa, alpha)
    below: tuple[RowsPerParameter, ...] = ()
    free = variables * (variables + 1) // 2 - df if variables is not None else None
    if free is not None:
        below = rows_rule_judged(free, required, n_obs, effective)
    return PowerResult(test, df, eps0, epsa, alpha, n_obs, power, required, target_power, note, ordinal, below,
                       clusters, effective, free, variables)
