//! Analytic derivatives against central finite differences, over random designs, θ and counts.

use proptest::prelude::*;
use vigil::cells::cell_probabilities::{Order, cell_probabilities};
use vigil::cells::likelihood::{Counts, log_likelihood, log_likelihood_derivatives};
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::parameter_map::ParameterKind;
use vigil::cells::spec::{
    BaseRate, BaseRateLink, ConditionSpec, Lapse, NaturalValues, Record, Role,
};

/// Central-difference step and tolerance: O(h²) truncation (~1e-8 relative) and rounding
/// (~1e-16·|lnL|/h) both stay well below the tolerance, while a wrong term in a derivative
/// shows up at O(1) relative.
const H: f64 = 1e-4;
const TOL: f64 = 1e-5;

fn rating(
    name: &str,
    k: usize,
    boundary: usize,
    full: (u64, u64),
    sigma_free: bool,
) -> ConditionSpec {
    let values = NaturalValues {
        d_prime: 1.0,
        criterion: 0.0,
        sigma: 1.0,
        gaps: vec![0.5; k - 2],
        base_rate: 0.5,
    };
    let rec = Record::Full {
        present: full.0,
        absent: full.1,
    };
    let mut spec = ConditionSpec::rating(name, boundary, rec, values);
    if !sigma_free || k == 2 {
        spec.roles.sigma = Role::Fixed;
    }
    spec
}

/// Design families: 0 = one full-count condition (K = 2..6, σ free or fixed, maybe a lapse),
/// 1 = error totals with a census, 2 = response totals with a census and a lapse,
/// 3 = two linked rating conditions (shared d′, σ and gaps), 4 = two linked error-totals
/// conditions with a shared free base rate.
fn design(
    family: u8,
    k: usize,
    boundary: usize,
    sigma_free: bool,
    lapse: bool,
) -> ObservationModel {
    let boundary = 1 + boundary % (k - 1);
    let totals = |name: &str, response: bool, census: u64| {
        let knowledge = BaseRate::Census(census);
        let rec = if response {
            Record::ResponseTotals {
                encounters: 90,
                base_rate: knowledge,
            }
        } else {
            Record::ErrorTotals {
                encounters: 90,
                base_rate: knowledge,
            }
        };
        ConditionSpec::yes_no(name, rec, 1.0, 0.0, 0.5)
    };
    let specs = match family {
        0 => {
            let mut s = rating("solo", k, boundary, (40, 50), sigma_free);
            if lapse {
                let mut guess = vec![0.5 / (k as f64 - 1.0); k];
                guess[0] = 0.5;
                s.lapse = Some(Lapse { rate: 0.07, guess });
            }
            vec![s]
        }
        1 => vec![totals("field", false, 60)],
        2 => {
            let mut s = totals("field", true, 60);
            s.lapse = Some(Lapse::yes_no(0.05, 0.3));
            vec![s]
        }
        3 => {
            let k = k.max(3);
            let boundary = 1 + boundary % (k - 1);
            let mut a = rating("a", k, boundary, (30, 30), true);
            let mut b = rating("b", k, 1 + (boundary % (k - 1)), (25, 35), true);
            for s in [&mut a, &mut b] {
                s.roles.d_prime = Role::Shared;
                s.roles.sigma = Role::Shared;
                s.roles.gaps = Role::Shared;
            }
            vec![a, b]
        }
        _ => {
            let mut a = totals("a", false, 40);
            let mut b = totals("b", false, 0);
            for s in [&mut a, &mut b] {
                s.roles.base_rate = BaseRateLink::Shared;
            }
            vec![a, b]
        }
    };
    ObservationModel::new(specs).unwrap()
}

fn theta_from(model: &ObservationModel, u: &[f64]) -> Vec<f64> {
    let ranges = |kind: ParameterKind| match kind {
        ParameterKind::DPrime => (-1.0, 3.0),
        ParameterKind::Criterion => (-1.5, 1.5),
        ParameterKind::LnSigma => (-0.5, 0.5),
        ParameterKind::LnGap(_) => (-1.5, 0.3),
        ParameterKind::LogitBaseRate => (-2.0, 2.0),
    };
    model
        .parameters()
        .kinds()
        .iter()
        .zip(u)
        .map(|(&kind, &x)| {
            let (lo, hi) = ranges(kind);
            lo + (hi - lo) * x
        })
        .collect()
}

fn counts_from(model: &ObservationModel, raw: &[u8]) -> Counts {
    let mut it = raw.iter().cycle();
    let cells = model
        .blocks()
        .iter()
        .map(|b| {
            b.cells
                .iter()
                .map(|_| f64::from(*it.next().unwrap() % 31))
                .collect()
        })
        .collect();
    Counts::new(model, cells).unwrap()
}

fn close(analytic: f64, numeric: f64, scale: f64) -> bool {
    (analytic - numeric).abs() <= TOL * (1.0 + scale)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn log_likelihood_gradient_and_hessian_match_finite_differences(
        family in 0u8..5, k in 2usize..=6, boundary in 0usize..5, sigma_free: bool, lapse: bool,
        u in proptest::collection::vec(0.0f64..1.0, 24),
        raw in proptest::collection::vec(any::<u8>(), 30),
    ) {
        let model = design(family, k, boundary, sigma_free, lapse);
        let theta = theta_from(&model, &u);
        let counts = counts_from(&model, &raw);
        let d = log_likelihood_derivatives(&model, &counts, &theta).unwrap();
        prop_assume!(d.value.is_finite());
        let scale = d.hessian.amax();
        for i in 0..theta.len() {
            let (mut up, mut down) = (theta.clone(), theta.clone());
            up[i] += H;
            down[i] -= H;
            let fd = (log_likelihood(&model, &counts, &up).unwrap()
                - log_likelihood(&model, &counts, &down).unwrap()) / (2.0 * H);
            prop_assert!(close(d.gradient[i], fd, d.gradient.amax()),
                "gradient {i} ({}): {} vs {fd}", model.parameters().names()[i], d.gradient[i]);
            let gu = log_likelihood_derivatives(&model, &counts, &up).unwrap().gradient;
            let gd = log_likelihood_derivatives(&model, &counts, &down).unwrap().gradient;
            for j in 0..theta.len() {
                let fd2 = (gu[j] - gd[j]) / (2.0 * H);
                prop_assert!(close(d.hessian[(i, j)], fd2, scale),
                    "hessian ({i},{j}): {} vs {fd2}", d.hessian[(i, j)]);
            }
        }
    }

    #[test]
    fn cell_jacobian_and_hessians_match_finite_differences(
        family in 0u8..5, k in 2usize..=6, boundary in 0usize..5, sigma_free: bool, lapse: bool,
        u in proptest::collection::vec(0.0f64..1.0, 24),
    ) {
        let model = design(family, k, boundary, sigma_free, lapse);
        let theta = theta_from(&model, &u);
        let at = cell_probabilities(&model, &theta, Order::Second).unwrap();
        for i in 0..theta.len() {
            let (mut up, mut down) = (theta.clone(), theta.clone());
            up[i] += H;
            down[i] -= H;
            let pu = cell_probabilities(&model, &up, Order::First).unwrap();
            let pd = cell_probabilities(&model, &down, Order::First).unwrap();
            for (b, block) in at.iter().enumerate() {
                for c in 0..block.p.len() {
                    let fd = (pu[b].p[c] - pd[b].p[c]) / (2.0 * H);
                    prop_assert!(close(block.jacobian[(c, i)], fd, 0.0));
                    for j in 0..theta.len() {
                        let fd2 = (pu[b].jacobian[(c, j)] - pd[b].jacobian[(c, j)]) / (2.0 * H);
                        prop_assert!(close(block.hessians[c][(i, j)], fd2, 0.0),
                            "block {b} cell {c} ({i},{j}): {} vs {fd2}", block.hessians[c][(i, j)]);
                    }
                }
            }
        }
    }
}
