"""bootstrap with full-information ML asked for (--incomplete-rows full-information) on a file without gaps: before,
every resample was refitted and the run then died in the BCa intervals ("IndexError: index 30 is out of bounds",
hostile tester, sixteenth round, case 05), because the rows' influence was taken for the model without item means
(the data had no gaps) while the fit, full-information ML, estimates the means too.

Independent check: on complete rows full-information ML is ML with the item means estimated, so each resample's
covariance-structure estimates, and with them every interval of a loading, variance or covariance, percentile and BCa
alike, equal those of the ordinary fit of the same resamples (same seed) (Arbuckle 1996; Enders 2010, ch. 4: with no
missing values the full-information likelihood is the complete-data likelihood)."""

from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool import bootstrap

ROOT = Path(__file__).resolve().parents[2]
MODEL = ROOT / "models" / "rider_three_factors.cfa"


def test_full_information_bootstrap_of_complete_rows_equals_the_ordinary_one(tmp_path: Path):
    rows = pd.read_csv(ROOT / "demo" / "rider_survey.csv").dropna()
    fiml = bootstrap(MODEL, rows, replications=40, workers=1, seed=3, missing="full-information").to_dict()["result"]
    plain = bootstrap(MODEL, rows, replications=40, workers=1, seed=3).to_dict()["result"]
    assert fiml["converged"] == plain["converged"] == 40
    by_key = {(i["kind"], tuple(i["variables"]), i["scale"]): i for i in fiml["intervals"]}
    assert len(by_key) > len(plain["intervals"])  # the item means' intervals too
    for interval in plain["intervals"]:
        same = by_key[(interval["kind"], tuple(interval["variables"]), interval["scale"])]
        for key in ("percentile_ci95", "bca_ci95"):
            np.testing.assert_allclose(same[key], interval[key], rtol=1e-6, atol=1e-8)
        np.testing.assert_allclose(same["bootstrap_se"], interval["bootstrap_se"], rtol=1e-6)
