//! `assurance.csv`: one row per design × point (the plan's answer, the assured design) ×
//! driving test: the approximate power at the plan's values, the assurance with its Monte
//! Carlo SE, and the assurance simulated with one study per drawn set of values.

use super::{num, opt, share, write};
use crate::uncertainty::AssuranceReport;
use crate::uncertainty::assured::AssuredPoint;

/// Column names, in order.
pub const COLUMNS: [&str; 17] = [
    "design",
    "point",
    "animals",
    "trials",
    "cost",
    "test",
    "target",
    "assurance_target",
    "point_power",
    "assurance",
    "assurance_mc_se",
    "draws",
    "failed_draws",
    "simulated",
    "simulated_low",
    "simulated_high",
    "studies",
];

pub fn render(report: Option<&AssuranceReport>) -> Result<Vec<u8>, csv::Error> {
    let mut rows = Vec::new();
    let Some(r) = report else {
        return write(&COLUMNS, &rows);
    };
    for d in &r.designs {
        let points: [(&str, Option<&AssuredPoint>); 2] = [
            ("plan-answer", d.at_plan_answer.as_ref()),
            ("assured", d.assured.as_ref()),
        ];
        for (label, p) in points {
            let Some(p) = p else { continue };
            for (t, sim) in p.tests.iter().zip(&p.simulated) {
                let mut row = vec![
                    d.design.clone(),
                    label.to_string(),
                    p.chosen.animals.map_or_else(String::new, |n| n.to_string()),
                    p.chosen.trials.to_string(),
                    opt(p.cost),
                    t.name.clone(),
                    opt(t.target),
                    opt(r.target),
                    num(t.assurance.point_power),
                    num(t.assurance.value),
                    num(t.assurance.mc_se),
                    t.assurance.draws.to_string(),
                    t.assurance.failed.to_string(),
                ];
                row.extend(share(sim));
                row.push(p.studies.to_string());
                rows.push(row);
            }
        }
    }
    write(&COLUMNS, &rows)
}
