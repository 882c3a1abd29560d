"""Shared helpers for generate.py: stable JSON output, the meta block, checks
against check values fixed in advance (tabulated, each with its published source
in the file's meta.sources), and the yes/no basics.

Nothing here is vigil's own code: this folder only produces golden values with
general-purpose libraries (NumPy, SciPy, statsmodels) for the Rust tests.
"""

import json
import math
import platform
from pathlib import Path

import numpy as np
import scipy
import statsmodels
from scipy.stats import norm

GOLDEN_DIR = Path(__file__).resolve().parent
GENERATOR = "tests/golden/generate.py"
REGENERATE = "bash tests/golden/regenerate.sh"

# Two-sided 95% normal quantile, written out so the Rust side can use the same literal.
Z_975 = 1.959963984540054


def library_versions():
    """Versions read from the imported modules at run time."""
    return {
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "statsmodels": statsmodels.__version__,
    }


def meta(description, quantities, sources):
    """The top-level "meta" object every golden file carries."""
    return {
        "generator": GENERATOR,
        "regenerate": REGENERATE,
        "library_versions": library_versions(),
        "description": description,
        "quantities": quantities,
        "sources": sources,
    }


def _plain(value):
    """Turn NumPy scalars and arrays into plain Python values for json."""
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, np.ndarray):
        return [_plain(v) for v in value.tolist()]
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        value = float(value)
        if not math.isfinite(value):
            raise ValueError(f"non-finite value {value!r} would not be valid JSON")
        return value
    return value


def write_json(name, document):
    """Write sorted-key, indented JSON; floats keep repr (shortest round-trip) precision."""
    text = json.dumps(_plain(document), indent=2, sort_keys=True, allow_nan=False)
    path = GOLDEN_DIR / name
    path.write_text(text + "\n", encoding="utf-8")
    print(f"wrote {path.relative_to(GOLDEN_DIR.parent.parent)}")


# How many tabulated check values assert_printed has checked in this run.
PRINTED_CHECKS = {"count": 0}


def assert_printed(label, computed, printed, decimals=6):
    """Check a computed value against a value printed to `decimals` places."""
    PRINTED_CHECKS["count"] += 1
    tolerance = 0.5 * 10.0 ** (-decimals) + 1e-12
    if abs(computed - printed) > tolerance:
        raise AssertionError(
            f"{label}: computed {computed!r} does not round to printed {printed!r} "
            f"({decimals} decimals)"
        )


def assert_close(label, a, b, tolerance):
    """Absolute agreement check between two independent computations."""
    a = np.asarray(a, dtype=float)
    b = np.asarray(b, dtype=float)
    worst = float(np.max(np.abs(a - b)))
    if worst > tolerance:
        raise AssertionError(f"{label}: max |difference| {worst!r} > {tolerance!r}")
    return worst


def yes_no_measures(hit_rate, fa_rate):
    """d' = z(H) - z(F), c = -(z(H) + z(F))/2, beta = exp(c d'), z = norm.ppf."""
    z_h = norm.ppf(hit_rate)
    z_f = norm.ppf(fa_rate)
    d_prime = z_h - z_f
    c = -(z_h + z_f) / 2.0
    return {"zH": z_h, "zF": z_f, "d_prime": d_prime, "c": c, "beta": math.exp(c * d_prime)}


def corrected_rates(counts, n, rule):
    """Rates from counts 0..n under a correction rule (vectorised).

    half_n    (Macmillan & Kaplan 1985): 0 -> 1/(2n), n -> 1 - 1/(2n), others k/n.
    loglinear (Hautus 1995): (k + 0.5)/(n + 1) for every k.
    none: k/n (0 and 1 stay; the caller treats them as degenerate).
    """
    counts = np.asarray(counts, dtype=float)
    if rule == "loglinear":
        return (counts + 0.5) / (n + 1.0)
    rates = counts / n
    if rule == "half_n":
        rates = np.where(counts == 0, 1.0 / (2.0 * n), rates)
        rates = np.where(counts == n, 1.0 - 1.0 / (2.0 * n), rates)
        return rates
    if rule == "none":
        return rates
    raise ValueError(f"unknown correction rule {rule!r}")


def fitted_total(n, rule):
    """Row total of a corrected yes/no row of n trials: n + 1 under loglinear (0.5 added to
    each of the two cells), n under half_n (the half count moves within the row) and none."""
    if rule == "loglinear":
        return n + 1.0
    if rule in ("half_n", "none"):
        return float(n)
    raise ValueError(f"unknown correction rule {rule!r}")


def gg_variances(hit_rate, fa_rate, n_present, n_absent):
    """Gourevitch & Galanter (1967) asymptotic variances; works on arrays.

    Var z(H) = H(1-H)/(N_S phi(z_H)^2), Var z(F) likewise,
    Var d' = Var z(H) + Var z(F), Var c = Var d'/4, Cov(d', c) = -(Var z(H) - Var z(F))/2.
    """
    z_h = norm.ppf(hit_rate)
    z_f = norm.ppf(fa_rate)
    var_zh = hit_rate * (1.0 - hit_rate) / (n_present * norm.pdf(z_h) ** 2)
    var_zf = fa_rate * (1.0 - fa_rate) / (n_absent * norm.pdf(z_f) ** 2)
    var_d = var_zh + var_zf
    return {
        "var_zH": var_zh,
        "var_zF": var_zf,
        "var_d": var_d,
        "var_c": var_d / 4.0,
        "cov_dc": -(var_zh - var_zf) / 2.0,
    }
