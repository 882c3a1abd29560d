//! `vigil ideal`: the ideal observer of Green & Swets (1966) for one presence rate, d′ and
//! payoff matrix — the optimal criterion, the rates and expected payoff it gives, optionally a
//! partially adjusted criterion, and a scan over the payoff ratio.
//!
//! The mathematics lives in [`crate::model::ideal`]; this module only checks the options
//! (naming the option in every error), claims the JSON file, calls the model and hands the
//! figures to [`crate::report::ideal_text`].
//!
//! Exit codes as for the other commands (see [`crate::commands`]): 2 for a bad option value or an
//! output path that cannot be written (both found before any work); 1 otherwise.

use super::AppError;
use crate::model::ideal::{IdealError, IdealObserver, Payoffs, log_spaced, scan_payoff_ratios};
use crate::output::CommitSet;
use crate::report;
use crate::report::format::plain;
use crate::report::ideal_text::{IdealFigures, PartialAdjustment, PayoffScan};
use std::path::PathBuf;

/// Largest number of payoff ratios `--scan` accepts (a readable table, not a data dump).
pub const MAX_SCAN_POINTS: usize = 1000;

/// Options of `vigil ideal`.
#[derive(Debug, Clone, PartialEq)]
pub struct IdealRequest {
    /// Sensitivity d′ (finite, > 0).
    pub d_prime: f64,
    /// P(stimulus present on a trial), strictly between 0 and 1.
    pub presence: f64,
    /// V_H, C_M, V_CR, C_FA: value of a hit, cost of a miss, value of a correct rejection,
    /// cost of a false alarm (amounts ≥ 0; costs are subtracted).
    pub payoffs: [f64; 4],
    /// Partial adjustment: the criterion f·c_opt, f in [0, 1].
    pub fraction: Option<f64>,
    /// A scan of the payoff ratio R: (low, high, points), log-spaced.
    pub scan: Option<(f64, f64, usize)>,
    /// Also write the figures as JSON.
    pub json: Option<PathBuf>,
}

/// What `--payoffs` accepts, for error messages.
pub const PAYOFFS_ALLOWED: &str = "four amounts V_H,C_M,V_CR,C_FA separated by commas (value of a hit, cost of a miss, \
value of a correct rejection, cost of a false alarm), each a number ≥ 0, with V_H + C_M > 0 and V_CR + C_FA > 0; e.g. 1,1,1,1";

/// What `--scan` accepts, for error messages.
pub fn scan_allowed() -> String {
    format!(
        "LOW:HIGH:POINTS — payoff ratios R = (V_CR + C_FA)/(V_H + C_M) with 0 < LOW ≤ HIGH and \
         POINTS a whole number from 1 to {MAX_SCAN_POINTS}, log-spaced; e.g. 0.1:10:9"
    )
}

/// Parses `--payoffs V_H,C_M,V_CR,C_FA` (syntax only; amounts are checked by [`ideal`]).
/// Used as the command line's value parser, so a malformed value exits with code 2.
pub fn parse_payoffs(text: &str) -> Result<[f64; 4], String> {
    let parts: Vec<&str> = text.split(',').map(str::trim).collect();
    let malformed = || format!("`{text}` is not four numbers\n  allowed: {PAYOFFS_ALLOWED}");
    if parts.len() != 4 {
        return Err(malformed());
    }
    let mut out = [0.0; 4];
    for (slot, part) in out.iter_mut().zip(&parts) {
        *slot = part.parse::<f64>().map_err(|_| malformed())?;
    }
    Ok(out)
}

/// Parses `--scan LOW:HIGH:POINTS` (syntax only; ranges are checked by [`ideal`]).
pub fn parse_scan(text: &str) -> Result<(f64, f64, usize), String> {
    let malformed = || {
        format!(
            "`{text}` is not LOW:HIGH:POINTS\n  allowed: {}",
            scan_allowed()
        )
    };
    let parts: Vec<&str> = text.split(':').map(str::trim).collect();
    let [low, high, points] = parts.as_slice() else {
        return Err(malformed());
    };
    let low = low.parse::<f64>().map_err(|_| malformed())?;
    let high = high.parse::<f64>().map_err(|_| malformed())?;
    let points = points.parse::<usize>().map_err(|_| malformed())?;
    Ok((low, high, points))
}

/// A bad option value: the option, the value given, the problem and what is allowed.
fn input_error(
    option: &str,
    given: &str,
    problem: impl std::fmt::Display,
    allowed: &str,
) -> AppError {
    AppError::Input(format!(
        "option {option} {given}: {problem}\n  allowed: {allowed}"
    ))
}

/// The option an [`IdealError`] comes from, with what that option accepts.
fn option_of(err: &IdealError) -> (&'static str, String) {
    match err {
        IdealError::Payoff { .. }
        | IdealError::NothingAtStakeWhenPresent
        | IdealError::NothingAtStakeWhenAbsent => ("--payoffs", PAYOFFS_ALLOWED.to_string()),
        IdealError::PresenceRate(_) => (
            "--presence",
            "a probability strictly between 0 and 1, e.g. 0.25".to_string(),
        ),
        IdealError::DPrime(_) => ("--d-prime", "a finite number > 0, e.g. 1.5".to_string()),
        IdealError::Fraction(_) => (
            "--fraction",
            "a number from 0 (criterion left at c = 0) to 1 (criterion at c_opt), e.g. 0.5"
                .to_string(),
        ),
        IdealError::Grid { .. } | IdealError::PayoffRatio(_) => ("--scan", scan_allowed()),
        IdealError::Criterion(_) => ("--fraction", "a finite criterion".to_string()),
    }
}

/// The `--payoffs` value as given, each amount spelled shortly.
fn payoffs_given(req: &IdealRequest) -> String {
    req.payoffs.map(plain).join(",")
}

/// Refuses inputs whose optimum overflows floating point: a payoff ratio, β_opt or c_opt
/// that is not a finite number (amounts near 1e308, or a d′ so small that ln β_opt / d′
/// overflows) would otherwise be reported as "inf".
fn finite_optimum(req: &IdealRequest, observer: &IdealObserver) -> Result<(), AppError> {
    let ratio = observer.payoffs().ratio();
    let beta = observer.optimal_beta();
    if !(ratio.is_finite() && ratio > 0.0 && beta.is_finite() && beta > 0.0) {
        return Err(input_error(
            "--payoffs",
            &payoffs_given(req),
            "the payoff ratio (V_CR + C_FA)/(V_H + C_M) or β_opt overflows floating point",
            PAYOFFS_ALLOWED,
        ));
    }
    if !observer.optimal_outcome().criterion.is_finite() {
        return Err(input_error(
            "--d-prime",
            &plain(req.d_prime),
            "c_opt = ln β_opt / d′ overflows floating point at this d′",
            "a finite number > 0 large enough that ln β_opt / d′ is finite, e.g. 1.5",
        ));
    }
    Ok(())
}

/// A request whose every value has been checked.
struct Validated {
    observer: IdealObserver,
    fraction: Option<f64>,
    grid: Option<Vec<f64>>,
}

/// Checks every option and returns the validated observer, the partial-adjustment
/// fraction and the scan grid. Nothing is computed or written before this succeeds.
fn validate(req: &IdealRequest) -> Result<Validated, AppError> {
    let given = |err: &IdealError| -> String {
        match err {
            IdealError::Payoff { .. }
            | IdealError::NothingAtStakeWhenPresent
            | IdealError::NothingAtStakeWhenAbsent => payoffs_given(req),
            IdealError::PresenceRate(p) => plain(*p),
            IdealError::DPrime(d) => plain(*d),
            IdealError::Fraction(f) | IdealError::Criterion(f) => plain(*f),
            IdealError::Grid { .. } | IdealError::PayoffRatio(_) => req
                .scan
                .map(|(l, h, n)| format!("{}:{}:{n}", plain(l), plain(h)))
                .unwrap_or_default(),
        }
    };
    let wrap = |err: IdealError| {
        let (option, allowed) = option_of(&err);
        input_error(option, &given(&err), &err, &allowed)
    };
    // The payoffs are checked first (the observer is built from them), then d′ and presence.
    let [v_hit, c_miss, v_cr, c_fa] = req.payoffs;
    let observer = IdealObserver::new(
        req.d_prime,
        req.presence,
        Payoffs::new(v_hit, c_miss, v_cr, c_fa).map_err(wrap)?,
    )
    .map_err(wrap)?;
    finite_optimum(req, &observer)?;
    if let Some(f) = req.fraction {
        observer.partial_criterion(f).map_err(wrap)?;
    }
    let grid = match req.scan {
        None => None,
        Some((low, high, points)) => {
            let given = format!("{}:{}:{points}", plain(low), plain(high));
            if !(1..=MAX_SCAN_POINTS).contains(&points) {
                return Err(input_error(
                    "--scan",
                    &given,
                    format!("{points} points is outside 1 to {MAX_SCAN_POINTS}"),
                    &scan_allowed(),
                ));
            }
            let grid = log_spaced(low, high, points).map_err(|_| {
                input_error(
                    "--scan",
                    &given,
                    "the payoff ratios must be finite with 0 < LOW ≤ HIGH",
                    &scan_allowed(),
                )
            })?;
            Some(grid)
        }
    };
    Ok(Validated {
        observer,
        fraction: req.fraction,
        grid,
    })
}

/// The figures for a validated request: the optimum, the partially adjusted criterion and
/// the scan rows.
fn compute(
    observer: IdealObserver,
    fraction: Option<f64>,
    grid: Option<&[f64]>,
) -> Result<IdealFigures, IdealError> {
    let optimal = observer.optimal_outcome();
    let partial = match fraction {
        None => None,
        Some(f) => {
            let outcome = observer.outcome(observer.partial_criterion(f)?)?;
            Some(PartialAdjustment {
                fraction: f,
                payoff_lost: optimal.expected_payoff - outcome.expected_payoff,
                outcome,
            })
        }
    };
    let scan = match grid {
        None => None,
        Some(ratios) => Some(PayoffScan {
            rows: scan_payoff_ratios(observer.d_prime(), observer.presence_rate(), ratios)?,
        }),
    };
    Ok(IdealFigures {
        observer,
        optimal_beta: observer.optimal_beta(),
        optimal,
        partial,
        scan,
    })
}

/// Runs `vigil ideal`: checks the options, claims the JSON file, computes and returns the
/// terminal report (the JSON file is written whole, or not at all).
pub fn ideal(req: &IdealRequest) -> Result<String, AppError> {
    let Validated {
        observer,
        fraction,
        grid,
    } = validate(req)?;
    let mut outputs = CommitSet::new();
    let json = req
        .json
        .as_deref()
        .map(|p| outputs.claim("--json", p))
        .transpose()?;
    let figures = compute(observer, fraction, grid.as_deref())
        .map_err(|e| AppError::Internal(e.to_string()))?;
    if let Some(slot) = json {
        let bytes = report::ideal_text::render_json(&figures)
            .map_err(|e| AppError::Internal(e.to_string()))?;
        outputs.write(slot, &bytes)?;
    }
    // An output named `-` takes standard output in place of the terminal report.
    match outputs.commit()? {
        Some(bytes) => Ok(String::from_utf8_lossy(&bytes).into_owned()),
        None => Ok(report::ideal_text::render(&figures)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn request() -> IdealRequest {
        IdealRequest {
            d_prime: 1.5,
            presence: 0.25,
            payoffs: [1.0, 1.0, 1.0, 1.0],
            fraction: None,
            scan: None,
            json: None,
        }
    }

    #[test]
    fn parses_payoffs_and_scan() {
        assert_eq!(parse_payoffs("10, 5,1,1").unwrap(), [10.0, 5.0, 1.0, 1.0]);
        assert_eq!(parse_scan("0.1:10:9").unwrap(), (0.1, 10.0, 9));
        for bad in ["1,1,1", "1,1,1,1,1", "a,1,1,1", ""] {
            let err = parse_payoffs(bad).unwrap_err();
            assert!(err.contains("V_H,C_M,V_CR,C_FA"), "{bad}: {err}");
        }
        for bad in ["0.1:10", "0.1:10:x", "0.1:10:2.5", "a:b:c"] {
            assert!(
                parse_scan(bad).unwrap_err().contains("LOW:HIGH:POINTS"),
                "{bad}"
            );
        }
    }

    #[test]
    fn each_bad_value_names_its_option_and_exits_2() {
        let cases: Vec<(IdealRequest, &str)> = vec![
            (
                IdealRequest {
                    d_prime: 0.0,
                    ..request()
                },
                "--d-prime",
            ),
            (
                IdealRequest {
                    presence: 1.0,
                    ..request()
                },
                "--presence",
            ),
            (
                IdealRequest {
                    payoffs: [0.0, 0.0, 1.0, 1.0],
                    ..request()
                },
                "--payoffs",
            ),
            (
                IdealRequest {
                    payoffs: [1.0, -1.0, 1.0, 1.0],
                    ..request()
                },
                "--payoffs",
            ),
            (
                IdealRequest {
                    fraction: Some(1.5),
                    ..request()
                },
                "--fraction",
            ),
            (
                IdealRequest {
                    scan: Some((2.0, 1.0, 5)),
                    ..request()
                },
                "--scan",
            ),
            (
                IdealRequest {
                    scan: Some((0.1, 10.0, 0)),
                    ..request()
                },
                "--scan",
            ),
        ];
        for (req, option) in cases {
            let err = ideal(&req).unwrap_err();
            assert_eq!(err.exit_code(), 2, "{option}");
            let msg = err.to_string();
            assert!(msg.starts_with(&format!("option {option} ")), "{msg}");
            assert!(msg.contains("allowed:"), "{msg}");
        }
    }

    #[test]
    fn partial_adjustment_never_beats_the_optimum() {
        let req = IdealRequest {
            fraction: Some(0.5),
            ..request()
        };
        let v = validate(&req).unwrap();
        let figures = compute(v.observer, v.fraction, v.grid.as_deref()).unwrap();
        let partial = figures.partial.unwrap();
        assert!(partial.payoff_lost > 0.0);
        assert!((partial.outcome.criterion - 0.5 * figures.optimal.criterion).abs() < 1e-15);
    }
}
