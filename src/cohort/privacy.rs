//! The discrete Laplace mechanism and how the privacy budget is split (Dwork & Roth
//! 2014, The Algorithmic Foundations of Differential Privacy, §3.3 and Theorem 3.16;
//! Canonne, Kamath & Steinke 2020 for the exact integer sampler).
//!
//! A released integer query with L1 sensitivity Δ gets independent discrete Laplace
//! noise of scale `Δ/ε` on every coordinate, which makes it ε-differentially private
//! (CKS 2020, Proposition 1 with the two-sided geometric distribution); the noise is
//! drawn with integer arithmetic only, never in floating point (Mironov 2012 shows how
//! floating-point Laplace noise leaks the value it hides); releases
//! with budgets ε₁…ε_r compose to Σεⱼ (sequential composition), and anything computed
//! from released values alone costs nothing more (post-processing).
//!
//! What `priors build` releases, for A attributes and a per-contributor bound of m
//! items ([`super::bound_contributions`]):
//!
//! - per attribute, the population histogram (contributors per value): Δ = 1;
//! - the number of contributors: Δ = 1;
//! - per attribute, the item-by-value histogram of memberships: one person adds 1 to
//!   one value's cell of at most m items, so Δ = m.
//!
//! The budget ε is split: a share `people_share` (default 10%) evenly over the A + 1
//! people counts, the rest evenly over the A item histograms. Membership rates,
//! dropping items under the member threshold, clamping negatives to zero, and the
//! calibration fitted on members drawn from the released table
//! ([`super::fit::pseudo_members`]) are post-processing of the noisy values. The candidate items come from the schema
//! (public), not from the cohort, so which items appear reveals nothing about it.

use rand::Rng;

/// Denominator of the rational ε the sampler works with: ε is rounded *down* to a
/// multiple of 2⁻²⁰, so the noise is never smaller than the nominal Δ/ε asks.
const EPSILON_DENOMINATOR: u64 = 1 << 20;

/// The smallest ε the exact sampler accepts (one step of [`EPSILON_DENOMINATOR`]).
pub const MIN_EPSILON: f64 = 1.0 / EPSILON_DENOMINATOR as f64;

/// Integer noise from the discrete Laplace (two-sided geometric) distribution with
/// scale `t/s`: `P(Z = z) = tanh(a/2)·e^{−a|z|}` with `a = s/t` (scipy's
/// `dlaplace(a)`). Adding it to an integer count with L1 sensitivity Δ gives
/// ε-differential privacy when `t/s = Δ/ε` (Canonne, Kamath & Steinke 2020, "The
/// Discrete Gaussian for Differential Privacy", §2 and Algorithm 2). The sampler uses
/// integer arithmetic and uniform integer draws only, so no floating-point rounding
/// can leak the count (the attack of Mironov 2012 on floating-point Laplace noise).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct DiscreteLaplace {
    /// Scale numerator.
    pub t: u64,
    /// Scale denominator.
    pub s: u64,
}

impl DiscreteLaplace {
    /// The noise for sensitivity `delta` and budget `epsilon`: scale `Δ/ε'` where ε'
    /// is ε rounded down to a multiple of 2⁻²⁰. `None` when ε is not a number at
    /// least [`MIN_EPSILON`] or the scale does not fit in integers.
    pub fn for_budget(delta: u64, epsilon: f64) -> Option<DiscreteLaplace> {
        if !(epsilon.is_finite() && epsilon >= MIN_EPSILON) || delta == 0 {
            return None;
        }
        let scaled = (epsilon * EPSILON_DENOMINATOR as f64).floor();
        if scaled >= u64::MAX as f64 {
            return None;
        }
        let s = scaled as u64;
        let t = delta.checked_mul(EPSILON_DENOMINATOR)?;
        let g = gcd(t, s);
        Some(DiscreteLaplace { t: t / g, s: s / g })
    }

    /// The scale `t/s` (the `b` of the continuous Laplace it approximates).
    pub fn scale(&self) -> f64 {
        self.t as f64 / self.s as f64
    }

    /// scipy's shape parameter `a = s/t = 1/scale`.
    pub fn shape(&self) -> f64 {
        self.s as f64 / self.t as f64
    }

    /// Variance `2e^{−a}/(1 − e^{−a})²` (CKS 2020, Definition 28 and the remark after
    /// it; about `2·scale²` for large scales).
    pub fn variance(&self) -> f64 {
        let a = self.shape();
        let q = (-a).exp();
        2.0 * q / (1.0 - q).powi(2)
    }

    /// One draw (CKS 2020, Algorithm 2).
    pub fn sample(&self, rng: &mut impl Rng) -> i64 {
        let (t, s) = (self.t, self.s);
        loop {
            let u = rng.random_range(0..t);
            if !bernoulli_exp(rng, u, t) {
                continue;
            }
            let mut v: u64 = 0;
            while bernoulli_exp(rng, 1, 1) {
                v += 1;
            }
            // X = U + t·V, in 128 bits (V is geometric: a large value is vanishingly
            // rare, but it must not wrap).
            let x = u as u128 + t as u128 * v as u128;
            let y = x / s as u128;
            let negative = rng.random_bool(0.5);
            if negative && y == 0 {
                continue;
            }
            let y = i64::try_from(y).unwrap_or(i64::MAX);
            return if negative { -y } else { y };
        }
    }
}

/// A Bernoulli draw with probability `n/d` (`0 ≤ n ≤ d`, `d > 0`) from one uniform
/// integer.
fn bernoulli_ratio(rng: &mut impl Rng, n: u128, d: u128) -> bool {
    rng.random_range(0..d) < n
}

/// A Bernoulli draw with probability `exp(−n/d)` for `n/d ≥ 0` (CKS 2020,
/// Algorithm 1): for `γ ≤ 1`, count how long a run of Bernoulli(γ/k) successes lasts
/// and return whether its length is even; for larger `γ`, one Bernoulli(e⁻¹) per whole
/// unit, then the fractional part.
fn bernoulli_exp(rng: &mut impl Rng, n: u64, d: u64) -> bool {
    let (n, d) = (n as u128, d as u128);
    let whole = n / d;
    for _ in 0..whole {
        if !bernoulli_exp_at_most_one(rng, 1, 1) {
            return false;
        }
    }
    bernoulli_exp_at_most_one(rng, n - whole * d, d)
}

fn bernoulli_exp_at_most_one(rng: &mut impl Rng, n: u128, d: u128) -> bool {
    let mut k: u128 = 1;
    loop {
        // Bernoulli(γ/k) with γ = n/d. k stays small (it passes j with probability
        // at most 1/j!); saturating keeps the arithmetic sound in any case.
        if !bernoulli_ratio(rng, n, d.saturating_mul(k)) {
            break;
        }
        k += 1;
    }
    k % 2 == 1
}

fn gcd(mut a: u64, mut b: u64) -> u64 {
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a.max(1)
}

/// Variance of (continuous) Laplace noise of scale `b`: `2b²` (Dwork & Roth 2014,
/// Definition 3.3); the discrete noise's variance tends to it as the scale grows.
pub fn laplace_variance(b: f64) -> f64 {
    2.0 * b * b
}

/// The default share of ε spent on the people counts (common practice, no source:
/// they are few numbers with sensitivity 1 and need little of the budget).
pub const DEFAULT_PEOPLE_SHARE: f64 = 0.1;

/// How ε is split over the released quantities.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Budget {
    /// Total ε per contributor.
    pub epsilon: f64,
    /// Share of ε spent on the population histograms and the contributor count.
    pub people_share: f64,
    pub n_attributes: usize,
    /// Items counted per contributor at most (m).
    pub max_items: usize,
}

impl Budget {
    /// ε for each of the A + 1 people counts.
    pub fn people_epsilon(&self) -> f64 {
        self.epsilon * self.people_share / (self.n_attributes + 1) as f64
    }

    /// ε for each attribute's item histogram.
    pub fn items_epsilon(&self) -> f64 {
        self.epsilon * (1.0 - self.people_share) / self.n_attributes.max(1) as f64
    }

    /// The noise on each people count (Δ = 1); `None` when its ε share is below
    /// [`MIN_EPSILON`].
    pub fn people_noise(&self) -> Option<DiscreteLaplace> {
        DiscreteLaplace::for_budget(1, self.people_epsilon())
    }

    /// The noise on each item count (Δ = m).
    pub fn items_noise(&self) -> Option<DiscreteLaplace> {
        DiscreteLaplace::for_budget(self.max_items.max(1) as u64, self.items_epsilon())
    }

    /// Why this budget cannot be used, if it cannot.
    pub fn problem(&self) -> Option<String> {
        if !(self.epsilon.is_finite() && self.epsilon > 0.0) {
            return Some("ε must be a number above 0".into());
        }
        if !(0.0..1.0).contains(&self.people_share) || self.people_share <= 0.0 {
            return Some("the people counts' share of ε must be between 0 and 1".into());
        }
        if self.people_noise().is_none() || self.items_noise().is_none() {
            return Some(format!(
                "ε = {} split over {} releases leaves less than {MIN_EPSILON:e} for one of them; raise ε",
                self.epsilon,
                2 * self.n_attributes + 1
            ));
        }
        None
    }

    /// Scale of the people counts' noise (about 1/ε of their share).
    pub fn people_scale(&self) -> f64 {
        self.people_noise()
            .map_or(1.0 / self.people_epsilon(), |n| n.scale())
    }

    /// L1 sensitivity of one attribute's item histogram.
    pub fn items_sensitivity(&self) -> f64 {
        self.max_items as f64
    }

    /// Scale of the item counts' noise (about m/ε of their share).
    pub fn items_scale(&self) -> f64 {
        self.items_noise()
            .map_or(self.items_sensitivity() / self.items_epsilon(), |n| {
                n.scale()
            })
    }

    /// The total actually spent (sequential composition): equals `epsilon`.
    pub fn spent(&self) -> f64 {
        self.people_epsilon() * (self.n_attributes + 1) as f64
            + self.items_epsilon() * self.n_attributes as f64
    }

    /// The split in words, for the priors file's provenance.
    pub fn describe(&self) -> String {
        format!(
            "ε = {eps} per contributor, sequential composition: {ps}% of it ({pe:.4} each) to the {np} people counts (contributors per value of each of the {a} attributes, and the number of contributors; L1 sensitivity 1, discrete Laplace scale {pb:.3}); the rest ({ie:.4} each) to the {a} item-by-value membership histograms (each contributor counted in at most {m} items chosen at random from their own list, so L1 sensitivity {m}; discrete Laplace scale {ib:.3}). Integer noise from an exact sampler (Canonne, Kamath & Steinke 2020, Algorithm 2). Membership rates, the member threshold, clamping at 0 and any calibration fitted from the released counts are post-processing. Candidate items come from the schema, not the cohort.",
            eps = self.epsilon,
            ps = (self.people_share * 100.0).round(),
            pe = self.people_epsilon(),
            np = self.n_attributes + 1,
            a = self.n_attributes,
            pb = self.people_scale(),
            ie = self.items_epsilon(),
            m = self.max_items,
            ib = self.items_scale(),
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn split_adds_up_to_epsilon() {
        let b = Budget {
            epsilon: 2.0,
            people_share: 0.1,
            n_attributes: 4,
            max_items: 50,
        };
        assert!((b.spent() - 2.0).abs() < 1e-12);
        // 0.2 over 5 people counts: 0.04 each, scale 25 — never less, and above it
        // only by ε's rounding down to a multiple of 2⁻²⁰.
        assert!(b.people_scale() >= 25.0 && b.people_scale() - 25.0 < 1e-3);
        // 1.8 over 4 histograms: 0.45 each, scale 50/0.45.
        let nominal = 50.0 / 0.45;
        assert!(b.items_scale() >= nominal && b.items_scale() - nominal < 1e-3);
        assert_eq!(b.problem(), None);
        let tiny = Budget { epsilon: 1e-7, ..b };
        assert!(tiny.problem().is_some(), "a share under 2^-20 is refused");
        assert!(b.describe().contains("at most 50 items"));
    }
}
