//! Inference: what an observer would conclude from the visible evidence. For each
//! attribute, `log P(v|S) = log π(v) + Σ_{i∈S} w_i·log L_i(v) − log Z`, where the weight
//! `w_i` is its source's (the temperature λ from the priors file for table evidence,
//! fixed weights for word lists and friends) shared among the visible pieces of one
//! cause ([`crate::combine`]), optionally followed by a fitted logistic calibration of
//! the best guess ([`crate::calibration`]) and the rules-of-thumb ceiling. [`Exposure`] keeps the per-value
//! sums of visible evidence, so hiding or showing one item updates every posterior in
//! time proportional to that item's evidence, not to the footprint.

use crate::combine::{
    ALONE, Footing, GroupState, Grouping, RULES_OF_THUMB_CEILING, cap_top, share,
};
use crate::evidence::{EvidenceSet, Subject};
use crate::priors::{Attribute, Calibration, Priors};
use crate::stats::{argmax, softmax};

/// The observer's belief about one attribute.
#[derive(Debug, Clone, PartialEq)]
pub struct Posterior {
    pub probs: Vec<f64>,
    /// Index of the best guess.
    pub best: usize,
    /// Its probability.
    pub probability: f64,
    /// Only rules of thumb (word-list evidence) support it, so its best guess is held
    /// under [`crate::combine::RULES_OF_THUMB_CEILING`] ([`crate::combine::cap_top`]).
    pub rests_on_rules: bool,
}

/// What inference needs of an attribute.
#[derive(Debug, Clone, PartialEq)]
pub struct AttrModel {
    pub log_base: Vec<f64>,
    pub calibration: Calibration,
}

impl AttrModel {
    pub fn from_attribute(a: &Attribute) -> Self {
        AttrModel {
            log_base: a.log_base.clone(),
            calibration: a.calibration.clone(),
        }
    }

    /// The posterior given the summed log-likelihood ratios of table evidence alone
    /// (the temperature λ applies to all of it): what calibration is fitted on.
    pub fn posterior(&self, sum: &[f64]) -> Posterior {
        let lambda = self.weight();
        let weighted: Vec<f64> = sum.iter().map(|s| lambda * s).collect();
        self.posterior_combined(&weighted, false)
    }

    /// The posterior given the combined, weighted sums of the visible evidence
    /// ([`crate::combine`]: each source's weight and each cause's saturation already
    /// applied), and whether only rules of thumb support it.
    pub fn posterior_combined(&self, weighted: &[f64], rests_on_rules: bool) -> Posterior {
        let logits =
            crate::calibration::weighted_logits(&self.calibration, &self.log_base, weighted);
        let mut probs = softmax(&logits);
        let (mut best, mut probability) = argmax(&probs);
        if rests_on_rules {
            probs = cap_top(&logits, &probs, best, RULES_OF_THUMB_CEILING);
            (best, probability) = argmax(&probs);
        }
        Posterior {
            probs,
            best,
            probability,
            rests_on_rules,
        }
    }

    /// The weight one unit of table log-likelihood ratio gets (λ, an inverse
    /// temperature). Other sources have their own weights ([`crate::combine`]).
    pub fn weight(&self) -> f64 {
        crate::calibration::lambda(&self.calibration)
    }
}

/// One visible subject's share in an attribute's posterior.
#[derive(Debug, Clone, PartialEq)]
pub struct Contribution {
    /// Index into the evidence list.
    pub evidence: usize,
    pub subject: Subject,
    /// Its weighted log-likelihood ratio for the best guess, in bits (the weight is
    /// its source's, shared with the other visible pieces of its cause): what it
    /// adds toward the observer's best guess (negative: it argues against it).
    pub toward_best_bits: f64,
    /// How much the best guess's probability would fall if this subject were hidden
    /// (leave-one-out, all its evidence for the attribute removed).
    pub loo_drop: f64,
}

/// One attribute's running state: sums of the visible evidence.
#[derive(Debug, Clone)]
struct Tally {
    /// Plain summed log-likelihood ratios (no weights).
    raw: Vec<f64>,
    /// Combined weighted sums: pieces alone at their source weight, plus every
    /// group's term ([`crate::combine`]).
    weighted: Vec<f64>,
    /// Visible pieces resting on data (table, friends, marks) and on rules of thumb.
    data: usize,
    rules: usize,
    /// Visible pieces, and per value those pointing toward it (ratio above 1).
    feeding: usize,
    pointing: Vec<usize>,
}

impl Tally {
    fn new(k: usize) -> Tally {
        Tally {
            raw: vec![0.0; k],
            weighted: vec![0.0; k],
            data: 0,
            rules: 0,
            feeding: 0,
            pointing: vec![0; k],
        }
    }

    fn rests_on_rules(&self) -> bool {
        self.data == 0 && self.rules > 0
    }
}

/// The live state of one person's exposure: evidence, which subjects are hidden, and
/// the running sums per attribute.
#[derive(Debug, Clone)]
pub struct Exposure {
    models: Vec<AttrModel>,
    evidence: EvidenceSet,
    /// Evidence indices grouped by subject (items in order, then the friend list), in
    /// evidence order within each subject; subject `s` owns
    /// `by_subject[starts[s]..starts[s + 1]]`. Two flat lists instead of one small
    /// list per item: a large archive has over 100,000 items.
    by_subject: Vec<usize>,
    starts: Vec<u32>,
    hidden: Vec<bool>,
    grouping: Grouping,
    groups: Vec<GroupState>,
    tallies: Vec<Tally>,
    /// Which subjects' evidence is the same piece for piece, found on first use.
    alike: std::sync::OnceLock<crate::effect::Alike>,
}

impl Exposure {
    pub fn new(priors: &Priors, evidence: EvidenceSet) -> Exposure {
        let models: Vec<AttrModel> = priors
            .attributes
            .iter()
            .map(AttrModel::from_attribute)
            .collect();
        Exposure::with_models(models, evidence)
    }

    pub fn with_models(models: Vec<AttrModel>, evidence: EvidenceSet) -> Exposure {
        let n_subjects = evidence.n_items + 1;
        let (by_subject, starts) = group_by_subject(&evidence, n_subjects);
        let lambdas: Vec<f64> = models.iter().map(AttrModel::weight).collect();
        let grouping = Grouping::new(&evidence.list, &lambdas);
        let groups = grouping
            .groups
            .iter()
            .map(|&(a, _)| GroupState {
                n: 0,
                sum: vec![0.0; models[a].log_base.len()],
            })
            .collect();
        let mut x = Exposure {
            tallies: models
                .iter()
                .map(|m| Tally::new(m.log_base.len()))
                .collect(),
            models,
            evidence,
            by_subject,
            starts,
            hidden: vec![false; n_subjects],
            grouping,
            groups,
            alike: std::sync::OnceLock::new(),
        };
        x.recompute();
        x
    }

    /// Rebuild every sum from scratch (incremental updates are exact up to rounding;
    /// this removes even that).
    pub fn recompute(&mut self) {
        for t in &mut self.tallies {
            *t = Tally::new(t.raw.len());
        }
        for g in &mut self.groups {
            g.n = 0;
            g.sum.iter_mut().for_each(|v| *v = 0.0);
        }
        for slot in 0..self.hidden.len() {
            if self.hidden[slot] {
                continue;
            }
            let range = self.starts[slot] as usize..self.starts[slot + 1] as usize;
            for &ei in &self.by_subject[range] {
                let e = &self.evidence.list[ei];
                let t = &mut self.tallies[e.attribute()];
                for ((r, w), l) in t.raw.iter_mut().zip(&mut t.weighted).zip(e.log_lr()) {
                    *r += l;
                    if self.grouping.group_of[ei] == ALONE {
                        *w += self.grouping.weight[ei] * l;
                    }
                }
                for (n, l) in t.pointing.iter_mut().zip(e.log_lr().iter()) {
                    *n += usize::from(*l > 0.0);
                }
                t.feeding += 1;
                match self.grouping.footing[ei] {
                    Footing::Data => t.data += 1,
                    Footing::RuleOfThumb => t.rules += 1,
                }
                let g = self.grouping.group_of[ei];
                if g != ALONE {
                    let g = &mut self.groups[g as usize];
                    g.n += 1;
                    for (s, l) in g.sum.iter_mut().zip(e.log_lr()) {
                        *s += l;
                    }
                }
            }
        }
        for (g, &(a, w)) in self.groups.iter().zip(&self.grouping.groups) {
            for (v, x) in self.tallies[a].weighted.iter_mut().enumerate() {
                *x += g.term(w, v);
            }
        }
    }

    pub fn evidence(&self) -> &EvidenceSet {
        &self.evidence
    }

    pub fn models(&self) -> &[AttrModel] {
        &self.models
    }

    pub fn n_attributes(&self) -> usize {
        self.models.len()
    }

    pub fn is_hidden(&self, subject: Subject) -> bool {
        self.hidden[slot(subject, self.evidence.n_items)]
    }

    /// Evidence indices for one subject.
    pub fn evidence_of(&self, subject: Subject) -> &[usize] {
        self.of_slot(slot(subject, self.evidence.n_items))
    }

    fn of_slot(&self, s: usize) -> &[usize] {
        &self.by_subject[self.starts[s] as usize..self.starts[s + 1] as usize]
    }

    /// Which subjects' evidence is the same piece for piece (so their figures are
    /// too, [`crate::effect::Memo`]); found once, on first use: it depends only on the
    /// evidence, which never changes.
    pub fn alike(&self) -> &crate::effect::Alike {
        self.alike.get_or_init(|| crate::effect::Alike::new(self))
    }

    /// How the evidence is grouped by shared cause, with each piece's source weight.
    pub fn grouping(&self) -> &Grouping {
        &self.grouping
    }

    /// The weight piece `ei` gets now: its source's weight, times its cause group's
    /// share `f(n)/n` for the group's `n` visible pieces (1 when it stands alone).
    pub fn piece_weight(&self, ei: usize) -> f64 {
        let w = self.grouping.weight[ei];
        match self.grouping.group_of[ei] {
            ALONE => w,
            g => w * share(self.groups[g as usize].n.max(1)),
        }
    }

    /// Visible pieces in the cause group of piece `ei` (1 when it stands alone).
    pub fn cause_size(&self, ei: usize) -> usize {
        match self.grouping.group_of[ei] {
            ALONE => 1,
            g => self.groups[g as usize].n,
        }
    }

    /// Add (`sign` 1) or remove (−1) piece `ei` from the running sums.
    fn apply(&mut self, ei: usize, sign: f64) {
        let e = &self.evidence.list[ei];
        let t = &mut self.tallies[e.attribute()];
        let g = self.grouping.group_of[ei];
        let shown = sign > 0.0;
        for (r, l) in t.raw.iter_mut().zip(e.log_lr()) {
            *r += sign * l;
        }
        if g == ALONE {
            let w = self.grouping.weight[ei];
            for (x, l) in t.weighted.iter_mut().zip(e.log_lr()) {
                *x += sign * w * l;
            }
        } else {
            let w = self.grouping.groups[g as usize].1;
            let group = &mut self.groups[g as usize];
            let before = share(group.n);
            if shown {
                group.n += 1;
            } else {
                group.n -= 1;
            }
            let after = share(group.n);
            for ((x, s), l) in t.weighted.iter_mut().zip(&mut group.sum).zip(e.log_lr()) {
                let old = *s;
                *s += sign * l;
                *x += w * (after * *s - before * old);
            }
        }
        for (n, l) in t.pointing.iter_mut().zip(e.log_lr().iter()) {
            if *l > 0.0 {
                if shown {
                    *n += 1;
                } else {
                    *n -= 1;
                }
            }
        }
        let count = match self.grouping.footing[ei] {
            Footing::Data => &mut t.data,
            Footing::RuleOfThumb => &mut t.rules,
        };
        for c in [count, &mut t.feeding] {
            if shown {
                *c += 1;
            } else {
                *c -= 1;
            }
        }
    }

    /// Hide or show a subject; returns whether anything changed. Cost: the subject's
    /// own evidence, independent of footprint size.
    pub fn set_hidden(&mut self, subject: Subject, hidden: bool) -> bool {
        let s = slot(subject, self.evidence.n_items);
        if self.hidden[s] == hidden {
            return false;
        }
        self.hidden[s] = hidden;
        let sign = if hidden { -1.0 } else { 1.0 };
        let range = self.starts[s] as usize..self.starts[s + 1] as usize;
        for k in range {
            let ei = self.by_subject[k];
            self.apply(ei, sign);
        }
        true
    }

    /// Subjects currently hidden.
    pub fn hidden_subjects(&self) -> Vec<Subject> {
        self.hidden
            .iter()
            .enumerate()
            .filter(|(_, h)| **h)
            .map(|(i, _)| unslot(i, self.evidence.n_items))
            .collect()
    }

    /// The observer's current belief about attribute `a`. A value that lies inside a
    /// value of a coarser attribute (a region inside its country) never reads likelier
    /// than it ([`nest`]).
    pub fn posterior(&self, a: usize) -> Posterior {
        let t = &self.tallies[a];
        let p = self.models[a].posterior_combined(&t.weighted, t.rests_on_rules());
        self.nest(a, p, &|b| self.posterior(b))
    }

    /// Hold attribute `a`'s values under the coarser values they lie in, given how to
    /// get a coarser attribute's posterior in the same state.
    fn nest(&self, a: usize, mut p: Posterior, coarser: &dyn Fn(usize) -> Posterior) -> Posterior {
        let mut changed = false;
        for n in self.evidence.nested.iter().filter(|n| n.child == a) {
            changed |= nest(&mut p.probs, &coarser(n.parent).probs, n);
        }
        if changed {
            (p.best, p.probability) = argmax(&p.probs);
        }
        p
    }

    /// Summed log-likelihood ratios of the visible evidence for attribute `a`, without
    /// weights.
    pub fn sum(&self, a: usize) -> &[f64] {
        &self.tallies[a].raw
    }

    /// Combined weighted sums of the visible evidence for attribute `a`: the
    /// posterior's logits less the log base rates (before any calibration beyond the
    /// weights, and before the rules-of-thumb ceiling).
    pub fn weighted_sum(&self, a: usize) -> &[f64] {
        &self.tallies[a].weighted
    }

    /// Whether only rules of thumb support attribute `a` now.
    pub fn rests_on_rules(&self, a: usize) -> bool {
        self.tallies[a].rests_on_rules()
    }

    /// Visible pieces of evidence for attribute `a` resting on data (table, friends,
    /// marks) and on rules of thumb.
    pub fn footings(&self, a: usize) -> (usize, usize) {
        (self.tallies[a].data, self.tallies[a].rules)
    }

    /// How many visible pieces of evidence feed attribute `a`.
    pub fn feeding(&self, a: usize) -> usize {
        self.tallies[a].feeding
    }

    /// How many visible pieces of evidence for attribute `a` point toward value `v`
    /// (likelihood ratio above 1). Kept up to date by [`Exposure::set_hidden`], so a
    /// front end can show it after every change without walking all the evidence.
    pub fn pointing_to(&self, a: usize, v: usize) -> usize {
        self.tallies[a].pointing[v]
    }

    /// The posterior for `a` if `subject` were hidden too (or shown, if hidden now).
    pub fn posterior_toggled(&self, a: usize, subject: Subject) -> Posterior {
        let s = slot(subject, self.evidence.n_items);
        let sign = if self.hidden[s] { 1.0 } else { -1.0 };
        let t = &self.tallies[a];
        let mut weighted = t.weighted.clone();
        let (mut data, mut rules) = (t.data, t.rules);
        // Groups touched, with their visible count and sums as they would be.
        let mut touched: Vec<(u32, GroupState)> = Vec::new();
        for &ei in self.of_slot(s) {
            let e = &self.evidence.list[ei];
            if e.attribute() != a {
                continue;
            }
            match self.grouping.footing[ei] {
                Footing::Data => data = data.wrapping_add_signed(sign as isize),
                Footing::RuleOfThumb => rules = rules.wrapping_add_signed(sign as isize),
            }
            let g = self.grouping.group_of[ei];
            if g == ALONE {
                let w = self.grouping.weight[ei];
                for (x, l) in weighted.iter_mut().zip(e.log_lr()) {
                    *x += sign * w * l;
                }
                continue;
            }
            let at = match touched.iter().position(|(h, _)| *h == g) {
                Some(at) => at,
                None => {
                    touched.push((g, self.groups[g as usize].clone()));
                    touched.len() - 1
                }
            };
            let state = &mut touched[at].1;
            state.n = state.n.wrapping_add_signed(sign as isize);
            for (x, l) in state.sum.iter_mut().zip(e.log_lr()) {
                *x += sign * l;
            }
        }
        for (g, new) in &touched {
            let w = self.grouping.groups[*g as usize].1;
            let old = &self.groups[*g as usize];
            for (v, x) in weighted.iter_mut().enumerate() {
                *x += new.term(w, v) - old.term(w, v);
            }
        }
        let p = self.models[a].posterior_combined(&weighted, data == 0 && rules > 0);
        self.nest(a, p, &|b| self.posterior_toggled(b, subject))
    }

    /// Every visible subject's contribution to attribute `a`, largest push toward the
    /// best guess first.
    pub fn contributions(&self, a: usize) -> Vec<Contribution> {
        let post = self.posterior(a);
        let mut out: Vec<Contribution> = self
            .evidence
            .list
            .iter()
            .enumerate()
            .filter(|(_, e)| e.attribute() == a && !self.is_hidden(e.subject()))
            .map(|(i, e)| {
                let without = self.posterior_toggled(a, e.subject());
                Contribution {
                    evidence: i,
                    subject: e.subject(),
                    toward_best_bits: self.piece_weight(i) * e.log_lr()[post.best]
                        / std::f64::consts::LN_2,
                    loo_drop: post.probability - without.probs[post.best],
                }
            })
            .collect();
        out.sort_by(|x, y| y.toward_best_bits.total_cmp(&x.toward_best_bits));
        out
    }
}

/// Evidence indices grouped by subject slot (a counting sort, stable), and where each
/// slot's group starts (`n_subjects + 1` entries).
fn group_by_subject(evidence: &EvidenceSet, n_subjects: usize) -> (Vec<usize>, Vec<u32>) {
    let mut starts = vec![0u32; n_subjects + 1];
    for e in &evidence.list {
        starts[slot(e.subject(), evidence.n_items) + 1] += 1;
    }
    for s in 1..starts.len() {
        starts[s] += starts[s - 1];
    }
    let mut next: Vec<u32> = starts[..n_subjects].to_vec();
    let mut by_subject = vec![0usize; evidence.list.len()];
    for (i, e) in evidence.list.iter().enumerate() {
        let n = &mut next[slot(e.subject(), evidence.n_items)];
        by_subject[*n as usize] = i;
        *n += 1;
    }
    (by_subject, starts)
}

fn slot(subject: Subject, n_items: usize) -> usize {
    match subject {
        Subject::Item(i) => i,
        Subject::FriendList => n_items,
    }
}

fn unslot(i: usize, n_items: usize) -> Subject {
    if i == n_items {
        Subject::FriendList
    } else {
        Subject::Item(i)
    }
}

#[cfg(test)]
mod tests;

/// Hold a finer attribute's probabilities (`probs`) under the coarser values they lie
/// in (`coarser`): where the values inside one coarser value add up to more than it,
/// they are scaled down to it, and what is taken goes to the finer attribute's
/// remainder ("somewhere else"). So "Oregon" never reads likelier than "United
/// States": a region's posterior is at most its country's (the law of total
/// probability; the levels are fitted separately and need not agree by themselves).
/// Scaling only ever lowers a finer value, never raises it. Returns whether anything
/// moved.
pub fn nest(probs: &mut [f64], coarser: &[f64], n: &crate::evidence::Nesting) -> bool {
    let mut sums = vec![0.0; coarser.len()];
    for (p, u) in probs.iter().zip(&n.parent_of) {
        if let Some(u) = u
            && let Some(s) = sums.get_mut(*u)
        {
            *s += p;
        }
    }
    let mut moved = 0.0;
    for (p, u) in probs.iter_mut().zip(&n.parent_of) {
        let Some(u) = *u else { continue };
        let (s, cap) = (
            sums.get(u).copied().unwrap_or(0.0),
            coarser.get(u).copied().unwrap_or(1.0),
        );
        if s > cap && s > 0.0 {
            let q = *p * cap / s;
            moved += *p - q;
            *p = q;
        }
    }
    if let Some(r) = probs.get_mut(n.remainder) {
        *r += moved;
    }
    moved > 0.0
}
