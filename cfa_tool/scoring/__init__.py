"""Factor scores: a score per person and factor from a fitted model, and how good the scores are.

The modules are pure functions on one group's fitted matrices:

* :mod:`~cfa_tool.scoring.model`: what the scores need from a fit (:func:`score_inputs`,
  :func:`ordinal_score_inputs`, :func:`one_group_ordinal_inputs`);
* :mod:`~cfa_tool.scoring.weights`: regression (Thurstone 1935), Bartlett (1937) and
  correlation-preserving (Anderson & Rubin 1956; ten Berge et al. 1999) weights per answer pattern;
* :mod:`~cfa_tool.scoring.linear`: rows scored block by block from their answered items;
* :mod:`~cfa_tool.scoring.ordinal`: expected a posteriori scores of ordinal items;
* :mod:`~cfa_tool.scoring.quality`: determinacy, reliability, score correlations, keyed sum scores and omega;
* :mod:`~cfa_tool.scoring.item_sums`: each person's keyed item sum and item mean, prorated from the answered items.
"""

from cfa_tool.scoring.item_sums import ItemSumRule, ItemSums, item_sums
from cfa_tool.scoring.linear import LinearScorer, ScoreBlock, row_blocks, score_blocks, score_groups, score_rows
from cfa_tool.scoring.methods import (DETERMINACY_CAUTION, ITEM_METHODS, LINEAR_METHODS, ScoreMethod, UnansweredFactor,
                                      Unscored)
from cfa_tool.scoring.model import (OrdinalScoringModel, ScoringModel, one_group_ordinal_inputs, ordinal_score_inputs,
                                    items_answered, score_inputs, scoring_model)
from cfa_tool.scoring.ordinal import EapScorer, PosteriorScores, eap_blocks, eap_scores
from cfa_tool.scoring.quality import ScoreQuality, score_quality

__all__ = ["DETERMINACY_CAUTION", "EapScorer", "ITEM_METHODS", "ItemSumRule", "ItemSums", "LINEAR_METHODS",
           "LinearScorer", "OrdinalScoringModel", "PosteriorScores", "ScoreBlock", "ScoreMethod", "ScoreQuality",
           "ScoringModel", "UnansweredFactor", "Unscored", "eap_blocks", "eap_scores", "item_sums",
           "one_group_ordinal_inputs", "ordinal_score_inputs", "row_blocks", "score_blocks", "score_groups", "score_inputs", "score_quality",
           "score_rows", "scoring_model", "items_answered"]
