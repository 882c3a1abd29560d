"""Golden file for the random-effects (GLMM-equivalent) probit fit; called from generate.py.

Model (yes/no detection, equal variance): animal i in condition j has n_S present trials with
h "yes" answers and n_N absent trials with f "yes" answers, P(yes | present) = Phi(d/2 - c),
P(yes | absent) = Phi(-d/2 - c), where d_ij and c_ij are linear in the fixed effects beta and
the animal's random effects r_i ~ N(0, Sigma) (independent between animals). The marginal
log-likelihood sum_i log integral exp(loglik_i(r)) N(r; 0, Sigma) dr (binomial coefficients
left out) is maximised over beta and Sigma; Sigma is parametrised by its lower Cholesky
factor with the diagonal on the log scale.

Each animal's integral is taken by adaptive Gauss-Hermite quadrature (Liu & Pierce 1994,
Biometrika 81:624-629; Pinheiro & Bates 1995, J. Comput. Graph. Stat. 4:12-35; from memory):
the product rule of numpy.polynomial.hermite.hermgauss centred at the mode r_hat of the log
joint density g(r) = loglik(r) + log N(r; 0, Sigma) and scaled by S, the lower Cholesky factor
of H^-1, H = -grad^2 g(r_hat): r_k = r_hat + sqrt(2) S x_k. One node per dimension is the
Laplace approximation. The gradient here is the exact gradient of that adapted rule (the
mode and S move with the parameters: implicit differentiation of the mode equation, third
derivatives of the probit rows and the derivative of a Cholesky factor), checked against
central differences of the objective; so every node count's fit is the true maximiser of
its own approximation.

Data are invented: simulated here with numpy.random.default_rng(seed); the counts are written
into the JSON, so the Rust side reads them and never re-simulates.

Run alone: `../../target/golden-venv/bin/python random_effects_files.py` (from tests/golden).
"""

import math

import numpy as np
from numpy.polynomial.hermite import hermgauss
from numpy.polynomial.legendre import leggauss
from scipy.integrate import dblquad
from scipy.linalg import null_space
from scipy.optimize import minimize
from scipy.special import log_ndtr, logsumexp
from scipy.stats import norm

from golden_support import assert_close, meta, write_json

# Nodes per dimension for the golden values, and the higher count that shows they converged.
NODES_USED = {2: 20, 3: 12}
NODES_CHECK = {2: 24, 3: 16}
# Node counts whose fits are compared with the converged one (for the Rust side's choice).
NODES_COMPARED = (1, 3, 5, 7)
# Convergence demanded of the golden values (brief: estimates < 1e-8, log-likelihood < 1e-9).
ESTIMATE_CONVERGED = 1e-8
LOGLIK_CONVERGED = 1e-9
# Central-difference step (in beta and the log-Cholesky entries) for the observed information.
HESSIAN_STEP = 1e-4
# An SD below this, or a |correlation| above CORR_EDGE, would be a boundary optimum.
SD_FLOOR = 0.05
CORR_EDGE = 0.98

HALF_LOG_2PI = 0.5 * math.log(2.0 * math.pi)


# ---------------------------------------------------------------------------------------
# Cases: the design of (d, c) in (beta, r), the simulation truth and the seed.
# ---------------------------------------------------------------------------------------

def _truth_sigma(sds, corr):
    """Covariance from SDs and a {(i, k): correlation} map."""
    sds = np.asarray(sds, dtype=float)
    r = np.eye(len(sds))
    for (i, k), v in corr.items():
        r[i, k] = r[k, i] = v
    return r * np.outer(sds, sds)


CASES = [
    {
        "name": "single", "conditions": 1, "groups": 1, "animals_per_group": [12],
        "trials": (20, 20), "seed": 20261202,
        "seed_note": "20261201 gave corr(a,b) -> -1 (boundary); next seed taken",
        "beta_names": ["d_prime", "criterion"], "random": ["a", "b"],
        "truth_beta": [1.2, -0.25], "truth_sd": [0.3, 0.35], "truth_corr": {(0, 1): -0.3},
        "hypothesis": ("bias", {"criterion": 1.0}),
    },
    {
        "name": "slope", "conditions": 2, "groups": 1, "animals_per_group": [16],
        "trials": (15, 15), "seed": 20261213,
        "seed_note": "20261202-20261212 gave a correlation near +-1 or an SD near 0, or a "
                     "fit that had not converged at 5 nodes (3x3 Sigma from 16 animals is "
                     "often degenerate); 20261213 is the first interior optimum",
        "beta_names": ["d_prime", "criterion_0", "criterion_1"], "random": ["a", "b", "u"],
        "truth_beta": [1.2, 0.0, -0.4], "truth_sd": [0.3, 0.35, 0.25],
        "truth_corr": {(0, 1): -0.3, (1, 2): 0.2, (0, 2): -0.06},
        "hypothesis": ("shift", {"criterion_0": 1.0, "criterion_1": -1.0}),
    },
    {
        "name": "two_groups", "conditions": 1, "groups": 2, "animals_per_group": [10, 10],
        "trials": (20, 20), "seed": 20261204,
        "seed_note": "20261203 gave SD(a) 0.044 (below the 0.05 floor); next seed taken",
        "beta_names": ["d_prime", "criterion", "difference"], "random": ["a", "b"],
        "truth_beta": [1.2, -0.25, 0.4], "truth_sd": [0.3, 0.35], "truth_corr": {(0, 1): -0.3},
        "hypothesis": ("difference", {"difference": 1.0}),
    },
    {
        "name": "few_trials", "conditions": 1, "groups": 1, "animals_per_group": [10],
        "trials": (8, 8), "seed": 20261204,
        "seed_note": "first seed tried",
        "beta_names": ["d_prime", "criterion"], "random": ["a", "b"],
        "truth_beta": [1.2, -0.25], "truth_sd": [0.3, 0.35], "truth_corr": {(0, 1): -0.3},
        "hypothesis": ("bias", {"criterion": 1.0}),
    },
]


def dc_design(case, group, condition):
    """Rows (x_d, z_d) and (x_c, z_c) with d = x_d.beta + z_d.r and c = x_c.beta + z_c.r."""
    p, q = len(case["beta_names"]), len(case["random"])
    xd, zd, xc, zc = np.zeros(p), np.zeros(q), np.zeros(p), np.zeros(q)
    xd[0], zd[0] = 1.0, 1.0  # d' and a in every case and condition
    if case["name"] == "slope":
        xc[1 + condition] = 1.0  # criterion_0 or criterion_1
        zc[1] = 1.0
        if condition == 1:
            zc[2] = 1.0  # u shifts only condition 1's criterion
    else:
        xc[1], zc[1] = 1.0, 1.0
        if case["name"] == "two_groups" and group == 1:
            xc[2] = 1.0
    return xd, zd, xc, zc


def animal_rows(case, animal):
    """The animal's binomial rows: eta = A beta + B r, with n trials and y 'yes' answers.

    Present row: eta = d/2 - c; absent row: eta = -d/2 - c.
    """
    a_rows, b_rows, n, y = [], [], [], []
    for j, (n_s, h, n_n, f) in enumerate(animal["counts"]):
        xd, zd, xc, zc = dc_design(case, animal["group"], j)
        a_rows += [xd / 2 - xc, -xd / 2 - xc]
        b_rows += [zd / 2 - zc, -zd / 2 - zc]
        n += [n_s, n_n]
        y += [h, f]
    return np.array(a_rows), np.array(b_rows), np.array(n, float), np.array(y, float)


def simulate(case):
    """Invented counts: r_i = chol(Sigma) z, z standard normal; binomial hits and false alarms."""
    rng = np.random.default_rng(case["seed"])
    chol = np.linalg.cholesky(_truth_sigma(case["truth_sd"], case["truth_corr"]))
    beta = np.array(case["truth_beta"])
    n_s, n_n = case["trials"]
    animals = []
    for group, count in enumerate(case["animals_per_group"]):
        for _ in range(count):
            r = chol @ rng.standard_normal(len(case["random"]))
            counts = []
            for j in range(case["conditions"]):
                xd, zd, xc, zc = dc_design(case, group, j)
                d, c = xd @ beta + zd @ r, xc @ beta + zc @ r
                p_s = 0.5 * math.erfc(-(d / 2 - c) / math.sqrt(2))
                p_n = 0.5 * math.erfc(-(-d / 2 - c) / math.sqrt(2))
                counts.append([n_s, int(rng.binomial(n_s, p_s)), n_n, int(rng.binomial(n_n, p_n))])
            animals.append({"group": group, "counts": counts})
    return animals


# ---------------------------------------------------------------------------------------
# One probit row and the parameters.
# ---------------------------------------------------------------------------------------

def _mills(x):
    """phi(x)/Phi(x), stable far into the lower tail (log_ndtr)."""
    return np.exp(-0.5 * x * x - HALF_LOG_2PI - log_ndtr(x))


def row_terms(n, y, eta):
    """f = y ln Phi(eta) + (n - y) ln Phi(-eta) and its first three derivatives in eta."""
    lp, lq = _mills(eta), _mills(-eta)
    # m(x) = phi/Phi: m' = -m (x + m), m'' = -m'(x + m) - m (1 + m').
    dlp = -lp * (eta + lp)
    dlq = -lq * (-eta + lq)
    d2lp = -dlp * (eta + lp) - lp * (1 + dlp)
    d2lq = -dlq * (-eta + lq) - lq * (1 + dlq)
    miss = n - y
    f0 = y * log_ndtr(eta) + miss * log_ndtr(-eta)
    return f0, y * lp - miss * lq, y * dlp + miss * dlq, y * d2lp - miss * d2lq


def unpack(theta, p, q):
    """beta, the Cholesky factor C of Sigma and dC/d(lambda_j) (row-wise lower triangle)."""
    beta = np.asarray(theta[:p], float)
    chol = np.zeros((q, q))
    d_chol = []
    i = p
    for a in range(q):
        for b in range(a + 1):
            dc = np.zeros((q, q))
            if a == b:
                chol[a, a] = math.exp(theta[i])
                dc[a, a] = chol[a, a]
            else:
                chol[a, b] = theta[i]
                dc[a, b] = 1.0
            d_chol.append(dc)
            i += 1
    return beta, chol, d_chol


def pack_sigma(beta, sds, corr):
    """theta from beta, SDs and a correlation matrix."""
    chol = np.linalg.cholesky(corr * np.outer(sds, sds))
    q = len(sds)
    lam = [math.log(chol[a, a]) if a == b else chol[a, b] for a in range(q) for b in range(a + 1)]
    return np.concatenate([beta, lam])


def sd_corr(theta, p, q):
    _, chol, _ = unpack(theta, p, q)
    sigma = chol @ chol.T
    sd = np.sqrt(np.diag(sigma))
    return sd, sigma / np.outer(sd, sd)


# ---------------------------------------------------------------------------------------
# One animal's adaptive quadrature and its exact gradient.
# ---------------------------------------------------------------------------------------

def product_rule(nodes, q):
    """Grid x_k (K x q) and log(prod w) + |x_k|^2 of the physicists' Hermite product rule."""
    x, w = hermgauss(nodes)
    grids = np.meshgrid(*([x] * q), indexing="ij")
    lw = np.meshgrid(*([np.log(w) + x * x] * q), indexing="ij")
    return np.stack([g.ravel() for g in grids], 1), sum(l.ravel() for l in lw)


def animal_mode(a, b, n, y, beta, prec):
    """Mode of g(r) by Newton with step halving (g is strictly concave: probit rows are
    log-concave and the prior is Gaussian), from r = 0. Converged when a step is below 1e-8
    of the posterior scale sqrt(diag H^-1); one more full step then leaves an error of order
    1e-16 of that scale (Newton converges quadratically)."""
    r = np.zeros(b.shape[1])
    base = a @ beta

    def g(rr):
        return row_terms(n, y, base + b @ rr)[0].sum() - 0.5 * rr @ prec @ rr

    def newton_step(rr):
        _, f1, f2, _ = row_terms(n, y, base + b @ rr)
        hess = b.T @ (b * -f2[:, None]) + prec
        return np.linalg.solve(hess, b.T @ f1 - prec @ rr), hess

    for _ in range(200):
        step, hess = newton_step(r)
        scale = np.sqrt(np.diag(np.linalg.inv(hess)))
        if np.max(np.abs(step) / scale) < 1e-8:
            return r + newton_step(r + step)[0] + step
        g0, t = g(r), 1.0
        while g(r + t * step) < g0 and t > 1e-6:
            t *= 0.5
        r = r + t * step
    raise AssertionError(f"animal mode search did not converge: beta {beta}, step {step}")


def _chol_derivative(s, s_inv, d_cov):
    """d chol(A) for A = S S^T and its derivative d_cov: S Phi(S^-1 dA S^-T), Phi = lower
    triangle with the diagonal halved."""
    m = s_inv @ d_cov @ s_inv.T
    phi = np.tril(m) - 0.5 * np.diag(np.diag(m))
    return s @ phi


def animal_marginal(a, b, n, y, theta, p, q, grid, want_grad=True):
    """log integral exp(loglik(r)) N(r; 0, Sigma) dr by adaptive Gauss-Hermite, and its
    gradient in theta = (beta, lambda)."""
    x, log_w = grid
    beta, chol, d_chol = unpack(theta, p, q)
    sigma = chol @ chol.T
    prec = np.linalg.inv(sigma)
    log_det_sigma = 2.0 * np.sum(np.log(np.diag(chol)))
    r_hat = animal_mode(a, b, n, y, beta, prec)
    eta_hat = a @ beta + b @ r_hat
    _, _, f2_hat, f3_hat = row_terms(n, y, eta_hat)
    hess = b.T @ (b * -f2_hat[:, None]) + prec
    h_inv = np.linalg.inv(hess)
    h_inv = 0.5 * (h_inv + h_inv.T)
    s = np.linalg.cholesky(h_inv)
    s_inv = np.linalg.inv(s)  # q x q and well conditioned: an explicit inverse is accurate
    log_det_s = np.sum(np.log(np.diag(s)))

    nodes = r_hat[None, :] + math.sqrt(2.0) * x @ s.T
    eta = (a @ beta)[None, :] + nodes @ b.T
    f0, f1, _, _ = row_terms(n, y, eta)
    g = (f0.sum(1) - 0.5 * np.einsum("ki,ij,kj->k", nodes, prec, nodes)
         - 0.5 * log_det_sigma - q * HALF_LOG_2PI)
    terms = log_w + g
    value = 0.5 * q * math.log(2.0) + log_det_s + logsumexp(terms)
    if not want_grad:
        return value, None

    weight = np.exp(terms - logsumexp(terms))  # the rule's posterior weights pi_k
    grad_r = f1 @ b - nodes @ prec  # grad_r g at each node
    d_sigma = [dc @ chol.T + chol @ dc.T for dc in d_chol]
    d_prec = [-prec @ ds @ prec for ds in d_sigma]
    grad = np.zeros(len(theta))
    for j in range(len(theta)):
        if j < p:
            # d r_hat by implicit differentiation of the mode equation B' f'(eta) - P r = 0.
            dr = h_inv @ (b.T @ (f2_hat * a[:, j]))
            d_eta = a[:, j] + b @ dr
            d_hess = b.T @ (b * (-f3_hat * d_eta)[:, None])
            dg_direct = f1 @ a[:, j]
        else:
            dp = d_prec[j - p]
            dr = -h_inv @ (dp @ r_hat)
            d_eta = b @ dr
            d_hess = b.T @ (b * (-f3_hat * d_eta)[:, None]) + dp
            dg_direct = (-0.5 * np.einsum("ki,ij,kj->k", nodes, dp, nodes)
                         - 0.5 * np.trace(prec @ d_sigma[j - p]))
        d_s = _chol_derivative(s, s_inv, -h_inv @ d_hess @ h_inv)
        d_nodes = dr[None, :] + math.sqrt(2.0) * x @ d_s.T
        d_g = dg_direct + np.sum(grad_r * d_nodes, 1)
        grad[j] = -0.5 * np.trace(h_inv @ d_hess) + weight @ d_g
    return value, grad


# ---------------------------------------------------------------------------------------
# The marginal likelihood, its fit and its observed information.
# ---------------------------------------------------------------------------------------

class Marginal:
    """Sum over animals of the adapted rule at a fixed node count."""

    def __init__(self, case, animals, nodes):
        self.p, self.q = len(case["beta_names"]), len(case["random"])
        self.rows = [animal_rows(case, an) for an in animals]
        self.grid = product_rule(nodes, self.q)

    def __call__(self, theta, want_grad=True):
        total, grad = 0.0, np.zeros(len(theta))
        for a, b, n, y in self.rows:
            v, g = animal_marginal(a, b, n, y, theta, self.p, self.q, self.grid, want_grad)
            total += v
            if want_grad:
                grad += g
        return total, grad


def fd_hessian(grad_fn, theta, step):
    """Central differences of an analytic gradient, symmetrised."""
    k = len(theta)
    hess = np.zeros((k, k))
    for j in range(k):
        e = np.zeros(k)
        e[j] = step
        hess[:, j] = (grad_fn(theta + e) - grad_fn(theta - e)) / (2 * step)
    return 0.5 * (hess + hess.T)


def maximise(loglik, start, basis=None):
    """Maximise loglik over theta = (basis @ gamma, lambda): BFGS (gtol 1e-10), then Newton
    steps on a finite-difference Hessian of the analytic gradient until the gradient is
    below 1e-11 (BFGS alone often stops on a line-search precision loss near 1e-8)."""
    p_full = loglik.p
    basis = np.eye(p_full) if basis is None else basis
    k_beta = basis.shape[1]

    def full(free):
        return np.concatenate([basis @ free[:k_beta], free[k_beta:]])

    def neg(free):
        v, g = loglik(full(free))
        return -v, -np.concatenate([basis.T @ g[:p_full], g[p_full:]])

    free0 = np.concatenate([np.linalg.lstsq(basis, start[:p_full], rcond=None)[0],
                            start[p_full:]])
    res = minimize(neg, free0, jac=True, method="BFGS", options={"gtol": 1e-10, "maxiter": 2000})
    free = res.x
    for _ in range(20):
        v, g = neg(free)
        if np.max(np.abs(g)) < 1e-11:
            break
        hess = fd_hessian(lambda f: neg(f)[1], free, HESSIAN_STEP)
        step = np.linalg.solve(hess, g)
        t = 1.0
        while neg(free - t * step)[0] > v + 1e-12 and t > 1e-4:
            t *= 0.5
        free = free - t * step
    v, g = neg(free)
    worst = float(np.max(np.abs(g)))
    if worst >= 1e-6:
        raise AssertionError(f"gradient {worst!r} at the optimum is not below 1e-6")
    return full(free), -v, worst


def estimates_vector(theta, p, q):
    """beta, SDs and the correlations above the diagonal, the values that are reported."""
    sd, corr = sd_corr(theta, p, q)
    return np.concatenate([theta[:p], sd, corr[np.triu_indices(q, 1)]])


# ---------------------------------------------------------------------------------------
# Start values and checks.
# ---------------------------------------------------------------------------------------

def start_values(case, animals):
    """Method-of-moments start: per-animal log-linear-rate estimates (Hautus 1995), their
    means by parameter and their SDs (halved, as they include the sampling noise)."""
    probit = lambda k, n: float(norm.ppf((k + 0.5) / (n + 1)))
    per = []
    for an in animals:
        d_c = []
        for n_s, h, n_n, f in an["counts"]:
            zh, zf = probit(h, n_s), probit(f, n_n)
            d_c.append((zh - zf, -(zh + zf) / 2))
        per.append((an["group"], d_c))
    d_i = np.array([np.mean([dc[0] for dc in d_c]) for _, d_c in per])
    c0 = np.array([d_c[0][1] for _, d_c in per])
    groups = np.array([g for g, _ in per])
    if case["name"] == "slope":
        c1 = np.array([d_c[1][1] for _, d_c in per])
        beta = [d_i.mean(), c0.mean(), c1.mean()]
        spread = [d_i.std(ddof=1), c0.std(ddof=1), (c1 - c0).std(ddof=1)]
    elif case["name"] == "two_groups":
        beta = [d_i.mean(), c0[groups == 0].mean(), c0[groups == 1].mean() - c0[groups == 0].mean()]
        centred = c0 - np.where(groups == 1, beta[2], 0.0)
        spread = [d_i.std(ddof=1), centred.std(ddof=1)]
    else:
        beta = [d_i.mean(), c0.mean()]
        spread = [d_i.std(ddof=1), c0.std(ddof=1)]
    sds = np.maximum(0.5 * np.array(spread), 0.1)
    return pack_sigma(np.array(beta), sds, np.eye(len(sds)))


def check_gradient(loglik, theta):
    """The analytic gradient of the adapted rule against central differences (step 1e-6:
    truncation ~1e-12, rounding ~1e-16 * |loglik| / 1e-6 ~ 1e-8)."""
    _, grad = loglik(theta)
    fd = np.zeros_like(theta)
    for j in range(len(theta)):
        e = np.zeros_like(theta)
        e[j] = 1e-6
        fd[j] = (loglik(theta + e, False)[0] - loglik(theta - e, False)[0]) / 2e-6
    assert_close("random effects analytic vs finite-difference gradient", grad, fd, 1e-6)


def check_against_brute_force(case, animals, theta, grid):
    """The adapted rule against a non-adaptive integral of the first animal's likelihood:
    scipy.integrate.dblquad for 2 random effects, a 60-point-per-dimension Gauss-Legendre
    product rule for 3 (tplquad to 1e-10 takes ~10 minutes). The box is the mode +- 8 prior
    SDs; the posterior is narrower (H = B'WB + Sigma^-1 >= Sigma^-1) and log-concave."""
    p, q = len(case["beta_names"]), len(case["random"])
    a, b, n, y = animal_rows(case, animals[0])
    beta, chol, _ = unpack(theta, p, q)
    sigma = chol @ chol.T
    prec = np.linalg.inv(sigma)
    r_hat = animal_mode(a, b, n, y, beta, prec)

    def log_joint(r):  # r: (..., q), without the normalising constants
        return (row_terms(n, y, r @ b.T + a @ beta)[0].sum(-1)
                - 0.5 * np.einsum("...i,ij,...j->...", r, prec, r))

    g0 = log_joint(r_hat)
    lo, hi = r_hat - 8 * np.sqrt(np.diag(sigma)), r_hat + 8 * np.sqrt(np.diag(sigma))
    if q == 2:
        integral, _ = dblquad(lambda r1, r0: math.exp(log_joint(np.array([r0, r1])) - g0),
                              lo[0], hi[0], lo[1], hi[1], epsabs=0, epsrel=1e-11)
    else:
        x, w = leggauss(60)
        axes = [0.5 * (h - l) * x + 0.5 * (h + l) for l, h in zip(lo, hi)]
        weights = [0.5 * (h - l) * w for l, h in zip(lo, hi)]
        pts = np.stack(np.meshgrid(*axes, indexing="ij"), -1)
        wgt = np.einsum("i,j,k->ijk", *weights)
        integral = float(np.sum(wgt * np.exp(log_joint(pts) - g0)))
    brute = (math.log(integral) + g0 - np.sum(np.log(np.diag(chol))) - q * HALF_LOG_2PI)
    rule, _ = animal_marginal(a, b, n, y, theta, p, q, grid, want_grad=False)
    return assert_close(f"{case['name']} animal 0 adaptive rule vs brute force", rule, brute, 1e-9)


def check_interior(case, theta):
    p, q = len(case["beta_names"]), len(case["random"])
    sd, corr = sd_corr(theta, p, q)
    off = np.abs(corr[np.triu_indices(q, 1)])
    if np.min(sd) < SD_FLOOR or (off.size and np.max(off) > CORR_EDGE):
        raise AssertionError(f"{case['name']}: boundary optimum sd={sd} corr={off}; change the seed")


# ---------------------------------------------------------------------------------------
# One case's record.
# ---------------------------------------------------------------------------------------

def fit_case(case, animals):
    p, q = len(case["beta_names"]), len(case["random"])
    nodes = NODES_USED[q]
    start = start_values(case, animals)
    used = Marginal(case, animals, nodes)
    for probe_nodes in (1, 3, nodes):
        probe = used if probe_nodes == nodes else Marginal(case, animals, probe_nodes)
        check_gradient(probe, start + 0.05 * np.cos(np.arange(len(start))))
    theta, loglik, grad_max = maximise(used, start)
    check_interior(case, theta)
    # The same optimum from the simulation truth: no second local maximum nearby.
    truth = pack_sigma(np.array(case["truth_beta"]), np.array(case["truth_sd"]),
                       _truth_sigma(case["truth_sd"], case["truth_corr"])
                       / np.outer(case["truth_sd"], case["truth_sd"]))
    theta_t, _, _ = maximise(used, truth)
    assert_close(f"{case['name']} optimum from two starts", estimates_vector(theta_t, p, q),
                 estimates_vector(theta, p, q), 1e-9)
    est = estimates_vector(theta, p, q)
    brute_change = check_against_brute_force(case, animals, theta, used.grid)

    # Converged in the node count: a rule 4 nodes richer per dimension, fitted afresh from
    # the same start (not from the golden optimum, so the comparison is not trivially 0).
    check = Marginal(case, animals, NODES_CHECK[q])
    theta_c, loglik_c, _ = maximise(check, start)
    est_change = assert_close(f"{case['name']} estimates at {NODES_CHECK[q]} nodes",
                              estimates_vector(theta_c, p, q), est, ESTIMATE_CONVERGED)
    ll_change = assert_close(f"{case['name']} loglik at {NODES_CHECK[q]} nodes",
                             loglik_c, loglik, LOGLIK_CONVERGED)

    accuracy = []
    for k in NODES_COMPARED:
        theta_k, loglik_k, _ = maximise(Marginal(case, animals, k), start)
        accuracy.append({"nodes": k,
                         "max_abs_change": float(np.max(np.abs(estimates_vector(theta_k, p, q) - est))),
                         "loglik_abs_change": abs(loglik_k - loglik)})

    # Observed information in (beta, log-Cholesky); the beta block of its inverse does not
    # depend on how Sigma is parametrised (the gradient vanishes at the optimum).
    info = -fd_hessian(lambda t: used(t)[1], theta, HESSIAN_STEP)
    cov = np.linalg.inv(info)
    cov_2h = np.linalg.inv(-fd_hessian(lambda t: used(t)[1], theta, 2 * HESSIAN_STEP))
    assert_close(f"{case['name']} SEs at steps h and 2h", np.sqrt(np.diag(cov_2h))[:p],
                 np.sqrt(np.diag(cov))[:p], 1e-7)
    if np.min(np.linalg.eigvalsh(info)) <= 0:
        raise AssertionError(f"{case['name']}: observed information not positive definite")
    se = np.sqrt(np.diag(cov))[:p]

    hyp_name, contrast = case["hypothesis"]
    w = np.array([contrast.get(nm, 0.0) for nm in case["beta_names"]])
    basis = null_space(w[None, :])
    theta0, loglik0, grad0 = maximise(used, theta, basis)
    check_interior(case, theta0)
    theta0c, loglik0c, _ = maximise(check, theta, basis)
    assert_close(f"{case['name']} restricted loglik at {NODES_CHECK[q]} nodes", loglik0c,
                 loglik0, LOGLIK_CONVERGED)
    assert_close(f"{case['name']} restriction holds", w @ theta0[:p], 0.0, 1e-12)
    contrast_est = float(w @ theta[:p])
    contrast_se = math.sqrt(w @ cov[:p, :p] @ w)
    sd, corr = sd_corr(theta, p, q)
    names = case["random"]
    return {
        "estimate": {
            "beta": dict(zip(case["beta_names"], theta[:p])),
            "sd": dict(zip(names, sd)),
            "correlation": {f"{names[i]},{names[k]}": corr[i, k]
                            for i in range(q) for k in range(i + 1, q)},
            "loglik": loglik,
        },
        "se_beta": dict(zip(case["beta_names"], se)),
        "hypothesis": {
            "name": hyp_name, "contrast": contrast, "value": 0.0,
            "contrast_estimate": contrast_est, "se": contrast_se,
            "loglik_restricted": loglik0, "lr": 2.0 * (loglik - loglik0),
            "wald_z": contrast_est / contrast_se,
        },
        "node_accuracy": accuracy,
        "nodes_used": nodes,
        "checks": {
            "max_abs_gradient": grad_max, "max_abs_gradient_restricted": grad0,
            "check_nodes": NODES_CHECK[q], "check_max_abs_change": est_change,
            "check_loglik_abs_change": ll_change,
            "brute_force_animal_0_abs_change": brute_change,
        },
    }


def random_effects():
    cases = []
    for case in CASES:
        animals = simulate(case)
        record = fit_case(case, animals)
        cases.append({
            "name": case["name"], "conditions": case["conditions"], "groups": case["groups"],
            "random": case["random"], "animals": animals, "seed": case["seed"],
            "seed_note": case["seed_note"],
            "origin": "scipy",
            "simulation_truth": {
                "beta": dict(zip(case["beta_names"], case["truth_beta"])),
                "sd": dict(zip(case["random"], case["truth_sd"])),
                "correlation": {f"{case['random'][i]},{case['random'][k]}": v
                                for (i, k), v in sorted(case["truth_corr"].items())}},
            **record,
        })
        est = record["estimate"]
        print(f"  random effects {case['name']}: beta "
              + ", ".join(f"{k} {v:.6f}" for k, v in est["beta"].items())
              + ", SD " + ", ".join(f"{k} {v:.6f}" for k, v in est["sd"].items())
              + f", loglik {est['loglik']:.6f}")
    write_json("random_effects.json", {
        "meta": meta(
            "Random-effects (GLMM-equivalent) probit fits of invented yes/no counts by maximum "
            "marginal likelihood, each animal's integral by adaptive Gauss-Hermite quadrature.",
            {"model": "P(yes | present) = Phi(d/2 - c), P(yes | absent) = Phi(-d/2 - c); "
                      "single, few_trials: d_i = d_prime + a_i, c_i = criterion + b_i; "
                      "slope: d_ij = d_prime + a_i, c_i0 = criterion_0 + b_i, "
                      "c_i1 = criterion_1 + b_i + u_i; two_groups: d_i = d_prime + a_i, "
                      "c_i = criterion + difference*[group 1] + b_i; r_i ~ N(0, Sigma) "
                      "independent between animals, one Sigma for all groups",
             "animals": "counts per condition [n_present, hits, n_absent, false_alarms]; "
                        "invented, simulated with numpy.random.default_rng(seed) from "
                        "simulation_truth",
             "estimate.loglik": "maximised marginal log-likelihood sum_i log integral "
                                "exp(loglik_i(r)) N(r; 0, Sigma) dr; loglik_i = sum_j [h ln p_S "
                                "+ (n_S - h) ln(1 - p_S) + f ln p_N + (n_N - f) ln(1 - p_N)], "
                                "binomial coefficients LEFT OUT",
             "estimate.beta, sd, correlation": "the maximiser (scipy.optimize.minimize BFGS, "
                                               "gtol 1e-10, analytic gradient of the adapted "
                                               "rule, then Newton polish); Sigma parametrised "
                                               "internally by its lower Cholesky factor, row "
                                               "by row, diagonal on the log scale",
             "quadrature": "adaptive Gauss-Hermite product rule (numpy hermgauss): centre "
                           "r_hat = mode of g(r) = loglik_i(r) + log N(r; 0, Sigma), scale "
                           "S = lower Cholesky factor of H^-1, H = -grad^2 g(r_hat); nodes "
                           "r_hat + sqrt(2) S x_k; 1 node = Laplace",
             "nodes_used": "nodes per dimension of the golden values (20 for 2 random "
                           "effects, 12 for 3); refitting with 4 more per dimension moves "
                           "every estimate by < 1e-8 and the log-likelihood by < 1e-9 "
                           "(asserted; the changes are in checks)",
             "node_accuracy": "max |change| of any estimate (beta, SDs, correlations) of the "
                              "fit with that many nodes per dimension (each the exact "
                              "maximiser of its own adapted rule, same optimiser, same start) "
                              "against the golden fit; loglik_abs_change likewise",
             "se_beta": "sqrt of the beta diagonal of the inverse observed information: "
                        "central differences (step 1e-4 in beta and the log-Cholesky "
                        "entries) of the analytic gradient; agrees with step 2e-4 to 1e-7",
             "hypothesis": "loglik_restricted: the MLE with contrast.beta = value imposed "
                           "(Sigma free); lr = 2 (loglik - loglik_restricted); wald_z = "
                           "(contrast_estimate - value) / se, se from the full beta "
                           "covariance block",
             "checks": "max |gradient| at the optimum (asserted < 1e-6), the node-count "
                       "convergence changes, and |adapted rule - brute-force integral| of "
                       "animal 0's log marginal at the optimum (scipy.integrate.dblquad for "
                       "2 random effects, a 60^3 Gauss-Legendre box rule for 3; asserted "
                       "< 1e-9)",
             "origin": "every estimate, SE, log-likelihood and statistic: scipy (computed "
                       "here); counts: numpy simulation of invented data"},
            ["Liu & Pierce 1994, Biometrika 81:624-629 (adaptive Gauss-Hermite; from memory)",
             "Pinheiro & Bates 1995, J. Comput. Graph. Stat. 4:12-35 (from memory)",
             "Pinheiro & Bates 1996, Stat. Comput. 6:289-296 (log-Cholesky; from memory)"]),
        "cases": cases,
    })


if __name__ == "__main__":
    random_effects()
