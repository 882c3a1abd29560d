"""Generate the golden JSON files that vigil's Rust tests compare against.

Run through `bash tests/golden/regenerate.sh` (it builds a venv with the pinned
libraries). One function per output file; every check value fixed in advance (origin
"tabulated") is asserted here to its printed precision before anything is written.
"""

import math

import numpy as np
from scipy.optimize import minimize_scalar
from scipy.stats import binom, binomtest, norm
from statsmodels.stats.proportion import proportion_confint

from golden_support import (
    PRINTED_CHECKS,
    Z_975,
    assert_close,
    assert_printed,
    corrected_rates,
    fitted_total,
    gg_variances,
    meta,
    write_json,
    yes_no_measures,
)
from error_total_files import error_total_pmf, error_totals_information
from rating_files import rating_equal_variance, rating_unequal_variance
from pilot_files import pilot_moments
from assurance_files import assurance, assurance_plan
from two_choice_files import two_choice
from random_effects_files import random_effects

REFS = "tabulated"  # a check value fixed in advance and asserted to its stated precision
# Check values fixed in advance that this script reproduces (see each function).
EXPECTED_PRINTED_CHECKS = 60


def yesno_measures():
    """(a) d', c, beta from (H, F)."""
    printed = [  # H, F, d', c, beta; d', c, beta printed to 3 decimals in W. Schneider's notes
        (0.70, 0.10, 1.805952, 0.378576, 1.981173),
        (0.50, 0.40, 0.253347, 0.126674, 1.032613),
        (0.85, 0.05, 2.681287, 0.304210, 2.260700),
        (0.70, 0.40, 0.777748, -0.135527, 0.899959),
    ]
    grid = [(0.99, 0.01), (0.95, 0.50), (0.90, 0.20), (0.80, 0.30), (0.75, 0.25),
            (0.60, 0.55), (0.55, 0.02), (0.30, 0.10), (0.40, 0.60), (0.20, 0.50),
            (0.05, 0.30), (0.999, 0.6), (0.35, 0.001)]
    cases = []
    for h, f, d, c, beta in printed:
        m = yes_no_measures(h, f)
        for key, value in (("d_prime", d), ("c", c), ("beta", beta)):
            assert_printed(f"yes/no H={h} F={f} {key}", m[key], value)
        cases.append({"H": h, "F": f, "origin": REFS, **m})
    for h, f in grid:
        cases.append({"H": h, "F": f, "origin": "grid", **yes_no_measures(h, f)})
    write_json("yesno_measures.json", {
        "meta": meta(
            "Yes/no sensitivity and bias from hit and false-alarm rates.",
            {"zH": "scipy.stats.norm.ppf(H)", "zF": "scipy.stats.norm.ppf(F)",
             "d_prime": "zH - zF", "c": "-(zH + zF)/2 (positive = conservative)",
             "beta": "exp(c * d_prime)",
             "origin": "'tabulated' (a check value fixed in advance and asserted) or 'grid' (chosen here)"},
            ["Macmillan & Creelman 2005, Detection Theory: A User's Guide, 2nd ed.",
             "Stanislaw & Todorov 1999, Behav. Res. Methods Instrum. Comput. 31:137-149"]),
        "cases": cases,
    })


def corrections():
    """(b) Rates of 0 or 1: the 1/(2N) rule and the log-linear rule."""
    printed = {  # (hits, Ns, fa, Nn) -> {rule: (d', c)}
        (50, 50, 0, 50): {"half_n": (4.652696, 0.0), "loglinear": (4.667537, 0.0)},
        (20, 20, 5, 25): {"half_n": (2.801585, -0.559171), "loglinear": (2.781847, -0.589829)},
        (9, 10, 0, 10): {"half_n": (2.926405, 0.181651), "loglinear": (2.787425, 0.296909)},
    }
    extra = [(30, 40, 0, 40), (0, 20, 3, 20), (12, 12, 12, 12), (0, 15, 0, 15),
             (35, 50, 10, 50), (7, 10, 2, 10), (18, 25, 6, 30), (44, 60, 9, 40),
             (1, 8, 7, 8)]
    cases = []
    for counts in list(printed) + extra:
        hits, n_s, fas, n_n = counts
        for rule in ("half_n", "loglinear"):
            h = float(corrected_rates(hits, n_s, rule))
            f = float(corrected_rates(fas, n_n, rule))
            m = yes_no_measures(h, f)
            if counts in printed:
                d, c = printed[counts][rule]
                assert_printed(f"{counts} {rule} d'", m["d_prime"], d)
                assert_printed(f"{counts} {rule} c", m["c"], c)
            cases.append({"hits": hits, "n_present": n_s, "false_alarms": fas,
                          "n_absent": n_n, "rule": rule, "H": h, "F": f,
                          "d_prime": m["d_prime"], "c": m["c"],
                          "origin": REFS if counts in printed else "chosen"})
    # Macmillan & Kaplan 1985 [memory]: "N = 40 gives F = 0.0125" under the 1/(2N) rule.
    assert_printed("1/(2N) with N=40", float(corrected_rates(0, 40, "half_n")), 0.0125)
    write_json("corrections.json", {
        "meta": meta(
            "Corrections for hit or false-alarm rates of 0 or 1.",
            {"half_n": "Macmillan & Kaplan 1985: rate 0 -> 1/(2N), rate 1 -> 1 - 1/(2N), "
                       "other rates k/N unchanged (rule from memory, confirmed in "
                       "secondary sources)",
             "loglinear": "Hautus 1995: H = (hits + 0.5)/(n_present + 1), "
                          "F = (false_alarms + 0.5)/(n_absent + 1) always (from memory)",
             "d_prime": "norm.ppf(H) - norm.ppf(F)", "c": "-(norm.ppf(H) + norm.ppf(F))/2"},
            ["Macmillan & Kaplan 1985, Psychol. Bull. 98:185-199",
             "Hautus 1995, Behav. Res. Methods Instrum. Comput. 27:46-51"]),
        "cases": cases,
    })


def gg_variance():
    """(c) Gourevitch & Galanter (1967) asymptotic variances."""
    printed = {(0.8, 0.2, 50, 50): (0.081655, 0.020414),
               (0.7, 0.1, 100, 100): (0.046592, 0.011648),
               (0.9, 0.3, 40, 60): (0.102005, 0.025501)}
    extra = [(0.6, 0.4, 30, 30), (0.95, 0.05, 200, 200), (0.75, 0.15, 20, 80),
             (0.3, 0.1, 50, 25), (0.99, 0.5, 100, 40)]
    cases = []
    for key in list(printed) + extra:
        h, f, n_s, n_n = key
        v = gg_variances(h, f, n_s, n_n)
        if key in printed:
            assert_printed(f"GG {key} var d'", v["var_d"], printed[key][0])
            assert_printed(f"GG {key} var c", v["var_c"], printed[key][1])
        cases.append({"H": h, "F": f, "n_present": n_s, "n_absent": n_n,
                      "origin": REFS if key in printed else "chosen", **v})
    write_json("gg_variance.json", {
        "meta": meta(
            "Asymptotic (delta-method) variances of d' and c.",
            {"var_zH": "H(1-H)/(n_present * phi(zH)^2), phi = norm.pdf, zH = norm.ppf(H)",
             "var_zF": "F(1-F)/(n_absent * phi(zF)^2)",
             "var_d": "var_zH + var_zF", "var_c": "var_d / 4",
             "cov_dc": "-(var_zH - var_zF)/2"},
            ["Gourevitch & Galanter 1967, Psychometrika 32:25-33 (formula from memory)"]),
        "cases": cases,
    })


def _enumerate_case(h_true, f_true, n_s, n_n, rule):
    """Exact moments and Wald coverage over all (hits, false alarms) outcomes."""
    hits = np.arange(n_s + 1)
    fas = np.arange(n_n + 1)
    weight = np.outer(binom.pmf(hits, n_s, h_true), binom.pmf(fas, n_n, f_true))
    h_hat = corrected_rates(hits, n_s, rule)[:, None] * np.ones((1, n_n + 1))
    f_hat = np.ones((n_s + 1, 1)) * corrected_rates(fas, n_n, rule)[None, :]
    extreme = (h_hat <= 0) | (h_hat >= 1) | (f_hat <= 0) | (f_hat >= 1)
    raw_extreme = np.add.outer((hits == 0) | (hits == n_s), (fas == 0) | (fas == n_n)) > 0
    p_raw_extreme = float(weight[raw_extreme].sum())
    keep = ~extreme
    p_keep = float(weight[keep].sum())
    p_dropped = float(weight[extreme].sum())
    w = weight[keep] / p_keep
    hk, fk = h_hat[keep], f_hat[keep]
    d_hat = norm.ppf(hk) - norm.ppf(fk)
    c_hat = -(norm.ppf(hk) + norm.ppf(fk)) / 2.0
    mean_d, mean_c = float(w @ d_hat), float(w @ c_hat)
    # The SE of the table as fitted: the corrected row totals (n + 1 under loglinear).
    se_d = np.sqrt(gg_variances(hk, fk, fitted_total(n_s, rule), fitted_total(n_n, rule))["var_d"])
    d_true = norm.ppf(h_true) - norm.ppf(f_true)
    c_true = -(norm.ppf(h_true) + norm.ppf(f_true)) / 2.0
    return {
        "H": h_true, "F": f_true, "n_present": n_s, "n_absent": n_n, "rule": rule,
        "d_prime_true": d_true, "c_true": c_true,
        "mean_d_prime": mean_d, "var_d_prime": float(w @ (d_hat - mean_d) ** 2),
        "mean_c": mean_c, "var_c": float(w @ (c_hat - mean_c) ** 2),
        "cov_d_prime_c": float(w @ ((d_hat - mean_d) * (c_hat - mean_c))),
        "coverage_d_prime": float(w[np.abs(d_hat - d_true) <= Z_975 * se_d].sum()),
        "coverage_c": float(w[np.abs(c_hat - c_true) <= Z_975 * se_d / 2.0].sum()),
        "p_degenerate": p_dropped,
        "p_raw_rate_extreme": p_raw_extreme,
        "conditional_on_non_degenerate": rule == "none",
    }


def exact_enumeration():
    """(d) Exact sampling moments of the yes/no estimators (Miller 1996)."""
    printed = {(0.8, 0.2, 20, 20, "half_n"): (1.783573, 0.248105),
               (0.8, 0.2, 20, 20, "loglinear"): (1.663737, 0.206234),
               (0.8, 0.2, 50, 50, "half_n"): (1.720670, 0.089485)}
    designs = [(0.8, 0.2, 20, 20), (0.8, 0.2, 50, 50), (0.9, 0.3, 15, 25),
               (0.6, 0.1, 30, 10), (0.7, 0.1, 100, 100)]
    cases = []
    for design in designs:
        for rule in ("half_n", "loglinear", "none"):
            case = _enumerate_case(*design, rule)
            if design + (rule,) in printed:
                mean, var = printed[design + (rule,)]
                assert_printed(f"exact {design} {rule} E[d']", case["mean_d_prime"], mean)
                assert_printed(f"exact {design} {rule} Var[d']", case["var_d_prime"], var)
            case["origin"] = REFS if design + (rule,) in printed else "chosen"
            cases.append(case)
    write_json("exact_enumeration.json", {
        "meta": meta(
            "Exact sampling distribution of the yes/no estimators by enumerating every "
            "(hits, false alarms) outcome; hits ~ Bin(n_present, H), false alarms ~ "
            "Bin(n_absent, F), independent; weights from scipy.stats.binom.pmf.",
            {"rule": "half_n | loglinear | none (see corrections.json); with none, an "
                     "outcome with any rate 0 or 1 is degenerate and dropped",
             "mean_d_prime, var_d_prime, mean_c, var_c, cov_d_prime_c":
                 "exact moments of d_hat = z(H_hat) - z(F_hat), c_hat = -(z(H_hat) + "
                 "z(F_hat))/2 (population variance); for rule none conditional on a "
                 "non-degenerate outcome",
             "coverage_d_prime": "P(|d_hat - d_true| <= 1.959963984540054 * SE), SE = "
                                 "sqrt of the Gourevitch-Galanter var_d at the (corrected) "
                                 "estimated rates with the corrected row totals (n + 1 "
                                 "under loglinear, n otherwise: the inverse observed "
                                 "information of the table as fitted); conditional for "
                                 "rule none",
             "coverage_c": "same with SE(c) = SE(d')/2 and c_true",
             "p_degenerate": "probability mass dropped: P(any raw rate 0 or 1) for rule "
                             "none, 0 for the corrections",
             "p_raw_rate_extreme": "P(hits in {0, n_present} or false alarms in "
                                   "{0, n_absent}), whatever the rule",
             "conditional_on_non_degenerate": "true when moments and coverage are "
                                              "conditional (rule none)"},
            ["Miller 1996, Percept. Psychophys. 58:65-72 (method from memory)",
             "Gourevitch & Galanter 1967, Psychometrika 32:25-33"]),
        "z_975": Z_975,
        "cases": cases,
    })


def wilson():
    """(e) Wilson score intervals from statsmodels, checked against SciPy and the formula."""
    printed = {(80, 100): (0.711171, 0.866633), (412, 500): (0.788186, 0.854874),
               (0, 50): (0.0, 0.071348), (950, 1000): (0.934686, 0.961870)}
    plan = [(x, n, 0.95) for x, n in printed] + [
        (10, 10, 0.95), (1, 20, 0.95), (37, 40, 0.95), (3, 7, 0.95), (80, 100, 0.90)]
    cases = []
    for x, n, level in plan:
        low, high = proportion_confint(x, n, alpha=1.0 - level, method="wilson")
        sp = binomtest(x, n).proportion_ci(confidence_level=level, method="wilson")
        assert_close(f"wilson {x}/{n} scipy", [low, high], [sp.low, sp.high], 1e-12)
        z = norm.ppf(0.5 + level / 2.0)
        p = x / n
        centre = (p + z * z / (2 * n)) / (1 + z * z / n)
        half = z / (1 + z * z / n) * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n))
        assert_close(f"wilson {x}/{n} formula", [low, high],
                     [max(0.0, centre - half), min(1.0, centre + half)], 1e-12)
        if (x, n) in printed and level == 0.95:
            assert_printed(f"wilson {x}/{n} lower", low, printed[(x, n)][0])
            assert_printed(f"wilson {x}/{n} upper", high, printed[(x, n)][1])
        cases.append({"successes": x, "n": n, "confidence": level, "z": z,
                      "lower": low, "upper": high, "centre": centre, "half_width": half,
                      "origin": REFS if (x, n) in printed and level == 0.95 else "chosen"})
    write_json("wilson.json", {
        "meta": meta(
            "Wilson score intervals for a binomial proportion.",
            {"lower, upper": "statsmodels.stats.proportion.proportion_confint(successes, n, "
                             "alpha=1-confidence, method='wilson'); equal to SciPy "
                             "binomtest(...).proportion_ci(method='wilson') to 1e-12",
             "centre": "(p + z^2/(2n)) / (1 + z^2/n), p = successes/n",
             "half_width": "z/(1 + z^2/n) * sqrt(p(1-p)/n + z^2/(4n^2)); the library "
                           "bounds equal centre -/+ half_width clipped to [0, 1]",
             "z": "norm.ppf(0.5 + confidence/2)"},
            ["Wilson 1927, JASA 22:209-212"]),
        "cases": cases,
    })


def _expected_payoff(c, d, p, v_h, c_m, v_cr, c_fa):
    h = norm.cdf(d / 2.0 - c)
    f = norm.cdf(-d / 2.0 - c)
    return p * (h * v_h - (1.0 - h) * c_m) + (1.0 - p) * ((1.0 - f) * v_cr - f * c_fa)


def ideal_observer():
    """(h) Payoff- and prior-optimal criterion (Green & Swets 1966)."""
    printed = {(1.5, 0.25, 1, 1, 1, 1): (3.0, 0.732408, 0.507018, 0.069116),
               (1.0, 0.5, 1, 1, 1, 3): (2.0, 0.693147, 0.423422, 0.116406),
               (2.0, 0.1, 10, 5, 1, 1): (1.2, 0.091161, 0.818283, 0.137601)}
    extra = [(1.0, 0.5, 1, 1, 1, 1), (2.5, 0.8, 1, 1, 1, 1), (0.8, 0.3, 5, 20, 1, 2),
             (3.0, 0.05, 50, 100, 1, 1)]
    cases = []
    for key in list(printed) + extra:
        d, p, v_h, c_m, v_cr, c_fa = (float(v) for v in key)
        beta = ((1.0 - p) / p) * ((v_cr + c_fa) / (v_h + c_m))
        c_opt = math.log(beta) / d
        h = norm.cdf(d / 2.0 - c_opt)
        f = norm.cdf(-d / 2.0 - c_opt)
        payoff = _expected_payoff(c_opt, d, *key[1:])
        search = minimize_scalar(lambda c: -_expected_payoff(c, d, *key[1:]),
                                 bounds=(c_opt - 5.0, c_opt + 5.0), method="bounded",
                                 options={"xatol": 1e-12})
        assert_close(f"ideal {key} numeric argmax", search.x, c_opt, 1e-6)
        if key in printed:
            for label, value, want in zip(("beta", "c", "H", "F"), (beta, c_opt, h, f),
                                          printed[key]):
                assert_printed(f"ideal {key} {label}", value, want)
        cases.append({
            "d_prime": d, "p_present": p, "V_H": v_h, "C_M": c_m, "V_CR": v_cr, "C_FA": c_fa,
            "beta_opt": beta, "c_opt": c_opt, "H": h, "F": f, "miss": 1.0 - h, "CR": 1.0 - f,
            "fa_to_miss_ratio": (1.0 - p) * f / (p * (1.0 - h)),
            "expected_payoff": payoff,
            "numeric_check": {"c_argmax": float(search.x),
                              "abs_difference": abs(float(search.x) - c_opt),
                              "method": "scipy.optimize.minimize_scalar(bounded, "
                                        "xatol=1e-12) on -expected_payoff"},
            "origin": REFS if key in printed else "chosen"})
    write_json("ideal_observer.json", {
        "meta": meta(
            "The criterion that maximises expected payoff given the prior and payoffs "
            "(equal-variance model, evidence absent ~ N(0,1), present ~ N(d',1)).",
            {"beta_opt": "[(1-p_present)/p_present] * [(V_CR + C_FA)/(V_H + C_M)]",
             "c_opt": "ln(beta_opt)/d_prime", "H": "Phi(d'/2 - c_opt)",
             "F": "Phi(-d'/2 - c_opt)", "miss": "1 - H", "CR": "1 - F",
             "fa_to_miss_ratio": "(1-p)F / (p(1-H)), expected false alarms per miss",
             "expected_payoff": "p(H V_H - (1-H) C_M) + (1-p)((1-F) V_CR - F C_FA) per trial",
             "numeric_check": "the maximiser found numerically; asserted within 1e-6 of c_opt"},
            ["Green & Swets 1966, Signal Detection Theory and Psychophysics "
             "(form from memory)"]),
        "cases": cases,
    })


def main():
    yesno_measures()
    corrections()
    gg_variance()
    exact_enumeration()
    wilson()
    rating_equal_variance()
    rating_unequal_variance()
    ideal_observer()
    error_totals_information()
    error_total_pmf()
    pilot_moments()
    assurance()
    assurance_plan()
    two_choice()
    random_effects()
    if PRINTED_CHECKS["count"] != EXPECTED_PRINTED_CHECKS:
        raise AssertionError(f"checked {PRINTED_CHECKS['count']} tabulated values, "
                             f"expected {EXPECTED_PRINTED_CHECKS}")
    print(f"all {EXPECTED_PRINTED_CHECKS} tabulated check values reproduced")


if __name__ == "__main__":
    main()
