"""Simulate the demo data: a rider-experience survey of a fictional city transit agency.

Invented scenario, no real people or places.  Riders rate 12 statements on a
five-point scale; three correlated traits stand behind them: punctuality of
the service, comfort on board, and courtesy of staff.  The population model
(below) also holds one residual covariance the three-factor model leaves out
(between easy_transfer and room_to_stand: both ask about crowding), so the
demo shows a modification index with something real behind it.

Run from the repository root:  python demo/make_demo_data.py
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

SEED = 20261202
N_RIDERS = 480
FACTORS = {
    "punctuality": ["on_time", "short_wait", "accurate_info", "easy_transfer"],
    "comfort": ["seat_available", "clean", "temperature", "room_to_stand"],
    "courtesy": ["greeting", "helpful", "respectful", "clear_answers"],
}
# standardized population loadings, in item order
LOADINGS = [0.78, 0.70, 0.64, 0.58, 0.72, 0.80, 0.55, 0.66, 0.62, 0.81, 0.76, 0.69]
FACTOR_CORRELATIONS = np.array([[1.00, 0.45, 0.35], [0.45, 1.00, 0.50], [0.35, 0.50, 1.00]])
RESIDUAL_CORRELATION = ("easy_transfer", "room_to_stand", 0.30)
MISSING_ANSWERS = 9  # a few blank cells, so the report shows listwise deletion


def population_covariance() -> tuple[list[str], np.ndarray]:
    items = [x for xs in FACTORS.values() for x in xs]
    lam = np.zeros((len(items), len(FACTORS)))
    for j, xs in enumerate(FACTORS.values()):
        for x in xs:
            i = items.index(x)
            lam[i, j] = LOADINGS[i]
    theta = np.diag(1.0 - np.array(LOADINGS) ** 2)
    a, b, r = RESIDUAL_CORRELATION
    ia, ib = items.index(a), items.index(b)
    theta[ia, ib] = theta[ib, ia] = r * np.sqrt(theta[ia, ia] * theta[ib, ib])
    return items, lam @ FACTOR_CORRELATIONS @ lam.T + theta


def simulate(seed: int = SEED) -> str:
    rng = np.random.default_rng(seed)
    items, sigma = population_covariance()
    z = rng.multivariate_normal(np.zeros(len(items)), sigma, size=N_RIDERS)
    scores = np.clip(np.rint(3.2 + 0.95 * z), 1, 5).astype(int)
    district = rng.choice(["north", "south"], size=N_RIDERS)
    cells = [[str(v) for v in row] for row in scores]
    for k in rng.choice(N_RIDERS * len(items), size=MISSING_ANSWERS, replace=False):
        cells[k // len(items)][k % len(items)] = ""
    lines = [",".join(["rider_id", "district"] + items)]
    for i, row in enumerate(cells):
        lines.append(",".join([f"R{i + 1:04d}", district[i]] + row))
    return "\n".join(lines) + "\n"


if __name__ == "__main__":
    out = Path(__file__).resolve().parent / "rider_survey.csv"
    out.write_text(simulate(), encoding="utf-8")
    print(f"wrote {out}")
