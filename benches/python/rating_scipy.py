"""The rating benchmark's work in Python with SciPy's general optimiser, for comparison.

Not part of the test suite. Same invented scenario as benches/rating.rs: K = 5, d' = 1.5,
sigma = 1.25, criteria (absolute) -0.5, 0.25, 1.0, 1.75, 50 present and 50 absent trials,
log-linear correction (+0.5 per cell). Each replicate draws multinomial counts, maximises
the Dorfman & Alf (1969) likelihood with scipy.optimize.minimize (BFGS, analytic-free), and
takes SEs from BFGS's inverse-Hessian estimate.

Run (uses the golden-file venv, which has numpy and scipy):
    bash tests/golden/regenerate.sh   # once, creates target/golden-venv
    target/golden-venv/bin/python benches/python/rating_scipy.py
"""

import time

import numpy as np
import scipy
from scipy.optimize import minimize
from scipy.stats import norm

MU, SIGMA = 1.5, 1.25
CRITERIA = np.array([-0.5, 0.25, 1.0, 1.75])
N_ABSENT = N_PRESENT = 50
REPLICATES = 300


def cell_probs(mu, sigma, k):
    edges = np.concatenate(([-np.inf], k, [np.inf]))
    absent = np.diff(norm.cdf(edges))
    present = np.diff(norm.cdf((edges - mu) / sigma))
    return absent, present


def neg_loglik(theta, a, p):
    mu, sigma = theta[0], np.exp(theta[1])
    k = np.cumsum(np.concatenate(([theta[2]], np.exp(theta[3:]))))
    pa, pp = cell_probs(mu, sigma, k)
    if np.any(pa <= 0) or np.any(pp <= 0):
        return np.inf
    return -(a @ np.log(pa) + p @ np.log(pp))


def start(a, p):
    fa = 1 - np.cumsum(a)[:-1] / a.sum()
    hp = 1 - np.cumsum(p)[:-1] / p.sum()
    zf, zh = norm.ppf(fa), norm.ppf(hp)
    slope, intercept = np.polyfit(zf, zh, 1)
    sigma = np.clip(1 / slope, 0.2, 5)
    k = -zf
    return np.concatenate(([intercept * sigma, np.log(sigma), k[0]], np.log(np.maximum(np.diff(k), 1e-3))))


def main():
    rng = np.random.default_rng(11)
    pa, pp = cell_probs(MU, SIGMA, CRITERIA)
    t0 = time.perf_counter()
    converged = 0
    for _ in range(REPLICATES):
        a = rng.multinomial(N_ABSENT, pa) + 0.5
        p = rng.multinomial(N_PRESENT, pp) + 0.5
        res = minimize(neg_loglik, start(a, p), args=(a, p), method="BFGS")
        converged += bool(res.success)
        _ = np.sqrt(np.diag(res.hess_inv))
    elapsed = time.perf_counter() - t0
    print(f"numpy {np.__version__}, scipy {scipy.__version__}")
    print(f"{REPLICATES} datasets in {elapsed:.2f} s: {REPLICATES / elapsed:.0f} per second "
          f"({converged} converged)")


if __name__ == "__main__":
    main()
