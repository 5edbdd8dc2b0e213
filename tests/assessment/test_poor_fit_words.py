"""The poor-fit caution cites the RMSEA's bound and its source (MacCallum, Browne & Sugawara 1996) only beside an RMSEA
beyond it (re-check s18, r10: the rule was cited beside a robust CFI of .692 while the robust RMSEA was .023, so a
reader looked for an RMSEA that failed).  The bounds are common practice (assessment.fit_indices.POOR_FIT_BOUNDS)."""

from __future__ import annotations

from types import SimpleNamespace

from cfa_tool.assessment.admissibility import poor_fit_problems


def _explanation(cfi: float, rmsea: float) -> str:
    [problem] = poor_fit_problems(SimpleNamespace(df=98, cfi=cfi, rmsea=rmsea, test="robust"))
    return str(problem.explanation)


def test_the_rmsea_source_is_cited_only_beside_an_rmsea_beyond_its_bound():
    low_cfi = _explanation(0.692, 0.023)
    assert "robust CFI .692, below .90" in low_cfi and "RMSEA" not in low_cfi and "MacCallum" not in low_cfi
    both = _explanation(0.692, 0.151)
    assert "robust RMSEA .151, above .10" in both and "MacCallum, Browne & Sugawara 1996" in both
