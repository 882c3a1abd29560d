"""Golden file for `vigil pilot`'s population values; called from generate.py.

An independent computation of the unweighted method-of-moments estimates on small fixed
pilots: per-animal yes/no estimates from the log-linear rates (Hautus 1995) with their
Gourevitch & Galanter (1967) variances at the corrected row total, then with NumPy and
SciPy the mean, np.cov (ddof = 1) minus the mean sampling covariance (DerSimonian & Laird
1986 with equal weights; their Q-statistic form is asserted equal here), Student t intervals
for the means (scipy.stats.t) and the equal-weight chi-square (Q-profile, Viechtbauer 2007)
intervals for the between-animal SDs (scipy.stats.chi2).

Run alone: `target/golden-venv/bin/python tests/golden/pilot_files.py` (from the repo root).
"""

import math

import numpy as np
from scipy.stats import chi2, norm, t

from golden_support import assert_close, fitted_total, gg_variances, meta, write_json

CONFIDENCE = 0.95

# Invented pilots (animal, condition, hits, present trials, false alarms, absent trials).
PILOTS = {
    "seven animals, one condition, one perfect hit rate": [
        ("a1", "", 14, 20, 5, 20),
        ("a2", "", 18, 20, 3, 20),
        ("a3", "", 11, 20, 6, 20),
        ("a4", "", 20, 20, 8, 20),
        ("a5", "", 9, 20, 2, 20),
        ("a6", "", 16, 20, 9, 20),
        ("a7", "", 12, 20, 1, 20),
    ],
    "five animals, two conditions, unequal trials": [
        ("b1", "open", 20, 30, 6, 30), ("b1", "cover", 15, 30, 2, 30),
        ("b2", "open", 25, 30, 10, 30), ("b2", "cover", 22, 30, 5, 30),
        ("b3", "open", 17, 24, 4, 36), ("b3", "cover", 12, 24, 1, 36),
        ("b4", "open", 28, 30, 14, 30), ("b4", "cover", 26, 30, 9, 30),
        ("b5", "open", 19, 30, 7, 30), ("b5", "cover", 11, 30, 3, 30),
    ],
    "four animals, no spread beyond noise": [
        ("c1", "", 15, 25, 5, 25),
        ("c2", "", 16, 25, 6, 25),
        ("c3", "", 15, 25, 6, 25),
        ("c4", "", 16, 25, 5, 25),
    ],
}


def animal_estimates(rows):
    """Per animal: (d', c) averaged over its conditions and their sampling covariance."""
    animals = {}
    for name, cond, hits, n_s, fas, n_n in rows:
        h = (hits + 0.5) / (n_s + 1.0)
        f = (fas + 0.5) / (n_n + 1.0)
        z_h, z_f = norm.ppf(h), norm.ppf(f)
        v = gg_variances(h, f, fitted_total(n_s, "loglinear"), fitted_total(n_n, "loglinear"))
        animals.setdefault(name, []).append(
            (z_h - z_f, -(z_h + z_f) / 2.0,
             np.array([[v["var_d"], v["cov_dc"]], [v["cov_dc"], v["var_c"]]])))
    ys, ss = [], []
    for fits in animals.values():
        k = len(fits)
        ys.append([sum(f[0] for f in fits) / k, sum(f[1] for f in fits) / k])
        ss.append(sum(f[2] for f in fits) / k**2)
    return np.array(ys), np.array(ss)


def population(rows):
    ys, ss = animal_estimates(rows)
    n = len(ys)
    mean = ys.mean(axis=0)
    observed = np.cov(ys.T, ddof=1)
    within = ss.mean(axis=0)
    between = observed - within
    # DerSimonian & Laird's moment form with weights w = 1: tau^2 = [Q - (sum w s^2 -
    # sum w^2 s^2 / sum w)] / (sum w - sum w^2 / sum w), Q = sum w (y - ybar)^2.
    for k in range(2):
        q = ((ys[:, k] - mean[k]) ** 2).sum()
        s2 = ss[:, k, k]
        w = np.ones(n)
        tau2 = (q - ((w * s2).sum() - (w**2 * s2).sum() / w.sum())) / (w.sum() - (w**2).sum() / w.sum())
        assert_close(f"DL Q form {k}", tau2, between[k, k], 1e-12)
    tq = t.ppf(0.5 + CONFIDENCE / 2.0, n - 1)
    se = np.sqrt(np.diag(observed) / n)
    lo_q, hi_q = chi2.ppf((1 - CONFIDENCE) / 2.0, n - 1), chi2.ppf((1 + CONFIDENCE) / 2.0, n - 1)
    root = lambda v: math.sqrt(max(v, 0.0))
    out = {"animals": n}
    for k, key in enumerate(["d_prime", "criterion"]):
        out[f"mean_{key}"] = mean[k]
        out[f"se_{key}"] = se[k]
        out[f"mean_{key}_low"] = mean[k] - tq * se[k]
        out[f"mean_{key}_high"] = mean[k] + tq * se[k]
        out[f"sd_{key}"] = root(between[k, k])
        out[f"sd_{key}_low"] = root((n - 1) * observed[k, k] / hi_q - within[k, k])
        out[f"sd_{key}_high"] = root((n - 1) * observed[k, k] / lo_q - within[k, k])
        out[f"observed_var_{key}"] = observed[k, k]
        out[f"within_var_{key}"] = within[k, k]
    if between[0, 0] > 0 and between[1, 1] > 0:
        r = between[0, 1] / math.sqrt(between[0, 0] * between[1, 1])
        out["correlation"] = min(1.0, max(-1.0, r))
    else:
        out["correlation"] = None
    return out


def pilot_moments():
    cases = []
    for label, rows in PILOTS.items():
        cases.append({
            "label": label,
            "rows": [{"animal": a, "condition": c, "hits": h, "present": ns,
                      "false_alarms": f, "absent": nn} for a, c, h, ns, f, nn in rows],
            **population(rows),
        })
    write_json("pilot_moments.json", {
        "meta": meta(
            "Population values of small fixed pilots by the unweighted method of moments.",
            {"per animal": "log-linear rates (k + 0.5)/(n + 1); d' = zH - zF, c = -(zH + zF)/2; "
                           "Gourevitch & Galanter variances at N = n + 1; averaged over conditions "
                           "(covariance divided by conditions^2)",
             "mean_*": "numpy mean over animals", "se_*": "sqrt(np.cov diag / n)",
             "mean_*_low/high": "mean -/+ scipy.stats.t.ppf(0.975, n - 1) * se",
             "sd_*": "sqrt(max(0, np.cov(ddof=1) - mean sampling variance))",
             "sd_*_low/high": "sqrt(max(0, (n-1) M / chi2.ppf(0.975|0.025, n-1) - mean sampling variance))",
             "correlation": "between covariance / sqrt(product of between variances), clamped to [-1, 1]; "
                            "null when a between variance is <= 0"},
            ["DerSimonian & Laird 1986, Controlled Clinical Trials 7:177-188 (moment form from memory)",
             "Viechtbauer 2007, Statistics in Medicine 26:37-52 (Q-profile idea, from memory)",
             "Gourevitch & Galanter 1967, Psychometrika 32:25-33 (from memory)",
             "Hautus 1995, Behav. Res. Methods Instrum. Comput. 27:46-51 (from memory)"]),
        "cases": cases,
    })


if __name__ == "__main__":
    pilot_moments()
