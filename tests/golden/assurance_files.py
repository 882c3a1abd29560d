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


if __name__ == "__main__":
    assurance()
