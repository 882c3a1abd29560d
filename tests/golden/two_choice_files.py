"""Golden file for two-choice (2AFC) records; called from generate.py.

Under the equal-variance model a two-choice task with a side bias gives a yes/no-like table
with "left" as the response: H = P(left | target left), F = P(left | target right), and
d' = [z(H) - z(F)] / sqrt(2), c = -[z(H) + z(F)] / 2, the proportion correct of an unbiased
observer p_c = Phi(d' / sqrt(2)), and without bias d' = sqrt(2) z(p_c) (Macmillan &
Creelman 2005, Detection Theory: A User's Guide, 2nd ed., ch. 7). Sampling variances by the
delta method from the binomial rows (Gourevitch & Galanter 1967 for the yes/no table):
Var z(p) = p(1 - p) / (n phi(z)^2), Var d' = [Var z(H) + Var z(F)] / 2,
Var c = [Var z(H) + Var z(F)] / 4, SE p_c = phi(d'/sqrt(2)) / sqrt(2) * SE d'.

Run alone: `target/golden-venv/bin/python tests/golden/two_choice_files.py` (from tests/golden).
"""

import math

from scipy.stats import norm

from golden_support import assert_close, meta, write_json

SQRT2 = math.sqrt(2.0)


def case(left_hits, n_left, right_fas, n_right):
    h, f = left_hits / n_left, right_fas / n_right
    zh, zf = norm.ppf(h), norm.ppf(f)
    d = (zh - zf) / SQRT2
    c = -(zh + zf) / 2
    var_z = lambda p, n, z: p * (1 - p) / (n * norm.pdf(z) ** 2)
    vh, vf = var_z(h, n_left, zh), var_z(f, n_right, zf)
    se_d = math.sqrt((vh + vf) / 2)
    return {"left_hits": left_hits, "n_left": n_left, "right_false_alarms": right_fas,
            "n_right": n_right, "d_prime": d, "criterion": c,
            "p_correct": norm.cdf(d / SQRT2), "se_d_prime": se_d,
            "se_criterion": math.sqrt((vh + vf) / 4),
            "se_p_correct": norm.pdf(d / SQRT2) / SQRT2 * se_d}


def two_choice():
    # d' = sqrt(2) z(p_c) without bias: p_c = 0.76 gives d' = 0.999 (Macmillan & Creelman
    # 2005, ch. 7 and their 2AFC table, from memory: d' = 1 at p_c = .76).
    assert_close("2AFC p_c = .76", SQRT2 * norm.ppf(0.76), 0.999, 1e-3)
    cases = [case(76, 100, 24, 100), case(40, 50, 15, 50), case(33, 41, 20, 63),
             case(180, 200, 60, 200)]
    unbiased = [{"p_correct": p, "d_prime": SQRT2 * norm.ppf(p)}
                for p in (0.6, 0.69, 0.76, 0.84, 0.92)]
    write_json("two_choice.json", {
        "meta": meta(
            "Two-choice (2AFC) closed forms: d', c and the unbiased proportion correct from "
            "left-choice counts by target side, their delta-method SEs, and d' from p_c.",
            {"d_prime": "[z(H) - z(F)] / sqrt(2)", "criterion": "-[z(H) + z(F)] / 2",
             "p_correct": "Phi(d' / sqrt(2))",
             "se_*": "delta method from the binomial rows (expected information)",
             "unbiased": "d' = sqrt(2) z(p_c)"},
            ["Macmillan & Creelman 2005, Detection Theory: A User's Guide, 2nd ed., ch. 7",
             "Gourevitch & Galanter 1967, Psychometrika 32:25-33 (variances, from memory)"]),
        "cases": cases,
        "unbiased": unbiased,
    })


if __name__ == "__main__":
    two_choice()
