"""A seeded corpus of simulated questionnaires for the convergence tests (a test helper, not part of the tool).

Each case is a scale of 9-60 Likert-type items on 3-10 correlated traits, with reverse-keyed items
(about a third of each trait's items, the first item, which the marker scaling uses, among them in
about half the traits), weak and strong loadings, and cross-loadings and correlated residuals in the
population that the fitted model leaves out, so that the fit is poor as it is in real scales (CFI
about .75-.95).  Answers are cut into 5-7 categories and, in some cases, 1-5% of them are missing
completely at random.  Everything follows from the case's seed.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd


@dataclass(frozen=True)
class Case:
    seed: int
    items: int
    factors: int
    n: int
    categories: int
    missing: float  # share of answers missing completely at random

    @property
    def name(self) -> str:
        return (f"seed{self.seed}-{self.items}items-{self.factors}factors-n{self.n}-{self.categories}cat"
                f"-{round(100 * self.missing)}pct")


@dataclass(frozen=True)
class Questionnaire:
    case: Case
    data: pd.DataFrame  # categories 1..k, NaN where missing
    blocks: tuple[tuple[str, ...], ...]  # the items of each trait, in the order the model lists them
    loadings: np.ndarray  # population loadings (items x traits), cross-loadings included
    reversed: frozenset[str]  # reverse-keyed items (negative population loading on their own trait)

    def model(self, scaling: str = "marker") -> str:
        """Our model text: each trait with its own items, cross-loadings and residual correlations left out."""
        lines = [f"factor t{j + 1}: " + ", ".join(items) for j, items in enumerate(self.blocks)]
        if scaling != "marker":
            lines.append(f"scale latent by {scaling}")
        return "\n".join(lines) + "\n"

    def reference_model(self) -> str:
        """The same model in the notation of the reference program (semopy)."""
        return "\n".join(f"t{j + 1} =~ " + " + ".join(items) for j, items in enumerate(self.blocks))


def questionnaire(case: Case) -> Questionnaire:
    rng = np.random.default_rng(case.seed)
    p, k = case.items, case.factors
    sizes = np.full(k, p // k)
    sizes[: p % k] += 1
    own = np.repeat(np.arange(k), sizes)
    strong = rng.random(k) < 0.5  # traits with strong (0.6-0.85) or weak (0.35-0.6) loadings
    magnitude = np.where(strong[own], rng.uniform(0.6, 0.85, p), rng.uniform(0.35, 0.6, p))
    sign = np.ones(p)
    start = 0
    for j, size in enumerate(sizes):
        n_reversed = max(1, int(round(size / 3)))
        first_reversed = rng.random() < 0.5
        pool = np.arange(start + 1, start + size)
        chosen = list(rng.choice(pool, n_reversed - first_reversed, replace=False)) + ([start] if first_reversed else [])
        sign[chosen] = -1.0
        start += size
    L = np.zeros((p, k))
    L[np.arange(p), own] = sign * magnitude
    # cross-loadings on another trait for about a quarter of the items (left out of the fitted model)
    for i in np.flatnonzero(rng.random(p) < 0.25):
        other = rng.choice([j for j in range(k) if j != own[i]])
        L[i, other] = rng.choice([-1.0, 1.0]) * rng.uniform(0.3, 0.45)
    phi = np.eye(k)
    upper = np.triu_indices(k, 1)
    phi[upper] = rng.uniform(-0.2, 0.45, len(upper[0]))
    phi = phi + np.triu(phi, 1).T
    low = np.linalg.eigvalsh(phi)[0]
    if low < 0.2:  # shrink the correlations until the matrix is comfortably positive definite
        off = phi - np.eye(k)
        phi = np.eye(k) + off * (0.8 / (1.0 - low))
    common = L @ phi @ L.T
    theta = np.diag(np.clip(1.0 - np.diag(common), 0.15, None))
    # a few correlated residuals (left out as well)
    for _ in range(max(1, p // 10)):
        a, b = rng.choice(p, 2, replace=False)
        theta[a, b] = theta[b, a] = rng.uniform(0.1, 0.2) * np.sqrt(theta[a, a] * theta[b, b]) * 2
    sigma = common + theta
    if np.linalg.eigvalsh(sigma)[0] <= 0.05:
        sigma += np.eye(p) * (0.05 - np.linalg.eigvalsh(sigma)[0])
    x = rng.multivariate_normal(np.zeros(p), sigma, size=case.n)
    x /= np.sqrt(np.diag(sigma))
    cuts = np.linspace(-1.7, 1.7, case.categories - 1)
    answers = np.empty_like(x)
    for j in range(p):
        answers[:, j] = 1 + np.searchsorted(cuts + rng.uniform(-0.5, 0.5), x[:, j])
    if case.missing:
        answers[rng.random(answers.shape) < case.missing] = np.nan
    names = [f"i{j + 1:02d}" for j in range(p)]
    blocks, start = [], 0
    for size in sizes:
        blocks.append(tuple(names[start:start + size]))
        start += size
    return Questionnaire(case, pd.DataFrame(answers, columns=names), tuple(blocks), L,
                         frozenset(names[i] for i in np.flatnonzero(sign < 0)))


def corpus_cases(count: int, seed: int = 20270101) -> list[Case]:
    """``count`` cases drawn from the ranges of the issue: 9-60 items, 3-10 factors (at least three
    items each), N 150-3,000 (at least six rows per item), 5-7 categories, complete or 1-5% of the
    answers missing (at most 0.6 missing answers per row on average)."""
    rng = np.random.default_rng(seed)
    cases = []
    for c in range(count):
        factors = int(rng.integers(3, 11))
        items = int(rng.integers(max(9, 3 * factors), 61))
        # enough rows for every item's categories to be used and for positive-definite polychoric correlations
        n = max(int(np.exp(rng.uniform(np.log(150), np.log(3000)))), 6 * items)
        # maximum likelihood and the ordinal estimator leave out incomplete rows: keep more than half of them
        rates = [r for r in (0.01, 0.02, 0.03, 0.05) if r * items <= 0.6]
        missing = 0.0 if rng.random() < 0.4 else float(rng.choice(rates))
        cases.append(Case(seed + c, items, factors, n, int(rng.integers(5, 8)), missing))
    return cases
