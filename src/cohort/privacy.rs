//! The Laplace mechanism and how the privacy budget is split (Dwork & Roth 2014, The
//! Algorithmic Foundations of Differential Privacy, §3.3 and Theorem 3.16).
//!
//! A released query with L1 sensitivity Δ gets independent Laplace noise of scale
//! `b = Δ/ε` on every coordinate, which makes it ε-differentially private; releases
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
//! dropping items under the member threshold, clamping negatives to zero and rounding
//! are post-processing of the noisy values. The candidate items come from the schema
//! (public), not from the cohort, so which items appear reveals nothing about it.

use rand::Rng;

/// One draw from the Laplace distribution with location 0 and scale `b`, as the
/// difference of two exponential draws (each `−ln U`, `U` in (0, 1]), using the
/// generator passed in.
pub fn laplace(rng: &mut impl Rng, b: f64) -> f64 {
    let e1 = -(1.0 - rng.random::<f64>()).ln();
    let e2 = -(1.0 - rng.random::<f64>()).ln();
    b * (e1 - e2)
}

/// Variance of Laplace noise of scale `b`: `2b²` (Dwork & Roth 2014, Definition 3.3).
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

    /// Laplace scale of the people counts (Δ = 1).
    pub fn people_scale(&self) -> f64 {
        1.0 / self.people_epsilon()
    }

    /// L1 sensitivity of one attribute's item histogram.
    pub fn items_sensitivity(&self) -> f64 {
        self.max_items as f64
    }

    /// Laplace scale of the item counts (Δ = m).
    pub fn items_scale(&self) -> f64 {
        self.items_sensitivity() / self.items_epsilon()
    }

    /// The total actually spent (sequential composition): equals `epsilon`.
    pub fn spent(&self) -> f64 {
        self.people_epsilon() * (self.n_attributes + 1) as f64
            + self.items_epsilon() * self.n_attributes as f64
    }

    /// The split in words, for the priors file's provenance.
    pub fn describe(&self) -> String {
        format!(
            "ε = {eps} per contributor, sequential composition: {ps}% of it ({pe:.4} each) to the {np} people counts (contributors per value of each of the {a} attributes, and the number of contributors; L1 sensitivity 1, Laplace scale {pb:.3}); the rest ({ie:.4} each) to the {a} item-by-value membership histograms (each contributor counted in at most {m} items chosen at random from their own list, so L1 sensitivity {m}; Laplace scale {ib:.3}). Membership rates, the member threshold, clamping at 0 and rounding are post-processing. Candidate items come from the schema, not the cohort.",
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
        // 0.2 over 5 people counts: 0.04 each, scale 25.
        assert!((b.people_scale() - 25.0).abs() < 1e-9);
        // 1.8 over 4 histograms: 0.45 each, scale 50/0.45.
        assert!((b.items_scale() - 50.0 / 0.45).abs() < 1e-9);
        assert!(b.describe().contains("at most 50 items"));
    }
}
