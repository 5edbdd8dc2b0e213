"""The vocabulary of factor scores: the methods, and why a score can be absent."""

from __future__ import annotations

from enum import Enum

import numpy as np


class ScoreMethod(Enum):
    """How a person's factor scores are computed from their answers (each under its published name)."""

    #: the posterior mean of the factors given the answers (Thurstone 1935): smallest mean squared error
    REGRESSION = "regression"
    #: weighted least squares with the residual variances as weights (Bartlett 1937): conditionally unbiased
    BARTLETT = "bartlett"
    #: scores whose covariance matrix equals the factors' (Anderson & Rubin 1956 for uncorrelated
    #: factors; ten Berge, Krijnen, Wansbeek & Shapiro 1999 for correlated ones)
    CORRELATION_PRESERVING = "correlation-preserving"
    #: ordinal items: the posterior mean over the latent-response model (expected a posteriori;
    #: Bock & Aitkin 1981)
    EXPECTED_A_POSTERIORI = "expected-a-posteriori"
    #: the plain scale score of scale manuals: the sum of a factor's own items, reverse-keyed items reversed
    #: (lowest + highest answer - x), prorated from the answered items (scoring.item_sums)
    ITEM_SUM = "item-sum"
    #: the same keyed answers averaged: on the answer scale, so factors with different numbers of items compare
    ITEM_MEAN = "item-mean"


LINEAR_METHODS = (ScoreMethod.REGRESSION, ScoreMethod.BARTLETT, ScoreMethod.CORRELATION_PRESERVING)
#: scale scores computed from the answers alone, keyed and checked by the fitted model (not factor scores)
ITEM_METHODS = (ScoreMethod.ITEM_SUM, ScoreMethod.ITEM_MEAN)
#: the methods that score a factor a row answered none of the items of, from its other answers (the posterior mean
#: exists whatever is answered); Bartlett and correlation-preserving scores need the factor's own items, item sums too
PREDICTING_METHODS = (ScoreMethod.REGRESSION, ScoreMethod.EXPECTED_A_POSTERIORI)


class Unscored(Enum):
    """Why a cell of a score table is empty."""

    #: the row answered none of the model's items
    NO_ANSWERS = "no answers on the model's items"
    #: Bartlett and correlation-preserving scores exist only for factors measured by items directly
    HIGHER_ORDER = "the method does not apply to a factor measured only through other factors"
    #: the row's answers do not reach every factor that the method scores jointly
    TOO_FEW_ANSWERS = "the answered items do not measure every factor the method scores jointly"
    #: item sums and means: the row answered fewer of the factor's items than the least share the rule asks for (the
    #: report names the share: reporting.score_report.reason_words)
    TOO_FEW_ITEMS_ANSWERED = "answered fewer of the factor's items than the least share"
    #: item sums and means exist only for a factor measured by items alone (none through factors below it)
    NOT_ITEMS_ALONE = "an item sum or mean is only for a factor measured by its own items alone"
    #: item sums and means: a method factor describes a way of answering (wording, acquiescence), not a trait
    NOT_A_TRAIT = "a method factor describes a way of answering, not a trait, and has no item sum or mean"
    #: item sums and means: the fit's loadings contradict the keying the model declares for the factor's items, so
    #: the fit withholds the keyed sum's reliability (assessment.reliability.withheld_sums): a sum of items that run
    #: against each other describes no scale, and its cells are left empty as its figures are withheld
    KEYING_WITHHELD = ("the fit's loadings contradict the keying the model declares for the factor's items, so their "
                       "keyed sum describes no scale")
    #: the row answered none of the factor's items, and its score of the factor (a prediction from its other answers)
    #: was asked to be left empty (:attr:`UnansweredFactor.LEAVE_EMPTY`)
    LEFT_EMPTY = "none of the factor's items answered: its prediction from the other answers left empty, as asked"


class UnansweredFactor(Enum):
    """What to do with a factor whose items a row answered none of (directly or through the factors below it).  A
    regression score or posterior mean of it still exists, a prediction from the row's other answers through the
    factors' correlations (Thurstone 1935; Bock & Aitkin 1981), which a report to the person could mistake for a
    measure of that factor."""

    #: write the prediction (the default: it keeps the data), with a caution first that says which rows have one
    PREDICT = "predict"
    #: leave the cell empty, counted as :attr:`Unscored.LEFT_EMPTY` and said in the file's why_not_scored column
    LEAVE_EMPTY = "leave-empty"


def rows_without_answers(answered, m: int) -> dict:
    """The count of rows that answered none of the model's items (``answered``: per row, whether it answered any),
    for each of the ``m`` factors, as {:attr:`Unscored.NO_ANSWERS`: counts}; {} when every row answered something.
    The one count of every method (factor scores, posterior means, item sums)."""
    missing = int(np.size(answered) - np.count_nonzero(answered))
    return {Unscored.NO_ANSWERS: np.full(m, missing, dtype=np.int64)} if missing else {}


#: determinacy below this is a caution against using the scores for decisions about individuals
#: (common practice, no single source; that Gorsuch 1983 and Grice 2001 discuss .80 and .90 is recalled from memory)
DETERMINACY_CAUTION = 0.80
#: reliability below this is usually too low for decisions about individuals (Nunnally & Bernstein 1994 ask
#: for .90 at least there; common practice, recalled from memory)
INDIVIDUAL_DECISIONS = 0.90
#: item sums and means: the least share of a factor's items a row must answer to be prorated (the mean of its answered
#: keyed items, times the number of items for a sum); common practice ('the half rule'), no single source, recalled
#: from memory
LEAST_SHARE_ANSWERED = 0.5
