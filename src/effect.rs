//! One figure per item: what a subject (an item or the friend list) does to the
//! observer's best guess about an attribute, by leave-one-out. `bits` is the change in
//! the best guess's log-odds, in bits, between the subject shown and the subject hidden
//! (positive: it supports the guess; negative: it argues against it), so its sign is the
//! sign of the change in the guess's probability, always. `points_to` is the guess when
//! it supports it, else the value it raises most. The reports, the explorer's item list
//! and item page all take their "adds", "points to" and "if hidden" from here, and the
//! posteriors come through [`Exposure::posterior_toggled`], so the figure follows
//! however the exposure combines evidence.

use crate::evidence::Subject;
use crate::infer::{Exposure, Posterior};

mod memo;
pub use memo::{Alike, Memo};

/// What one subject does to one attribute's best guess.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Effect {
    /// The observer's best guess now (value index) and its probability now.
    pub best: usize,
    pub probability: f64,
    /// Its probability with the subject toggled (hidden if shown, shown if hidden).
    pub toggled: f64,
    /// log₂-odds of the guess with the subject shown minus with it hidden.
    pub bits: f64,
    /// The guess's probability with the subject shown minus with it hidden, worked
    /// out from the other values' probabilities when the guess is above one half (so
    /// a near-certain guess's small change is not rounded away: its sign is the sign
    /// of `bits`).
    pub gain: f64,
    /// The value the subject pushes toward: the guess when `bits > 0`, else the value
    /// whose probability it raises most.
    pub points_to: usize,
}

impl Effect {
    /// How far the guess's probability falls when the subject is hidden (negative: it
    /// rises). For a hidden subject, how far it would rise if shown again: the same
    /// figure, `gain`, with the same sign as `bits`.
    pub fn drop_if_hidden(&self) -> f64 {
        self.gain
    }
}

/// The summed probability of every value but `v`.
fn rest(post: &Posterior, v: usize) -> f64 {
    post.probs
        .iter()
        .enumerate()
        .filter(|&(u, _)| u != v)
        .map(|(_, &p)| p)
        .sum()
}

/// The log-odds of value `v`, in bits, computed from the other values' sum (accurate
/// when `P(v)` is close to 1).
pub fn log2_odds(post: &Posterior, v: usize) -> f64 {
    let p = post.probs[v].max(f64::MIN_POSITIVE);
    p.log2() - rest(post, v).max(f64::MIN_POSITIVE).log2()
}

/// What showing rather than hiding something does to value `v`, from the posteriors
/// with it shown and with it hidden: (the change in `v`'s log₂-odds, the change in
/// its probability). The plan's reasons use this too, so they read as the reports do.
pub fn change(shown: &Posterior, hidden: &Posterior, v: usize) -> (f64, f64) {
    let bits = log2_odds(shown, v) - log2_odds(hidden, v);
    let gain = if shown.probs[v] > 0.5 || hidden.probs[v] > 0.5 {
        rest(hidden, v) - rest(shown, v)
    } else {
        shown.probs[v] - hidden.probs[v]
    };
    (bits, gain)
}

/// The effect of `subject` on attribute `a`'s current best guess.
pub fn effect(x: &Exposure, a: usize, subject: Subject) -> Effect {
    effect_given(x, a, subject, &x.posterior(a))
}

/// [`effect`] given attribute `a`'s current posterior `now` (so a list of many
/// subjects works it out once).
pub fn effect_given(x: &Exposure, a: usize, subject: Subject, now: &Posterior) -> Effect {
    let toggled = x.posterior_toggled(a, subject);
    let (shown, hidden) = if x.is_hidden(subject) {
        (&toggled, now)
    } else {
        (now, &toggled)
    };
    let best = now.best;
    let (bits, gain) = change(shown, hidden, best);
    let points_to = if bits > 0.0 {
        best
    } else {
        (0..now.probs.len())
            .max_by(|&u, &v| {
                (shown.probs[u] - hidden.probs[u]).total_cmp(&(shown.probs[v] - hidden.probs[v]))
            })
            .unwrap_or(best)
    };
    Effect {
        best,
        probability: now.probability,
        toggled: toggled.probs[best],
        bits,
        gain,
        points_to,
    }
}

/// The change in value `v`'s log₂-odds, for attribute `a`, between `subject` shown
/// and hidden (the figure [`effect`] gives for the best guess, for any value).
pub fn bits_toward(x: &Exposure, a: usize, subject: Subject, v: usize) -> f64 {
    let now = x.posterior(a);
    let toggled = x.posterior_toggled(a, subject);
    if x.is_hidden(subject) {
        change(&toggled, &now, v).0
    } else {
        change(&now, &toggled, v).0
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::evidence::{Evidence, EvidenceSet, Origin};
    use crate::infer::AttrModel;
    use crate::priors::Calibration;

    fn exposure(items: &[[f64; 3]]) -> Exposure {
        let base = [0.5, 0.3, 0.2];
        let mut set = EvidenceSet::new(items.len());
        for (i, p) in items.iter().enumerate() {
            set.push(Evidence::from_distribution(
                Subject::Item(i),
                0,
                p.to_vec(),
                &base,
                10.0,
                Origin::Mark,
            ));
        }
        let model = AttrModel {
            log_base: base.iter().map(|b| b.ln()).collect(),
            calibration: Calibration::Temperature { lambda: 1.0 },
        };
        Exposure::with_models(vec![model], set)
    }

    // Worked by hand (Bayes' rule, λ = 1): base (0.5, 0.3, 0.2); item 0 has likelihood
    // ratios (1.6, 0.5, 0.25), item 1 (0.6, 1.0, 2.0). Both shown: weights 0.48, 0.15,
    // 0.1 → P(v0) = 0.48/0.73; odds 0.48/0.25 = 1.92. Item 0 hidden: weights 0.3, 0.3,
    // 0.4 → odds of v0 0.3/0.7. So item 0 adds log₂(1.92/(3/7)) = log₂ 4.48 bits.
    #[test]
    fn bits_are_the_change_in_the_guess_log_odds() {
        let x = exposure(&[[0.8, 0.15, 0.05], [0.3, 0.3, 0.4]]);
        let e = effect(&x, 0, Subject::Item(0));
        assert_eq!(e.best, 0);
        assert!((e.probability - 0.48 / 0.73).abs() < 1e-12);
        assert!((e.bits - 4.48f64.log2()).abs() < 1e-12, "{}", e.bits);
        assert_eq!(e.points_to, 0);
        // Item 1 argues against v0 and for v2 (its probability rises most with it).
        let e = effect(&x, 0, Subject::Item(1));
        assert!(e.bits < 0.0);
        assert!(e.drop_if_hidden() < 0.0);
        assert_eq!(e.points_to, 2);
    }

    #[test]
    fn sign_agrees_with_leave_one_out_and_hidden_items_read_the_same() {
        let mut items: Vec<[f64; 3]> = (0..30)
            .map(|i| {
                let a = 0.1 + (i % 7) as f64 * 0.1;
                let b = 0.05 + (i % 3) as f64 * 0.1;
                [a, b, 1.0 - a - b]
            })
            .collect();
        // Members exactly as mixed as the population (0.5, 0.3, 0.2).
        items.push([0.5, 0.3, 0.2]);
        let mut x = exposure(&items);
        for i in 0..items.len() {
            let e = effect(&x, 0, Subject::Item(i));
            let loo = e.drop_if_hidden();
            // An item whose members match the population (likelihood ratios of 1)
            // changes nothing: both figures are zero up to rounding, where the signs
            // of two rounding errors need not agree.
            let nothing = e.bits.abs() < 1e-9 && loo.abs() < 1e-9;
            assert!(
                e.bits * loo > 0.0 || nothing,
                "item {i}: {} vs {loo}",
                e.bits
            );
        }
        // Hide one item: its figure is what it would add if shown again, the same
        // number with the guess it would restore.
        let before = effect(&x, 0, Subject::Item(3));
        x.set_hidden(Subject::Item(3), true);
        let after = effect(&x, 0, Subject::Item(3));
        if before.best == after.best {
            assert!((before.bits - after.bits).abs() < 1e-9);
        }
        assert!(after.bits * after.drop_if_hidden() >= 0.0);
    }
}

#[cfg(test)]
mod memo_tests;
