//! The documented split rule, "present = presence × trials rounded to the nearest whole
//! number, halves up", holds for exact halves that binary floating point puts just below ½.

mod common;

use common::{accepted, plan_text};

/// The row of `check`'s scenario table for `trials`, as its whitespace-separated cells.
fn row(table: &str, presence: &str, trials: u32) -> Vec<String> {
    table
        .lines()
        .map(|l| l.split_whitespace().map(str::to_string).collect::<Vec<_>>())
        .find(|cells| {
            let n = cells.len();
            // … presence, c, trials, present, absent (check's last five columns).
            n >= 5 && cells[n - 5] == presence && cells[n - 3] == trials.to_string()
        })
        .unwrap_or_else(|| panic!("no row for {presence} × {trials} in:\n{table}"))
}

#[test]
fn exact_halves_round_up_in_check() {
    // presence × trials = 31.5, 59.5, 31.5 and 28.5 exactly (in decimal); the rule gives
    // 32, 60, 32 and 29 present trials.
    for (presence, trials, present) in [
        ("0.7", 45, 32),
        ("0.7", 85, 60),
        ("0.35", 90, 32),
        ("0.57", 50, 29),
    ] {
        let text = plan_text("playback-yes-no.toml")
            .replacen("presence = 0.3", &format!("presence = {presence}"), 1)
            .replacen(
                "trials = [20, 40, 80, 160]",
                &format!("trials = [{trials}]"),
                1,
            );
        let table = accepted(&text);
        let cells = row(&table, presence, trials);
        let n = cells.len();
        assert_eq!(
            cells[n - 2],
            present.to_string(),
            "{presence} × {trials}: {cells:?}"
        );
        assert_eq!(cells[n - 1], (trials - present).to_string(), "{cells:?}");
    }
}
