"""Auxiliary variables in full-information ML: Graham's (2003) saturated-correlates model.

An auxiliary variable is a column that is not in the model but goes with the answers or with their being missing
(age, say).  Full-information ML assumes answers missing at random given the variables in the likelihood; putting
the auxiliaries into the likelihood, without changing the model, makes that assumption weaker (Collins, Schafer &
Kam 2001; Enders 2010, ch. 5).  Graham (2003) lets each auxiliary correlate with every other auxiliary and with the
residual of every indicator; for a factor model, whose factors do not correlate with the auxiliaries, the joint
moments of the p items y and the r auxiliaries a are then

    mu* = [mu(theta); alpha],   Sigma* = [[Sigma(theta), C], [C', Omega]]

with alpha (r), C (p x r) and Omega (r x r, symmetric) free.  This is the model for y together with an unrestricted
normal regression of a on y, so the auxiliaries add as many parameters as moments: the degrees of freedom are those
of the model alone, and with complete rows the likelihood factors and theta is the estimate without auxiliaries.
The discrepancy is the full-information one (:mod:`cfa_tool.estimation.fiml`) of the p + r columns, less that of
the saturated model of the p + r columns (EM), so N F is the model's likelihood-ratio chi-square.  The
independence (baseline) model of the incremental indices keeps the auxiliaries' means, variances and covariances
with everything free and only the items' covariances with each other at zero (Savalei & Bentler 2009), so the
baseline does not pay for the auxiliaries' correlations and CFI/TLI are not inflated.

Every row with some value among the p + r columns is in the likelihood: a row that answers no item but an auxiliary
adds the auxiliaries' density, which through C moves the items' estimated moments, and leaving such rows out would
select the sample by the auxiliaries (pipeline.inputs.with_helpers keeps them).

The parameter vector is theta (the model's, first) followed, group by group, by eta_g = (alpha, C by rows,
Omega's lower triangle by rows).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from cfa_tool.data.patterns import PatternData
from cfa_tool.estimation.fiml import MissingDataLikelihood, model_second_order
from cfa_tool.model.implied import ModelMatrices, StructuredModel
from cfa_tool.model.rank_two import EntryBasis, basis_vectors

if TYPE_CHECKING:
    from cfa_tool.estimation.ml import GroupMoments


def _joint_directions(p: int, r: int, observed_variances: bool) -> tuple[np.ndarray, np.ndarray]:
    """d Sigma* and d mu* (shapes (k, p+r, p+r), (k, p+r)) of the linear parameters: alpha, C, Omega; with
    ``observed_variances`` (the baseline) the items' means and variances come first."""
    P = p + r
    sigma_dirs, mean_dirs = [], []

    def mean(i):
        d = np.zeros(P)
        d[i] = 1.0
        mean_dirs.append(d)
        sigma_dirs.append(np.zeros((P, P)))

    def cov(i, j):
        d = np.zeros((P, P))
        d[i, j] = d[j, i] = 1.0
        sigma_dirs.append(d)
        mean_dirs.append(np.zeros(P))

    if observed_variances:
        for i in range(p):
            mean(i)
        for i in range(p):
            cov(i, i)
    for j in range(r):
        mean(p + j)
    for i in range(p):
        for j in range(r):
            cov(i, p + j)
    for a in range(r):
        for b in range(a + 1):
            cov(p + a, p + b)
    return np.array(sigma_dirs).reshape(-1, P, P), np.array(mean_dirs).reshape(-1, P)


def _joint_entries(p: int, r: int, observed_variances: bool, helpers_from: int
                   ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The parameters of :func:`_joint_directions`, in its order, as rank-two entries (:mod:`cfa_tool.model.rank_two`):
    (u, v, c, w, mean) with d Sigma* = c (e_u e_v' + e_v e_u') and d mu* = e_w where ``mean``, the columns u, v, w
    those of a basis whose column i is item i and column ``helpers_from`` + j is helper j (c 1/2 on the diagonal,
    0 for a mean)."""
    helper = helpers_from + np.arange(r)
    item = np.arange(p)
    a, b = np.tril_indices(r)
    parts = []  # (u, v, c, w, mean) of each kind
    if observed_variances:
        parts.append((item * 0, item * 0, np.zeros(p), item, np.ones(p, dtype=bool)))
        parts.append((item, item, np.full(p, 0.5), item * 0, np.zeros(p, dtype=bool)))
    parts.append((helper * 0, helper * 0, np.zeros(r), helper, np.ones(r, dtype=bool)))
    parts.append((np.repeat(item, r), np.tile(helper, p), np.ones(p * r), np.zeros(p * r, dtype=int),
                  np.zeros(p * r, dtype=bool)))
    parts.append((helper[a], helper[b], np.where(a == b, 0.5, 1.0), np.zeros(len(a), dtype=int),
                  np.zeros(len(a), dtype=bool)))
    return tuple(np.concatenate(column) for column in zip(*parts))


def _entry_basis(u, v, c, w, mean_one, mean_from_a, width: int) -> EntryBasis:
    """An :class:`~cfa_tool.model.rank_two.EntryBasis` of given entries over a basis of ``width`` columns (the flat
    positions of the pairs the information reads laid out for that width)."""

    def pairs(x, y):
        return x[:, None] * width + y[None, :]

    return EntryBasis(u, v, w, c, mean_from_a, mean_one, pairs(u, u), pairs(v, v), pairs(u, v), pairs(v, u),
                      pairs(w, w), np.outer(c, c))


def auxiliary_count(p: int, r: int) -> int:
    """Parameters the auxiliaries add in each group: r means, p r covariances with the items, r(r+1)/2 of their own."""
    return r + p * r + r * (r + 1) // 2


def joint_start(p: int, r: int, saturated: list[tuple[np.ndarray, np.ndarray]], implied: list[np.ndarray]
                ) -> np.ndarray:
    """eta of every group from the saturated (EM) moments of the p + r columns, kept positive definite beside the
    model's implied covariance ``implied`` of each group: the helpers' regression on the items, B = C' S^-1 with
    residual covariance W = Omega - C' S^-1 C (S, C, Omega the EM parts), is kept and the joint moments rebuilt
    around Sigma(theta): C = Sigma B', Omega = W + B Sigma B' (positive definite as W and Sigma are)."""
    out = []
    a, b = np.tril_indices(r)
    for (mu, sigma), model_sigma in zip(saturated, implied):
        S, C, omega = sigma[:p, :p], sigma[:p, p:], sigma[p:, p:]
        B = np.linalg.solve(S, C).T
        within = omega - C.T @ np.linalg.solve(S, C)
        C_start = model_sigma @ B.T
        omega_start = within + B @ model_sigma @ B.T
        out.append(np.concatenate([mu[p:], C_start.ravel(), omega_start[a, b]]))
    return np.concatenate(out) if out else np.zeros(0)


@dataclass
class JointMatrices:
    """The model's matrices of one group and the joint moments of items and auxiliaries."""

    model: ModelMatrices
    sigma: np.ndarray
    mu: np.ndarray

    @property
    def B(self) -> np.ndarray:
        return self.model.B

    def implied_covariance(self) -> np.ndarray:
        return self.sigma

    def implied_mean(self) -> np.ndarray:
        return self.mu


class JointModel:
    """The model with r auxiliary columns in the saturated-correlates form (module docstring), as the
    full-information likelihood uses a model: ``p``, ``matrices`` and ``jacobian`` over the p + r columns."""

    def __init__(self, model: StructuredModel, r: int, n_groups: int):
        self.structured = model
        self.items = model.p
        self.r = r
        self.p = model.p + r
        self.n_groups = n_groups
        self.q = model.J.shape[1]
        self.k = auxiliary_count(model.p, r)
        self.n_free = self.q + n_groups * self.k
        self._directions = _joint_directions(model.p, r, False)
        self._layouts: dict = {}  # each group's (basis, J*) of rank_two_layout, fixed by the model

    @property
    def basis_width(self) -> int:
        """The columns of :meth:`rank_two_layout`'s V*: the model's p + 2m and the helpers'."""
        return self.structured.p + 2 * self.structured.m + self.r

    def split(self, theta: np.ndarray, g: int) -> tuple[np.ndarray, np.ndarray]:
        """(the model's theta, group g's eta)."""
        start = self.q + g * self.k
        return theta[: self.q], theta[start: start + self.k]

    def matrices(self, theta: np.ndarray, g: int = 0) -> JointMatrices:
        model_theta, eta = self.split(theta, g)
        mats = self.structured.matrices(model_theta, g)
        p, r = self.items, self.r
        sigma = np.empty((self.p, self.p))
        sigma[:p, :p] = mats.implied_covariance()
        C = eta[r: r + p * r].reshape(p, r)
        sigma[:p, p:] = C
        sigma[p:, :p] = C.T
        a, b = np.tril_indices(r)
        omega = np.empty((r, r))
        omega[a, b] = eta[r + p * r:]
        omega[b, a] = eta[r + p * r:]
        sigma[p:, p:] = omega
        return JointMatrices(mats, sigma, np.concatenate([mats.implied_mean(), eta[:r]]))

    def rank_two_layout(self, mats: JointMatrices, g: int):
        """(V*, a, the entries' basis, J*) of group g for the rank-two gathers of full-information ML
        (:meth:`cfa_tool.estimation.fiml.MissingDataLikelihood._layout`): the model's basis V = [I, C', G] over the
        items beside the helpers' unit vectors, V* = [[V, 0], [0, I_r]], the model's entries followed by the helpers'
        parameters (unit directions, :func:`_joint_entries`), and J* mapping the joint parameters to them."""
        V, a = basis_vectors(mats.model, True)
        p, width = self.items, V.shape[1]
        joint_V = np.zeros((self.p, width + self.r))
        joint_V[:p, :width] = V
        joint_V[p:, width:] = np.eye(self.r)
        return (joint_V, a) + self._joint_layout(g, width)

    def _joint_layout(self, g: int, width: int):
        """The (basis, J*) of :meth:`rank_two_layout`, fixed by the model: made once a group."""
        if g not in self._layouts:
            model, J = self.structured.bases[g], self.structured.active_J[g]
            u, v, c, w, mean = _joint_entries(self.items, self.r, False, width)
            basis = _entry_basis(np.concatenate([model.u, u]), np.concatenate([model.v, v]),
                                 np.concatenate([model.c, c]), np.concatenate([model.w, w]),
                                 np.concatenate([model.mean_one, mean]),
                                 np.concatenate([model.mean_from_a, np.full(len(u), -1)]), width + self.r)
            joint_J = np.zeros((len(basis.u), self.n_free))
            joint_J[: len(model.u), : self.q] = J
            start = self.q + g * self.k
            joint_J[len(model.u):, start: start + self.k] = np.eye(self.k)
            self._layouts[g] = basis, joint_J
        return self._layouts[g]

    def jacobian(self, theta: np.ndarray, g: int = 0) -> tuple[np.ndarray, np.ndarray]:
        """d Sigma* / d theta (n_free, p+r, p+r) and d mu* / d theta (n_free, p+r) of group g."""
        model_sigma, model_mu = self.structured.jacobian(theta[: self.q], g)
        p = self.items
        d_sigma = np.zeros((self.n_free, self.p, self.p))
        d_mu = np.zeros((self.n_free, self.p))
        d_sigma[: self.q, :p, :p] = model_sigma
        d_mu[: self.q, :p] = model_mu
        start = self.q + g * self.k
        d_sigma[start: start + self.k], d_mu[start: start + self.k] = self._directions
        return d_sigma, d_mu


class AuxiliaryLikelihood(MissingDataLikelihood):
    """The full-information discrepancy of the model with auxiliary columns (:class:`JointModel`); its
    ``patterns`` and saturated moments are those of the p + r columns."""

    def _second_order(self, g: int, mats: JointMatrices, M: np.ndarray, mean_gradient: np.ndarray) -> np.ndarray:
        """tr(M D_ab) + m' dmu_ab over the joint parameters (:meth:`MissingDataLikelihood.observed_hessian`, whose
        formula is unchanged): the helpers' parameters enter Sigma* and mu* linearly, so the term is the model's
        alone, with M and m restricted to the items."""
        joint = self.model
        out = np.zeros((joint.n_free, joint.n_free))
        p = joint.items
        out[: joint.q, : joint.q] = model_second_order(joint.structured, g, mats.model, M[:p, :p], mean_gradient[:p])
        return out


class LinearJointModel:
    """A covariance structure linear in its parameters over the p + r columns: the items' means and variances,
    the auxiliaries' means, their covariances with the items and with each other (the baseline of the module
    docstring: the items' covariances with each other zero)."""

    def __init__(self, p: int, r: int):
        self.p = p + r
        self.items = p
        self.r = r
        self._directions = _joint_directions(p, r, True)
        self.n_free = len(self._directions[0])
        u, v, c, w, mean = _joint_entries(p, r, True, p)
        self._basis = _entry_basis(u, v, c, w, mean, np.full(len(u), -1), self.p)

    def matrices(self, theta: np.ndarray, g: int = 0) -> JointMatrices:
        d_sigma, d_mu = self._directions
        return JointMatrices(None, np.tensordot(theta, d_sigma, axes=1), theta @ d_mu)

    def jacobian(self, theta: np.ndarray, g: int = 0) -> tuple[np.ndarray, np.ndarray]:
        return self._directions

    def rank_two_layout(self, mats: JointMatrices, g: int):
        """(V, a, the entries' basis, J) for the rank-two gathers of full-information ML (as
        :meth:`JointModel.rank_two_layout`): every parameter a unit direction, V the identity, J the identity."""
        return np.eye(self.p), np.zeros(0), self._basis, np.eye(self.n_free)


class _BaselineLikelihood(MissingDataLikelihood):
    def observed_hessian(self, theta: np.ndarray) -> np.ndarray | None:  # the scoring information suffices
        return None


def auxiliary_baseline(patterns: list[PatternData], groups: Sequence[GroupMoments], p: int, r: int,
                       max_iterations: int = 500
                       ) -> tuple[float, int] | None:
    """(chi-square, df) of the baseline model with auxiliaries (Savalei & Bentler 2009; module docstring): in each
    group the items uncorrelated with each other, every mean and variance and every covariance that involves an
    auxiliary free; df = p(p-1)/2 per group, as without auxiliaries.  ``groups``: each group's saturated (EM) moments
    of the p + r columns (the joint likelihood's).  None when its search does not converge."""
    from cfa_tool.estimation.optimizer import minimise

    model = LinearJointModel(p, r)  # the same in every group
    a, b = np.tril_indices(r)
    chi = 0.0
    for data, gm in zip(patterns, groups):
        mu, sigma = gm.mean, gm.covariance
        likelihood = _BaselineLikelihood(model, [data], [(mu, sigma)], [gm])
        # start: the items uncorrelated with everything (positive definite whatever the data)
        start = np.concatenate([mu[:p], np.diag(sigma)[:p], mu[p:], np.zeros(p * r), sigma[p:, p:][a, b]])
        bound = np.full(len(start), np.inf)
        found = minimise(likelihood.evaluate, likelihood.value, start, -bound, bound, max_iterations,
                         gradient=likelihood.gradient)
        if not found.converged:
            return None
        chi += data.n_obs * found.value
    return chi, len(patterns) * p * (p - 1) // 2


@dataclass(frozen=True)
class AuxiliaryFit:
    """What a fit with auxiliary variables keeps beside the model's own estimation: the auxiliaries' names, the
    joint likelihood over items and auxiliaries, the joint parameter vector at its minimum (the model's theta
    first), and each group's saturated (EM) moments of the items alone (for Little's test of the items)."""

    names: tuple[str, ...]
    likelihood: AuxiliaryLikelihood
    theta: np.ndarray
    items_saturated: tuple[tuple[np.ndarray, np.ndarray], ...]
    #: each group's rows (of its moments, in their order) that answer some item: a row answering helpers only adds
    #: to the joint likelihood but has no distance on the items (pipeline.inputs.with_helpers keeps such rows)
    answered: tuple[np.ndarray, ...] = ()

    @property
    def q(self) -> int:
        return self.likelihood.model.q

    def log_likelihood(self) -> float:
        """The joint log-likelihood of items and helpers at the estimates (it includes the helpers' part, so the
        information criteria from it compare only fits with the same helpers)."""
        from cfa_tool.estimation.fiml import fiml_log_likelihood

        return fiml_log_likelihood(self.likelihood, self.theta)

    def group_chi_square(self, g: int) -> float:
        """Group g's share of the chi-square, N w_g F_g of the joint discrepancy."""
        joint = self.likelihood
        return joint.n_total * joint.weights[g] * joint.group_discrepancy(self.theta, g)

    def observed_hessian(self) -> np.ndarray | None:
        """The joint observed information (second derivatives of F) at the estimates in closed form (with
        higher-order factors too).  The model's standard errors are its block of the inverse (the helpers' parameters
        estimated alongside, not held fixed; Kenward & Molenberghs 1998 for the observed information with answers
        missing at random)."""
        return self.likelihood.observed_hessian(self.theta)
