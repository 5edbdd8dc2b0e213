"""A resample whose variances leave a fixed covariance impossible at the start of its search is that refit's
failure, counted as the refits count one that does not converge, not the end of the whole run with a model error
(exit 2).  The model: Holzinger & Swineford's (1939) three factors with covariance(visual, textual) fixed at 1.0,
near the bound the data's start values allow (a fit of all 301 rows starts and converges; at 1.05 it cannot start);
bootstrap resamples of the rows, each refitted from start values taken from its own data (the start every refit
falls back on when it is given none)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.language.parser import parse_model
from cfa_tool.model.parameters import ImpossibleAtStart
from cfa_tool.pipeline.continuous import FitOptions, estimate, replicate_fits
from cfa_tool.workflows.bootstrap import resampled_moments

MODEL = ("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
         "fix covariance(visual, textual) = 1.0\n")
NAMES = tuple(f"x{k}" for k in range(1, 10))


def test_a_resample_that_cannot_start_is_counted_not_raised(hs_data):
    spec = parse_model(MODEL)
    samples = resampled_moments(hs_data[list(NAMES)].to_numpy(dtype=float), NAMES, list(range(40)))
    fits = replicate_fits(spec, samples, None)
    assert len(fits) == len(samples)
    failed = [r for r, f in enumerate(fits) if not f.converged]
    assert 0 < len(failed) < len(samples)  # some resamples cannot start, the others are fitted
    for r, (fit, sample) in enumerate(zip(fits, samples)):
        if r in failed:  # each failure is a start that leaves the fixed covariance impossible, as a fit would say
            with pytest.raises(ImpossibleAtStart, match=r"covariance\(visual, textual\) is fixed at 1"):
                estimate(spec, [(None, sample)], FitOptions(diagnostics=False))
            assert np.isnan(fit.chi_square)
        else:
            assert np.isfinite(fit.chi_square)


def test_the_bootstrap_of_that_model_counts_its_refits(hs_data):
    """The bootstrap refits from the fit's estimates (a start inside the model whatever the resample), and its
    counts add up to the resamples drawn."""
    boot = cfa_tool.bootstrap(MODEL, hs_data, replications=40, seed=3, bollen_stine=False, bca=False, workers=1)
    counts = boot.to_dict()["result"]
    assert counts["converged"] + counts["not_converged"] + counts["failed"] == 40
    assert counts["converged"] >= 2
