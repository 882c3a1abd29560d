"""Golden files for error-total records (misses + false alarms); called from generate.py."""

import math

import numpy as np
from scipy.stats import binom, norm

from golden_support import assert_close, assert_printed, meta, write_json

REFS = "tabulated"  # a check value fixed in advance and asserted to its stated precision


def _error_cells(theta, pi):
    d, c = theta
    h = norm.cdf(d / 2.0 - c)
    f = norm.cdf(-d / 2.0 - c)
    p1 = (1.0 - pi) * f
    p2 = pi * (1.0 - h)
    return np.array([p1, p2, 1.0 - p1 - p2])


def error_totals_information():
    """(i) Expected Fisher information of the error-totals record."""
    cases = []
    for d, c, pi, n in [(1.5, 0.3, 0.5, 100), (1.0, -0.2, 0.2, 200), (2.0, 0.5, 0.7, 60)]:
        theta = np.array([d, c])
        step = 1e-6
        jac = np.column_stack([
            (_error_cells(theta + e, pi) - _error_cells(theta - e, pi)) / (2 * step)
            for e in np.eye(2) * step])
        # Analytic check: dH/dd = phi_h/2, dH/dc = -phi_h, dF/dd = -phi_f/2, dF/dc = -phi_f.
        phi_h, phi_f = norm.pdf(d / 2 - c), norm.pdf(-d / 2 - c)
        d_p1 = (1 - pi) * np.array([-phi_f / 2, -phi_f])
        d_p2 = -pi * np.array([phi_h / 2, -phi_h])
        assert_close(f"error cells {d},{c} jacobian", jac,
                     np.vstack([d_p1, d_p2, -d_p1 - d_p2]), 1e-8)
        probs = _error_cells(theta, pi)
        info = n * (jac.T / probs) @ jac
        cov = np.linalg.inv(info)
        cases.append({"d_prime": d, "c": c, "pi": pi, "N": n,
                      "cell_probs": probs, "cell_jacobian": jac,
                      "information": info, "covariance": cov,
                      "se_d_prime": math.sqrt(cov[0, 0]), "se_c": math.sqrt(cov[1, 1]),
                      "correlation": cov[0, 1] / math.sqrt(cov[0, 0] * cov[1, 1])})
    write_json("error_totals_information.json", {
        "meta": meta(
            "Expected Fisher information for (d', c) when each of N encounters only "
            "records false alarm / miss / correct (stimulus present with known "
            "probability pi).",
            {"cell_probs": "[false alarm p1 = (1-pi)F, miss p2 = pi(1-H), correct "
                           "1-p1-p2], H = Phi(d'/2 - c), F = Phi(-d'/2 - c)",
             "cell_jacobian": "3x2 rows = cells, columns = (d', c); central differences "
                              "with step 1e-6, asserted within 1e-8 of the analytic "
                              "derivatives",
             "information": "N * sum_cells (dp/dtheta)(dp/dtheta)^T / p (2x2, order d', c)",
             "covariance": "inverse of information", "se_d_prime": "sqrt(covariance[0][0])",
             "se_c": "sqrt(covariance[1][1])", "correlation": "of (d', c) estimates"},
            ["Multinomial expected information (textbook likelihood theory, common "
             "practice)"]),
        "cases": cases,
    })


def error_total_pmf():
    """(j) Distribution of misses + false alarms by convolution."""
    cases = []
    for d, c, n_s, n_n in [(1.5, 0.3, 50, 50), (1.5, 0.0, 50, 50), (1.0, -0.4, 30, 70)]:
        p_miss = norm.cdf(c - d / 2.0)
        p_fa = norm.cdf(-d / 2.0 - c)
        pmf = np.convolve(binom.pmf(np.arange(n_s + 1), n_s, p_miss),
                          binom.pmf(np.arange(n_n + 1), n_n, p_fa))
        support = np.arange(pmf.size)
        mean = float(support @ pmf)
        var = float(((support - mean) ** 2) @ pmf)
        cdf_20 = float(pmf[:21].sum())
        if c == 0.0:
            assert_close("c=0 total is binomial", pmf,
                         binom.pmf(support, n_s + n_n, norm.cdf(-d / 2.0)), 1e-12)
        if (d, c, n_s, n_n) == (1.5, 0.3, 50, 50):
            assert_printed("error total E", mean, 23.660714)
            assert_printed("error total Var", var, 17.256948)
            assert_printed("error total P(<=20)", cdf_20, 0.225821)
        cases.append({"d_prime": d, "c": c, "n_present": n_s, "n_absent": n_n,
                      "p_miss": p_miss, "p_false_alarm": p_fa, "mean": mean,
                      "variance": var, "p_total_le_20": cdf_20, "pmf": pmf,
                      "origin": REFS if (d, c) == (1.5, 0.3) else "chosen"})
    write_json("error_total_pmf.json", {
        "meta": meta(
            "Distribution of the error total (misses + false alarms).",
            {"p_miss": "Phi(c - d'/2)", "p_false_alarm": "Phi(-d'/2 - c)",
             "pmf": "numpy.convolve of Bin(n_present, p_miss) and Bin(n_absent, "
                    "p_false_alarm) pmfs (scipy.stats.binom.pmf); index = total errors",
             "mean": "sum k pmf[k]", "variance": "sum (k - mean)^2 pmf[k]",
             "p_total_le_20": "sum_{k<=20} pmf[k]"},
            ["Convolution of independent binomials (common practice); with c = 0 the "
             "total is Bin(n_present + n_absent, Phi(-d'/2)) (asserted)"]),
        "cases": cases,
    })
