"""Rating-design likelihood (Dorfman & Alf 1969), written by hand in NumPy/SciPy.

Model: evidence on absent trials ~ N(0, 1), on present trials ~ N(mu, sigma^2);
category k (0-based, 0 = lowest evidence) is chosen when k_k < x <= k_{k+1}, with
bounds -inf = k_0 < k_1 < ... < k_{K-1} < k_K = +inf.

  lnL = sum_k a_k ln[Phi(k_k) - Phi(k_{k-1})] + p_k ln[Phi((k_k-mu)/sigma) - Phi((k_{k-1}-mu)/sigma)]

(a_k absent counts, p_k present counts; no multinomial coefficient, so lnL equals the
per-trial log-likelihood sum that statsmodels reports.)

Natural parameters: theta = (mu, sigma, k_1, ..., k_{K-1}).
Search parameters:  phi   = (mu, ln sigma, k_1, ln(k_2 - k_1), ..., ln(k_{K-1} - k_{K-2})).
"""

import numpy as np
from scipy.optimize import minimize
from scipy.stats import norm


def _interval_probs(lower, upper):
    """Phi(upper) - Phi(lower), using upper tails where that keeps precision."""
    use_tail = lower > 0.0
    direct = norm.cdf(upper) - norm.cdf(lower)
    tail = norm.sf(lower) - norm.sf(upper)
    return np.where(use_tail, tail, direct)


def log_likelihood(theta, absent, present):
    """Dorfman-Alf lnL at natural parameters; -inf outside the parameter space."""
    theta = np.asarray(theta, dtype=float)
    mu, sigma, cuts = theta[0], theta[1], theta[2:]
    if sigma <= 0.0 or np.any(np.diff(cuts) <= 0.0):
        return -np.inf
    bounds = np.concatenate(([-np.inf], cuts, [np.inf]))
    p_absent = _interval_probs(bounds[:-1], bounds[1:])
    z = (bounds - mu) / sigma
    p_present = _interval_probs(z[:-1], z[1:])
    total = 0.0
    for counts, probs in ((absent, p_absent), (present, p_present)):
        counts = np.asarray(counts, dtype=float)
        used = counts > 0
        if np.any(probs[used] <= 0.0):
            return -np.inf
        total += float(np.sum(counts[used] * np.log(probs[used])))
    return total


def gradient(theta, absent, present):
    """Analytic gradient of lnL with respect to theta = (mu, sigma, k_1..k_{K-1})."""
    theta = np.asarray(theta, dtype=float)
    mu, sigma, cuts = theta[0], theta[1], theta[2:]
    absent = np.asarray(absent, dtype=float)
    present = np.asarray(present, dtype=float)
    n_cuts = cuts.size
    bounds = np.concatenate(([-np.inf], cuts, [np.inf]))
    z = (bounds - mu) / sigma
    p_absent = _interval_probs(bounds[:-1], bounds[1:])
    p_present = _interval_probs(z[:-1], z[1:])
    ratio_a = absent / p_absent
    ratio_p = present / p_present
    # Density at each finite cut; z*phi(z) at the cuts (both vanish at +-inf).
    phi_a = norm.pdf(cuts)
    phi_p = norm.pdf(z[1:-1])
    zphi_p = z[1:-1] * phi_p
    grad = np.zeros(2 + n_cuts)
    # Cut j (1-based) is the upper bound of category j-1 and the lower bound of category j.
    for j in range(n_cuts):
        grad[2 + j] += (ratio_a[j] - ratio_a[j + 1]) * phi_a[j]
        grad[2 + j] += (ratio_p[j] - ratio_p[j + 1]) * phi_p[j] / sigma
        # d u_j / d mu = -1/sigma, d u_j / d sigma = -u_j / sigma.
        grad[0] += -(ratio_p[j] - ratio_p[j + 1]) * phi_p[j] / sigma
        grad[1] += -(ratio_p[j] - ratio_p[j + 1]) * zphi_p[j] / sigma
    return grad


def natural_from_search(phi):
    """phi = (mu, ln sigma, k_1, ln gaps) -> theta = (mu, sigma, k_1..k_{K-1})."""
    phi = np.asarray(phi, dtype=float)
    cuts = np.cumsum(np.concatenate((phi[2:3], np.exp(phi[3:]))))
    return np.concatenate(([phi[0], np.exp(phi[1])], cuts))


def search_from_natural(theta):
    theta = np.asarray(theta, dtype=float)
    cuts = theta[2:]
    return np.concatenate(([theta[0], np.log(theta[1]), cuts[0]], np.log(np.diff(cuts))))


def _search_gradient(phi, absent, present):
    """Chain rule from the natural-scale gradient to the search parameters."""
    theta = natural_from_search(phi)
    g = gradient(theta, absent, present)
    out = np.empty_like(g)
    out[0] = g[0]
    out[1] = g[1] * theta[1]
    cut_grad = g[2:]
    tail_sums = np.cumsum(cut_grad[::-1])[::-1]
    out[2] = tail_sums[0]
    out[3:] = np.exp(phi[3:]) * tail_sums[1:]
    return out


def hessian_from_values(func, x, rel_step=1e-4):
    """Central finite-difference Hessian from function values only.

    H_ij = [f(x+h_i+h_j) - f(x+h_i-h_j) - f(x-h_i+h_j) + f(x-h_i-h_j)] / (4 h_i h_j).
    """
    x = np.asarray(x, dtype=float)
    steps = rel_step * np.maximum(1.0, np.abs(x))
    n = x.size
    hess = np.zeros((n, n))
    for i in range(n):
        for j in range(i, n):
            ei = np.zeros(n)
            ej = np.zeros(n)
            ei[i] = steps[i]
            ej[j] = steps[j]
            value = (
                func(x + ei + ej) - func(x + ei - ej) - func(x - ei + ej) + func(x - ei - ej)
            ) / (4.0 * steps[i] * steps[j])
            hess[i, j] = hess[j, i] = value
    return hess


def jacobian_of_gradient(grad, x, rel_step=1e-6):
    """Central differences of an analytic gradient, symmetrised (cross-check Hessian)."""
    x = np.asarray(x, dtype=float)
    steps = rel_step * np.maximum(1.0, np.abs(x))
    n = x.size
    jac = np.zeros((n, n))
    for i in range(n):
        e = np.zeros(n)
        e[i] = steps[i]
        jac[:, i] = (grad(x + e) - grad(x - e)) / (2.0 * steps[i])
    return 0.5 * (jac + jac.T)


def starting_points(absent, present):
    """zROC least squares on log-linear corrected cumulative rates, plus perturbations."""
    absent = np.asarray(absent, dtype=float)
    present = np.asarray(present, dtype=float)
    # Rate of responding in category > k, for k = 0..K-2.
    fa = (np.cumsum(absent[::-1])[::-1][1:] + 0.5) / (absent.sum() + 1.0)
    hit = (np.cumsum(present[::-1])[::-1][1:] + 0.5) / (present.sum() + 1.0)
    z_f = norm.ppf(fa)
    z_h = norm.ppf(hit)
    slope, intercept = np.polyfit(z_f, z_h, 1) if z_f.size > 1 else (1.0, z_h[0] - z_f[0])
    slope = float(np.clip(slope, 0.3, 3.0))
    sigma0 = 1.0 / slope
    mu0 = intercept * sigma0
    cuts0 = np.sort(-z_f)
    cuts0 = cuts0 + np.arange(cuts0.size) * 1e-3  # keep them strictly increasing
    starts = []
    for sigma_scale in (1.0, 0.7, 1.4):
        for mu_shift in (0.0, -0.3, 0.3):
            theta = np.concatenate(([mu0 + mu_shift, sigma0 * sigma_scale], cuts0))
            starts.append(search_from_natural(theta))
    return starts


def newton_polish(loglik, grad, theta, steps=20):
    """Newton steps with the finite-difference Jacobian of the analytic gradient;
    a step is kept only if lnL does not go down."""
    best = np.asarray(theta, dtype=float)
    best_ll = loglik(best)
    for _ in range(steps):
        g = grad(best)
        if np.max(np.abs(g)) < 1e-11:
            break
        step = np.linalg.solve(jacobian_of_gradient(grad, best), -g)
        candidate = best + step
        cand_ll = loglik(candidate)
        if not np.isfinite(cand_ll) or cand_ll < best_ll - 1e-12:
            break
        best, best_ll = candidate, cand_ll
    return best


def equal_variance_loglik(theta_eq, absent, present):
    """lnL with sigma = 1 at theta_eq = (d', k_1..k_{K-1})."""
    theta_eq = np.asarray(theta_eq, dtype=float)
    return log_likelihood(np.concatenate(([theta_eq[0], 1.0], theta_eq[1:])), absent, present)


def equal_variance_gradient(theta_eq, absent, present):
    theta_eq = np.asarray(theta_eq, dtype=float)
    g = gradient(np.concatenate(([theta_eq[0], 1.0], theta_eq[1:])), absent, present)
    return np.concatenate(([g[0]], g[2:]))


def fit_unequal_variance(absent, present):
    """Maximise lnL over (mu, sigma, cuts): BFGS (analytic gradient) from several starts,
    a Nelder-Mead polish of each, then Newton steps; keep the best lnL."""
    def objective(phi):
        value = log_likelihood(natural_from_search(phi), absent, present)
        return np.inf if not np.isfinite(value) else -value

    def objective_grad(phi):
        return -_search_gradient(phi, absent, present)

    results = []
    for start in starting_points(absent, present):
        bfgs = minimize(objective, start, jac=objective_grad, method="BFGS",
                        options={"gtol": 1e-10, "maxiter": 10000})
        polish = minimize(objective, bfgs.x, method="Nelder-Mead",
                          options={"xatol": 1e-10, "fatol": 1e-12, "maxiter": 20000,
                                   "maxfev": 40000, "adaptive": True})
        phi = polish.x if polish.fun <= bfgs.fun else bfgs.x
        theta = newton_polish(lambda t: log_likelihood(t, absent, present),
                              lambda t: gradient(t, absent, present),
                              natural_from_search(phi))
        results.append((log_likelihood(theta, absent, present), theta))
    results.sort(key=lambda item: -item[0])
    best_ll, best_theta = results[0]
    spread = max(best_ll - ll for ll, _ in results)
    return best_theta, best_ll, len(results), spread


def fit_equal_variance(absent, present):
    """The same likelihood with sigma fixed at 1, fitted by BFGS then Newton steps
    (an independent check of the statsmodels ordinal probit fit)."""
    def full(search):
        return np.concatenate(([search[0], 0.0], search[1:]))

    def objective(search):
        value = log_likelihood(natural_from_search(full(search)), absent, present)
        return np.inf if not np.isfinite(value) else -value

    def objective_grad(search):
        g = _search_gradient(full(search), absent, present)
        return -np.concatenate(([g[0]], g[2:]))

    start = starting_points(absent, present)[0]
    start = np.concatenate(([start[0]], start[2:]))
    fit = minimize(objective, start, jac=objective_grad, method="BFGS",
                   options={"gtol": 1e-10, "maxiter": 10000})
    theta = natural_from_search(full(fit.x))
    theta_eq = np.concatenate(([theta[0]], theta[2:]))
    return newton_polish(lambda t: equal_variance_loglik(t, absent, present),
                         lambda t: equal_variance_gradient(t, absent, present),
                         theta_eq)
