"""How a model is fitted, as typed values declared once.

Every choice a user makes about estimation (and every method the tool chooses itself) is a member
of one of the enumerations below.  A member's ``value`` is the word a user types, on the command
line and in Python; its ``label`` is the short name tables print; its ``phrase`` the words a
methods paragraph uses.  The command line's choices, the library's checks, the reports and the
JSON all read them here, so no code ever has to recognise a method from a sentence.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

from cfa_tool.errors import OptionError, clipped
from cfa_tool.numbers import word_list


class Choice(str, Enum):
    """A typed choice: ``value`` the word a user types, ``label`` the name tables print, ``phrase`` the
    words of a methods paragraph; ``offered`` says whether users may choose it (the tool picks the others)."""

    def __new__(cls, word: str, label: str, phrase: str, offered: bool = True):
        member = str.__new__(cls, word)
        member._value_ = word
        member.label = label
        member.phrase = phrase
        member.offered = offered
        return member

    @classmethod
    def words(cls) -> tuple[str, ...]:
        """The words users may give, in declaration order (the command line's choices)."""
        return tuple(m.value for m in cls if m.offered)

    @classmethod
    def parse(cls, value: object, what: str):
        """``value`` (a member or its word) as a member users may choose; anything else is an OptionError."""
        if isinstance(value, cls) and value.offered:
            return value
        if isinstance(value, str):
            for member in cls:
                if member.offered and member.value == value:
                    return member
        raise OptionError(f"{what} must be one of {', '.join(cls.words())}, not '{clipped(value, 40)}'")

    def __str__(self) -> str:
        return self.value


class Estimator(Choice):
    MAXIMUM_LIKELIHOOD = ("maximum-likelihood", "maximum likelihood", "maximum likelihood")
    LEAST_SQUARES = ("least-squares", "least squares", "least squares", False)


class Weighting(Choice):
    """The weight matrix of least squares for ordinal items."""

    DIAGONAL = ("diagonally-weighted", "diagonally weighted", "diagonally weighted least squares")
    UNWEIGHTED = ("unweighted", "unweighted", "unweighted least squares")


#: The adjusted test of least squares for ordinal items, in the words every report, note and methods paragraph uses
#: (declared once): the statistic is chi-square x scale + shift (Asparouhov & Muthén 2010), and the difference of two
#: nested fits is adjusted the same way (Satorra 2000; Asparouhov & Muthén 2006).
ADJUSTED_TEST = "scale-shifted, mean and variance adjusted"
#: why changes in fit indices of ordinal fits are no test (compare leaves them out, invariance refuses the rule that
#: reads them): each model's indices come from its own adjusted statistic, and the change-in-fit guides were set for
#: continuous items; Sass, Schmitt & Marsh (2014, recalled from memory) found the changes of ordinal fits' indices to
#: behave otherwise under least squares than under ML
ORDINAL_FIT_CHANGE_WHY = ("with ordinal items each model's CFI and RMSEA come from its own adjusted statistic (its own "
                          "scale and shift), so their changes between models cannot be compared, nor read against the "
                          "guides of Cheung & Rensvold (2002) and Chen (2007), which were set for continuous items "
                          "(changes in the fit indices of ordinal fits behave otherwise: Sass, Schmitt & Marsh 2014)")
#: the same, with what to judge nested models by where their difference test is not in doubt (invariance's steps)
ORDINAL_FIT_CHANGE = f"{ORDINAL_FIT_CHANGE_WHY}; judge nested models by the adjusted difference test"
#: what pairwise present rows assume, in the note, the methods paragraphs and README alike: the estimates of each
#: threshold and correlation from the rows that answered its items are consistent when answers are missing completely
#: at random (Little & Rubin 2002), while full-information estimation needs them only missing at random
MISSING_COMPLETELY_AT_RANDOM = "answers are missing completely at random"
#: what full-information ML assumes (Rubin 1976; Little & Rubin 2002): whether an answer is missing may depend on the
#: answers a row gave, not on the missing answer itself
MISSING_AT_RANDOM = "answers are missing at random"


class FitTest(Choice):
    """The test of the model's fit (and the standard errors that go with it); ``pieces`` name what turns the
    chi-square into the corrected statistic, ``rule`` says how."""

    NORMAL = ("normal", "likelihood ratio", "the normal-theory likelihood-ratio test")
    SATORRA_BENTLER = ("satorra-bentler", "Satorra-Bentler",
                       "the Satorra-Bentler scaled test and robust standard errors")
    YUAN_BENTLER = ("yuan-bentler", "Yuan-Bentler", "the Yuan-Bentler scaled test and robust standard errors")
    # (its name holds no citation: tables and notes put it in parentheses, "Scaled chi-square (...)"; the methods
    # text cites it)
    SCALE_SHIFTED = ("scale-shifted", ADJUSTED_TEST,
                     f"{ADJUSTED_TEST} chi-square test (Asparouhov & Muthén, 2010)", False)
    # the robust test that suits the data, resolved before any fit (FitOptions): Satorra-Bentler with
    # complete rows, Yuan-Bentler with full-information ML, the adjusted test of least squares for ordinal items
    ROBUST = ("robust", "robust", "a robust test", True)

    def design_label(self, design: bool) -> str:
        """The scaled test's name in tables and notes: under a sampling design (``design``) the scaling is computed
        from the design-based covariance of the sample moments or the rows' scores (cfa_tool.inference.design), a
        design-based scaled test (new-user trial s16: it was called Yuan-Bentler or Satorra-Bentler alone)."""
        if not design or self not in (FitTest.SATORRA_BENTLER, FitTest.YUAN_BENTLER):
            return self.label
        return f"design-based, {self.label} scaling"

    def design_phrase(self, design: bool) -> str:
        """The scaled test in the words of a methods paragraph, with its source; under a sampling design, Satorra and
        Bentler's (1994) scaling with the design-based covariance of the sample moments (pseudo-maximum likelihood;
        Muthén & Satorra 1995) or, with full-information ML, Yuan and Bentler's (2000) with the design-based
        covariance of the rows' scores (Asparouhov 2005)."""
        if not design or self not in (FitTest.SATORRA_BENTLER, FitTest.YUAN_BENTLER):
            return f"the {self.label} scaled test"
        if self is FitTest.SATORRA_BENTLER:
            return ("a design-based scaled test (the Satorra-Bentler scaling with the design-based covariance of the "
                    "sample moments; Muthén & Satorra, 1995)")
        return ("a design-based scaled test (the Yuan-Bentler scaling with the design-based covariance of the rows' "
                "scores; Asparouhov, 2005)")

    def for_rows(self, missing: "MissingData | None") -> "FitTest":
        """The robust test resolved for how rows with gaps are handled (other tests unchanged)."""
        if self is not FitTest.ROBUST:
            return self
        return FitTest.YUAN_BENTLER if missing is MissingData.FULL_INFORMATION else FitTest.SATORRA_BENTLER

    @property
    def robust(self) -> bool:
        """Whether the test is a corrected one with robust (sandwich) standard errors."""
        return self is not FitTest.NORMAL

    @property
    def pieces(self) -> tuple[str, ...]:
        """The names of the numbers that turn the chi-square into this test's statistic."""
        return ("scale", "shift") if self is FitTest.SCALE_SHIFTED else ("scaling factor",)

    @property
    def correction(self) -> str:
        """The pieces in the words of a table row: 'scale and shift', 'scaling factor'."""
        return word_list(self.pieces)

    @property
    def rule(self) -> str:
        """How the pieces make the statistic, so that a reader can reproduce it."""
        if self is FitTest.SCALE_SHIFTED:
            return "statistic = chi-square x scale + shift"
        return "statistic = chi-square / factor; 1 under normality"


class Information(Choice):
    """Where the standard errors come from."""

    EXPECTED = ("expected", "expected information", "the expected information")
    OBSERVED = ("observed", "observed information", "the observed information")
    SANDWICH = ("sandwich", "robust (sandwich)", "robust (sandwich) standard errors", False)


class MissingData(Choice):
    """What happens to rows with missing answers on model variables."""

    FULL_INFORMATION = ("full-information", "full information", "full-information maximum likelihood")
    LISTWISE = ("listwise", "listwise deletion", "listwise deletion")
    # ordinal items (the tool's default for them): thresholds from the rows answering each item, each
    # correlation from the rows answering both items
    PAIRWISE = ("pairwise", "pairwise present rows",
                "all available answers (each correlation from the rows that answered both items)", False)


class WeightKind(Choice):
    """What the numbers of a weights column mean."""

    SAMPLING = ("sampling", "sampling weights", "sampling weights, rescaled to sum to the number of rows analysed")
    FREQUENCY = ("frequency", "frequency weights", "frequency weights, each row counted as often as its weight says")


class Items(Choice):
    """How the items are analysed."""

    CONTINUOUS = ("continuous", "continuous items", "continuous items", False)
    ORDINAL = ("ordinal", "ordinal items", "ordinal items", False)
    # ordinal items with continuous ones beside them (polyserial correlations)
    MIXED = ("mixed", "ordinal and continuous items", "ordinal items with continuous items beside them", False)


class DifferenceMethod(str, Enum):
    """How two nested fits are compared; the value is the name reports and the JSON give."""

    LIKELIHOOD_RATIO = "likelihood ratio"
    SATORRA_BENTLER_2001 = "Satorra-Bentler 2001 scaled difference"
    SATORRA_BENTLER_2010 = "Satorra-Bentler 2010 strictly positive scaled difference"
    SCALE_SHIFTED = f"{ADJUSTED_TEST} difference (Asparouhov & Muthén 2006)"

    def __str__(self) -> str:
        return self.value

    @property
    def phrase(self) -> str:
        """The test in the words of a methods paragraph, with its authors."""
        return _DIFFERENCE_PHRASES[self]


_DIFFERENCE_PHRASES = {
    DifferenceMethod.LIKELIHOOD_RATIO: "the likelihood-ratio chi-square difference test (Steiger, Shapiro & Browne, 1985)",
    DifferenceMethod.SATORRA_BENTLER_2001: "the scaled chi-square difference test (Satorra & Bentler, 2001)",
    DifferenceMethod.SATORRA_BENTLER_2010: "the strictly positive scaled chi-square difference test (Satorra & Bentler, "
                                           "2010)",
    DifferenceMethod.SCALE_SHIFTED: f"the {ADJUSTED_TEST} chi-square difference test (Satorra, 2000; Asparouhov & "
                                    f"Muthén, 2006)",
}


@dataclass(frozen=True)
class FitMethod:
    """Exactly how a model was fitted."""

    estimator: Estimator
    test: FitTest
    information: Information
    missing: MissingData
    weighting: Weighting | None = None  # least squares only
    items: Items = Items.CONTINUOUS
    thresholds: bool = False  # ordinal items: thresholds are parameters (the form used with groups)
    clustered: bool = False  # robust standard errors from per-cluster sums of the rows' scores (a sampling design)
    #: the sandwich and the scaled test are design-based (sampling weights, clusters or strata)
    design_based: bool = False
    #: full-information ML only: the columns beside the model in its likelihood (auxiliary variables in Graham's
    #: 2003 saturated-correlates form, estimation/auxiliary.py)
    helpers: tuple[str, ...] = ()

    @property
    def ordinal(self) -> bool:
        return self.items is not Items.CONTINUOUS

    @property
    def full_information(self) -> bool:
        return self.missing is MissingData.FULL_INFORMATION

    @property
    def bread(self) -> Information | None:
        """The information a maximum-likelihood sandwich takes as its bread: the observed one with the Yuan-Bentler
        test (full-information ML, valid when answers are missing at random; cfa_tool.inference.robust_missing),
        the expected one with the Satorra-Bentler test (complete rows; cfa_tool.inference.robust); None without a
        sandwich or with least squares."""
        if self.ordinal:
            return None
        return {FitTest.YUAN_BENTLER: Information.OBSERVED, FitTest.SATORRA_BENTLER: Information.EXPECTED}.get(self.test)

    def sentence(self, groups: int = 1) -> str:
        """The estimation in one line, as the report's status line and the JSON's ``estimator`` give it."""
        if self.ordinal:
            errors = "cluster-robust standard errors" if self.clustered else "robust standard errors"
            if self.thresholds:
                beside = (", with the means, variances and polyserial correlations of continuous items"
                          if self.items is Items.MIXED else "")
                return (f"{self.weighting.label} least squares on thresholds and polychoric correlations (ordinal items"
                        f"{beside}, {groups} groups), {errors}")
            extra = ", with polyserial correlations for continuous items" if self.items is Items.MIXED else ""
            return f"{self.weighting.label} least squares on polychoric correlations (ordinal items{extra}), {errors}"
        text = self.estimator.label
        if self.test is FitTest.SATORRA_BENTLER:
            text += (f" with {self._scaled_test()} and "
                     + ("cluster-robust standard errors" if self.clustered else "robust standard errors"))
        elif self.test is FitTest.YUAN_BENTLER:
            text += (f" with {self._scaled_test()} and "
                     + ("cluster-robust standard errors" if self.clustered else "robust (Huber-White) standard errors")
                     + f" from the {self.bread.label}")
        if self.full_information:
            text += " (full information, incomplete rows included)"
        if self.helpers:
            text += f", auxiliary variables {', '.join(self.helpers)} (saturated correlates)"
        if not self.test.robust and self.information in (Information.EXPECTED, Information.OBSERVED):
            text += f", standard errors from the {self.information.label}"
        return text

    def _scaled_test(self) -> str:
        """The scaled test in the status line: 'Yuan-Bentler scaled test', or under a sampling design 'design-based
        scaled test (Yuan-Bentler scaling)' (:meth:`FitTest.design_label`)."""
        if self.design_based:
            return f"design-based scaled test ({self.test.label} scaling)"
        return f"{self.test.label} scaled test"

    def to_dict(self) -> dict:
        return {"estimator": self.estimator.value, "test": self.test.value, "information": self.information.value,
                "missing": self.missing.value, "weighting": self.weighting.value if self.weighting else None,
                "items": self.items.value, "thresholds_as_parameters": self.thresholds, "clustered": self.clustered,
                "design_based": self.design_based,
                "missing_helpers": list(self.helpers)}


class DecisionRule(Choice):
    """How each step of an invariance ladder after the configural one is judged; ``phrase`` (also
    ``description``) is how the report states the rule."""

    DIFFERENCE_TEST = ("difference-test", "difference test",
                       "the chi-square difference test against the step before (p >= alpha)")
    FIT_CHANGE = ("fit-change", "change in fit",
                  "the change in fit against the step before: CFI falls by no more than .010 (Cheung & Rensvold 2002), "
                  "RMSEA rises by less than .015 and SRMR by less than .030 at the loadings step and .010 after it "
                  "(Chen 2007)")
    BOTH = ("both", "both", "both the chi-square difference test (p >= alpha) and the change-in-fit guides (Cheung & "
                            "Rensvold 2002; Chen 2007)")

    @property
    def description(self) -> str:
        return self.phrase


class ReferenceMean(Choice):
    """Alignment: what the reference group's factor means are; ``value`` the word users give, ``phrase`` what
    the report says."""

    ZERO = ("zero", "zero", "the reference group's factor means are 0 and its variances 1 (the authors' fixed alignment)")
    ESTIMATED = ("estimated", "estimated", "the reference group's factor means are estimated too, its variances are 1 "
                                           "(the authors' free alignment, identified by non-invariant loadings)")


#: alignment: level of the pairwise tests that flag non-invariant parameters (the level of the authors' procedure,
#: recalled), and Monte Carlo trials of the aligned means
ALIGNMENT_FLAG_LEVEL = 0.01
ALIGNMENT_TRIALS = 20
