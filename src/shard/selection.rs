//! Which part of a split run to simulate: `K/N`, the K-th of N parts (1 ≤ K ≤ N).

use serde::{Deserialize, Serialize};
use std::fmt;

/// Most parts a run can be split into.
pub const MAX_PARTS: u32 = 100_000;

/// Part `index` of `count` (both counted from 1).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct Part {
    pub index: u32,
    pub count: u32,
}

impl Part {
    /// Reads `K/N`; the message names what is allowed.
    pub fn parse(text: &str) -> Result<Part, String> {
        let bad = || {
            format!(
                "--part \"{text}\": expected K/N, the K-th of N parts, whole numbers with 1 ≤ K ≤ N ≤ {MAX_PARTS} (for example --part 3/40)"
            )
        };
        let (k, n) = text.trim().split_once('/').ok_or_else(bad)?;
        let index: u32 = k.trim().parse().map_err(|_| bad())?;
        let count: u32 = n.trim().parse().map_err(|_| bad())?;
        if index == 0 || count == 0 || index > count || count > MAX_PARTS {
            return Err(bad());
        }
        Ok(Part { index, count })
    }

    /// Whether the (point, chunk) pair numbered `global` (from 0, plan order) is this part's.
    pub fn holds(&self, global: u64) -> bool {
        global % u64::from(self.count) + 1 == u64::from(self.index)
    }
}

impl fmt::Display for Part {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}/{}", self.index, self.count)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_and_rejects() {
        assert_eq!(
            Part::parse("3/40"),
            Ok(Part {
                index: 3,
                count: 40
            })
        );
        assert_eq!(Part::parse(" 1/1 "), Ok(Part { index: 1, count: 1 }));
        for bad in ["0/4", "5/4", "3", "a/4", "3/0", "-1/4", "1/100001"] {
            assert!(Part::parse(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn parts_deal_every_pair_exactly_once() {
        for n in [1, 2, 7] {
            for g in 0..50 {
                let owners = (1..=n)
                    .filter(|&k| Part { index: k, count: n }.holds(g))
                    .count();
                assert_eq!(owners, 1);
            }
        }
    }
}
