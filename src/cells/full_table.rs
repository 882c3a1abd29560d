//! The full table of one condition: P(category | class) for both stimulus classes, with first and
//! second derivatives in the condition's local coordinates u = (d′, c, ln σ, ln gaps…, logit π).
//!
//! Dorfman & Alf (1969): P(m | absent) = Φ(k_{m+1}) − Φ(k_m), P(m | present) =
//! Φ((k_{m+1} − d′)/σ) − Φ((k_m − d′)/σ), with k₀ = −∞, k_K = +∞. The boundary criterion is
//! k_b = c + d′/2; the others are reached from it by summing gaps e^{u_gap}.
//!
//! Hot path of every fit and every information sweep, so it is hand-written with flat buffers
//! reused between calls rather than built from small matrices.

use crate::cells::parameter_map::{
    SLOT_CRITERION, SLOT_D_PRIME, SLOT_FIRST_GAP, SLOT_LN_SIGMA, local_dim,
};
use crate::cells::spec::Lapse;
use crate::model::normal;

/// Stimulus class of a full-table row.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Class {
    Absent = 0,
    Present = 1,
}

/// P(category | class) with derivatives, for one condition, in local coordinates.
#[derive(Debug, Clone, Default)]
pub(crate) struct TableJets {
    dim: usize,
    categories: usize,
    second: bool,
    value: Vec<f64>,
    grad: Vec<f64>,
    hess: Vec<f64>,
    // Scratch reused between calls.
    k: Vec<f64>,
    dk: Vec<f64>,
    dz: Vec<f64>,
    d2z: Vec<f64>,
    bound_cdf: Vec<f64>,
    bound_sf: Vec<f64>,
    bound_grad: Vec<f64>,
    bound_hess: Vec<f64>,
}

impl TableJets {
    /// Number of local coordinates L = K + 2.
    pub fn dim(&self) -> usize {
        self.dim
    }

    fn entry(&self, class: Class, category: usize) -> usize {
        class as usize * self.categories + category
    }

    /// P(category | class).
    pub fn value(&self, class: Class, category: usize) -> f64 {
        self.value[self.entry(class, category)]
    }

    /// ∂P/∂u (length L).
    pub fn grad(&self, class: Class, category: usize) -> &[f64] {
        let e = self.entry(class, category) * self.dim;
        &self.grad[e..e + self.dim]
    }

    /// ∂²P/∂u∂uᵀ (L × L, row-major); empty unless second derivatives were asked for.
    pub fn hess(&self, class: Class, category: usize) -> &[f64] {
        if !self.second {
            return &[];
        }
        let l2 = self.dim * self.dim;
        let e = self.entry(class, category) * l2;
        &self.hess[e..e + l2]
    }

    /// Evaluates the table at local coordinates `u` (length K + 2) of a validated condition.
    /// The table's mean difference is `d_scale`·d′ (1, or √2 for a two-choice task: see
    /// `spec::Record::d_prime_scale`); derivatives stay with respect to d′ itself.
    pub fn evaluate(
        &mut self,
        u: &[f64],
        categories: usize,
        boundary: usize,
        lapse: Option<&Lapse>,
        second: bool,
        d_scale: f64,
    ) {
        let kk = categories;
        let l = local_dim(kk);
        let l2 = l * l;
        self.dim = l;
        self.categories = kk;
        self.second = second;
        let nb = kk - 1;
        self.value.resize(2 * kk, 0.0);
        self.grad.resize(2 * kk * l, 0.0);
        self.hess.resize(if second { 2 * kk * l2 } else { 0 }, 0.0);
        self.criteria(u, kk, boundary, l, d_scale);
        self.dz.resize(l, 0.0);
        self.d2z.resize(l2, 0.0);
        self.bound_cdf.resize(nb, 0.0);
        self.bound_sf.resize(nb, 0.0);
        self.bound_grad.resize(nb * l, 0.0);
        self.bound_hess
            .resize(if second { nb * l2 } else { 0 }, 0.0);
        let mu = d_scale * u[SLOT_D_PRIME];
        let inv_sigma = (-u[SLOT_LN_SIGMA]).exp();
        for class in [Class::Absent, Class::Present] {
            for i in 0..nb {
                let z = self.bound_derivatives(class, i, (mu, d_scale), inv_sigma, l, second);
                self.bound_cdf[i] = normal::cdf(z);
                self.bound_sf[i] = normal::sf(z);
                let dens = normal::pdf(z);
                // ∂Φ(z) = φ(z)·∂z;  ∂²Φ(z) = φ(z)·(∂²z − z·∂z ∂zᵀ)  since φ′(z) = −z·φ(z).
                for a in 0..l {
                    self.bound_grad[i * l + a] = dens * self.dz[a];
                }
                if second {
                    for a in 0..l {
                        for b in 0..l {
                            let v = self.d2z[a * l + b] - z * self.dz[a] * self.dz[b];
                            self.bound_hess[i * l2 + a * l + b] = dens * v;
                        }
                    }
                }
            }
            self.assemble(class, l, second, lapse);
        }
    }

    /// Criteria k_i (stored at i − 1) and their derivatives ∂k/∂u. The second derivatives of
    /// k are diagonal in the gap coordinates and equal to the first (∂²e^g/∂g² = e^g).
    fn criteria(&mut self, u: &[f64], kk: usize, boundary: usize, l: usize, d_scale: f64) {
        let nb = kk - 1;
        self.k.resize(nb, 0.0);
        self.dk.clear();
        self.dk.resize(nb * l, 0.0);
        let b = boundary - 1;
        self.k[b] = u[SLOT_CRITERION] + 0.5 * d_scale * u[SLOT_D_PRIME];
        for i in 0..nb {
            self.dk[i * l + SLOT_D_PRIME] = 0.5 * d_scale;
            self.dk[i * l + SLOT_CRITERION] = 1.0;
        }
        // Above the boundary: k_{i} = k_{i−1} + e^{u_gap(i−1)}; gap m lies between k_{m}, k_{m+1}
        // in 0-based storage.
        for i in b + 1..nb {
            let w = u[SLOT_FIRST_GAP + i - 1].exp();
            self.k[i] = self.k[i - 1] + w;
            for m in b..i {
                let wm = u[SLOT_FIRST_GAP + m].exp();
                self.dk[i * l + SLOT_FIRST_GAP + m] = wm;
            }
        }
        for i in (0..b).rev() {
            let w = u[SLOT_FIRST_GAP + i].exp();
            self.k[i] = self.k[i + 1] - w;
            for m in i..b {
                let wm = u[SLOT_FIRST_GAP + m].exp();
                self.dk[i * l + SLOT_FIRST_GAP + m] = -wm;
            }
        }
    }

    /// Fills `dz`, `d2z` for bound `i` of `class` and returns z. `mu` = (s·d′, s).
    /// Absent: z = k. Present: z = (k − s·d′)·e^{−u₂}, so ∂z/∂u₂ = −z and ∂²z/∂u₂∂x = −∂z/∂x.
    fn bound_derivatives(
        &mut self,
        class: Class,
        i: usize,
        (mu, d_scale): (f64, f64),
        inv_sigma: f64,
        l: usize,
        second: bool,
    ) -> f64 {
        let dk = &self.dk[i * l..(i + 1) * l];
        let (z, scale) = match class {
            Class::Absent => (self.k[i], 1.0),
            Class::Present => ((self.k[i] - mu) * inv_sigma, inv_sigma),
        };
        for (d, k) in self.dz.iter_mut().zip(dk) {
            *d = k * scale;
        }
        if class == Class::Present {
            self.dz[SLOT_D_PRIME] -= d_scale * inv_sigma;
            self.dz[SLOT_LN_SIGMA] = -z;
        }
        if second {
            self.d2z.iter_mut().for_each(|x| *x = 0.0);
            for (g, k) in dk.iter().enumerate().skip(SLOT_FIRST_GAP) {
                self.d2z[g * l + g] = k * scale;
            }
            if class == Class::Present {
                let s = SLOT_LN_SIGMA;
                for a in 0..l {
                    if a != s {
                        self.d2z[a * l + s] = -self.dz[a];
                        self.d2z[s * l + a] = -self.dz[a];
                    }
                }
                self.d2z[s * l + s] = z;
            }
        }
        z
    }

    /// Category m spans [k_m, k_{m+1}); its probability is the Φ difference computed on the
    /// side of zero where it does not cancel: sf(lo) − sf(hi) when lo > 0, else Φ(hi) − Φ(lo).
    fn assemble(&mut self, class: Class, l: usize, second: bool, lapse: Option<&Lapse>) {
        let kk = self.categories;
        let l2 = l * l;
        let keep = lapse.map_or(1.0, |lp| 1.0 - lp.rate);
        for m in 0..kk {
            let lo = m.checked_sub(1);
            let hi = if m + 1 < kk { Some(m) } else { None };
            let p = match (lo, hi) {
                (None, Some(h)) => self.bound_cdf[h],
                (Some(o), None) => self.bound_sf[o],
                (Some(o), Some(h)) => {
                    if self.bound_sf[o] < 0.5 {
                        self.bound_sf[o] - self.bound_sf[h]
                    } else {
                        self.bound_cdf[h] - self.bound_cdf[o]
                    }
                }
                (None, None) => 1.0,
            };
            let e = self.entry(class, m);
            let guess = lapse.map_or(0.0, |lp| lp.rate * lp.guess[m]);
            self.value[e] = keep * p.max(0.0) + guess;
            for a in 0..l {
                let up = hi.map_or(0.0, |h| self.bound_grad[h * l + a]);
                let down = lo.map_or(0.0, |o| self.bound_grad[o * l + a]);
                self.grad[e * l + a] = keep * (up - down);
            }
            if second {
                for ab in 0..l2 {
                    let up = hi.map_or(0.0, |h| self.bound_hess[h * l2 + ab]);
                    let down = lo.map_or(0.0, |o| self.bound_hess[o * l2 + ab]);
                    self.hess[e * l2 + ab] = keep * (up - down);
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // With σ = 1 and K = 2, H = Φ(d′/2 − c), F = Φ(−d′/2 − c) (project convention; Macmillan &
    // Creelman 2005). H = .70, F = .10 gives d′ = 1.805952, c = 0.378576 (SciPy 1.17;
    // printed to 3 decimals in W. Schneider, "Short notes on the theory of signal detection").
    #[test]
    fn yes_no_rates_match_the_convention() {
        let mut t = TableJets::default();
        t.evaluate(&[1.805952, 0.378576, 0.0, 0.0], 2, 1, None, false, 1.0);
        assert!((t.value(Class::Present, 1) - 0.70).abs() < 1e-6);
        assert!((t.value(Class::Absent, 1) - 0.10).abs() < 1e-6);
    }

    #[test]
    fn rows_sum_to_one_and_gradients_to_zero() {
        let mut t = TableJets::default();
        let u = [1.3, -0.2, 0.3, -0.5, 0.1, -1.0, 0.4, 0.0];
        let lapse = Lapse {
            rate: 0.1,
            guess: vec![0.2, 0.2, 0.2, 0.2, 0.1, 0.1],
        };
        t.evaluate(&u, 6, 3, Some(&lapse), true, 1.0);
        for class in [Class::Absent, Class::Present] {
            let s: f64 = (0..6).map(|m| t.value(class, m)).sum();
            assert!((s - 1.0).abs() < 1e-12);
            for a in 0..t.dim() {
                let g: f64 = (0..6).map(|m| t.grad(class, m)[a]).sum();
                assert!(g.abs() < 1e-12);
            }
        }
    }

    // A two-choice table is the yes/no table at √2·d′ (Macmillan & Creelman 2005, ch. 7):
    // with c = 0, H = 1 − F = p_c = Φ(d′/√2); p_c = 0.76 at d′ = 0.998863 (SciPy 1.17
    // `sqrt(2)*norm.ppf(0.76)`).
    #[test]
    fn two_choice_scale_gives_the_proportion_correct() {
        let mut t = TableJets::default();
        t.evaluate(
            &[0.998863, 0.0, 0.0, 0.0],
            2,
            1,
            None,
            true,
            std::f64::consts::SQRT_2,
        );
        assert!((t.value(Class::Present, 1) - 0.76).abs() < 1e-6);
        assert!((t.value(Class::Absent, 0) - 0.76).abs() < 1e-6);
        // ∂H/∂d′ = φ(d′/√2)/√2 (chain rule, written out here).
        let want = crate::model::normal::pdf(0.998863 / std::f64::consts::SQRT_2)
            / std::f64::consts::SQRT_2;
        assert!((t.grad(Class::Present, 1)[0] - want).abs() < 1e-12);
    }

    #[test]
    fn far_tail_cells_keep_relative_accuracy() {
        // Absent row with all criteria far above zero: Φ(k2) − Φ(k1) must come from the upper
        // tails, not from 1 − 1.
        let mut t = TableJets::default();
        t.evaluate(&[0.0, 9.0, 0.0, 0.0, 0.0], 3, 1, None, false, 1.0);
        let exact = normal::sf(9.0) - normal::sf(10.0);
        let got = t.value(Class::Absent, 1);
        assert!(((got - exact) / exact).abs() < 1e-12, "{got} vs {exact}");
    }
}
