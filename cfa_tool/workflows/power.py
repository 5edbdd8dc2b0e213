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

    def to_dict(self) -> dict:
        return asdict(self)


def rmsea_power(df: int, n_obs: int, rmsea_null: float, rmsea_alt: float, alpha: float = 0.05) -> float:
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
    from cfa_tool.model.parameters import build_parameter_table, one_group_only
    from cfa_tool.pipeline.ordinal import refuse_set_residual_variances

    one_group_only(spec, "the power of the RMSEA test is computed for one group's model")
    if spec.ordinal:
        refuse_set_residual_variances(spec)
    table = build_parameter_table(spec)
    return table.p * (table.p + 1) // 2 - table.n_free, table.p


def plan(df: int, test: str = "close", n_obs: int | None = None, alpha: float = 0.05, target_power: float = 0.80,
         rmsea_null: float | None = None, rmsea_alt: float | None = None, variables: int | None = None,
         ordinal: bool = False) -> PowerResult:
    """Power of the RMSEA test at ``n_obs`` and the smallest N reaching ``target_power``; with the model's
    number of ``variables``, that N is never below what estimating the model needs (more rows than variables), and
    the sample sizes shown are judged by the rule of rows per free parameter every fit applies (its free parameters
    p(p + 1)/2 - df, the covariance structure's; assessment.admissibility.rows_per_parameter): the test's N says
    nothing of how precisely the model's parameters are estimated (new-user trial s17: N = 96 for 46 parameters).
    ``ordinal``: the model declares ordinal items (the report then says the plan is for the normal-theory test)."""
    if test not in TESTS:
        raise OptionError(f"test must be one of {', '.join(TESTS)}, not '{clipped(test, 40)}'")
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
    note = None
    if variables is not None and required <= variables + 1:
        note = (f"the test alone would reach the power at N = {required}, but the model's {variables} variables need more "
                f"rows than that to be estimated at all (and a factor analysis far more); N = {variables + 2} is shown "
                f"as the least possible")
        required = variables + 2
    below: tuple[RowsPerParameter, ...] = ()
    if variables is not None:
        free = variables * (variables + 1) // 2 - df
        below = tuple(facts for n in dict.fromkeys((required, n_obs)) if n is not None
                      for facts in rows_per_parameter((n,), (free,)))
    return PowerResult(test, df, eps0, epsa, alpha, n_obs, power, required, target_power, note, ordinal, below)
