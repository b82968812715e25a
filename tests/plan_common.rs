//! Shared helpers for the planner tests: build an exposure from plain numbers, and
//! score a hide set through a fresh exposure (the scan's own scoring path, not the
//! planner's).

#![allow(dead_code)]

use telltale::evidence::{Evidence, EvidenceSet, Figures, Origin, Subject};
use telltale::infer::{AttrModel, Exposure};
use telltale::priors::Calibration;

#[derive(Debug, Clone)]
pub struct Attr {
    pub base: Vec<f64>,
    pub lambda: f64,
    pub threshold: f64,
    pub true_value: Option<usize>,
    /// Per value, its own level (instead of `threshold`), when given.
    pub levels: Option<Vec<f64>>,
    /// Per item, its log-likelihood ratios.
    pub log_lr: Vec<Vec<f64>>,
    /// Per item, what its evidence rests on and the cause it shares (empty: every item
    /// is reference-table evidence from its own reference item): 0 its own reference
    /// item; 1 or 2 a reference item shared by every item of that kind (a cause
    /// group); 3 a word-list rule shared by every item of that kind (grouped by the
    /// value it points to; a rule of thumb); 4 its own reference item, worth less than
    /// one member (counts as a rule of thumb).
    pub kinds: Vec<u8>,
}

pub fn exposure(n: usize, attrs: &[Attr]) -> Exposure {
    let models = attrs
        .iter()
        .map(|a| AttrModel {
            log_base: a.base.iter().map(|b| b.ln()).collect(),
            calibration: Calibration::Temperature { lambda: a.lambda },
        })
        .collect();
    let mut set = EvidenceSet::new(n);
    for (ai, a) in attrs.iter().enumerate() {
        for (i, l) in a.log_lr.iter().enumerate() {
            let kind = a.kinds.get(i).copied().unwrap_or(0);
            let table = |reference: String| Origin::Table {
                matched_by: telltale::priors::MatchedBy::Name,
                reference: reference.into(),
            };
            // Reference-table evidence (the temperature λ applies to it), by default
            // one reference item per archive item, so no two share a cause.
            let origin = match kind {
                1 | 2 => table(format!("shared reference {kind}")),
                3 => Origin::lexicon("a word rule", format!("item {i}")),
                _ => table(format!("reference {i}")),
            };
            set.push(Evidence::new(
                Subject::Item(i),
                ai,
                Figures {
                    log_lr: l,
                    distribution: &a.base,
                    homogeneity: 0.0,
                    info_bits: 0.0,
                    support: if kind == 4 { 0.5 } else { 1.0 },
                },
                origin,
            ));
        }
    }
    Exposure::with_models(models, set)
}

/// Whether hiding `hidden` meets every attribute's threshold (or per-value levels), scored on a fresh copy
/// of the exposure through `Exposure::set_hidden` and `Exposure::posterior`.
pub fn meets(base: &Exposure, attrs: &[Attr], hidden: &[Subject]) -> bool {
    let mut x = base.clone();
    for &s in hidden {
        x.set_hidden(s, true);
    }
    attrs.iter().enumerate().all(|(ai, a)| {
        let post = x.posterior(ai);
        let level = |v: usize| a.levels.as_ref().map_or(a.threshold, |l| l[v]);
        match a.true_value {
            Some(t) => post.probs[t] <= level(t),
            None => post.probs.iter().enumerate().all(|(v, &p)| p <= level(v)),
        }
    })
}
