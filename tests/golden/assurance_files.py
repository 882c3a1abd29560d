"""Golden file for assurance (expected power over a prior); called from generate.py.

Assurance = integral of power(theta) * prior density(theta) (O'Hagan, Stevens & Campbell
2005, Pharmaceutical Statistics 4:187-201), with the normal-approximation Wald power curve
(two-sided: Phi(d/s - z) + Phi(-d/s - z), z = norm.ppf(1 - alpha/2); one-sided 'greater':
Phi(d/s - z), z = norm.ppf(1 - alpha)), integrated with scipy.integrate.quad over a normal
or truncated normal (scipy.stats.truncnorm) prior of the effect d.

Run alone: `target/golden-venv/bin/python tests/golden/assurance_files.py` (from tests/golden).
"""

import math

import numpy as np
from scipy.integrate import quad
from scipy.stats import norm, truncnorm

from golden_support import assert_close, meta, write_json


def power(d, se, alpha, sided):
    if sided == "two-sided":
        z = norm.ppf(1 - alpha / 2)
        return norm.cdf(d / se - z) + norm.cdf(-d / se - z)
    z = norm.ppf(1 - alpha)
    return norm.cdf(d / se - z)


def assurance_case(mean, sd, low, high, se, alpha, sided):
    a, b = (low - mean) / sd, (high - mean) / sd
    prior = truncnorm(a, b, loc=mean, scale=sd)
    lo = max(low, mean - 12 * sd)
    hi = min(high, mean + 12 * sd)
    value, err = quad(lambda d: power(d, se, alpha, sided) * prior.pdf(d), lo, hi,
                      epsabs=1e-13, epsrel=1e-12, limit=200)
    assert err < 1e-9, err
    if sided == "greater" and math.isinf(low) and math.isinf(high):
        # Closed form for the one-sided z test under a normal prior (common practice):
        # Phi((m - z s)/sqrt(s^2 + v)).
        closed = norm.cdf((mean - norm.ppf(1 - alpha) * se) / math.sqrt(se**2 + sd**2))
        assert_close("one-sided closed form", value, closed, 1e-9)
    return {"mean": mean, "sd": sd, "low": low if np.isfinite(low) else None,
            "high": high if np.isfinite(high) else None, "se": se, "alpha": alpha,
            "sided": sided, "point_power": power(mean, se, alpha, sided), "assurance": value}


def assurance():
    inf = math.inf
    cases = [
        assurance_case(0.3, 0.1, -inf, inf, 0.12, 0.05, "two-sided"),
        assurance_case(0.3, 0.1, -inf, inf, 0.12, 0.05, "greater"),
        assurance_case(0.5, 0.25, -inf, inf, 0.2, 0.05, "two-sided"),
        assurance_case(0.2, 0.15, 0.0, inf, 0.1, 0.05, "two-sided"),
        assurance_case(-0.25, 0.19, -inf, inf, 0.09, 0.05, "two-sided"),
    ]
    write_json("assurance.json", {
        "meta": meta(
            "Assurance of a Wald test: normal-approximation power averaged over a normal or "
            "truncated-normal prior of the effect.",
            {"point_power": "power at the prior mean",
             "assurance": "scipy.integrate.quad of power(d) * truncnorm.pdf(d) over the prior's "
                          "range (clipped at mean +/- 12 sd)",
             "low/high": "truncation bounds (null = none)"},
            ["O'Hagan, Stevens & Campbell 2005, Pharmaceutical Statistics 4:187-201 "
             "(definition; one-sided closed form from common practice)"]),
        "cases": cases,
    })




def yes_no_c_se(d_prime, c, n_present, n_absent):
    """SE of the criterion estimate c = -(z(H) + z(F))/2 of a yes/no table by the delta
    method (Gourevitch & Galanter 1967): the inverse expected information of the binomial
    pair at H = Phi(d'/2 - c), F = Phi(-d'/2 - c)."""
    h, f = norm.cdf(d_prime / 2 - c), norm.cdf(-d_prime / 2 - c)
    var_zh = h * (1 - h) / (n_present * norm.pdf(norm.ppf(h)) ** 2)
    var_zf = f * (1 - f) / (n_absent * norm.pdf(norm.ppf(f)) ** 2)
    return math.sqrt(var_zh + var_zf) / 2


def plan_case(d_prime, trials, mean, sd, low, high, alpha, sided):
    """Assurance of a one-animal yes/no bias test (c against 0) at `trials` per condition
    (presence 0.5) when c is uncertain: the Wald power is recomputed at every c (its SE
    depends on c), then averaged over the truncated-normal prior with quad."""
    n = trials // 2

    def pw(c):
        se = yes_no_c_se(d_prime, c, n, trials - n)
        if sided == "less":
            return norm.cdf(-c / se - norm.ppf(1 - alpha))
        return power(c, se, alpha, sided)

    a, b = (low - mean) / sd, (high - mean) / sd
    prior = truncnorm(a, b, loc=mean, scale=sd)
    lo, hi = max(low, mean - 12 * sd), min(high, mean + 12 * sd)
    value, err = quad(lambda c: pw(c) * prior.pdf(c), lo, hi, epsabs=1e-13, epsrel=1e-12,
                      limit=200)
    assert err < 1e-9, err
    return {"d_prime": d_prime, "trials": trials, "mean": mean, "sd": sd,
            "low": low if np.isfinite(low) else None,
            "high": high if np.isfinite(high) else None, "alpha": alpha, "sided": sided,
            "point_power": pw(mean), "assurance": value}


def assurance_plan():
    inf = math.inf
    cases = [
        plan_case(1.0, 100, -0.2, 0.1, -inf, inf, 0.05, "two-sided"),
        plan_case(1.5, 60, -0.3, 0.15, -inf, inf, 0.05, "less"),
        plan_case(0.8, 80, 0.25, 0.2, 0.0, 1.0, 0.05, "two-sided"),
    ]
    write_json("assurance_plan.json", {
        "meta": meta(
            "Assurance of a one-animal yes/no bias test from a plan: the Wald power of c "
            "against 0 at a fixed trial count, its SE recomputed at every value of the "
            "uncertain criterion, averaged over a normal or truncated-normal prior.",
            {"point_power": "power at the prior mean",
             "assurance": "scipy.integrate.quad of power(c) * truncnorm.pdf(c)",
             "trials": "trials per condition, half with the stimulus present"},
            ["O'Hagan, Stevens & Campbell 2005, Pharmaceutical Statistics 4:187-201 "
             "(definition)",
             "Gourevitch & Galanter 1967, Psychometrika 32:25-33 (variance of c-hat, from "
             "memory)"]),
        "cases": cases,
    })


if __name__ == "__main__":
    assurance()
    assurance_plan()
