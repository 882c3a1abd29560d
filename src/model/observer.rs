//! The hypothesised observer and the yes/no measures of signal detection theory.
//!
//! Conventions (Macmillan & Creelman 2005): absent evidence ~ N(0, 1), present ~ N(d′, σ²).
//! The criterion c is measured from the midpoint between the two means in absent-SD units;
//! positive c is conservative (fewer "present" responses).

use super::normal;
use serde::Serialize;

/// The animal the plan hypothesises: its sensitivity, bias and evidence spread.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Observer {
    /// Sensitivity d′: distance between the means of the two evidence distributions.
    pub d_prime: f64,
    /// Criterion c at the yes/no boundary (midpoint convention).
    pub criterion: f64,
    /// SD of the present-stimulus evidence; 1 for the equal-variance model.
    pub sigma: f64,
    /// Optional lapses: trials on which the animal does not attend.
    pub lapse: Option<LapseSpec>,
}

/// Lapses: on a share `rate` of trials the animal ignores the stimulus and responds
/// "present" with probability `guess_yes`, so P(yes) = (1 − λ)·P_model(yes) + λ·g.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct LapseSpec {
    /// λ in [0, 1); the plan's `lapse_rate` (and its name in JSON).
    #[serde(rename = "lapse_rate")]
    pub rate: f64,
    /// g in [0, 1]; the plan's `lapse_yes` (and its name in JSON).
    #[serde(rename = "lapse_yes")]
    pub guess_yes: f64,
}

/// Hit and false-alarm rates of a yes/no observer.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Rates {
    pub hit: f64,
    pub false_alarm: f64,
}

impl LapseSpec {
    /// P(category m) on a lapse trial of a K-category scale with boundary b: "present"
    /// responses (probability g) spread evenly over the categories at or above b, the rest
    /// evenly below it. With K = 2 this is the usual guessing model.
    pub fn guess(&self, m: usize, categories: usize, boundary: usize) -> f64 {
        if m >= boundary {
            self.guess_yes / (categories - boundary) as f64
        } else {
            (1.0 - self.guess_yes) / boundary as f64
        }
    }

    /// Mixes lapses into category probabilities in place: p = (1 − λ)·p + λ·guess.
    pub fn mix(&self, probabilities: &mut [f64], boundary: usize) {
        let k = probabilities.len();
        for (m, p) in probabilities.iter_mut().enumerate() {
            *p = (1.0 - self.rate) * *p + self.rate * self.guess(m, k, boundary);
        }
    }
}

impl Observer {
    /// Expected yes/no rates with the boundary at k = c + d′/2:
    /// H = Φ((d′ − k)/σ), F = Φ(−k); with σ = 1, H = Φ(d′/2 − c), F = Φ(−d′/2 − c).
    /// Lapses mix in the guessing rate: p = (1 − λ)·p_model + λ·g.
    pub fn rates(&self) -> Rates {
        let k = self.criterion + self.d_prime / 2.0;
        let (hit, false_alarm) = (normal::sf((k - self.d_prime) / self.sigma), normal::sf(k));
        match self.lapse {
            None => Rates { hit, false_alarm },
            Some(l) => Rates {
                hit: (1.0 - l.rate) * hit + l.rate * l.guess_yes,
                false_alarm: (1.0 - l.rate) * false_alarm + l.rate * l.guess_yes,
            },
        }
    }
}

/// d′, c and β from a pair of z-transformed rates.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct YesNoMeasures {
    pub d_prime: f64,
    pub criterion: f64,
    pub beta: f64,
}

impl YesNoMeasures {
    /// d′ = z(H) − z(F); c = −[z(H) + z(F)]/2; β = exp(c·d′)
    /// (Macmillan & Creelman 2005; Stanislaw & Todorov 1999).
    pub fn from_z(z_hit: f64, z_false_alarm: f64) -> Self {
        let d_prime = z_hit - z_false_alarm;
        let criterion = -0.5 * (z_hit + z_false_alarm);
        Self {
            d_prime,
            criterion,
            beta: (criterion * d_prime).exp(),
        }
    }

    /// The measures from rates strictly inside (0, 1); `None` otherwise.
    pub fn from_rates(hit: f64, false_alarm: f64) -> Option<Self> {
        Some(Self::from_z(normal::z(hit)?, normal::z(false_alarm)?))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Worked examples: printed to 3 decimals in W. Schneider, "Short notes on
    // the theory of signal detection"; full precision from SciPy 1.17 (tests/golden has more).
    #[test]
    fn worked_examples() {
        let cases = [
            (0.70, 0.10, 1.805952, 0.378576, 1.981173),
            (0.50, 0.40, 0.253347, 0.126674, 1.032613),
            (0.85, 0.05, 2.681287, 0.304210, 2.260700),
        ];
        for (h, f, d, c, b) in cases {
            let m = YesNoMeasures::from_rates(h, f).unwrap();
            assert!((m.d_prime - d).abs() < 1e-6, "d′ for H={h} F={f}");
            assert!((m.criterion - c).abs() < 1e-6, "c for H={h} F={f}");
            assert!((m.beta - b).abs() < 1e-6, "β for H={h} F={f}");
        }
    }

    #[test]
    fn rates_invert_measures() {
        let obs = Observer {
            d_prime: 1.3,
            criterion: 0.4,
            sigma: 1.0,
            lapse: None,
        };
        let r = obs.rates();
        let m = YesNoMeasures::from_rates(r.hit, r.false_alarm).unwrap();
        assert!((m.d_prime - 1.3).abs() < 1e-12);
        assert!((m.criterion - 0.4).abs() < 1e-12);
    }
}

#[cfg(test)]
mod lapse_tests {
    use super::*;

    // The lapse (guessing) model written out independently: a share λ of trials answered
    // "yes" at rate g regardless of the stimulus (common practice in psychophysics, e.g.
    // Wichmann & Hill 2001 [memory for the citation]).
    #[test]
    fn lapse_mixes_in_the_guessing_rate() {
        let (d, c, lambda, g) = (1.5_f64, 0.3_f64, 0.1_f64, 0.4_f64);
        let obs = Observer {
            d_prime: d,
            criterion: c,
            sigma: 1.0,
            lapse: Some(LapseSpec {
                rate: lambda,
                guess_yes: g,
            }),
        };
        let r = obs.rates();
        let h = normal::cdf(d / 2.0 - c);
        let f = normal::cdf(-d / 2.0 - c);
        assert!((r.hit - ((1.0 - lambda) * h + lambda * g)).abs() < 1e-15);
        assert!((r.false_alarm - ((1.0 - lambda) * f + lambda * g)).abs() < 1e-15);
    }
}
