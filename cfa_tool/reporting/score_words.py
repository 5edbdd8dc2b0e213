"""The words of factor scores' reports, declared once: each scoring method's short name (the scores' tables and
notes) and its words with its authors (the methods paragraph, reporting.paragraph.scores_paragraph), and a least
share of items in plain words.  Apart from the paragraph builder so that a fit's report, which has no scores, does
not load the scoring modules (the command's cold start)."""

from __future__ import annotations

from cfa_tool.reporting.numbers import needed_decimals
from cfa_tool.scoring.methods import ScoreMethod

#: each scoring method's name in the scores' report and paragraph
METHOD_LABELS = {ScoreMethod.REGRESSION: "regression", ScoreMethod.BARTLETT: "Bartlett",
                 ScoreMethod.CORRELATION_PRESERVING: "correlation-preserving",
                 ScoreMethod.EXPECTED_A_POSTERIORI: "posterior mean", ScoreMethod.ITEM_SUM: "item sum",
                 ScoreMethod.ITEM_MEAN: "item mean"}


#: how close to a least share its percentage is printed (:func:`share_words`): within half a percent of itself
SHARE_CLOSE = 5e-3


def share_words(share: float) -> str:
    """A least share in plain words: 'half' for .5, else a percentage with the fewest decimals (up to 4) that neither
    print 0 nor move it by as much as half a percent of itself ('60%', '67%' for 2/3, '12.3%', '0.01%'; hostile s20: a
    share of .0001 was printed 'at least 0%')."""
    if share == 0.5:
        return "half"
    percent = 100 * share
    return f"{percent:.{needed_decimals(percent, most=4, within=SHARE_CLOSE)}f}%"


#: how the scores' paragraph names each scoring method, with its authors (scoring.methods.ScoreMethod)
SCORE_METHOD_WORDS = {
    ScoreMethod.REGRESSION: "regression scores (the posterior mean of the factors given the answers; Thurstone, 1935)",
    ScoreMethod.BARTLETT: "Bartlett scores (weighted least squares with the residual variances as weights; Bartlett, "
                          "1937)",
    ScoreMethod.CORRELATION_PRESERVING: "correlation-preserving scores (ten Berge, Krijnen, Wansbeek, & Shapiro, 1999)",
    ScoreMethod.EXPECTED_A_POSTERIORI: "posterior means of the factors over the latent-response model (expected a "
                                       "posteriori scores; Bock & Aitkin, 1981)",
    ScoreMethod.ITEM_SUM: "keyed item sums (each factor's own items, reverse-keyed items reversed as lowest + highest "
                          "answer \u2212 x)",
    ScoreMethod.ITEM_MEAN: "keyed item means (the keyed item sum over the number of items)",
}
