//! The hypothesised numbers a plan may vary (`[sensitivity]`) or hold uncertain
//! (`[assurance]`): which keys, their allowed ranges, and how a variant plan is written.
//!
//! A variant is the plan's own text with one or more values replaced and the two sections
//! removed, validated again from the start: a value the plan format refuses is refused here
//! with the same words, and everything derived from a value (a condition that inherits d′, an
//! ideal criterion) follows it.

use serde::Serialize;

/// One assumption key with what it means and the closed range its values may take.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct KeyInfo {
    /// Table and key in the plan (`hypothesis.*.shift` for a group difference's shift).
    pub table: &'static str,
    pub name: &'static str,
    /// What the value is, in words, for reports.
    pub label: &'static str,
    pub low: f64,
    pub high: f64,
    /// The plan's value when the key is absent (`None`: the key is required where used).
    pub default: Option<f64>,
}

/// Below 1 for a range open at 1 (a correlation, a lapse rate): values this close are
/// numerically the bound, so nothing is lost by closing the range here.
const BELOW_ONE: f64 = 0.999;
const INF: f64 = f64::INFINITY;

/// Every key an assumption may name, in the order reports list them.
pub const KEYS: &[KeyInfo] = &[
    KeyInfo {
        table: "observer",
        name: "d_prime",
        label: "d′",
        low: 0.0,
        high: INF,
        default: None,
    },
    KeyInfo {
        table: "observer",
        name: "criterion",
        label: "criterion c",
        low: -INF,
        high: INF,
        default: None,
    },
    KeyInfo {
        table: "observer",
        name: "criterion_fraction",
        label: "share of the ideal criterion shift",
        low: 0.0,
        high: 1.0,
        default: Some(1.0),
    },
    KeyInfo {
        table: "observer",
        name: "sigma",
        label: "σ",
        low: 1e-3,
        high: INF,
        default: Some(1.0),
    },
    KeyInfo {
        table: "observer",
        name: "lapse_rate",
        label: "lapse rate",
        low: 0.0,
        high: BELOW_ONE,
        default: Some(0.0),
    },
    KeyInfo {
        table: "animals",
        name: "sd_d_prime",
        label: "between-animal SD of d′",
        low: 0.0,
        high: INF,
        default: Some(0.0),
    },
    KeyInfo {
        table: "animals",
        name: "sd_criterion",
        label: "between-animal SD of c",
        low: 0.0,
        high: INF,
        default: Some(0.0),
    },
    KeyInfo {
        table: "animals",
        name: "correlation",
        label: "between-animal correlation of d′ and c",
        low: -BELOW_ONE,
        high: BELOW_ONE,
        default: Some(0.0),
    },
    KeyInfo {
        table: "animals",
        name: "sd_criterion_shift",
        label: "between-animal SD of the criterion shift",
        low: 0.0,
        high: INF,
        default: Some(0.0),
    },
    KeyInfo {
        table: "animals",
        name: "sd_d_prime_change",
        label: "between-animal SD of the d′ change",
        low: 0.0,
        high: INF,
        default: Some(0.0),
    },
    KeyInfo {
        table: "animals",
        name: "sd_ln_sigma",
        label: "between-animal SD of ln σ",
        low: 0.0,
        high: 2.0,
        default: Some(0.0),
    },
    KeyInfo {
        table: "animals",
        name: "sd_lapse_rate",
        label: "between-animal SD of the lapse rate",
        low: 0.0,
        high: INF,
        default: Some(0.0),
    },
    KeyInfo {
        table: "hypothesis",
        name: "shift",
        label: "shift",
        low: -INF,
        high: INF,
        default: None,
    },
];

/// The key names as a list for "allowed:" texts.
pub fn allowed_keys() -> String {
    KEYS.iter()
        .map(|k| match k.table {
            "hypothesis" => "`hypothesis.NAME.shift`".to_string(),
            t => format!("`{t}.{}`", k.name),
        })
        .collect::<Vec<_>>()
        .join(", ")
}

/// A parsed assumption key.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(into = "String")]
pub struct AssumptionKey {
    pub table: &'static str,
    pub name: &'static str,
    /// The hypothesis named in `hypothesis.NAME.shift`.
    pub hypothesis: Option<String>,
}

impl From<AssumptionKey> for String {
    fn from(k: AssumptionKey) -> String {
        k.dotted()
    }
}

impl AssumptionKey {
    /// Reads `observer.d_prime`, `animals.sd_criterion`, `hypothesis.NAME.shift`…
    pub fn parse(dotted: &str) -> Option<Self> {
        if let Some(rest) = dotted.strip_prefix("hypothesis.") {
            let name = rest.strip_suffix(".shift")?;
            return (!name.is_empty()).then(|| Self {
                table: "hypothesis",
                name: "shift",
                hypothesis: Some(name.to_string()),
            });
        }
        let (table, name) = dotted.split_once('.')?;
        KEYS.iter()
            .find(|k| k.table == table && k.name == name && k.table != "hypothesis")
            .map(|k| Self {
                table: k.table,
                name: k.name,
                hypothesis: None,
            })
    }

    pub fn info(&self) -> &'static KeyInfo {
        KEYS.iter()
            .find(|k| k.table == self.table && k.name == self.name)
            .expect("parsed keys are registered")
    }

    /// As written in a plan.
    pub fn dotted(&self) -> String {
        match &self.hypothesis {
            Some(h) => format!("hypothesis.{h}.shift"),
            None => format!("{}.{}", self.table, self.name),
        }
    }

    /// In words, for reports ("between-animal SD of c", "shift of “habitat”").
    pub fn label(&self) -> String {
        match &self.hypothesis {
            Some(h) => format!("shift of \u{201c}{h}\u{201d}"),
            None => self.info().label.to_string(),
        }
    }

    /// Where the key's table sits in a plan's TOML: the top-level table, and for a
    /// hypothesis's key its index among the `[[hypothesis]]` tables.
    fn locate(&self, plan: &toml::Table) -> Result<Option<usize>, String> {
        match &self.hypothesis {
            Some(name) => plan
                .get("hypothesis")
                .and_then(|v| v.as_array())
                .and_then(|hs| {
                    hs.iter()
                        .position(|h| h.get("name").and_then(|n| n.as_str()) == Some(name.as_str()))
                })
                .map(Some)
                .ok_or_else(|| format!("the plan has no [[hypothesis]] named \"{name}\"")),
            None => plan
                .get(self.table)
                .is_some_and(toml::Value::is_table)
                .then_some(None)
                .ok_or_else(|| format!("the plan has no [{}] table", self.table)),
        }
    }

    /// The table holding the key, for writing.
    fn holder<'t>(&self, plan: &'t mut toml::Table) -> Result<&'t mut toml::Table, String> {
        let at = self.locate(plan)?;
        let v = plan.get_mut(self.table).expect("located");
        let t = match at {
            Some(i) => v.as_array_mut().and_then(|hs| hs.get_mut(i)),
            None => Some(v),
        };
        Ok(t.and_then(|t| t.as_table_mut()).expect("located"))
    }

    /// The plan's value of this key (its default when absent).
    pub fn value_in(&self, plan: &toml::Table) -> Result<f64, String> {
        let at = self.locate(plan)?;
        let v = &plan[self.table];
        let holder = match at {
            Some(i) => &v[i],
            None => v,
        };
        match holder.get(self.name) {
            Some(toml::Value::Float(x)) => Ok(*x),
            Some(toml::Value::Integer(i)) => Ok(*i as f64),
            Some(_) => Err(format!(
                "`{}` is not a number in this plan, so it cannot vary",
                self.dotted()
            )),
            None => self
                .info()
                .default
                .ok_or_else(|| format!("the plan does not set `{}`", self.dotted())),
        }
    }

    /// Writes `value` into the plan's TOML. A new observer criterion moves every rating
    /// scale's listed criteria with it (the spacing stays): a scale's boundary criterion is
    /// the observer's, so the scale describes the same animal moved.
    pub fn set_in(&self, plan: &mut toml::Table, value: f64) -> Result<(), String> {
        if (self.table, self.name) == ("observer", "criterion") {
            let shift = value - self.value_in(plan)?;
            shift_scales(plan, shift);
        }
        let holder = self.holder(plan)?;
        holder.insert(self.name.to_string(), toml::Value::Float(value));
        Ok(())
    }
}

/// Adds `shift` to every listed criterion of every design's scale.
fn shift_scales(plan: &mut toml::Table, shift: f64) {
    let Some(designs) = plan.get_mut("design").and_then(|d| d.as_array_mut()) else {
        return;
    };
    for d in designs {
        let Some(criteria) = d
            .get_mut("scale")
            .and_then(|s| s.get_mut("criteria"))
            .and_then(|c| c.as_array_mut())
        else {
            continue;
        };
        for c in criteria {
            let x = match c {
                toml::Value::Float(x) => *x,
                toml::Value::Integer(i) => *i as f64,
                _ => continue,
            };
            *c = toml::Value::Float(x + shift);
        }
    }
}

/// `[sensitivity]`: each assumption with the values to try, in key order.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Sensitivity {
    pub sweeps: Vec<Sweep>,
}

/// One assumption and its values (the plan's own value among them or not).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Sweep {
    pub key: AssumptionKey,
    /// The plan's value.
    pub plan_value: f64,
    /// Increasing, distinct.
    pub values: Vec<f64>,
}

/// Default number of values drawn for an assurance.
pub const DEFAULT_DRAWS: usize = 2000;

/// `[assurance]`: distributions of the uncertain assumptions.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AssuranceSpec {
    pub draws: usize,
    /// The assurance the search must reach (`None`: report assurance, search on power).
    pub target: Option<f64>,
    pub uncertain: Vec<Uncertain>,
}

/// One uncertain assumption: a normal centred on the plan's value, truncated to a range.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Uncertain {
    pub key: AssumptionKey,
    pub plan_value: f64,
    pub sd: f64,
    pub low: f64,
    pub high: f64,
}
