//! From the raw file to a trusted [`Plan`]: every range and consistency check, once.

use super::keys::allowed;
use super::locate::{key_path_of, line_of};
use super::raw::{RawCriterion, RawDesign, RawPlan, RawScale};
use super::{CriterionRule, Plan, PlanError, Study};
use crate::design::{
    BaseRate, Condition, Design, RatingScale, RecordKind, Response, SharedParameter, split_trials,
};
use crate::model::ideal::{IdealObserver, Payoffs};
use crate::model::{LapseSpec, Observer, normal};
use crate::vocab::RateCorrection;
use std::path::Path;
use toml::Spanned;

/// Default number of simulated experiments per scenario.
pub const DEFAULT_EXPERIMENTS: u64 = 2000;
/// Default confidence level of intervals.
pub const DEFAULT_CONFIDENCE: f64 = 0.95;
/// Default level of hypothesis tests.
pub const DEFAULT_ALPHA: f64 = 0.05;
/// Default ceiling of the sample-size search.
pub const DEFAULT_MAX_TRIALS: u32 = 2000;
/// Largest trial count per condition accepted (keeps tables and memory bounded).
pub const MAX_TRIALS: i64 = 1_000_000;

/// Error builder bound to one file's text.
pub(super) struct Ctx<'a> {
    pub(super) path: &'a Path,
    pub(super) source: &'a str,
}

impl Ctx<'_> {
    /// An error at a value's span; the key path comes from the text, `key` names the rule.
    pub(super) fn at<T>(&self, value: &Spanned<T>, key: &str, problem: String) -> PlanError {
        let span = value.span();
        PlanError {
            file: self.path.to_path_buf(),
            line: Some(line_of(self.source, span.start)),
            key: key_path_of(self.source, &span),
            problem,
            allowed: allowed(key).to_string(),
        }
    }
}

pub fn validate(path: &Path, source: &str, raw: RawPlan) -> Result<Plan, PlanError> {
    let ctx = Ctx { path, source };
    let study = study(&ctx, &raw)?;
    let spec = observer(&ctx, &raw)?;
    if raw.designs.get_ref().is_empty() {
        return Err(ctx.at(&raw.designs, "design", "no design given".into()));
    }
    let mut designs = Vec::new();
    for d in raw.designs.get_ref() {
        let design = design(&ctx, d, &spec)?;
        if designs.iter().any(|x: &Design| x.name == design.name) {
            return Err(ctx.at(
                &d.name,
                "name",
                format!("design name \"{}\" is used twice", design.name),
            ));
        }
        designs.push(design);
    }
    let mut observer = spec.observer;
    if spec.optimal {
        // The header's criterion: the ideal one for the first design's first condition.
        observer.criterion = designs[0].conditions[0].criterion;
    }
    let goals = super::validate_goals::goals(&ctx, &raw, &designs, &study, spec.payoffs)?;
    Ok(Plan {
        source: path.to_path_buf(),
        study,
        observer,
        criterion_rule: spec.rule(),
        designs,
        hypotheses: goals.hypotheses,
        targets: goals.targets,
        animals: goals.animals,
        budget: goals.budget,
    })
}

/// The observer as written, before conditions resolve an "optimal" criterion.
struct ObserverSpec {
    observer: Observer,
    payoffs: Option<Payoffs>,
    fraction: f64,
    optimal: bool,
    criterion_span: std::ops::Range<usize>,
}

impl ObserverSpec {
    fn rule(&self) -> CriterionRule {
        match (self.optimal, self.payoffs) {
            (true, Some(payoffs)) => CriterionRule::Optimal {
                payoffs,
                fraction: self.fraction,
            },
            _ => CriterionRule::Fixed {
                criterion: self.observer.criterion,
            },
        }
    }

    /// The criterion of a condition without its own: the fixed one, or the ideal
    /// observer's for the condition's presence rate (times the partial-adjustment fraction).
    fn default_criterion(
        &self,
        ctx: &Ctx,
        presence: f64,
        d_prime: f64,
        fixed: f64,
    ) -> Result<f64, PlanError> {
        if !self.optimal {
            return Ok(fixed);
        }
        optimal_criterion(
            ctx,
            self.payoffs,
            presence,
            d_prime,
            self.fraction,
            &self.criterion_span,
        )
    }
}

/// c_opt = ln β_opt / d′ for a presence rate (Green & Swets 1966), times `fraction`.
fn optimal_criterion(
    ctx: &Ctx,
    payoffs: Option<Payoffs>,
    presence: f64,
    d_prime: f64,
    fraction: f64,
    span: &std::ops::Range<usize>,
) -> Result<f64, PlanError> {
    let at = Spanned::new(span.clone(), ());
    let payoffs = payoffs.ok_or_else(|| {
        ctx.at(
            &at,
            "criterion",
            "\"optimal\" needs an [observer.payoffs] table".into(),
        )
    })?;
    let ideal = IdealObserver::new(d_prime, presence, payoffs)
        .map_err(|e| ctx.at(&at, "criterion", e.to_string()))?;
    ideal
        .partial_criterion(fraction)
        .map_err(|e| ctx.at(&at, "criterion", e.to_string()))
}

fn study(ctx: &Ctx, raw: &RawPlan) -> Result<Study, PlanError> {
    let s = &raw.study;
    let seed = *s.seed.get_ref();
    if seed < 0 {
        return Err(ctx.at(&s.seed, "seed", format!("{seed} is negative")));
    }
    let experiments = match &s.experiments {
        None => DEFAULT_EXPERIMENTS,
        Some(e) if *e.get_ref() >= 1 => *e.get_ref() as u64,
        Some(e) => {
            return Err(ctx.at(
                e,
                "experiments",
                format!("{} is not a positive number of experiments", e.get_ref()),
            ));
        }
    };
    let confidence = match &s.confidence {
        None => DEFAULT_CONFIDENCE,
        Some(c) if open_unit(*c.get_ref()) => *c.get_ref(),
        Some(c) => {
            return Err(ctx.at(
                c,
                "confidence",
                format!("{} is outside (0, 1)", c.get_ref()),
            ));
        }
    };
    let rate_correction = match &s.rate_correction {
        None => RateCorrection::LogLinear,
        Some(r) => RateCorrection::from_name(r.get_ref()).ok_or_else(|| {
            ctx.at(
                r,
                "rate_correction",
                format!("\"{}\" is not a known correction", r.get_ref()),
            )
        })?,
    };
    let alpha = match &s.alpha {
        None => DEFAULT_ALPHA,
        Some(a) if open_unit(*a.get_ref()) => *a.get_ref(),
        Some(a) => return Err(ctx.at(a, "alpha", format!("{} is outside (0, 1)", a.get_ref()))),
    };
    let max_trials = match &s.max_trials {
        None => DEFAULT_MAX_TRIALS,
        Some(m) if (2..=MAX_TRIALS).contains(m.get_ref()) => *m.get_ref() as u32,
        Some(m) => {
            return Err(ctx.at(
                m,
                "max_trials",
                format!("{} is outside 2 to {MAX_TRIALS}", m.get_ref()),
            ));
        }
    };
    Ok(Study {
        title: s.title.clone(),
        seed: seed as u64,
        experiments,
        confidence,
        rate_correction,
        alpha,
        max_trials,
    })
}

fn observer(ctx: &Ctx, raw: &RawPlan) -> Result<ObserverSpec, PlanError> {
    let o = &raw.observer;
    let d = *o.d_prime.get_ref();
    if !(d.is_finite() && d >= 0.0) {
        return Err(ctx.at(
            &o.d_prime,
            "d_prime",
            format!("{d} is not a sensitivity ≥ 0"),
        ));
    }
    let payoffs = match &o.payoffs {
        None => None,
        Some(p) => {
            let r = p.get_ref();
            Some(
                Payoffs::new(
                    r.value_hit,
                    r.cost_miss,
                    r.value_correct_rejection,
                    r.cost_false_alarm,
                )
                .map_err(|e| ctx.at(p, "payoffs", e.to_string()))?,
            )
        }
    };
    let fraction = match &o.criterion_fraction {
        None => 1.0,
        Some(f) if (0.0..=1.0).contains(f.get_ref()) => *f.get_ref(),
        Some(f) => {
            return Err(ctx.at(
                f,
                "criterion_fraction",
                format!("{} is outside [0, 1]", f.get_ref()),
            ));
        }
    };
    let (c, optimal) = match o.criterion.get_ref() {
        RawCriterion::Value(c) if c.is_finite() => (*c, false),
        RawCriterion::Value(c) => {
            return Err(ctx.at(
                &o.criterion,
                "criterion",
                format!("{c} is not a finite number"),
            ));
        }
        // A placeholder until each condition's presence rate gives its ideal criterion.
        RawCriterion::Word(w) if w == "optimal" => (0.0, true),
        RawCriterion::Word(w) => {
            return Err(ctx.at(
                &o.criterion,
                "criterion",
                format!("\"{w}\" is neither a number nor \"optimal\""),
            ));
        }
    };
    if optimal && payoffs.is_none() {
        return Err(ctx.at(
            &o.criterion,
            "criterion",
            "criterion = \"optimal\" needs an [observer.payoffs] table".into(),
        ));
    }
    if let (false, Some(f)) = (optimal, &o.criterion_fraction) {
        return Err(ctx.at(
            f,
            "criterion_fraction",
            "criterion_fraction applies only with criterion = \"optimal\"".into(),
        ));
    }
    let sigma = match &o.sigma {
        None => 1.0,
        Some(s) if s.get_ref().is_finite() && *s.get_ref() > 0.0 => *s.get_ref(),
        Some(s) => return Err(ctx.at(s, "sigma", format!("{} is not a positive SD", s.get_ref()))),
    };
    let lapse = match (&o.lapse_rate, &o.lapse_yes) {
        (None, None) => None,
        (None, Some(g)) => {
            return Err(ctx.at(
                g,
                "lapse_rate",
                "lapse_yes is given without lapse_rate".into(),
            ));
        }
        (Some(l), g) => {
            let rate = *l.get_ref();
            if !(rate.is_finite() && (0.0..1.0).contains(&rate)) {
                return Err(ctx.at(l, "lapse_rate", format!("{rate} is outside [0, 1)")));
            }
            let guess_yes = match g {
                None => 0.5,
                Some(g) if (0.0..=1.0).contains(g.get_ref()) => *g.get_ref(),
                Some(g) => {
                    return Err(ctx.at(
                        g,
                        "lapse_yes",
                        format!("{} is outside [0, 1]", g.get_ref()),
                    ));
                }
            };
            (rate > 0.0).then_some(LapseSpec { rate, guess_yes })
        }
    };
    let observer = Observer {
        d_prime: d,
        criterion: c,
        sigma,
        lapse,
    };
    Ok(ObserverSpec {
        observer,
        payoffs,
        fraction,
        optimal,
        criterion_span: o.criterion.span(),
    })
}

fn design(ctx: &Ctx, d: &RawDesign, spec: &ObserverSpec) -> Result<Design, PlanError> {
    let observer = &spec.observer;
    let name = d.name.get_ref().trim().to_string();
    if name.is_empty() {
        return Err(ctx.at(&d.name, "name", "the design name is empty".into()));
    }
    let response = match &d.scale {
        None => Response::YesNo,
        Some(s) => Response::Rating(scale(ctx, s, observer)?),
    };
    let record = record(ctx, d, &response)?;
    let base_rate = base_rate(ctx, d, record)?;
    let default_presence = match &d.presence {
        Some(p) => Some(presence(ctx, p)?),
        None => None,
    };
    let boundary_criterion = match &response {
        Response::YesNo => observer.criterion,
        Response::Rating(s) => s.criteria[s.boundary - 1],
    };
    let conditions = conditions(ctx, d, &name, default_presence, spec, boundary_criterion)?;
    let trials = trials(ctx, d, record, &conditions)?;
    let shared = shared(ctx, d, &response, base_rate, conditions.len())?;
    Ok(Design {
        name,
        presence: conditions[0].presence,
        trials,
        response,
        record,
        base_rate,
        conditions,
        shared,
    })
}

fn presence(ctx: &Ctx, p: &Spanned<f64>) -> Result<f64, PlanError> {
    let v = *p.get_ref();
    if open_unit(v) {
        Ok(v)
    } else {
        Err(ctx.at(p, "presence", format!("{v} is outside (0, 1)")))
    }
}

fn record(ctx: &Ctx, d: &RawDesign, response: &Response) -> Result<RecordKind, PlanError> {
    let Some(r) = &d.record else {
        return Ok(RecordKind::Full);
    };
    let kind = RecordKind::from_name(r.get_ref()).ok_or_else(|| {
        ctx.at(
            r,
            "record",
            format!("\"{}\" is not a known record", r.get_ref()),
        )
    })?;
    if kind != RecordKind::Full && matches!(response, Response::Rating(_)) {
        return Err(ctx.at(
            r,
            "record",
            format!(
                "a \"{}\" record keeps yes/no responses only; it cannot be combined with a rating scale",
                r.get_ref()
            ),
        ));
    }
    Ok(kind)
}

fn base_rate(ctx: &Ctx, d: &RawDesign, record: RecordKind) -> Result<BaseRate, PlanError> {
    let census = match &d.census {
        Some(c) if *c.get_ref() >= 1 => Some((c, *c.get_ref() as u64)),
        Some(c) => {
            return Err(ctx.at(
                c,
                "census",
                format!("a census of {} encounters is not ≥ 1", c.get_ref()),
            ));
        }
        None => None,
    };
    let Some(b) = &d.base_rate else {
        if let Some((c, _)) = census {
            return Err(ctx.at(
                c,
                "census",
                "census is given but base_rate is not \"census\"".into(),
            ));
        }
        return Ok(BaseRate::Known);
    };
    if record == RecordKind::Full {
        return Err(ctx.at(
            b,
            "base_rate",
            "a full record fixes the present and absent trial counts, so it has no base rate to know or estimate"
                .into(),
        ));
    }
    match (b.get_ref().as_str(), census) {
        ("known", None) => Ok(BaseRate::Known),
        ("unknown", None) => Ok(BaseRate::Unknown),
        ("census", Some((_, m))) => Ok(BaseRate::Census(m)),
        ("census", None) => Err(ctx.at(
            b,
            "census",
            "base_rate = \"census\" needs census = <encounters>".into(),
        )),
        ("known" | "unknown", Some((c, _))) => Err(ctx.at(
            c,
            "census",
            "census is given but base_rate is not \"census\"".into(),
        )),
        (other, _) => Err(ctx.at(
            b,
            "base_rate",
            format!("\"{other}\" is not a known base-rate option"),
        )),
    }
}

fn conditions(
    ctx: &Ctx,
    d: &RawDesign,
    design_name: &str,
    default_presence: Option<f64>,
    spec: &ObserverSpec,
    criterion: f64,
) -> Result<Vec<Condition>, PlanError> {
    let d_prime = spec.observer.d_prime;
    let Some(list) = &d.conditions else {
        let presence = default_presence.ok_or_else(|| {
            ctx.at(
                &d.name,
                "presence",
                format!("design \"{design_name}\" gives no presence rate"),
            )
        })?;
        return Ok(vec![Condition {
            name: design_name.to_string(),
            presence,
            d_prime,
            criterion: spec.default_criterion(ctx, presence, d_prime, criterion)?,
        }]);
    };
    if list.get_ref().is_empty() {
        return Err(ctx.at(list, "condition", "the list of conditions is empty".into()));
    }
    let mut out: Vec<Condition> = Vec::new();
    for c in list.get_ref() {
        let name = c.name.get_ref().trim().to_string();
        if name.is_empty() || out.iter().any(|x| x.name == name) {
            return Err(ctx.at(
                &c.name,
                "name",
                format!("condition name \"{name}\" is empty or used twice"),
            ));
        }
        let presence = match &c.presence {
            Some(p) => presence(ctx, p)?,
            None => default_presence.ok_or_else(|| {
                ctx.at(
                    &c.name,
                    "presence",
                    format!("condition \"{name}\" has no presence rate and the design gives none"),
                )
            })?,
        };
        let dp = match &c.d_prime {
            Some(v) if v.get_ref().is_finite() && *v.get_ref() >= 0.0 => *v.get_ref(),
            Some(v) => {
                return Err(ctx.at(
                    v,
                    "d_prime",
                    format!("{} is not a sensitivity ≥ 0", v.get_ref()),
                ));
            }
            None => d_prime,
        };
        let crit = match c.criterion.as_ref().map(|v| (v, v.get_ref())) {
            Some((_, RawCriterion::Value(x))) if x.is_finite() => *x,
            Some((v, RawCriterion::Word(w))) if w == "optimal" => {
                optimal_criterion(ctx, spec.payoffs, presence, dp, spec.fraction, &v.span())?
            }
            Some((v, _)) => {
                return Err(ctx.at(v, "criterion", "not a finite number or \"optimal\"".into()));
            }
            None => spec.default_criterion(ctx, presence, dp, criterion)?,
        };
        out.push(Condition {
            name,
            presence,
            d_prime: dp,
            criterion: crit,
        });
    }
    Ok(out)
}

fn trials(
    ctx: &Ctx,
    d: &RawDesign,
    record: RecordKind,
    conditions: &[Condition],
) -> Result<Vec<u32>, PlanError> {
    if d.trials.get_ref().is_empty() {
        return Err(ctx.at(
            &d.trials,
            "trials",
            "the list of trial counts is empty".into(),
        ));
    }
    let mut trials = Vec::new();
    for t in d.trials.get_ref() {
        let n = *t.get_ref();
        if !(2..=MAX_TRIALS).contains(&n) {
            return Err(ctx.at(
                t,
                "trials",
                format!("{n} trials is outside 2 to {MAX_TRIALS}"),
            ));
        }
        if record == RecordKind::Full {
            for c in conditions {
                let split = split_trials(n as u32, c.presence);
                if split.present == 0 || split.absent == 0 {
                    return Err(ctx.at(
                        t,
                        "trials",
                        format!(
                            "{n} trials at presence {} (condition \"{}\") leaves {} present and {} absent trials; both must be at least 1",
                            c.presence, c.name, split.present, split.absent
                        ),
                    ));
                }
            }
        }
        if trials.contains(&(n as u32)) {
            return Err(ctx.at(t, "trials", format!("{n} is listed twice")));
        }
        trials.push(n as u32);
    }
    trials.sort_unstable();
    Ok(trials)
}

fn shared(
    ctx: &Ctx,
    d: &RawDesign,
    response: &Response,
    base_rate: BaseRate,
    conditions: usize,
) -> Result<Vec<SharedParameter>, PlanError> {
    let rating = match response {
        Response::YesNo => None,
        Response::Rating(s) => Some(s),
    };
    let has_sigma = rating.is_some_and(|s| !s.fix_sigma);
    let has_spacing = rating.is_some_and(|s| s.categories >= 3);
    let has_base_rate = base_rate != BaseRate::Known;
    let Some(list) = &d.shared else {
        // Default: one animal, one sensitivity and one scale shape; criteria (and base
        // rates) free per condition.
        let mut out = vec![SharedParameter::DPrime];
        if has_sigma {
            out.push(SharedParameter::Sigma);
        }
        if has_spacing {
            out.push(SharedParameter::Spacing);
        }
        return Ok(if conditions > 1 { out } else { Vec::new() });
    };
    if conditions < 2 {
        return Err(ctx.at(
            list,
            "shared",
            "sharing needs two or more [[design.condition]] tables".into(),
        ));
    }
    let mut out = Vec::new();
    for item in list.get_ref() {
        let p = SharedParameter::from_name(item.get_ref()).ok_or_else(|| {
            ctx.at(
                item,
                "shared",
                format!(
                    "\"{}\" is not a parameter that conditions can share",
                    item.get_ref()
                ),
            )
        })?;
        let missing = match p {
            SharedParameter::Sigma if !has_sigma => Some("σ is fixed at 1 in this design"),
            SharedParameter::Spacing if !has_spacing => {
                Some("the design has no criteria besides the boundary")
            }
            SharedParameter::BaseRate if !has_base_rate => {
                Some("the base rate is known (or fixed by a full record), not estimated")
            }
            _ => None,
        };
        if let Some(why) = missing {
            return Err(ctx.at(
                item,
                "shared",
                format!("\"{}\" cannot be shared: {why}", item.get_ref()),
            ));
        }
        if !out.contains(&p) {
            out.push(p);
        }
    }
    Ok(out)
}

fn scale(
    ctx: &Ctx,
    spanned: &Spanned<RawScale>,
    observer: &Observer,
) -> Result<RatingScale, PlanError> {
    let s = spanned.get_ref();
    let k = *s.categories.get_ref();
    if !(2..=12).contains(&k) {
        return Err(ctx.at(
            &s.categories,
            "categories",
            format!("{k} categories is outside 2 to 12"),
        ));
    }
    let b = *s.boundary.get_ref();
    if !(1..k).contains(&b) {
        return Err(ctx.at(
            &s.boundary,
            "boundary",
            format!("criterion {b} does not exist on a {k}-category scale"),
        ));
    }
    let k = k as usize;
    let criteria = match (&s.criteria, &s.absent_shares) {
        (Some(c), None) => {
            let v = c.get_ref();
            if v.len() != k - 1 {
                return Err(ctx.at(
                    c,
                    "criteria",
                    format!("{} criteria given for {k} categories", v.len()),
                ));
            }
            if v.iter().any(|x| !x.is_finite()) || v.windows(2).any(|w| w[0] >= w[1]) {
                return Err(ctx.at(
                    c,
                    "criteria",
                    "the criteria are not strictly increasing finite numbers".into(),
                ));
            }
            v.clone()
        }
        (None, Some(sh)) => criteria_from_shares(ctx, sh, k, observer.d_prime)?,
        (Some(c), Some(_)) => {
            return Err(ctx.at(
                c,
                "criteria",
                "give criteria or absent_shares, not both".into(),
            ));
        }
        (None, None) => {
            return Err(ctx.at(
                spanned,
                "scale",
                "the scale needs criteria or absent_shares".into(),
            ));
        }
    };
    let fix_sigma = s.fix_sigma.unwrap_or(false);
    if k == 2 && !fix_sigma {
        return Err(ctx.at(
            spanned,
            "fix_sigma",
            "a 2-category scale cannot estimate σ; set fix_sigma = true".into(),
        ));
    }
    Ok(RatingScale {
        categories: k,
        boundary: b as usize,
        criteria,
        fix_sigma,
    })
}

/// Criteria from the expected share of absent trials in each category: the absent
/// evidence is N(0, 1), so k_j = z(share of categories below j) and c_j = k_j − d′/2.
fn criteria_from_shares(
    ctx: &Ctx,
    sh: &Spanned<Vec<f64>>,
    k: usize,
    d_prime: f64,
) -> Result<Vec<f64>, PlanError> {
    let v = sh.get_ref();
    if v.len() != k {
        return Err(ctx.at(
            sh,
            "absent_shares",
            format!("{} shares given for {k} categories", v.len()),
        ));
    }
    if v.iter().any(|x| !(x.is_finite() && *x > 0.0)) {
        return Err(ctx.at(
            sh,
            "absent_shares",
            "every share must be a number > 0".into(),
        ));
    }
    let total: f64 = v.iter().sum();
    if (total - 1.0).abs() > 1e-6 {
        return Err(ctx.at(
            sh,
            "absent_shares",
            format!("the shares sum to {total}, not 1"),
        ));
    }
    let mut cumulative = 0.0;
    let mut out = Vec::with_capacity(k - 1);
    for share in &v[..k - 1] {
        cumulative += share;
        let z = normal::z(cumulative).ok_or_else(|| {
            ctx.at(
                sh,
                "absent_shares",
                "a cumulative share reached 0 or 1".into(),
            )
        })?;
        out.push(z - d_prime / 2.0);
    }
    Ok(out)
}

pub(super) fn open_unit(x: f64) -> bool {
    x > 0.0 && x < 1.0
}
