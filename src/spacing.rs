//! Log-spaced grids, the one rule behind the trial-count scans and the payoff scans.

/// `count` values from `low` to `high` (both included, end points exact) equally spaced in ln.
/// Callers check 0 < low ≤ high and count ≥ 1; with `count` = 1 or low = high the grid is `[low]`.
pub fn log_grid(low: f64, high: f64, count: usize) -> Vec<f64> {
    if count <= 1 || low == high {
        return vec![low];
    }
    let (a, b) = (low.ln(), high.ln());
    let step = (b - a) / (count - 1) as f64;
    // End points are set exactly so the grid covers [low, high] without rounding drift.
    (0..count)
        .map(|i| match i {
            0 => low,
            i if i == count - 1 => high,
            i => (a + step * i as f64).exp(),
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decades_are_hit_exactly_at_the_ends_and_closely_inside() {
        // ln-spacing of 0.1..10 in 5 points is 0.1, 10^-0.5, 1, 10^0.5, 10 (by definition).
        let g = log_grid(0.1, 10.0, 5);
        let want = [0.1, 10f64.powf(-0.5), 1.0, 10f64.powf(0.5), 10.0];
        for (x, w) in g.iter().zip(want) {
            assert!((x / w - 1.0).abs() < 1e-14, "{x} vs {w}");
        }
        assert_eq!(g[0], 0.1);
        assert_eq!(g[4], 10.0);
    }
}
