"""Golden files for rating (graded-response) designs; called from generate.py.

All datasets below are invented for these checks (counts per response category,
category 0 = lowest evidence, i.e. most confident "absent").
"""

import math
import warnings

import numpy as np
from scipy.stats import norm
from statsmodels.miscmodels.ordinal_model import OrderedModel

from golden_support import assert_close, meta, write_json
from rating_likelihood import (
    equal_variance_gradient,
    equal_variance_loglik,
    fit_equal_variance,
    fit_unequal_variance,
    gradient,
    hessian_from_values,
    jacobian_of_gradient,
    log_likelihood,
)

EQUAL_VARIANCE_DATA = [  # (name, absent counts, present counts); invented
    ("ev_k3", [40, 25, 15], [12, 20, 48]),
    ("ev_k4", [30, 25, 15, 10], [8, 12, 20, 40]),
    ("ev_k4_weak", [55, 30, 10, 5], [20, 25, 30, 25]),
    ("ev_k5", [22, 18, 12, 6, 2], [4, 7, 12, 17, 20]),
    ("ev_k5_zero_cell", [35, 20, 10, 5, 0], [3, 6, 12, 19, 30]),
    ("ev_k6", [28, 22, 17, 14, 11, 8], [6, 9, 12, 16, 24, 33]),
]

UNEQUAL_VARIANCE_DATA = [  # invented; present trials more spread out than absent ones
    ("uv_k3", [45, 30, 25], [20, 20, 60]),
    ("uv_k4", [50, 30, 15, 5], [15, 15, 25, 45]),
    ("uv_k5", [40, 30, 15, 10, 5], [12, 10, 15, 23, 40]),
    ("uv_k5_shallow", [60, 25, 10, 4, 1], [25, 15, 15, 20, 25]),
    ("uv_k6", [20, 30, 25, 12, 8, 5], [4, 6, 10, 18, 22, 40]),
    # Mirror-image counts: by symmetry the MLE has sigma = 1 and k_j + k_{K-j} = mu.
    ("uv_k6_symmetric", [30, 25, 20, 12, 8, 5], [5, 8, 12, 20, 25, 30]),
    ("uv_k6_zero_cell", [25, 30, 20, 15, 10, 0], [2, 5, 10, 18, 30, 35]),
    # Only one criterion has both cumulative rates strictly inside (0, 1), yet the maximum
    # is interior: every absent count sits below the top category, no present count below
    # category 2.
    ("uv_k5_one_interior_criterion", [9, 6, 5, 4, 0], [0, 0, 3, 5, 8]),
    # Rows that overlap in the middle two categories only; interior maximum, sigma = 1 by
    # the mirror symmetry of the counts.
    ("uv_k4_overlap_middle", [3, 3, 3, 0], [0, 3, 3, 3]),
]


def _per_trial(absent, present):
    """Expand category counts into per-trial (category, present indicator) arrays."""
    categories = np.arange(len(absent))
    y = np.concatenate([np.repeat(categories, absent), np.repeat(categories, present)])
    x = np.concatenate([np.zeros(sum(absent)), np.ones(sum(present))])[:, None]
    return y, x


def _threshold_jacobian(params):
    """d(d', k_1..k_{K-1}) / d(d', k_1, ln(k_2-k_1), ...): the delta-method Jacobian."""
    n = params.size
    jac = np.zeros((n, n))
    jac[0, 0] = 1.0
    for row in range(1, n):  # row r holds cut k_r = k_1 + sum_{i=2..r} exp(params[i])
        jac[row, 1] = 1.0
        for col in range(2, row + 1):
            jac[row, col] = math.exp(params[col])
    return jac


def _fit_ordered_probit(absent, present):
    y, x = _per_trial(absent, present)
    model = OrderedModel(y, x, distr="probit")
    with warnings.catch_warnings():
        # BFGS often ends with "precision loss" at gtol=1e-9; the gradient is checked below.
        warnings.simplefilter("ignore")
        result = model.fit(method="bfgs", maxiter=10000, gtol=1e-9, disp=False)
    return model, result


def rating_equal_variance():
    """(f) Equal-variance rating model as an ordinal probit (statsmodels OrderedModel)."""
    cases = []
    for name, absent, present in EQUAL_VARIANCE_DATA:
        model, result = _fit_ordered_probit(absent, present)
        params = np.asarray(result.params, dtype=float)
        criteria = model.transform_threshold_params(params)[1:-1]
        natural = np.concatenate(([params[0]], criteria))
        cov_model = np.asarray(result.cov_params(), dtype=float)
        jac = _threshold_jacobian(params)
        cov_natural = jac @ cov_model @ jac.T
        cov_natural = 0.5 * (cov_natural + cov_natural.T)  # drop rounding asymmetry

        # Independent checks with the hand-written likelihood on the natural scale.
        assert_close(f"{name} lnL", equal_variance_loglik(natural, absent, present),
                     result.llf, 1e-8)
        grad_max = float(np.max(np.abs(equal_variance_gradient(natural, absent, present))))
        if grad_max > 1e-5:
            raise AssertionError(f"{name}: statsmodels optimum gradient {grad_max}")
        own = fit_equal_variance(absent, present)
        assert_close(f"{name} own fit vs statsmodels", own, natural, 1e-6)
        hess = hessian_from_values(lambda t: -equal_variance_loglik(t, absent, present),
                                   natural)
        cov_fd = np.linalg.inv(hess)
        assert_close(f"{name} SE delta method vs FD Hessian",
                     np.sqrt(np.diag(cov_natural)), np.sqrt(np.diag(cov_fd)), 1e-4)
        assert_close(f"{name} covariance vs FD Hessian", cov_natural, cov_fd, 1e-4)

        se = np.sqrt(np.diag(cov_natural))
        cases.append({
            "name": name, "K": len(absent), "absent_counts": absent,
            "present_counts": present, "d_prime": params[0], "criteria": criteria,
            "loglik": result.llf, "se_d_prime": math.sqrt(cov_model[0, 0]),
            "se_criteria": se[1:], "cov_natural": cov_natural,
            "model_params": params, "cov_model_params": cov_model,
            "check_gradient_max_abs": grad_max,
        })
    write_json("rating_equal_variance.json", {
        "meta": meta(
            "Equal-variance rating model (absent ~ N(0,1), present ~ N(d',1), category k "
            "chosen when k_k < x <= k_{k+1}) fitted as an ordered probit: statsmodels "
            "OrderedModel(y, present_indicator, distr='probit'), no constant, fitted by "
            "BFGS (gtol 1e-9) on the expanded per-trial data (OrderedModel takes no "
            "frequency weights). Datasets are invented.",
            {"absent_counts, present_counts": "trials per category, category 0 = lowest "
                                              "evidence (most confident 'absent')",
             "d_prime": "coefficient of the present indicator (= mean of present evidence)",
             "criteria": "cut points k_1 < ... < k_{K-1} on the evidence axis (absent mean "
                         "at 0) from model.transform_threshold_params",
             "loglik": "result.llf = sum over trials of ln P(category) (no multinomial "
                       "coefficient); equals the hand-written Dorfman-Alf lnL with sigma=1",
             "model_params": "statsmodels scale: (d', k_1, ln(k_2-k_1), ..., "
                             "ln(k_{K-1}-k_{K-2}))",
             "cov_model_params": "result.cov_params() on the statsmodels scale",
             "se_d_prime": "sqrt(cov_model_params[0][0])",
             "cov_natural": "J cov_model_params J^T, order (d', k_1..k_{K-1}), J = "
                            "d(natural)/d(model_params): dk_r/dk_1 = 1, dk_r/dln(gap_i) "
                            "= gap_i for i <= r (delta method)",
             "se_criteria": "sqrt of the criteria diagonal of cov_natural",
             "check_gradient_max_abs": "max |d lnL / d(d', k)| at the statsmodels optimum, "
                                       "analytic gradient of the hand-written lnL",
             "verification": "asserted before writing: own BFGS+Newton fit of the "
                             "hand-written lnL agrees to 1e-6; SEs and cov_natural agree to "
                             "1e-4 with the inverse of a central finite-difference Hessian "
                             "(function values, step 1e-4 * max(1,|x|)) of -lnL on the "
                             "natural scale"},
            ["Dorfman & Alf 1969, J. Math. Psychol. 6:487-496 (likelihood)",
             "statsmodels OrderedModel (ordinal probit)"]),
        "cases": cases,
    })


def _fitted_probs(theta):
    mu, sigma, cuts = theta[0], theta[1], theta[2:]
    bounds = np.concatenate(([-np.inf], cuts, [np.inf]))
    return np.diff(norm.cdf(bounds)), np.diff(norm.cdf((bounds - mu) / sigma))


def rating_unequal_variance():
    """(g) Unequal-variance rating model by direct maximisation of the Dorfman-Alf lnL."""
    cases = []
    for name, absent, present in UNEQUAL_VARIANCE_DATA:
        theta, loglik, n_starts, spread = fit_unequal_variance(absent, present)
        grad = gradient(theta, absent, present)
        grad_max = float(np.max(np.abs(grad)))
        if grad_max >= 1e-6:
            raise AssertionError(f"{name}: gradient at optimum {grad_max} >= 1e-6")
        neg_ll = lambda t: -log_likelihood(t, absent, present)  # noqa: E731
        cov = np.linalg.inv(hessian_from_values(neg_ll, theta))
        cov = 0.5 * (cov + cov.T)  # drop rounding asymmetry of the inverse
        cov_check = np.linalg.inv(
            jacobian_of_gradient(lambda t: -gradient(t, absent, present), theta))
        assert_close(f"{name} SE value-Hessian vs gradient-Jacobian",
                     np.sqrt(np.diag(cov)), np.sqrt(np.diag(cov_check)), 1e-5)
        k = len(absent)
        if k == 3:  # 4 parameters, 4 free cell probabilities: the fit is saturated
            p_abs, p_pres = _fitted_probs(theta)
            assert_close(f"{name} saturated fit", np.concatenate((p_abs, p_pres)),
                         np.concatenate((np.array(absent) / sum(absent),
                                         np.array(present) / sum(present))), 1e-7)
        mu, sigma = theta[0], theta[1]
        if name.endswith("_symmetric"):
            assert_close(f"{name} sigma", sigma, 1.0, 1e-8)
            assert_close(f"{name} mirrored criteria", theta[2:] + theta[2:][::-1],
                         np.full(k - 1, mu), 1e-8)
        d_a = mu / math.sqrt((1.0 + sigma**2) / 2.0)
        se = np.sqrt(np.diag(cov))
        cases.append({
            "name": name, "K": k, "absent_counts": absent, "present_counts": present,
            "mu": mu, "sigma": sigma, "criteria": theta[2:], "loglik": loglik,
            "se_mu": se[0], "se_sigma": se[1], "se_criteria": se[2:], "cov_natural": cov,
            "zroc_intercept": mu / sigma, "zroc_slope": 1.0 / sigma,
            "d_a": d_a, "A_z": norm.cdf(d_a / math.sqrt(2.0)),
            "gradient_max_abs": grad_max, "n_starts": n_starts,
            "loglik_spread_across_starts": spread, "saturated": k == 3,
        })
    write_json("rating_unequal_variance.json", {
        "meta": meta(
            "Unequal-variance rating model (absent ~ N(0,1), present ~ N(mu, sigma^2)) "
            "fitted by maximising the Dorfman-Alf log-likelihood with "
            "scipy.optimize.minimize. Datasets are invented.",
            {"loglik": "sum_k a_k ln[Phi(k_k)-Phi(k_{k-1})] + p_k ln[Phi((k_k-mu)/sigma) "
                       "- Phi((k_{k-1}-mu)/sigma)], k_0 = -inf, k_K = +inf (no "
                       "multinomial coefficient)",
             "mu, sigma, criteria": "maximum-likelihood estimates; search over (mu, "
                                    "ln sigma, k_1, ln gaps): BFGS with analytic gradient "
                                    "(gtol 1e-10) from n_starts starts, Nelder-Mead polish "
                                    "(xatol 1e-10, fatol 1e-12), then Newton steps on the "
                                    "natural scale; best lnL kept",
             "gradient_max_abs": "max |d lnL/d(mu, sigma, k)| at the optimum; asserted < 1e-6",
             "cov_natural": "inverse of the central finite-difference Hessian (function "
                            "values, step 1e-4 * max(1,|x|)) of -lnL, order (mu, sigma, "
                            "k_1..k_{K-1}); asserted to agree to 1e-5 in SE with the "
                            "finite-difference Jacobian of the analytic gradient",
             "se_mu, se_sigma, se_criteria": "square roots of the cov_natural diagonal",
             "zroc_intercept, zroc_slope": "mu/sigma, 1/sigma",
             "d_a": "mu / sqrt((1 + sigma^2)/2) (Simpson & Fitter 1973)",
             "A_z": "Phi(d_a / sqrt(2))",
             "saturated": "K = 3: as many parameters as free cell probabilities; fitted "
                          "probabilities asserted equal to the observed proportions",
             "loglik_spread_across_starts": "best lnL minus the worst start's final lnL",
             "uv_k6_symmetric": "present counts mirror the absent counts, so sigma = 1 "
                                "and k_j + k_{K-j} = mu at the MLE (asserted to 1e-8)"},
            ["Dorfman & Alf 1969, J. Math. Psychol. 6:487-496",
             "Simpson & Fitter 1973, Psychol. Bull. 80:481-488"]),
        "cases": cases,
    })
