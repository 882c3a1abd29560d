//! The `vigil ideal` report: the ideal observer's criterion and what it earns (Green & Swets
//! 1966), a partially adjusted criterion beside it, a payoff-ratio scan with one plain
//! reading; and the same figures as JSON.

use super::format::{number, plain, signed};
use super::ideal_scan_text::{balance_ratio, scan_reading, scan_table};
use super::style::{new_table, right_align};
use crate::model::ideal::{IdealObserver, PayoffOutcome, ScanRow};
use serde::Serialize;
use std::fmt::Write;

/// The source of the formulas, printed and stored with every result.
pub const SOURCE: &str = "Green & Swets 1966, Signal Detection Theory and Psychophysics";

/// What the figures assume, printed and stored with every result.
pub const ASSUMPTIONS: &str = "equal-variance Gaussian evidence (absent ~ N(0, 1), present ~ N(d′, 1)); \
an observer that knows the presence rate and the payoffs; H = Φ(d′/2 − c), F = Φ(−d′/2 − c)";

/// Everything `vigil ideal` computed, ready to print.
#[derive(Debug, Clone, Serialize)]
pub struct IdealFigures {
    /// d′, presence rate and payoffs (validated).
    pub observer: IdealObserver,
    /// β_opt = [(1 − p)/p]·(V_CR + C_FA)/(V_H + C_M).
    pub optimal_beta: f64,
    /// The observer at c_opt = ln β_opt / d′.
    pub optimal: PayoffOutcome,
    /// The observer at f·c_opt, when a fraction was given.
    pub partial: Option<PartialAdjustment>,
    /// The optimum over a range of payoff ratios, when asked.
    pub scan: Option<PayoffScan>,
}

/// A criterion a fraction f of the way from c = 0 to c_opt.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct PartialAdjustment {
    /// f in [0, 1].
    pub fraction: f64,
    /// The observer at c = f·c_opt.
    pub outcome: PayoffOutcome,
    /// Expected payoff per trial at c_opt minus that at f·c_opt (≥ 0).
    pub payoff_lost: f64,
}

/// The ideal observer at each payoff ratio of a log-spaced grid.
#[derive(Debug, Clone, Serialize)]
pub struct PayoffScan {
    pub rows: Vec<ScanRow>,
}

pub(super) use super::format::significant as sig_n;

/// Six significant digits: the figures a user may want to copy.
fn sig(x: f64) -> String {
    sig_n(x, 6)
}

/// Three significant digits: the figures of a reading.
pub(super) fn sig_short(x: f64) -> String {
    sig_n(x, 3)
}

/// A false-alarm-to-miss ratio to `n` significant digits; ∞ when no misses are expected
/// in floating point.
pub(super) fn fa_per_miss(r: Option<f64>, n: usize) -> String {
    r.map_or_else(|| "∞".into(), |x| sig_n(x, n))
}

/// The whole report as text.
pub fn render(fig: &IdealFigures) -> String {
    let mut out = String::new();
    let obs = &fig.observer;
    let pay = obs.payoffs();
    let p = obs.presence_rate();
    let _ = writeln!(
        out,
        "vigil ideal — the criterion that maximises the expected payoff per trial ({SOURCE})"
    );
    let _ = writeln!(
        out,
        "Inputs: d′ = {}; stimulus present on {} of trials (p = {}); payoffs V_H = {}, C_M = {}, V_CR = {}, C_FA = {}.",
        plain(obs.d_prime()),
        super::format::percent(p),
        plain(p),
        plain(pay.value_hit()),
        plain(pay.cost_miss()),
        plain(pay.value_correct_rejection()),
        plain(pay.cost_false_alarm())
    );
    let _ = writeln!(
        out,
        "Payoff ratio R = (V_CR + C_FA)/(V_H + C_M) = {}; prior odds against the stimulus (1 − p)/p = {}.",
        sig(pay.ratio()),
        sig((1.0 - p) / p)
    );
    let _ = writeln!(out, "β_opt = [(1 − p)/p]·R = {}", sig(fig.optimal_beta));
    let _ = writeln!(
        out,
        "c_opt = ln β_opt / d′ = {} (positive = conservative)",
        number(fig.optimal.criterion, 6)
    );
    if let Some(part) = &fig.partial {
        let _ = writeln!(
            out,
            "partial adjustment: c = f·c_opt = {} × {} = {}",
            plain(part.fraction),
            number(fig.optimal.criterion, 6),
            number(part.outcome.criterion, 6)
        );
    }
    let _ = writeln!(out);
    outcome_table(&mut out, fig);
    let _ = writeln!(out, "Reading: {}", optimum_reading(fig));
    if let Some(scan) = &fig.scan {
        let _ = writeln!(out);
        scan_table(&mut out, scan);
        let _ = writeln!(out, "Reading: {}", scan_reading(scan, pay.ratio()));
    }
    let _ = writeln!(out);
    let _ = writeln!(out, "Assumes {ASSUMPTIONS}.");
    super::layout::wrap_prose(&out)
}

/// One table cell from an outcome and d′.
type Cell = fn(&PayoffOutcome, f64) -> String;

fn outcome_table(out: &mut String, fig: &IdealFigures) {
    let partial_header = fig
        .partial
        .map(|p| format!("at f·c_opt (f = {})", p.fraction));
    let mut header = vec!["quantity", "at c_opt"];
    if let Some(h) = &partial_header {
        header.push(h);
    }
    let mut t = new_table(header);
    let d = fig.observer.d_prime();
    let rows: [(&str, Cell); 8] = [
        ("criterion c", |o, _| number(o.criterion, 6)),
        ("β = exp(c·d′)", |o, d| sig((o.criterion * d).exp())),
        ("hit rate H", |o, _| number(o.hit_rate, 6)),
        ("false-alarm rate F", |o, _| number(o.false_alarm_rate, 6)),
        ("miss rate 1 − H", |o, _| number(o.miss_rate, 6)),
        ("correct-rejection rate 1 − F", |o, _| {
            number(o.correct_rejection_rate, 6)
        }),
        ("false alarms per miss", |o, _| {
            fa_per_miss(o.false_alarm_to_miss_ratio, 6)
        }),
        ("expected payoff per trial", |o, _| {
            number(o.expected_payoff, 6)
        }),
    ];
    for (label, cell) in rows {
        let mut cells = vec![label.to_string(), cell(&fig.optimal, d)];
        if let Some(p) = &fig.partial {
            cells.push(cell(&p.outcome, d));
        }
        t.add_row(cells);
    }
    if let Some(p) = &fig.partial {
        t.add_row(vec![
            "payoff lost per trial".into(),
            number(0.0, 6),
            number(p.payoff_lost, 6),
        ]);
    }
    right_align(&mut t, 1..3);
    let _ = writeln!(out, "{t}");
}

/// "conservative", "liberal" or "unbiased" for a criterion (|c| < 0.005 reads as unbiased).
fn leaning(c: f64) -> &'static str {
    if c >= 0.005 {
        "conservative"
    } else if c <= -0.005 {
        "liberal"
    } else {
        "unbiased"
    }
}

fn optimum_reading(fig: &IdealFigures) -> String {
    let o = &fig.optimal;
    // Rates below 0.1% keep three significant digits instead of reading as "0.0%".
    let pct = |x: f64| {
        if x > 0.0 && x < 1e-3 {
            format!("{}%", sig_short(100.0 * x))
        } else {
            super::format::percent(x)
        }
    };
    let mut s = format!(
        "with these stakes and this presence rate the best criterion is {} (c_opt = {}): the observer \
         misses {} of present stimuli and raises a false alarm on {} of absent trials — {} false alarms per miss — \
         for an expected payoff of {} per trial.",
        leaning(o.criterion),
        signed(o.criterion, 2),
        pct(o.miss_rate),
        pct(o.false_alarm_rate),
        fa_per_miss(o.false_alarm_to_miss_ratio, 3),
        number(o.expected_payoff, 3)
    );
    if let Some(p) = &fig.partial {
        let _ = write!(
            s,
            " Stopping {} of the way from c = 0 (c = {}) gives {} false alarms per miss and {} per trial, {} less.",
            plain(p.fraction),
            signed(p.outcome.criterion, 2),
            fa_per_miss(p.outcome.false_alarm_to_miss_ratio, 3),
            number(p.outcome.expected_payoff, 3),
            number(p.payoff_lost, 3)
        );
    }
    s
}

#[derive(Serialize)]
struct Document<'a> {
    tool: &'static str,
    version: &'static str,
    command: &'static str,
    source: &'static str,
    assumptions: &'static str,
    inputs: &'a IdealObserver,
    payoff_ratio: f64,
    prior_odds_absent: f64,
    optimal_beta: f64,
    optimal: &'a PayoffOutcome,
    partial: Option<&'a PartialAdjustment>,
    scan: Option<ScanOut<'a>>,
    reading: String,
}

#[derive(Serialize)]
struct ScanOut<'a> {
    rows: &'a [ScanRow],
    /// R at which false alarms and misses are expected equally often (interpolated).
    balance_ratio: Option<f64>,
    reading: String,
}

/// The JSON bytes of the figures (pretty-printed, newline-terminated). Undefined ratios
/// (no expected misses) are `null`.
pub fn render_json(fig: &IdealFigures) -> serde_json::Result<Vec<u8>> {
    let p = fig.observer.presence_rate();
    let own_ratio = fig.observer.payoffs().ratio();
    let doc = Document {
        tool: "vigil",
        version: env!("CARGO_PKG_VERSION"),
        command: "ideal",
        source: SOURCE,
        assumptions: ASSUMPTIONS,
        inputs: &fig.observer,
        payoff_ratio: own_ratio,
        prior_odds_absent: (1.0 - p) / p,
        optimal_beta: fig.optimal_beta,
        optimal: &fig.optimal,
        partial: fig.partial.as_ref(),
        scan: fig.scan.as_ref().map(|s| ScanOut {
            rows: &s.rows,
            balance_ratio: balance_ratio(&s.rows),
            reading: scan_reading(s, own_ratio),
        }),
        reading: optimum_reading(fig),
    };
    let mut bytes = serde_json::to_vec_pretty(&doc)?;
    bytes.push(b'\n');
    Ok(bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_digits() {
        assert_eq!(sig(3.0), "3.00000");
        assert_eq!(sig(0.732408123), "0.732408");
        assert_eq!(sig(123456.7), "123457");
        assert_eq!(sig(1.5e-6), "1.50000e-6");
        assert_eq!(sig(f64::NAN), "–");
        assert_eq!(sig_short(5813.2), "5813");
        assert_eq!(sig_short(0.5234), "0.523");
    }
}
