"""The sampling design of a data set: weights, clusters and strata, read and checked.

Sampling weights are rescaled to sum to the number of rows analysed (in each group), so that
weights all equal to one constant give exactly the unweighted estimates and N stays the number
of rows for the test statistic (pseudo-maximum likelihood; Muthén & Satorra 1995).  Frequency
weights are counts: a row of weight 3 stands for three identical rows, and N is the sum of the
weights.  The effective sample size is Kish's (1965) (sum w)^2 / sum w^2.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from functools import cached_property

import numpy as np
import pandas as pd

from cfa_tool.numbers import count_text, counted, cut_list, rounded_number, user_number, word_list
from cfa_tool.data.kept_rows import row_of
from cfa_tool.errors import DataError, OptionError, clipped, printable
from cfa_tool.language.names import written_group
from cfa_tool.options import Option
from cfa_tool.method import MissingData, WeightKind
from cfa_tool.data.renamed_columns import renamed_hint
from cfa_tool.suggest import close_names, did_you_mean

SMALL_NUMBER_OF_CLUSTERS = 30  # below about 30-50 clusters cluster-robust errors are too small (common practice)
#: what too few clusters do, in the words of every caution that says it: a fit's design (SampleDesign.caution) and a
#: power plan's cluster sample (planned_clusters_caution)
FEW_CLUSTERS_WORDS = ("with fewer than about 30-50 clusters (common practice) cluster-robust standard errors and tests "
                      "tend to be too small")


@dataclass(frozen=True)
class DesignColumns:
    """The columns a user named for the design (any of them may be None)."""

    weights: str | None = None
    cluster: str | None = None
    strata: str | None = None
    kind: WeightKind = WeightKind.SAMPLING

    @property
    def names(self) -> tuple[tuple[str, str], ...]:
        return tuple((what, name) for what, name in (("weights", self.weights), ("cluster", self.cluster),
                                                      ("strata", self.strata)) if name is not None)

    @property
    def robust(self) -> bool:
        """Whether the design calls for sandwich standard errors and a scaled test (everything but frequency
        weights alone, which are the same as repeated rows)."""
        return self.cluster is not None or self.strata is not None or (
            self.weights is not None and self.kind is WeightKind.SAMPLING)


@dataclass(frozen=True)
class RowDesign:
    """Weight, cluster and stratum of each row analysed, in the order of the rows."""

    weights: np.ndarray  # sampling weights rescaled to sum to the rows; frequency weights as given
    kind: WeightKind
    clusters: np.ndarray | None = field(default=None)  # integer code of each row's cluster
    strata: np.ndarray | None = field(default=None)  # integer code of each row's stratum
    given: tuple[float, float] = (0.0, 0.0)  # sum and sum of squares of the weights as given (before rescaling)
    # the cluster and the stratum of each code, as the data name them (groups coded apart share names, not codes)
    cluster_names: tuple[str, ...] = ()
    strata_names: tuple[str, ...] = ()

    @property
    def total(self) -> float:
        return float(self.weights.sum())

    def sampling_units(self) -> tuple[np.ndarray, np.ndarray]:
        """(the sampling unit of each row, the stratum code of each unit): units are the clusters, or the rows
        when strata come without clusters; one stratum (code 0) when none is given.  Units in the order of their
        (stratum, cluster) pairs; made once per design (read-only arrays), which the meats of a fit ask for many
        times."""
        return self._sampling_units

    @cached_property
    def _sampling_units(self) -> tuple[np.ndarray, np.ndarray]:
        units = self.clusters if self.clusters is not None else np.arange(len(self.weights))
        strata = self.strata if self.strata is not None else np.zeros(len(self.weights), dtype=int)
        if len(units):  # each (stratum, unit) pair as one whole number that sorts as the pairs do
            shifted = units.astype(np.int64) - int(units.min())
            key = (strata.astype(np.int64) - int(strata.min())) * (int(shifted.max()) + 1) + shifted
        else:
            key = np.zeros(0, dtype=np.int64)
        _, first, unit_of_row = np.unique(key, return_index=True, return_inverse=True)
        unit_of_row = unit_of_row.ravel()
        stratum_of_unit = strata[first].astype(np.result_type(strata, units))
        unit_of_row.flags.writeable = stratum_of_unit.flags.writeable = False
        return unit_of_row, stratum_of_unit

    def lone_strata(self) -> tuple[str, ...]:
        """The strata with a single sampling unit (cluster, or row without clusters) among these rows, by name."""
        if self.strata is None:
            return ()
        _, stratum_of_unit = self.sampling_units()
        codes, counts = np.unique(stratum_of_unit, return_counts=True)
        return tuple(_named(codes[counts == 1], self.strata_names))


def _named(codes: np.ndarray, names: tuple[str, ...]) -> list[str]:
    """The names of integer ``codes`` (the code itself, as text, where no name is given)."""
    return [names[c] if c < len(names) else str(c) for c in codes.tolist()]


def shared_clusters(designs: list[RowDesign | None]) -> bool:
    """Whether some cluster, by name, has rows in more than one of these groups' designs (the groups are then
    domains of one cluster sample, not independent samples)."""
    seen: set = set()
    for design in designs:
        if design is None or design.clusters is None:
            return False
        own = set(_named(np.unique(design.clusters), design.cluster_names))
        if own & seen:
            return True
        seen |= own
    return False


def joint_design(designs: list[RowDesign]) -> RowDesign:
    """The groups' rows as one sample, in the order of the groups, clusters and strata coded anew by name; each
    group's weights as they are."""
    parts, names = [], []
    for codes, labels in (("clusters", "cluster_names"), ("strata", "strata_names")):
        if getattr(designs[0], codes) is None:
            parts.append(None)
            names.append(())
            continue
        coded, uniques = pd.factorize(np.concatenate([np.array(_named(getattr(d, codes), getattr(d, labels)), dtype=object)
                                                      for d in designs]))
        parts.append(coded)
        names.append(tuple(str(u) for u in uniques))
    return RowDesign(np.concatenate([d.weights for d in designs]), designs[0].kind, *parts,
                     given=(sum(d.given[0] for d in designs), sum(d.given[1] for d in designs)),
                     cluster_names=names[0], strata_names=names[1])


@dataclass(frozen=True)
class DominantCluster:
    """The cluster whose rows carry the largest share of the design effect of a fit's statistics
    (inference.design.dominant_cluster): its name, that share, the clusters (sampling units) among which it was
    the largest, and the statistics' mean design effect."""

    name: str
    share: float
    clusters: int
    design_effect: float

    @property
    def large(self) -> bool:
        """Whether one cluster holds so much of the design effect that the design-based covariance, and the
        standard errors and scaled test made from it, mostly describe that cluster: a share above
        :data:`DOMINANT_SHARE` and above :data:`DOMINANT_TIMES` times the even share 1/C (a rule of thumb of this
        tool, not a law)."""
        return self.share > DOMINANT_SHARE and self.share > DOMINANT_TIMES / self.clusters


#: a cluster holding more than this share of the design effect of the statistics (more than all the other clusters
#: together), and more than DOMINANT_TIMES times the even share 1/C, dominates the design-based covariance (a rule of
#: thumb of this tool, not a law: with 40 clusters alike each holds about 2.5%; a cluster of clustered answers of
#: normal size can hold a fifth or more, its share growing with the fourth power of its mean's departure)
DOMINANT_SHARE = 0.5
DOMINANT_TIMES = 5.0


@dataclass(frozen=True)
class SampleDesign:
    """What the report states about the design used."""

    columns: DesignColumns
    rows: int
    sum_of_weights: float | None  # of the weights as given (before rescaling)
    effective_n: float | None  # Kish (1965)
    clusters: int | None
    strata: int | None
    group_rows: tuple[int, ...] = ()  # rows of each group when there are several (sampling weights rescaled in each)
    # strata with a single sampling unit (cluster, or row without clusters) among the rows analysed, by name (in a
    # group, when the groups are independent samples); their unit is centred at the mean of all units' sums
    lone_strata: tuple[str, ...] = ()
    shared_clusters: bool = False  # the groups share clusters: domains of one cluster sample
    # strata with rows of more than one group, when the groups are taken as independent samples (not sharing
    # clusters): each group's part of such a stratum is a stratum of its own in the design-based errors
    shared_strata: tuple[str, ...] = ()
    # groups taken as independent samples: each group's label, clusters and Kish's effective sample size (each group's
    # estimates and their standard errors rest on its own rows, so each is judged on its own; re-check s16)
    group_labels: tuple[str, ...] = ()
    group_clusters: tuple[int, ...] = ()
    group_effective: tuple[float, ...] = ()
    #: data.cluster_similarity.ClusterSimilarity: the items' intraclass correlations over the clusters and the design
    #: effect they imply, for planning a later sample (new-user trial s20); None without clusters
    similarity: object | None = None

    def to_dict(self) -> dict:
        c = self.columns
        return {"weights": c.weights, "weight_kind": c.kind.value if c.weights else None,
                "sum_of_weights": self.sum_of_weights, "effective_sample_size": self.effective_n,
                "cluster": c.cluster, "clusters": self.clusters, "strata_column": c.strata, "strata": self.strata,
                "rows": self.rows, "rows_per_group": list(self.group_rows) or None, "sandwich": c.robust,
                "groups": (None if not self.group_rows else
                           "domains sharing clusters" if self.shared_clusters else "independent samples"),
                "strata_with_a_single_unit": list(self.lone_strata),
                "strata_shared_by_groups": list(self.shared_strata),
                "single_unit_centred_at": "the mean of all units' sums" if self.lone_strata else None,
                "cluster_similarity": self.similarity.to_dict() if self.similarity is not None else None}

    def design_effective_n(self) -> float | None:
        """The effective sample size of the design as a whole where the clusters' design effect is known (the items'
        median intraclass correlation, data.cluster_similarity): the rows, or Kish's effective N of sampling weights,
        over that design effect, the two design effects multiplied (Kish 1965; Gabler, Haeder & Lahiri 1999, recalled
        from memory): a rough guide, as the design effect is; None without clusters or their intraclass correlations.
        A reader takes Kish's effective N of the weights alone for the sample's (new-user trial s28: 2,129 of 2,400
        rows, with a design effect of 3.7 over 40 depots)."""
        deff = getattr(self.similarity, "design_effect", None) if self.columns.cluster is not None else None
        if deff is None or not deff == deff or deff <= 0:
            return None
        c = self.columns
        base = (self.effective_n if c.weights is not None and c.kind is WeightKind.SAMPLING and self.effective_n else
                self.sum_of_weights if c.weights is not None and self.sum_of_weights else self.rows)
        return float(base) / float(deff)

    def _design_n_words(self, paper: bool) -> str:
        """The design's effective sample size beside the clusters (:meth:`design_effective_n`); '' when unknown."""
        n = self.design_effective_n()
        if n is None:
            return ""
        weights = self.columns.weights is not None
        deff = self.similarity.design_effect
        if paper:
            after = ("which with the weights' makes" if weights else "so")
            return (f" (the items' median intraclass correlation gives a design effect of about {deff:.2f}, {after} an "
                    f"effective sample size of about {count_text(round(n))} for the design as a whole; Kish, 1965)")
        over = "the weights' effective N" if weights else "the rows"
        return f"; effective N of the design about {count_text(round(n))}, {over} over this design effect"

    def sentence(self, full_information: bool = False, ordinal: bool = False,
                 correlations: str = "polychoric correlations", weighted_least_squares: bool = True) -> str:
        """The design in the words of a methods paragraph, as the code uses it (``ordinal``: of a fit to thresholds
        and ``correlations``, e.g. 'tetrachoric correlations', whose least-squares weights, when
        ``weighted_least_squares``, come from their variances: with the rows taken as independent under clusters or
        strata, by the design otherwise)."""
        c = self.columns
        parts = []
        if c.weights is not None:
            if c.kind is WeightKind.FREQUENCY:
                parts.append(f"frequency weights from the column {c.weights} (sum {count_text(self.sum_of_weights)}, taken as N)")
            else:
                within = (f"rescaled within each group to sum to its rows ({', '.join(map(count_text, self.group_rows))})"
                          if self.group_rows
                          else f"rescaled to sum to the {count_text(self.rows)} rows")
                parts.append(f"sampling weights from the column {c.weights} (sum {count_text(self.sum_of_weights)}, {within}; "
                             f"Kish's effective sample size of the weights alone {self.effective_n:.1f}), by "
                             + ("the weighted full-information likelihood (Asparouhov, 2005)" if full_information else
                                f"weighted thresholds and {correlations} (pseudo-maximum likelihood; Muthén & "
                                f"Satorra, 1995; Asparouhov, 2005)" if ordinal else
                                "pseudo-maximum likelihood on weighted moments (Muthén & Satorra, 1995)"))
        if c.cluster is not None:
            parts.append(f"{self.clusters} clusters defined by {c.cluster}{self._design_n_words(True)}")
        if c.strata is not None:
            parts.append(f"{self.strata} strata defined by {c.strata}")
        text = "The sampling design was taken into account: " + "; ".join(parts) + "."
        if not c.robust:
            return text
        # inference/design.design_meat: weighted sums per cluster (or per row), centred within strata, C/(C - 1)
        units = "clusters" if c.cluster else "rows"
        sums = self._unit_sums()[1]
        if c.strata is not None:
            # in a methods section's words (new-user trial s20): the formula, sum_h C_h/(C_h - 1) ..., is in
            # inference/design.py's docstring
            spread = (f"the {units}' {sums} centred within each stratum (the variance between {units} within "
                      f"strata, each stratum's multiplied by its number of {units} over that number less one; Binder, "
                      f"1983)")
        else:
            spread = f"the {units}' {sums}" + (" (multiplied by the number of clusters over that number less "
                                               "one; Binder, 1983)" if c.cluster else "")
        after = ""
        if self.group_rows and self.shared_clusters:
            # full-information ML: the rows' scores of their answered items, rows with gaps included
            # (inference.robust_missing.groups_scores_meat, s21)
            after += (" The groups are domains that share clusters: their estimating equations are stacked, and each "
                      "cluster's sums gather the contributions of its rows in every group"
                      + (", rows with missing answers included (each row's score from the items it answered, valid "
                         "when answers are missing at random)" if full_information else "")
                      + ", so the groups' estimates are correlated through their clusters (Binder, 1983).")
        elif self.group_rows and (c.cluster or c.strata):
            after += (" The groups were taken as independent samples" + (", each with its own clusters" if c.cluster
                                                                          else "")
                      + ("" if not c.strata else
                         "; each group's rows within a stratum were treated as a stratum of their own"
                         if self.shared_strata else ", each with its own strata") + ".")
            # groups that share strata: shared_strata_caution follows among the design's cautions
        lone = self.lone_text()
        if lone:
            after += f" {lone[0].upper()}{lone[1:]}."
        if ordinal:
            weights = ("The least-squares weights come from the variances of the thresholds and correlations with the "
                       "rows taken as independent" + (" (weights applied)" if c.weights is not None else "")
                       + f", so the {word_list(x for x, col in (('clusters', c.cluster), ('strata', c.strata)) if col)}"
                       " change the standard errors and the test but not the estimates; "
                       "the standard errors and the scale-shifted test come from the design-based covariance of the "
                       "thresholds and correlations"
                       if weighted_least_squares and (c.cluster is not None or c.strata is not None) else
                       "The least-squares weights come from the design-based covariance of the thresholds and "
                       "correlations; the standard errors and the scale-shifted test come from it too" if
                       weighted_least_squares else
                       "The standard errors and the scale-shifted test come from the design-based covariance of the "
                       "thresholds and correlations")
            return text + (f" {weights}: the covariance of their influence functions (the rows' contributions to their "
                           f"estimating equations) over {spread}.") + after
        return text + (f" Standard errors are sandwich estimates from the rows' score contributions over {spread}, and "
                       f"the chi-square is scaled accordingly.") + after

    def score_test_text(self) -> str | None:
        """What the modification indices of a continuous maximum-likelihood fit under this design are: design-based
        score tests (pipeline.continuous: assessment.robust_scores.robust_score_tests, Satorra's 1989 generalized
        score test with the design-based meat; s17, where s16 gave the normal-theory ones with a note that they left
        the design out).  None for frequency weights alone, which are repeated rows."""
        c = self.columns
        if not c.robust:
            return None
        parts = [what for what, there in (("sampling weights", c.weights is not None and c.kind is WeightKind.SAMPLING),
                                          ("clusters", c.cluster is not None), ("strata", c.strata is not None))
                 if there]
        return SCORE_TESTS_BY_DESIGN.format(word_list(parts),
                                            "weighted " if c.weights is not None else "")  # (s23: also without)

    def shared_strata_caution(self) -> str | None:
        """Why the design-based errors of groups taken as independent samples rest on an assumption when the groups
        have rows in the same strata (None otherwise): each group's part of a stratum is centred as a stratum of its
        own, which treats the groups' numbers of rows in each stratum as fixed by the design; groups drawn together
        (domains of one sample: a characteristic such as the form's language, not a part of the sampling) have
        random sizes within strata, and rows of different groups in one household or other cluster answer alike,
        both left out (Binder 1983 for domains of a stratified sample; Lumley 2010)."""
        if not self.shared_strata or not self.group_rows or self.shared_clusters:
            return None
        count = len(self.shared_strata)
        which = cut_list(self.shared_strata, LONE_STRATA_NAMED, lambda name: f"'{name}'")
        return (f"The groups share {count} {'stratum' if count == 1 else 'strata'} of '{self.columns.strata}' "
                f"({which}), and the standard errors and tests treat each group's rows in a stratum as drawn apart, as "
                f"if the design had fixed how many rows of each group each stratum holds. If the groups were drawn "
                f"together (one sample, the groups a characteristic of its rows), their sizes within strata were not "
                f"fixed (usually a small difference), and rows of different groups in one household or other cluster "
                f"may answer alike, which standard errors without the clusters leave out: they are then too small.")

    def _unit_sums(self) -> tuple[str, str]:
        """What the design-based covariance sums over, each sampling unit's (inference.design.design_meat), in
        words, one and many: a cluster's sum of its rows' contributions, a row's own contribution, weighted when
        weights were given ('weighted sum', 'weighted sums'; s23: 'weighted sums' were said of clusters and strata
        without weights)."""
        noun = ("sum", "sums") if self.columns.cluster else ("contribution", "contributions")
        if self.columns.weights is None:
            return noun
        return f"weighted {noun[0]}", f"weighted {noun[1]}"

    def lone_text(self) -> str:
        """What was done with strata of a single sampling unit (empty when there are none)."""
        if not self.lone_strata:
            return ""
        unit = "cluster" if self.columns.cluster else "row"
        count = len(self.lone_strata)
        which = cut_list(self.lone_strata, LONE_STRATA_NAMED, lambda name: f"'{name}'")
        where = " in a group" if self.group_rows and not self.shared_clusters else ""
        one, many = self._unit_sums()
        return (f"{count} {'stratum has' if count == 1 else 'strata have'} a single {unit}{where} ({which}); with no second "
                f"{unit} to compare, its {one} was centred at the mean of all {unit}s' {many.split()[-1]} instead of its "
                f"stratum's mean (factor 1), a conservative choice that counts the differences between strata as "
                f"variance (Lumley 2010)")

    def lone_caution(self) -> str | None:
        """Why standard errors lean large when a stratum has a single sampling unit (None otherwise)."""
        if not self.lone_strata:
            return None
        return (f"{self.lone_text()[0].upper()}{self.lone_text()[1:]}. This errs towards larger standard errors (and a "
                f"smaller scaled chi-square), not smaller ones; merging that stratum with a neighbouring one in the data "
                f"is the alternative (Rust & Kalton 1987)")  # notes end without a full stop (views add it)

    def status(self) -> str:
        """The design in the status line: 'design: sampling weights (w; sum 912, Kish's effective N of the weights
        alone 783.2), clusters (school; 60; ...; effective N of the design about 212, ...)'."""
        c = self.columns
        parts = []
        if c.weights is not None:
            extra = (f"; sum {count_text(self.sum_of_weights)}" + (
                f", Kish's effective N of the weights alone {self.effective_n:.1f}" if c.kind is WeightKind.SAMPLING
                else ""))
            parts.append(f"{c.kind.label} ({c.weights}{extra})")
        if c.cluster is not None:
            alike = self.similarity.phrase() if self.similarity is not None else ""
            parts.append(f"clusters ({c.cluster}; {self.clusters}{'; ' + alike if alike else ''}"
                         f"{self._design_n_words(False) if alike else ''})")
        if c.strata is not None:
            parts.append(f"strata ({c.strata}; {self.strata})")
        return "design: " + ", ".join(parts)

    def weight_caution(self) -> str | None:
        """Why estimates and tests lean on few rows when the sampling weights are uneven: Kish's effective sample size
        (sum w)^2 / sum w^2 (Kish 1965) below :data:`UNEVEN_WEIGHTS_SHARE` of the rows, i.e. a design effect of the
        weighting, 1 + CV^2 of the weights (Kish 1992), above 2; when the sample's is not, that of each group of
        independent samples, whose estimates rest on its own rows (None otherwise).  How many rows a fit has for its
        parameters is another rule, the same with and without weights (assessment.admissibility)."""
        if (self.columns.weights is None or self.columns.kind is not WeightKind.SAMPLING or self.effective_n is None
                or not self.rows):
            return None
        if self.effective_n >= UNEVEN_WEIGHTS_SHARE * self.rows:
            few = self._uneven_groups()
            if not few:
                return None
            # each group named by the one rule of group names, the words in the number of the groups named (s23)
            listed = "; ".join(f"group {written_group(label, self.group_labels)}: its {count_text(n)} rows count as "
                               f"about {k:.1f}" for label, n, k in few)
            one = len(few) == 1
            return (f"The weights in '{self.columns.weights}' are very uneven within {'a group' if one else 'groups'} "
                    f"({listed}; Kish's effective sample size of each group's rows, below half of them taken as very "
                    f"uneven, a rule of thumb of survey practice, not a law): "
                    + ("that group's estimates rest mostly on its heavily weighted rows, and their standard errors are "
                       "as large as those of a sample of that many rows." if one else
                       "those groups' estimates rest mostly on their heavily weighted rows, and their standard errors "
                       "are as large as those of samples of that many rows."))
        return (f"The weights in '{self.columns.weights}' are very uneven: the {count_text(self.rows)} rows count as about "
                f"{self.effective_n:.1f} (Kish's effective sample size, {rounded_number(100 * self.effective_n / self.rows, 2)}% of the rows; "
                f"below half of them is taken as very uneven, a rule of thumb of survey practice, not a law), so the "
                f"estimates rest mostly on the heavily weighted rows and their standard errors are as large as those "
                f"of a sample of about {self.effective_n:.0f} rows.")

    def _uneven_groups(self) -> list[tuple[str, int, float]]:
        """(label, rows, Kish's effective sample size) of each group whose own rows count as fewer than
        :data:`UNEVEN_WEIGHTS_SHARE` of them."""
        return [(label, n, k) for label, n, k in zip(self.group_labels, self.group_rows, self.group_effective)
                if n and k < UNEVEN_WEIGHTS_SHARE * n]

    def _few_cluster_groups(self) -> list[tuple[str, int]]:
        """(label, clusters) of each group of independent samples with fewer than SMALL_NUMBER_OF_CLUSTERS clusters."""
        return [(label, k) for label, k in zip(self.group_labels, self.group_clusters) if k < SMALL_NUMBER_OF_CLUSTERS]

    @property
    def judged_effective_n(self) -> float | None:
        """The effective sample size :meth:`weight_caution` speaks of: the sample's, or the smallest of the groups it
        names when the sample's is not below the rule."""
        few = self._uneven_groups() if self.effective_n is not None and self.rows and \
            self.effective_n >= UNEVEN_WEIGHTS_SHARE * self.rows else []
        return min(k for _, _, k in few) if few else self.effective_n

    @property
    def judged_clusters(self) -> int | None:
        """The number of clusters :meth:`caution` speaks of: the sample's, or the fewest of the groups it names when
        the sample has enough of them."""
        few = self._few_cluster_groups() if self.clusters is not None and self.clusters >= SMALL_NUMBER_OF_CLUSTERS \
            else []
        return min(k for _, k in few) if few else self.clusters

    def frequency_caution(self) -> str | None:
        """Why frequency weights that make N more than :data:`EXPANSION_RATIO` times the rows look like survey
        expansion weights (persons in the population each respondent stands for: sampling weights), which as counts
        make N and the chi-square huge and the standard errors far too small (None otherwise)."""
        if (self.columns.weights is None or self.columns.kind is not WeightKind.FREQUENCY or not self.rows
                or self.sum_of_weights is None or self.sum_of_weights <= EXPANSION_RATIO * self.rows):
            return None
        return (f"The frequency weights in '{self.columns.weights}' count {self.sum_of_weights:,.0f} rows from the "
                f"{self.rows:,} rows analysed ({self.sum_of_weights / self.rows:,.0f} per row on average), so N is "
                f"{self.sum_of_weights:,.0f} and the standard errors and test are those of a sample that large. "
                f"Weights that make N more than {EXPANSION_RATIO} times the rows (a rule of thumb of this tool, not a "
                f"law) are usually survey expansion weights (the persons in the population each respondent stands "
                f"for), which are sampling weights, not counts of identical rows.")

    def caution(self, free_parameters: int, thresholds: int = 0) -> str | None:
        """Why cluster-robust standard errors and tests are in doubt with this few clusters (None with enough of them),
        in words a methods section can keep: with no more clusters than the parameters the design-based covariance
        must carry (the model's ``free_parameters`` and, of an ordinal fit in one group, its ``thresholds``, estimated
        in a first step whose covariance under the design is part of the same sandwich; new-user trial s18: 40 clusters
        against 22 parameters and 48 thresholds), that covariance, a sum over the clusters' centred score sums, has
        rank at most C - 1, so joint (Wald-type) tests and a scaled statistic, which use the whole matrix, are
        unreliable, while each standard error, one diagonal entry, is a usable if somewhat small estimate (Cameron &
        Miller 2015, section on few clusters, recalled from memory, not checked here); below about 30-50 clusters
        cluster-robust standard errors tend to be too small (common practice).  Never advises leaving the clusters
        out, which makes every standard error too small when rows of one cluster answer alike (new-user trial s20):
        the advice is :func:`few_clusters_advice`."""
        if self.clusters is None:
            return None
        carried = free_parameters + thresholds
        parameters = (f"the {carried} free parameters ({free_parameters} of the model and {thresholds} thresholds)"
                   if thresholds else f"the {free_parameters} free parameters")
        where = f"Only {self.clusters} clusters in '{self.columns.cluster}'"
        if self.clusters <= carried:
            return (f"{where}, no more than {parameters}: the cluster-robust covariance of the estimates is built from "
                    f"the clusters' sums, so it can describe at most "
                    f"{counted(max(self.clusters - 1, 0), 'independent direction')} (one fewer than the clusters), fewer than the parameters it covers. Tests of many "
                    f"parameters at once rest on the whole of that covariance and are unreliable here: the scaled "
                    f"chi-square test, its p-value and the robust CFI, TLI and RMSEA made from it (Cameron & Miller, "
                    f"2015). Each standard error on its own is less affected, though with few clusters standard "
                    f"errors tend to be somewhat too small.")
        if self.clusters >= SMALL_NUMBER_OF_CLUSTERS:
            few = self._few_cluster_groups()
            if not few:
                return None
            listed = ", ".join(f"{written_group(label, self.group_labels)} ({k})" for label, k in few)
            return (f"Few clusters of '{self.columns.cluster}' in group{'s' if len(few) > 1 else ''} {listed}: each "
                    f"group's estimates and their cluster-robust standard errors rest on its own clusters; with fewer "
                    f"than about 30-50 clusters (common practice) the standard errors tend to be too small, and with "
                    f"no more clusters than the group's free parameters tests of many parameters at once are "
                    f"unreliable.")
        return f"{where}: {FEW_CLUSTERS_WORDS}, so p-values near the chosen level are less certain than they look."


def planned_clusters_caution(clusters: int, free: int | None = None, head: str = "") -> str | None:
    """The caution of a power plan whose cluster sample has only ``clusters`` clusters (workflows.power.ClusterPlan;
    None from :data:`SMALL_NUMBER_OF_CLUSTERS` on), in the words of a fit's design (:data:`FEW_CLUSTERS_WORDS`,
    :meth:`SampleDesign.caution`): the fit of such a sample tests less surely than the plan, a test of independent rows
    by the design effect alone, assumes; with no more clusters than the model's ``free`` parameters, its design-based
    test of fit is unreliable (Cameron & Miller 2015, recalled from memory, as the fit's caution cites it).  ``head``:
    the plans concerned and their clusters in words, where a plan has several samples (the N asked about and the
    smallest N), in place of 'The plan's cluster sample has only N clusters'; ``clusters`` is then the fewest."""
    if clusters >= SMALL_NUMBER_OF_CLUSTERS:
        return None
    joint = (f"; with no more clusters than the model's {free} free parameters, the design-based test of fit, a test "
             f"of many parameters at once, is unreliable (Cameron & Miller, 2015)" if free is not None and
             clusters <= free else "")
    head = head or f"The plan's cluster sample has only {clusters} cluster{'s' if clusters != 1 else ''}"
    return (f"{head}: {FEW_CLUSTERS_WORDS}, so the fit of such a sample would reject more often than the power and the sample size "
            f"planned here assume{joint}.")


def few_clusters_advice(ordinal: bool = False) -> str:
    """What helps with too few clusters (:meth:`SampleDesign.caution`), never leaving them out (new-user trial s20:
    'fit without --cluster' made every standard error too small when rows of one cluster answer alike): keep them,
    read single standard errors rather than joint tests, fewer parameters (of ``ordinal`` items, fewer answer
    categories, so fewer thresholds), more clusters in a later sample."""
    fewer = ("fewer parameters help (rarely used answer categories merged mean fewer thresholds)" if ordinal else
             "fewer parameters help")
    return ("keep the clusters (leaving them out makes every standard error too small when rows of one cluster answer "
            "alike); read the single standard errors and confidence intervals rather than the scaled test; "
            f"{fewer}, and so do more clusters in a later sample.")


#: the first note under the modification indices of a fit under a sampling design (SampleDesign.score_test_text)
SCORE_TESTS_BY_DESIGN = (
    "These indices take the sampling design ({}) into account: each is a design-based score test (Satorra's 1989 "
    "generalized score test), the squared score of the parameter over its variance estimated under the design, as the "
    "standard errors and the scaled test are; the expected changes are those of the {}likelihood.")
#: strata with a single unit named in the methods paragraph and the caution (the rest counted)
LONE_STRATA_NAMED = 5
#: Kish's effective sample size below this share of the rows (a design effect of the weighting, n / n_eff = 1 + CV^2 of
#: the weights (Kish 1992), above 2): weights so uneven that a caution says so (a rule of thumb of survey practice,
#: recalled from memory, not from a source checked here)
UNEVEN_WEIGHTS_SHARE = 0.5
#: frequency weights that make N more than this many times the rows analysed look like survey expansion weights (a
#: rule of thumb of this tool: a row standing for 20 identical respondents is rare in questionnaire data)
EXPANSION_RATIO = 20


def design_columns(weights: str | None = None, cluster: str | None = None, strata: str | None = None,
                   weight_kind: WeightKind | str | None = None) -> DesignColumns | None:
    """The design options checked for type (None when none is given)."""
    for what, value in (("weights", weights), ("cluster", cluster), ("strata", strata)):
        if value is not None and not isinstance(value, str):
            raise OptionError(f"{what} must name a column (text), not {type(value).__name__}")
    if weight_kind is not None and weights is None:
        raise OptionError("a kind of weights is given but no weights column, so it cannot apply; name the column")
    kind = WeightKind.parse(weight_kind, "the kind of weights") if weight_kind is not None else WeightKind.SAMPLING
    if weights is None and cluster is None and strata is None:
        return None
    return DesignColumns(weights, cluster, strata, kind)


def design_weights(frame: pd.DataFrame, columns: DesignColumns, model_variables: tuple[str, ...], group: str | None,
                   source: str) -> np.ndarray | None:
    """The weights of ``frame``'s rows, parsed once and checked (None without a weights column), after the checks of
    the design's column names: what :func:`check_design` and the caution about groups weighted out
    (pipeline.inputs.weighted_out_problems) then read instead of parsing the column again."""
    _check_names(frame, columns, model_variables, group, source)
    if columns.weights is None:
        return None
    return _weights(frame, columns, source, _data_rows(frame), lambda: answering_nothing(frame, model_variables))


def answering_nothing(frame: pd.DataFrame, model_variables: tuple[str, ...]) -> np.ndarray:
    """Per row, whether it answers none of the model variables (a spreadsheet's notes line under the data, a row of
    separators): the estimation leaves such a row out whatever it holds, so its weight, cluster or stratum may be
    missing."""
    present = [name for name in model_variables if name in frame.columns]
    if not present:
        return np.zeros(len(frame), dtype=bool)
    return frame[present].isna().all(axis=1).to_numpy()


def _check_names(frame: pd.DataFrame, columns: DesignColumns, model_variables: tuple[str, ...], group: str | None,
                 source: str) -> None:
    """Each column of the design named once, present in ``frame``, and neither a model variable nor the group
    column."""
    names = [n for _, n in columns.names]
    if len(set(names)) != len(names):
        twice = next(n for n in names if names.count(n) > 1)
        raise OptionError(f"the column '{printable(twice)}' is named for two parts of the design; each needs its own")
    for what, name in columns.names:
        if name not in frame.columns:
            near = close_names(name, frame.columns)
            raise OptionError(f"{source}: there is no {what} column '{printable(name)}'"
                              + (renamed_hint(frame, name) or (did_you_mean(name, near[0]) if near else "")))
        if name in model_variables:
            raise OptionError(f"'{printable(name)}' is an item in the model and cannot also be the {what} column")
        if name == group:
            raise OptionError(f"'{printable(name)}' is the group column and cannot also be the {what} column")


def check_design(frame: pd.DataFrame, columns: DesignColumns, model_variables: tuple[str, ...], group: str | None,
                 source: str, weights: np.ndarray | None = None) -> tuple[pd.DataFrame, list[str]]:
    """The rows to analyse (rows of weight zero left out, with a note) after every check of the design
    columns; each problem is an error naming the column and a row.  ``weights``: the weights of ``frame``'s rows
    as :func:`design_weights` parsed them (parsed here when not given)."""
    _check_names(frame, columns, model_variables, group, source)
    rows = _data_rows(frame)
    notes: list[str] = []
    w = None
    if columns.weights is not None:
        w = weights if weights is not None else _weights(frame, columns, source, rows,
                                                         lambda: answering_nothing(frame, model_variables))
        if len(w) != len(frame):
            raise ValueError("the weights given are not those of the frame's rows")
    # the labels of the cluster, strata and group columns, each read once for every check below (rows left out
    # below leave them too)
    labels = {name: _labels(frame[name]) for name in dict.fromkeys((columns.cluster, columns.strata, group))
              if name is not None}
    frame, rows, w, silent_notes, kept = _without_silent_rows(frame, rows, w, columns, model_variables, labels)
    labels = {name: cells[kept] for name, cells in labels.items()}
    notes += silent_notes
    if w is not None:
        zero = w == 0
        if zero.all():
            raise DataError(f"{source}: every weight in column '{printable(columns.weights)}' is zero, so no row counts")
        if zero.any():
            before = frame
            frame = frame.loc[~zero]
            count = int(zero.sum())
            labels = {name: cells[~zero] for name, cells in labels.items()}
            notes.append(f"{count} {'row has' if count == 1 else 'rows have'} weight 0 in '{columns.weights}' and "
                         f"{'was' if count == 1 else 'were'} left out of the estimation")
            rows = rows[~zero]
            gone, left = groups_weighted_out(before, columns.weights, group, w)
            if gone and len(left) < 2:  # the multi-group analysis cannot run: the weights, not the labels, are why
                left_words = f"every row left is in group '{printable(left[0])}'" if left else "no group is left"
                raise DataError(f"{source}: {weighted_out_words(gone, group, columns.weights)}, so {left_words}; a "
                                f"multi-group analysis needs at least two groups")
            # a group weighted out is a caution of the fit, first (pipeline.inputs.odd_value_problems)
    for what, name in (("cluster", columns.cluster), ("stratum", columns.strata)):
        if name is not None:
            absent = labels[name].isna().to_numpy()
            if absent.any():
                first = int(np.argmax(absent))
                cell = frame[name].iloc[first]
                looks = "" if pd.isna(cell) else f" (the cell holds only {_blank_words(str(cell))}, so it looks empty)"
                raise DataError(f"{source}: column '{printable(name)}', {row_of(frame, rows[first])}: no {what} "
                                f"given{looks}; every row needs one (a row filter, {Option.KEEP}, can leave such rows "
                                f"out)")
    if columns.cluster is not None and columns.strata is not None:
        pairs = pd.DataFrame({"cluster": labels[columns.cluster].to_numpy(),
                              "stratum": labels[columns.strata].to_numpy()}).drop_duplicates()
        shared = pairs["cluster"].duplicated()
        if shared.any():
            cluster = pairs["cluster"][shared.to_numpy()].iloc[0]
            raise DataError(f"{source}: cluster '{printable(cluster)}' of column '{printable(columns.cluster)}' lies in "
                            f"more than one stratum of '{printable(columns.strata)}'; clusters must be nested in strata")
    if columns.cluster is not None:
        names = pd.unique(labels[columns.cluster])
        if len(names) < 2:
            raise DataError(f"{source}: column '{printable(columns.cluster)}' names a single cluster "
                            f"('{printable(names[0])}'), and cluster-robust standard errors need at least two (and "
                            f"about 30 or more to be trusted); remove the cluster column or give the right one")
    if columns.cluster is not None and group is not None and shared_cluster(frame, columns, group, labels) is None:
        # the groups are independent samples, each with its own clusters: each group needs two of them
        grouped = labels[group].notna().to_numpy()  # rows with a group (a blank label is none)
        per_group = labels[columns.cluster][grouped].groupby(labels[group][grouped].to_numpy()).nunique()
        single = per_group[per_group < 2]
        if len(single):
            raise DataError(f"{source}: group '{printable(single.index[0])}' of '{printable(group)}' has a single "
                            f"cluster of '{printable(columns.cluster)}' (every cluster lies within one group, so the "
                            f"groups are independent samples), and cluster-robust standard errors need at least two in "
                            f"each; fit without that group ({Option.KEEP}) or without the cluster column")
    from cfa_tool.data.labels import label_notes

    for part, unit, name in (("cluster", ("cluster", "clusters"), columns.cluster),
                             ("strata", ("stratum", "strata"), columns.strata)):
        if name is not None:
            notes += label_notes(frame, name, part=part, unit=unit)
    return frame, notes


def shared_cluster(frame: pd.DataFrame, columns: DesignColumns, group: str | None, labels: dict | None = None):
    """The first cluster with rows in more than one group (None when every cluster lies within one group).
    ``labels``: the cluster and group columns' labels of ``frame``'s rows (:func:`_labels`), when read already."""
    if columns.cluster is None or group is None:
        return None
    labels = labels or {}
    clusters = labels[columns.cluster] if columns.cluster in labels else _labels(frame[columns.cluster])
    groups = labels[group] if group in labels else _labels(frame[group])
    grouped = groups.notna().to_numpy()  # rows with a group (a blank label is none)
    pairs = pd.DataFrame({"cluster": clusters[grouped].to_numpy(), "group": groups[grouped].to_numpy()}
                         ).drop_duplicates()
    shared = pairs["cluster"].duplicated()
    return pairs["cluster"][shared.to_numpy()].iloc[0] if shared.any() else None


def refuse_lone_strata(design: RowDesign, columns: DesignColumns, source: str, why: str) -> None:
    """A one-line error naming the first stratum with a single sampling unit among the rows analysed, for a
    computation that cannot borrow a spread for it (``why``)."""
    lone = design.lone_strata()
    if lone:
        raise DataError(f"{source}: stratum '{printable(lone[0])}' of column '{printable(columns.strata)}' has a single "
                        f"{'cluster' if columns.cluster else 'row'} among the rows analysed, and {why}; merge it with a "
                        f"neighbouring stratum in the data")


def groups_weighted_out(frame: pd.DataFrame, weights: str, group: str | None, w: np.ndarray | None = None
                        ) -> tuple[list[tuple[str, int]], list[str]]:
    """The groups of ``group`` every row of which has weight 0 in ``weights`` (label, rows), and the labels left."""
    if group is None or group not in frame.columns or weights not in frame.columns:
        return [], []
    if w is None:
        w = pd.to_numeric(frame[weights], errors="coerce").to_numpy(dtype=float)
    labels = _labels(frame[group])
    counts = labels.value_counts()
    left = sorted(set(labels[w != 0].dropna()))
    return [(g, int(counts[g])) for g in sorted(set(counts.index) - set(left))], left


def weighted_out_words(gone: list[tuple[str, int]], group: str, weights: str) -> str:
    return (f"every row of group{'s' if len(gone) > 1 else ''} "
            + word_list(f"'{printable(g)}' ({n} row{'s' if n != 1 else ''})" for g, n in gone)
            + f" of '{printable(group)}' has weight 0 in '{printable(weights)}'")


def _labels(column: pd.Series) -> pd.Series:
    """A column of cluster, stratum or group names read as labels are read everywhere (spaces at the ends and
    Unicode forms ignored; cfa_tool.data.labels), missing values kept missing, and a cell of spaces and invisible
    format characters alone (a zero-width space) missing too, as a group column reads it (data.groups.group_keys:
    the data file's reader reads a cell of spaces as empty and leaves the other as text; re-check s17, G1: a
    cluster named ''): by the one rule of groups (data.labels.group_keys), each distinct cell read once as cells
    alike by type and text (data.labels.distinct_cells), so that True and 1 of a column of Python objects stay two
    clusters named as the data have them (a mapping keyed by the cells took them as one, named 'True')."""
    from cfa_tool.data.labels import group_keys

    return group_keys(column)


def _blank_words(text: str) -> str:
    """What a cell that reads as no label holds: 'spaces', 'invisible format characters (U+200B ZERO WIDTH SPACE)'."""
    import unicodedata

    from cfa_tool.data.labels import invisible_characters

    found = invisible_characters(text)
    if not found:
        return "spaces"
    named = ", ".join(f"U+{ord(ch):04X} {unicodedata.name(ch, 'UNNAMED CHARACTER')}" for ch in found)
    return f"invisible format characters ({named})" + (" and spaces" if text.strip(found) else "")


def _data_rows(frame: pd.DataFrame) -> np.ndarray:
    from cfa_tool.data.moments import row_numbers

    return row_numbers(frame)


def _without_silent_rows(frame: pd.DataFrame, rows: np.ndarray, w: np.ndarray | None, columns: DesignColumns,
                         model_variables: tuple[str, ...], labels: dict
                         ) -> tuple[pd.DataFrame, np.ndarray, np.ndarray | None, list[str], np.ndarray]:
    """The rows that answer no model variable and lack a weight, cluster or stratum (:func:`answering_nothing`: a
    notes line under the data) left out, with a note naming them; a row that answers something and lacks one stays,
    for the checks' error.  ``labels``: the cluster and strata columns' labels (:func:`_labels`).  (frame, rows,
    weights, notes, the rows kept as a mask), unchanged when there is none."""
    lacking = np.zeros(len(frame), dtype=bool) if w is None else np.isnan(w)  # only silent rows get no weight
    missing_parts = ["weight"] if lacking.any() else []
    silent = None
    for what, name in (("cluster", columns.cluster), ("stratum", columns.strata)):
        if name is None:
            continue
        absent = labels[name].isna().to_numpy()
        if absent.any():
            silent = answering_nothing(frame, model_variables) if silent is None else silent
            if (absent & silent).any():
                lacking |= absent & silent
                missing_parts.append(what)
    if not lacking.any():
        return frame, rows, w, [], np.ones(len(frame), dtype=bool)
    count = int(lacking.sum())
    named = (f"row {rows[lacking][0]}" if count == 1 else f"{count} rows (the first row {rows[lacking][0]})")
    note = (f"{named} {'answers' if count == 1 else 'answer'} no model variable and {'has' if count == 1 else 'have'} "
            f"no {word_list(missing_parts, 'or')}, so {'it was' if count == 1 else 'they were'} left out (a notes line "
            f"under the data, perhaps)")
    keep = ~lacking
    return frame.loc[keep], rows[keep], (None if w is None else w[keep]), [note], keep


def _weights(frame: pd.DataFrame, columns: DesignColumns, source: str, rows: np.ndarray,
             answering_nothing_of=None) -> np.ndarray:
    """The weights column parsed and checked; a row without a weight is an error unless it answers no model
    variable (``answering_nothing_of``: a function giving :func:`answering_nothing` of the frame's rows, called only
    when some weight is missing), whose weight stays NaN for :func:`check_design` to leave it out."""
    name = columns.weights
    where = f"{source}: weights column '{printable(name)}', row"
    column = frame[name]
    truth = (np.ones(len(column), dtype=bool) if column.dtype.kind == "b" or str(column.dtype) == "boolean"
             else column.map(lambda v: isinstance(v, (bool, np.bool_))).to_numpy(dtype=bool))
    truth = truth & column.notna().to_numpy()
    if truth.any():  # TRUE/FALSE would be read as 1/0: weights must be numbers
        first = int(np.argmax(truth))
        raise DataError(f"{where} {rows[first]}: holds {str(column.iloc[first]).upper()}, a TRUE/FALSE value; weights "
                        f"must be numbers (is it the right column?)")
    values = pd.to_numeric(column, errors="coerce").to_numpy(dtype=float)
    text = np.isnan(values) & frame[name].notna().to_numpy()
    if text.any():
        raise DataError(f"{where} {rows[np.argmax(text)]}: '{clipped(str(column.iloc[np.argmax(text)]), 40)}' "
                        f"is not a number")
    valid = ~np.isnan(values)
    unweighted = ~valid
    if unweighted.any() and answering_nothing_of is not None:
        unweighted &= ~answering_nothing_of()
    for bad, what in ((unweighted, f"no weight (every row that answers an item needs one; leave such rows out with "
                                   f"{Option.KEEP})"),
                      (np.isinf(values), "an infinite weight"), (values < 0, "a negative weight")):
        if bad.any():
            raise DataError(f"{where} {rows[np.argmax(bad)]}: {what}")
    if valid.all():
        _check_weight_values(values, rows, columns, source, name, where)
    else:  # rows that answer nothing and have no weight, left out by check_design: the checks read the others
        _check_weight_values(values[valid], rows[valid], columns, source, name, where)
    return values


def _check_weight_values(values: np.ndarray, rows: np.ndarray, columns: DesignColumns, source: str, name: str,
                         where: str) -> None:
    """The checks of the weights given: whole numbers for frequency weights, a range the tool computes with, and
    enough spread (Kish's effective sample size)."""
    if columns.kind is WeightKind.FREQUENCY:
        fraction = values != np.round(values)
        if fraction.any():
            raise DataError(f"{where} {rows[np.argmax(fraction)]}: frequency weights count rows and must be whole "
                            f"numbers, not {float(values[np.argmax(fraction)])!r} (for sampling weights leave out the "
                            f"kind)")  # the value as given: ':g' showed 2.0000000001 as 2 (hostile trial s16)
        if values.sum() > MAX_FREQUENCY_TOTAL:
            raise DataError(f"{source}: the frequency weights in column '{printable(name)}' count {count_text(values.sum())} rows, "
                            f"more than the {MAX_FREQUENCY_TOTAL:,.0f} the tool computes with")
    elif values.max(initial=0.0) > 0 and not WEIGHT_RANGE[0] <= values.max() <= WEIGHT_RANGE[1]:
        raise DataError(f"{source}: the sampling weights in column '{printable(name)}' reach {user_number(values.max())}, outside "
                        f"the range the tool computes with ({user_number(WEIGHT_RANGE[0])} to {user_number(WEIGHT_RANGE[1])}); sampling weights "
                        f"count only relative to each other, so divide the column by its mean")
    elif values.max(initial=0.0) > 0:
        relative = values / values.max()  # Kish's (1965) effective sample size, free of the weights' scale
        effective = relative.sum() ** 2 / (relative @ relative)
        if effective < FEWEST_EFFECTIVE_ROWS:  # hostile trial s16: blamed an item as constant instead
            top = int(np.argmax(values))
            raise DataError(f"{source}: the sampling weights in column '{printable(name)}' put almost all the weight on "
                            f"{'one row' if effective < 1.5 else 'a few rows'} (row {rows[top]} has weight "
                            f"{float(values[top])!r}; Kish's effective sample size {effective:.2f} of {len(values)} rows), "
                            f"so the weighted answers have next to no spread; check that it is the right column and "
                            f"that its weights are on one scale")


#: the largest sampling weight must lie in this range (the weights are rescaled, but sums of squares of far
#: smaller or larger numbers leave the range of floating-point numbers)
WEIGHT_RANGE = (1e-100, 1e100)
#: sampling weights whose Kish effective sample size is below this many rows leave weighted covariances with no spread
#: to speak of (one row carrying the weight): refused, naming the weights (a rule of this tool)
FEWEST_EFFECTIVE_ROWS = 2.0
#: frequency weights may count at most this many rows (fit indices of larger N are not computed reliably)
MAX_FREQUENCY_TOTAL = 1e9


def row_design(frame: pd.DataFrame, columns: DesignColumns, kept: np.ndarray, part: np.ndarray | None = None,
               read: tuple | None = None) -> RowDesign:
    """The design of the rows ``kept`` (a mask over the rows of ``frame`` in ``part``, a mask over ``frame``; all of
    them when None), sampling weights rescaled to sum to their number; cluster and stratum codes are those of the
    whole ``frame``, so that they mean the same in every group.  ``read``: the design columns of the whole ``frame``
    as :func:`design_columns_read` reads them (read here when not given), for a caller that takes several parts."""
    part = np.ones(len(frame), dtype=bool) if part is None else part
    weights, coded = read if read is not None else design_columns_read(frame, columns)
    w = weights[part][kept] if weights is not None else np.ones(int(kept.sum()))
    given = (float(w.sum()), float(w @ w))
    if columns.kind is WeightKind.SAMPLING:
        w = w * (len(w) / w.sum())
    codes = [code[part][kept] if code is not None else None for code, _ in coded]
    return RowDesign(w, columns.kind, *codes, given=given, cluster_names=coded[0][1], strata_names=coded[1][1])


def design_columns_read(frame: pd.DataFrame, columns: DesignColumns) -> tuple:
    """(the weights of ``frame``'s rows or None, [(each row's cluster code, the clusters' names), (the same of the
    strata)], (None, ()) for a column not given): the codes by the labels of the whole frame (:func:`_labels`)."""
    weights = (pd.to_numeric(frame[columns.weights]).to_numpy(dtype=float) if columns.weights is not None else None)
    coded = []
    for name in (columns.cluster, columns.strata):
        if name is None:
            coded.append((None, ()))
            continue
        code, labels = pd.factorize(_labels(frame[name]).to_numpy())
        coded.append((code, tuple(str(label) for label in labels)))
    return weights, coded


def kept_rows(frame: pd.DataFrame, names: tuple[str, ...], source: str, missing) -> np.ndarray:
    """The rows sample moments use: complete rows (listwise) or rows with any answer (full information)."""
    from cfa_tool.data.moments import numeric_columns

    answered = ~np.isnan(numeric_columns(frame, names, source))
    if missing == MissingData.FULL_INFORMATION:
        return answered.any(axis=1)
    return answered.all(axis=1)


def with_row_design(moments, design: RowDesign):
    """``moments`` (SampleMoments of the same rows, already weighted by :func:`cfa_tool.data.moments.sample_moments`)
    with the design attached; with frequency weights N is the sum of the weights."""
    n_obs = int(round(design.total)) if design.kind is WeightKind.FREQUENCY else moments.n_obs
    return replace(moments, n_obs=n_obs, design=design)


def design_summary(frame: pd.DataFrame, columns: DesignColumns, moments: list, labels=()) -> SampleDesign:
    """The design as the report states it, over the rows analysed in every group (``moments``: each group's
    SampleMoments or OrdinalMoments, carrying its RowDesign; ``labels``: the groups' labels, for the cautions that
    judge each group of independent samples on its own clusters and weights)."""
    rows = sum(len(m.design.weights) for m in moments)
    total = sum(m.design.given[0] for m in moments) if columns.weights is not None else None
    sampling = total is not None and columns.kind is WeightKind.SAMPLING
    # each group's own Kish effective size: sampling weights are rescaled within each group (row_design), so the rows
    # count as the sum of these, not as the raw weights over the whole file say (hostile s25: weights 2 in one group
    # and 1 in the other fit as unweighted, yet 'Kish's effective N 433.3' of 480 was reported)
    own = tuple(float(m.design.given[0] ** 2 / m.design.given[1]) if m.design.given[1] else 0.0 for m in moments) \
        if sampling else ()
    kish = sum(own) if sampling else total
    clusters = sum(len(np.unique(m.design.clusters)) for m in moments) if columns.cluster else None
    strata = len(pd.unique(_labels(frame[columns.strata]))) if columns.strata else None
    group_rows = tuple(len(m.design.weights) for m in moments) if len(moments) > 1 else ()
    designs = [m.design for m in moments]
    shared = len(designs) > 1 and shared_clusters(designs)
    if shared:
        joint = joint_design(designs)
        clusters, lone = len(joint.cluster_names), joint.lone_strata()
    else:
        lone = tuple(dict.fromkeys(name for d in designs for name in d.lone_strata()))
    across: tuple[str, ...] = ()
    if len(designs) > 1 and columns.strata is not None and not shared:
        named = [set(_named(np.unique(d.strata), d.strata_names)) for d in designs]
        across = tuple(sorted(name for name in set().union(*named) if sum(name in n for n in named) > 1))
    labels = tuple(str(x) for x in labels) if len(moments) > 1 and len(labels) == len(moments) else ()
    per_clusters = (tuple(len(np.unique(d.clusters)) for d in designs) if labels and columns.cluster and not shared
                    else ())
    per_effective = own if labels else ()
    return SampleDesign(columns, rows, total, kish, clusters, strata, group_rows, lone, shared, across, labels,
                        per_clusters, per_effective, _similarity(moments) if columns.cluster else None)


def _similarity(moments: list):
    """The items' intraclass correlations over the clusters of the rows analysed in every group
    (data.cluster_similarity), from each group's rows (SampleMoments.rows) or ordinal answers (OrdinalMoments.codes
    read back as the answers' values); None when the rows are not at hand."""
    from cfa_tool.data.cluster_similarity import cluster_similarity

    values, clusters = [], []
    for m in moments:
        design = getattr(m, "design", None)
        if design is None or design.clusters is None:
            return None
        rows = getattr(m, "rows", None)
        codes = getattr(m, "codes", None)
        if rows is None and codes is not None:  # ordinal answers: each code's value, NaN for no answer (-1)
            rows = np.full(codes.shape, np.nan)
            for j, levels in enumerate(m.categories):
                answered = codes[:, j] >= 0
                if levels and m.names[j] not in getattr(m, "continuous", ()):
                    rows[answered, j] = np.asarray(levels, dtype=float)[codes[answered, j]]
        if rows is None or len(rows) != len(design.clusters) or m.names != moments[0].names:
            return None
        values.append(np.asarray(rows, dtype=float))
        names = np.asarray(design.cluster_names, dtype=object) if design.cluster_names else None
        clusters.append(names[design.clusters] if names is not None else design.clusters)
    if not values:
        return None
    return cluster_similarity(moments[0].names, np.vstack(values), np.concatenate(clusters))



def apply_design(groups: list, frame: pd.DataFrame, group_column: str | None, names: tuple[str, ...], source: str,
                 columns: DesignColumns, missing) -> list:
    """Each group's (label, SampleMoments) with the design of its rows attached."""
    out = []
    keys = _labels(frame[group_column]) if group_column is not None else None
    read = design_columns_read(frame, columns)  # the design columns of every row, read once for every group
    for label, moments in groups:
        part = (keys == label).to_numpy() if keys is not None else np.ones(len(frame), dtype=bool)
        kept = kept_rows(frame.loc[part], names, source, missing)
        out.append((label, with_row_design(moments, row_design(frame, columns, kept, part, read))))
    return out
