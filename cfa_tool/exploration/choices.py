"""The vocabularies of exploratory factor analysis, each declared once.

Values are descriptive words of this program; the names of published methods
(varimax, quartimin, oblimin, geomin, promax) keep their authors' names.
"""

from __future__ import annotations

from enum import Enum


class CorrelationKind(Enum):
    """What the analysed correlations are."""

    PEARSON = "pearson"  # product-moment correlations of continuous items
    POLYCHORIC = "polychoric"  # ordinal items (polyserial/Pearson beside continuous ones)


class ExtractionMethod(Enum):
    """How the unrotated factors are estimated."""

    MAXIMUM_LIKELIHOOD = "maximum-likelihood"  # Joreskog (1967); Lawley & Maxwell (1971)
    LEAST_SQUARES = "least-squares"  # unweighted least squares / minimum residual (Harman & Jones 1966)


class RotationMethod(Enum):
    NONE = "none"
    VARIMAX = "varimax"  # Kaiser (1958), orthogonal
    QUARTIMIN = "quartimin"  # direct quartimin (Jennrich & Sampson 1966), oblique
    OBLIMIN = "oblimin"  # direct oblimin with parameter gamma (Jennrich 1979), oblique
    GEOMIN = "geomin"  # Yates (1987); Browne (2001), oblique or orthogonal
    TARGET = "target"  # partially specified target (Browne 1972), oblique or orthogonal
    PROMAX = "promax"  # Hendrickson & White (1964), oblique


class FitStatistic(Enum):
    """How a solution's chi-square was obtained."""

    NORMAL_THEORY = "normal-theory"  # N times the ML discrepancy, continuous items assumed multivariate normal
    MEAN_SCALED = "mean-scaled"  # the same divided by the Satorra-Bentler (1994) scaling factor (ordinal items)


class CountRule(Enum):
    """Rules for the number of factors."""

    PARALLEL_COMPONENTS = "parallel-analysis-components"  # Horn (1965)
    PARALLEL_FACTORS = "parallel-analysis-factors"  # Horn (1965) on the reduced matrix (Humphreys & Ilgen 1969)
    AVERAGE_PARTIAL = "minimum-average-partial"  # Velicer (1976)
    AVERAGE_PARTIAL_REVISED = "minimum-average-partial-revised"  # Velicer, Eaton & Fava (2000), fourth powers
    LOWEST_BIC = "lowest-bic"  # Schwarz (1978) over the maximum-likelihood solutions
    CLOSE_FIT = "close-fit"  # fewest factors with RMSEA at most .05 (Browne & Cudeck 1993; a convention)


class ParallelReference(Enum):
    """Where the random eigenvalues of parallel analysis come from; ``phrase`` is how reports say it."""

    NORMAL = "normal-data"  # Pearson correlations of random normal rows (Horn 1965)
    SHUFFLED = "shuffled-answers"  # polychoric correlations of the answers, each item shuffled on its own

    @property
    def phrase(self) -> str:
        return {ParallelReference.NORMAL: "random normal data sets of the same size",
                ParallelReference.SHUFFLED: "copies of the answers with each item shuffled on its own, analysed by "
                                            "polychoric correlations as the data are (Garrido, Abad & Ponsoda 2013)"}[self]


class CountNote(Enum):
    """Reasons to treat the recommended number of factors with care."""

    RULES_DISAGREE = "rules-disagree"
    NEXT_EIGENVALUE_BORDERLINE = "next-eigenvalue-borderline"
    NEXT_EIGENVALUE_ABOVE_CHANCE = "next-eigenvalue-above-chance"
    NO_FACTOR_ABOVE_CHANCE = "no-factor-above-chance"
    POOR_FIT_AT_RECOMMENDED = "poor-fit-at-recommended"
    IMPROPER_AT_RECOMMENDED = "improper-solution-at-recommended"


class ErrorsUnavailable(Enum):
    """Why a solution has no standard errors."""

    UNROTATED_SEVERAL_FACTORS = "unrotated-several-factors"
    UNIQUENESS_AT_BOUND = "uniqueness-at-bound"
    SINGULAR_INFORMATION = "singular-information"


class Placement(Enum):
    """Where the draft model puts an item."""

    ON_FACTOR = "on-factor"  # one loading at or above the threshold: on that factor
    SEVERAL_LOADINGS = "several-loadings"  # two or more at or above the threshold: left for the researcher
    NO_LOADING = "no-loading"  # none at or above the threshold: left for the researcher


class FactorNaming(Enum):
    """How an exploratory block's names are given to its rotated factors."""

    ANCHOR_ITEMS = "anchor-items"  # the k-th name to the factor the block's k-th item (its echelon anchor) loads on most
    TARGET = "target"  # the names follow the target's columns
    ONE_FACTOR = "one-factor"  # nothing to rotate


class BlockErrors(Enum):
    """Where an exploratory block's standard errors come from, or why it has none."""

    DELTA_METHOD = "delta-method"  # implicit differentiation of the rotation's conditions (Jennrich 1973)
    SINGULAR_ROTATION = "singular-rotation"  # the rotation's conditions are singular at this solution: none
    NO_PARAMETER_COVARIANCE = "no-parameter-covariance"  # the fit gave no covariance of its estimates: none
