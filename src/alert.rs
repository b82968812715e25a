//! When a value counts as exposed: the one rule the reports, the explorer and the
//! planner share. A value is exposed when its probability is over the attribute's alert
//! level, or when it is over the rarity floor (20% by default) *and* over the rarity
//! lift times its population rate (5× by default): a guess of a minority religion at
//! 60% gives a person away even under an alert level of 70%. Equivalently each value
//! has its own level `τ_v = min(τ, max(floor, lift·π(v)))` and is exposed when its
//! probability is over it. Both rarity numbers are settings (command-line flags, the
//! explorer, saved decisions); the defaults are common practice, no source.

use serde::{Deserialize, Serialize};

/// Default rarity floor: a value under this share is never flagged for rarity alone
/// (common practice, no source).
pub const RARITY_FLOOR: f64 = 0.20;

/// Default rarity lift: a value must be this many times its population rate to be
/// flagged for rarity (common practice, no source).
pub const RARITY_LIFT: f64 = 5.0;

/// The rarity part of the rule: a value over `floor` and over `lift ×` its population
/// rate counts as exposed whatever the alert level. `floor = 1` turns it off.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Rarity {
    /// Probability a value must pass to be flagged for rarity, in (0, 1].
    pub floor: f64,
    /// How many times its population rate it must pass, at least 1.
    pub lift: f64,
}

impl Default for Rarity {
    fn default() -> Self {
        Rarity {
            floor: RARITY_FLOOR,
            lift: RARITY_LIFT,
        }
    }
}

/// A rarity setting out of range.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum Error {
    #[error("rarity floor {0} must be above 0 and at most 1 (100% turns the rarity rule off)")]
    Floor(f64),
    #[error("rarity lift {0} must be a finite number of at least 1")]
    Lift(f64),
}

impl Rarity {
    /// The rule with only the alert level (no value is flagged for rarity).
    pub const OFF: Rarity = Rarity {
        floor: 1.0,
        lift: 1.0,
    };

    /// A checked setting.
    pub fn new(floor: f64, lift: f64) -> Result<Rarity, Error> {
        if !(floor > 0.0 && floor <= 1.0) {
            return Err(Error::Floor(floor));
        }
        if !(lift.is_finite() && lift >= 1.0) {
            return Err(Error::Lift(lift));
        }
        Ok(Rarity { floor, lift })
    }

    /// Whether the rarity part can flag anything (floor under 100%).
    pub fn is_on(&self) -> bool {
        self.floor < 1.0
    }

    /// The level value `v` with population rate `base_rate` must stay at or under:
    /// `min(level, max(floor, lift·base_rate))`.
    pub fn value_level(&self, level: f64, base_rate: f64) -> f64 {
        let rare = self.floor.max(self.lift * base_rate.max(0.0));
        level.min(rare)
    }

    /// [`Rarity::value_level`] for every value of an attribute.
    pub fn value_levels(&self, level: f64, base_rates: &[f64]) -> Vec<f64> {
        base_rates
            .iter()
            .map(|&b| self.value_level(level, b))
            .collect()
    }

    /// Whether a value with this probability and population rate is exposed.
    pub fn exposed(&self, level: f64, probability: f64, base_rate: f64) -> bool {
        probability > self.value_level(level, base_rate)
    }

    /// The exposed value of a posterior, if any: the most probable of the values over
    /// their own level. The remainder value (none of the values named, see
    /// [`crate::priors::REMAINDER_ID`]) is never flagged: guessing it discloses nothing.
    pub fn flag(
        &self,
        level: f64,
        probs: &[f64],
        base_rates: &[f64],
        remainder: Option<usize>,
    ) -> Option<Flag> {
        probs
            .iter()
            .zip(base_rates)
            .enumerate()
            .filter(|&(v, (&p, &b))| Some(v) != remainder && self.exposed(level, p, b))
            .max_by(|x, y| x.1.0.total_cmp(y.1.0))
            .map(|(value, (&probability, &base_rate))| Flag {
                value,
                probability,
                base_rate,
                value_level: self.value_level(level, base_rate),
                by_rarity: probability <= level,
            })
    }
}

/// A value the rule counts as exposed.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Flag {
    /// Index into the attribute's values.
    pub value: usize,
    pub probability: f64,
    pub base_rate: f64,
    /// Its own level `τ_v`.
    pub value_level: f64,
    /// Exposed only because it is rare (its probability is under the alert level).
    pub by_rarity: bool,
}

#[cfg(test)]
mod tests {
    use super::*;

    // The worked cases that made the rule (demo priors' population rates): after the
    // teacher persona's default plan, Jewish at 63% (rate 4.0%, 16×) and Pennsylvania at
    // 22% (rate 3.9%, 5.6×) were both called safe under alert levels of 70% and 35%.
    #[test]
    fn rare_values_over_floor_and_lift_are_exposed() {
        let r = Rarity::default();
        assert!(r.exposed(0.70, 0.63, 0.040318));
        assert!(r.exposed(0.35, 0.22, 0.039175));
        // Under the floor: never for rarity alone, however large the lift.
        assert!(!r.exposed(0.70, 0.19, 0.001));
        // Over the floor but under 5×: the alert level decides.
        assert!(!r.exposed(0.70, 0.45, 0.10));
        assert!(r.exposed(0.40, 0.45, 0.10));
        // Off: only the alert level.
        assert!(!Rarity::OFF.exposed(0.70, 0.63, 0.040318));
        assert!(Rarity::OFF.exposed(0.70, 0.71, 0.040318));
    }

    // τ_v = min(τ, max(0.20, 5·π)) worked by hand.
    #[test]
    fn per_value_levels() {
        let r = Rarity::default();
        let levels = r.value_levels(0.5, &[0.01, 0.06, 0.2]);
        assert!((levels[0] - 0.20).abs() < 1e-15);
        assert!((levels[1] - 0.30).abs() < 1e-15);
        assert!((levels[2] - 0.50).abs() < 1e-15);
        // The rule and the level agree everywhere on a grid.
        for pi in [0.001, 0.02, 0.04, 0.05, 0.08, 0.3, 0.9] {
            for p in (0..=100).map(|i| i as f64 / 100.0) {
                let direct = p > 0.5 || (p > 0.2 && p > 5.0 * pi);
                assert_eq!(r.exposed(0.5, p, pi), direct, "p {p} π {pi}");
            }
        }
    }

    #[test]
    fn flag_names_the_most_probable_exposed_value() {
        let r = Rarity::default();
        // Best guess 0.55 under a 0.7 level at 0.5 base: safe; value 1 at 0.3, 15×.
        let f = r
            .flag(0.7, &[0.55, 0.30, 0.15], &[0.5, 0.02, 0.48], None)
            .unwrap();
        assert_eq!(f.value, 1);
        assert!(f.by_rarity);
        assert!(
            r.flag(0.7, &[0.55, 0.30, 0.15], &[0.5, 0.3, 0.2], None)
                .is_none()
        );
        let f = r
            .flag(0.5, &[0.8, 0.2, 0.0], &[0.5, 0.3, 0.2], None)
            .unwrap();
        assert_eq!((f.value, f.by_rarity), (0, false));
    }

    #[test]
    fn settings_are_checked() {
        assert!(Rarity::new(0.2, 5.0).is_ok());
        assert!(Rarity::new(0.0, 5.0).is_err());
        assert!(Rarity::new(1.2, 5.0).is_err());
        assert!(Rarity::new(0.2, 0.5).is_err());
        assert!(Rarity::new(0.2, f64::NAN).is_err());
        assert!(!Rarity::new(1.0, 5.0).unwrap().is_on());
    }
}
