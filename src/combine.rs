//! How pieces of evidence are combined into one attribute's posterior, when they do not
//! all count as independent (docs/model-card.md, "Combining evidence").
//!
//! Plain naive Bayes adds every item's log-likelihood ratio as if each were an
//! independent witness; with correlated items it is overconfident (Domingos & Pazzani
//! 1997, "On the Optimality of the Simple Bayesian Classifier under Zero-One Loss",
//! Machine Learning 29). Here:
//!
//! - each piece has a **source weight**: table evidence gets the temperature λ fitted on
//!   table evidence (an inverse temperature: λ < 1 softens, λ > 1 sharpens); word-list
//!   (lexicon) evidence and the friend list get their own fixed weights, never λ;
//! - pieces that share a **cause** (the same lexicon rule pointing the same way, such as
//!   every group name that mentions a place in Oregon; reference items of one name,
//!   such as one item matched by two archive items, or a page and a group the priors
//!   file lists under one name) form a group. A group of `n` visible pieces with summed
//!   log-likelihood ratios `S` adds `w · f(n)/n · S` (`f(n) = 1 + ln n`: the mean piece
//!   counted `f(n)` times). One piece counts in full; ten count like 3.3; thirty like
//!   4.4. Each further piece adds less than the one before;
//! - a posterior resting only on **rules of thumb** (lexicon evidence, with no table,
//!   friends or own-mark evidence visible) never gives its best guess
//!   [`RULES_OF_THUMB_CEILING`] or more: its odds are combined harmonically with the
//!   ceiling's odds ([`cap_top`]).
//!
//! The state of one attribute is linear in which subjects are visible (per-value sums
//! and counts), so hiding or showing a subject costs time in proportion to its own
//! evidence; only the final step from that state to probabilities is not linear.

use foldhash::{HashMap, HashMapExt};

use crate::evidence::{Evidence, Origin};

/// Weight of one unit of word-list (lexicon) log-likelihood ratio: the rules carry
/// their own stated strengths (docs/evidence.md), so they are used as written and
/// never sharpened by the table's temperature (common practice, no source).
pub const LEXICON_WEIGHT: f64 = 1.0;

/// Weight of the friend list's log-likelihood ratio: the weighted-vote relational
/// neighbour's smoothed share is its own estimate of the value (Macskassy & Provost
/// 2007, "Classification in Networked Data", JMLR 8), used as it is.
pub const FRIENDS_WEIGHT: f64 = 1.0;

/// Weight of the user's own marks.
pub const MARK_WEIGHT: f64 = 1.0;

/// The highest probability a best guess gets when only rules of thumb support it
/// (common practice, no source: a rule of thumb about a name is right often, not
/// almost always; 0.85 reads "about 8 to 9 times in 10").
pub const RULES_OF_THUMB_CEILING: f64 = 0.85;

/// How much `n` pieces of one cause count together, in units of their mean:
/// `f(n) = 1 + ln n` (`f(0) = 0`). Concave, so each piece adds less than the one
/// before, and unbounded, so more pieces never count less (common practice, no
/// source: logarithmic saturation of repeated, redundant evidence).
pub fn saturation(n: usize) -> f64 {
    if n == 0 { 0.0 } else { 1.0 + (n as f64).ln() }
}

/// The weight each of `n` visible pieces of one cause gets: `f(n)/n` (1 for one piece).
pub fn share(n: usize) -> f64 {
    if n == 0 {
        0.0
    } else {
        saturation(n) / n as f64
    }
}

/// What a piece of evidence rests on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Footing {
    /// Counted data: the reference table, the friend list, the user's own marks.
    Data,
    /// A rule of thumb from a word list (places, life stages, beliefs).
    RuleOfThumb,
}

/// Table evidence worth fewer members than this (after the noise discount of a noisy
/// priors file, [`crate::stats::noise_equivalent`]) does not count as data for the
/// rules-of-thumb ceiling: it says less than one member's declaration (common
/// practice, no source).
pub const MIN_DATA_SUPPORT: f64 = 1.0;

/// What a piece of evidence rests on: word lists are rules of thumb; table evidence is
/// data when it is worth at least [`MIN_DATA_SUPPORT`] members (else it counts with
/// the rules of thumb); friends and marks are data.
pub fn footing(e: &Evidence) -> Footing {
    match &e.origin {
        Origin::Lexicon(_) => Footing::RuleOfThumb,
        Origin::Table { .. } if e.support() < MIN_DATA_SUPPORT => Footing::RuleOfThumb,
        Origin::Table { .. } | Origin::Friends { .. } | Origin::Mark => Footing::Data,
    }
}

/// The weight one unit of this piece's log-likelihood ratio gets, before grouping;
/// `lambda` is the attribute's temperature (for table evidence only).
pub fn source_weight(origin: &Origin, lambda: f64) -> f64 {
    match origin {
        Origin::Table { .. } => lambda,
        Origin::Lexicon(_) => LEXICON_WEIGHT,
        Origin::Friends { .. } => FRIENDS_WEIGHT,
        Origin::Mark => MARK_WEIGHT,
    }
}

/// The cause a piece shares with others, if any: the lexicon rule (its `cause` when
/// the source gives one, else its rule name) and the value it points to most; or the
/// name of the reference item a table piece comes from (so reference items of one name
/// share a cause). Friends and marks stand alone.
fn cause_of(e: &Evidence) -> Option<Cause<'_>> {
    match &e.origin {
        Origin::Lexicon(rule) => {
            Some((0, rule.cause.as_deref().unwrap_or(&rule.rule), e.leaning()))
        }
        Origin::Table { reference, .. } => Some((1, reference, 0)),
        Origin::Friends { .. } | Origin::Mark => None,
    }
}

/// A cause: (kind, name, value pointed to).
type Cause<'a> = (u8, &'a str, usize);

/// No group: the piece stands alone.
pub const ALONE: u32 = u32::MAX;

/// How a list of evidence is grouped by cause: for every piece its group (or
/// [`ALONE`]), and per group its attribute and source weight. Only causes with two or
/// more pieces form a group.
#[derive(Debug, Clone, Default)]
pub struct Grouping {
    pub group_of: Vec<u32>,
    /// Per group: (attribute, source weight).
    pub groups: Vec<(usize, f64)>,
    /// Per piece: source weight.
    pub weight: Vec<f64>,
    /// Per piece: what it rests on.
    pub footing: Vec<Footing>,
}

impl Grouping {
    /// Group `list`; `lambdas` holds each attribute's temperature.
    pub fn new(list: &[Evidence], lambdas: &[f64]) -> Grouping {
        let mut first: HashMap<(usize, Cause<'_>), (usize, u32)> = HashMap::new();
        let mut group_of = vec![ALONE; list.len()];
        let mut groups = Vec::new();
        let mut weight = Vec::with_capacity(list.len());
        let mut footing_of = Vec::with_capacity(list.len());
        for (i, e) in list.iter().enumerate() {
            let lambda = lambdas.get(e.attribute()).copied().unwrap_or(1.0);
            let w = source_weight(&e.origin, lambda);
            weight.push(w);
            footing_of.push(footing(e));
            let Some(cause) = cause_of(e) else {
                continue;
            };
            match first.get_mut(&(e.attribute(), cause)) {
                None => {
                    first.insert((e.attribute(), cause), (i, ALONE));
                }
                Some((at, g)) => {
                    if *g == ALONE {
                        *g = groups.len() as u32;
                        groups.push((e.attribute(), w));
                        group_of[*at] = *g;
                    }
                    group_of[i] = *g;
                }
            }
        }
        Grouping {
            group_of,
            groups,
            weight,
            footing: footing_of,
        }
    }
}

/// One group's running state: visible pieces and their summed log-likelihood ratios.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupState {
    pub n: usize,
    pub sum: Vec<f64>,
}

impl GroupState {
    /// What the group adds to the attribute's combined sums, per value.
    pub fn term(&self, weight: f64, v: usize) -> f64 {
        weight * share(self.n) * self.sum[v]
    }
}

/// Hold a distribution's best guess under `ceiling` smoothly: its odds `o` become
/// `o' = 1/(1/o + 1/O)`, where `O = ceiling/(1 − ceiling)` are the ceiling's odds
/// (harmonic combination: about `o` while `o` is small, rising toward `O` and never
/// reaching it as `o` grows, so more evidence still counts for a little more). The
/// other values share the rest in their proportions (worked in logits, so nothing
/// underflows), and the best guess stays at least level with the runner-up.
pub fn cap_top(logits: &[f64], probs: &[f64], best: usize, ceiling: f64) -> Vec<f64> {
    if probs.len() < 2 || !(ceiling > 0.0 && ceiling < 1.0) {
        return probs.to_vec();
    }
    let others: Vec<f64> = logits
        .iter()
        .enumerate()
        .filter(|(i, _)| *i != best)
        .map(|(_, &z)| z)
        .collect();
    let rest = crate::stats::log_sum_exp(&others);
    // ln o, and ln o' = −ln(e^{−ln o} + 1/O), computed without overflow.
    let log_odds = logits[best] - rest;
    let log_ceiling_odds = (ceiling / (1.0 - ceiling)).ln();
    let log_new = -crate::stats::log_sum_exp(&[-log_odds, -log_ceiling_odds]);
    let runner_up = others.iter().fold(f64::NEG_INFINITY, |m, &z| m.max(z)) - rest;
    let top = 1.0 / (1.0 + (-log_new).exp());
    let r = runner_up.exp();
    let top = top.max(r / (1.0 + r));
    logits
        .iter()
        .enumerate()
        .map(|(i, &z)| {
            if i == best {
                top
            } else {
                (1.0 - top) * (z - rest).exp()
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn saturation_is_concave_and_rising() {
        assert_eq!(saturation(0), 0.0);
        assert_eq!(saturation(1), 1.0);
        let mut last_gain = f64::INFINITY;
        for n in 1..100 {
            let gain = saturation(n + 1) - saturation(n);
            assert!(gain > 0.0 && gain < last_gain, "n = {n}");
            last_gain = gain;
        }
        // f(10) = 1 + ln 10 ≈ 3.3026 (arithmetic).
        assert!((saturation(10) - 3.302_585_092_994_046).abs() < 1e-12);
        assert!((share(10) - 0.330_258_509_299_404_6).abs() < 1e-12);
    }

    #[test]
    fn capping_keeps_proportions() {
        let logits = [3.0f64, 1.0, 0.0];
        let probs = crate::stats::softmax(&logits);
        let capped = cap_top(&logits, &probs, 0, 0.6);
        assert!((capped.iter().sum::<f64>() - 1.0).abs() < 1e-12);
        // o = e³/(e + 1) ≈ 5.4011, O = 1.5: o' = 1/(1/o + 1/O) ≈ 1.1740, P ≈ 0.5400.
        let o = 3f64.exp() / (1f64.exp() + 1.0);
        let o2 = 1.0 / (1.0 / o + 1.0 / 1.5);
        assert!((capped[0] - o2 / (1.0 + o2)).abs() < 1e-12);
        assert!(capped[0] < 0.6);
        assert!((capped[1] / capped[2] - 1f64.exp()).abs() < 1e-12);
        // Never above the ceiling however strong, and rising with the evidence.
        let mut last = 0.0;
        for z in [0.0, 2.0, 10.0, 100.0, 800.0] {
            let l = [z, 0.0, 0.0];
            let p = cap_top(&l, &crate::stats::softmax(&l), 0, 0.85);
            assert!(p[0] < 0.85 + 1e-15 && p[0] >= last, "{z}: {p:?}");
            assert!(p.iter().all(|x| x.is_finite()));
            last = p[0];
        }
        assert!(last > 0.849);
    }
}
