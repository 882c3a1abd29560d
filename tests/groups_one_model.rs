//! The yes/no and rating group paths draw each animal's counts from their own closed-form
//! probabilities (fast: no model is built per animal). They must be the one true model the
//! engine simulates single subjects from: the cell probabilities of
//! `design::model::truth_specs` with the animal's d′ and c, here obtained through the
//! general-route animal (`CellsAnimals::animal_specs`) and the observation model of `cells`.
//! Two implementations of the same formulas, so they agree to rounding (1e-12); a scale
//! placed differently, a lapse spread differently or a σ dropped moves them by far more.

use vigil::cells::cell_probabilities::{Order, cell_probabilities};
use vigil::cells::observation_model::ObservationModel;
use vigil::design::{BaseRate, Condition, Design, RatingScale, RecordKind, Response, split_trials};
use vigil::groups::animal_cells::CellsAnimals;
use vigil::groups::animal_rating::RatingAnimals;
use vigil::groups::animal_yesno::YesNoAnimals;
use vigil::groups::population::Deviation;
use vigil::model::{LapseSpec, Observer};
use vigil::vocab::RateCorrection;

const TRIALS: u32 = 40;

fn design(response: Response) -> Design {
    Design {
        name: "d".into(),
        presence: 0.4,
        trials: vec![TRIALS],
        response,
        record: RecordKind::Full,
        base_rate: BaseRate::Known,
        conditions: vec![Condition {
            name: "c".into(),
            presence: 0.4,
            d_prime: 1.3,
            criterion: 0.15,
        }],
        shared: Vec::new(),
    }
}

fn observer() -> Observer {
    Observer {
        d_prime: 1.3,
        criterion: 0.15,
        sigma: 1.3,
        lapse: Some(LapseSpec {
            rate: 0.05,
            guess_yes: 0.6,
        }),
    }
}

const ANIMALS: [Deviation; 3] = [
    Deviation {
        d_prime: 0.0,
        criterion: 0.0,
        criterion_shift: 0.0,
        d_prime_change: 0.0,
        ln_sigma: 0.0,
        lapse_rate: None,
    },
    Deviation {
        d_prime: 0.4,
        criterion: -0.35,
        criterion_shift: 0.0,
        d_prime_change: 0.0,
        ln_sigma: 0.0,
        lapse_rate: None,
    },
    Deviation {
        d_prime: -0.25,
        criterion: 0.5,
        criterion_shift: 0.0,
        d_prime_change: 0.0,
        ln_sigma: 0.0,
        lapse_rate: None,
    },
];

/// (present, absent) cell probabilities of the animal's true model (blocks in model order:
/// present trials, then absent trials).
fn truth(design: &Design, deviation: &Deviation) -> (Vec<f64>, Vec<f64>) {
    let cells = CellsAnimals::new(design, &observer(), TRIALS, RateCorrection::LogLinear).unwrap();
    let model = ObservationModel::new(cells.animal_specs(deviation)).unwrap();
    let blocks = cell_probabilities(&model, &model.hypothesised_theta(), Order::First).unwrap();
    (blocks[0].p.clone(), blocks[1].p.clone())
}

#[test]
fn yes_no_animals_are_the_true_model() {
    let d = design(Response::YesNo);
    let split = split_trials(TRIALS, 0.4);
    let path = YesNoAnimals::new(
        &observer(),
        &d.conditions[0],
        split,
        RateCorrection::LogLinear,
    );
    for dev in &ANIMALS {
        let rates = path.animal(dev).rates();
        let (present, absent) = truth(&d, dev);
        assert!((rates.hit - present[1]).abs() < 1e-12, "{dev:?}");
        assert!((rates.false_alarm - absent[1]).abs() < 1e-12, "{dev:?}");
    }
}

#[test]
fn rating_animals_are_the_true_model() {
    for fix_sigma in [false, true] {
        let scale = RatingScale {
            categories: 5,
            boundary: 3,
            criteria: vec![-0.9, -0.3, 0.15, 0.8],
            fix_sigma,
        };
        let d = design(Response::Rating(scale.clone()));
        let split = split_trials(TRIALS, 0.4);
        let path = RatingAnimals::new(
            &scale,
            &d.conditions[0],
            &observer(),
            split,
            RateCorrection::LogLinear,
        );
        for dev in &ANIMALS {
            let (absent, present) = path.probabilities(dev).unwrap();
            let (want_present, want_absent) = truth(&d, dev);
            for j in 0..5 {
                assert!(
                    (absent[j] - want_absent[j]).abs() < 1e-12,
                    "fix_sigma {fix_sigma}, {dev:?}, absent category {j}"
                );
                assert!(
                    (present[j] - want_present[j]).abs() < 1e-12,
                    "fix_sigma {fix_sigma}, {dev:?}, present category {j}"
                );
            }
        }
    }
}
