//! Inference: what an observer would conclude from the visible evidence. For each
//! attribute, `log P(v|S) = log π(v) + λ·Σ_{i∈S} log L_i(v) − log Z` (naive Bayes with
//! a calibration temperature λ from the priors file), optionally followed by a fitted
//! logistic calibration of the best guess ([`crate::calibration`]). [`Exposure`] keeps the per-value
//! sums of visible evidence, so hiding or showing one item updates every posterior in
//! time proportional to that item's evidence, not to the footprint.

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

    /// The posterior given the summed log-likelihood ratios of the visible evidence.
    pub fn posterior(&self, sum: &[f64]) -> Posterior {
        let logits = crate::calibration::logits(&self.calibration, &self.log_base, sum);
        let probs = softmax(&logits);
        let (best, probability) = argmax(&probs);
        Posterior {
            probs,
            best,
            probability,
        }
    }

    /// The weight one unit of log-likelihood ratio gets (λ for the temperature model).
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
    /// `λ·log₂ L(best guess)`: bits this subject adds toward the observer's best
    /// guess (negative: it argues against it).
    pub toward_best_bits: f64,
    /// How much the best guess's probability would fall if this subject were hidden
    /// (leave-one-out, all its evidence for the attribute removed).
    pub loo_drop: f64,
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
    sums: Vec<Vec<f64>>,
    feeding: Vec<usize>,
    /// Per attribute and value: visible pieces of evidence whose likelihood ratio for
    /// that value is above 1 (they point toward it).
    pointing: Vec<Vec<usize>>,
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
        let mut x = Exposure {
            sums: models.iter().map(|m| vec![0.0; m.log_base.len()]).collect(),
            feeding: vec![0; models.len()],
            pointing: models.iter().map(|m| vec![0; m.log_base.len()]).collect(),
            models,
            evidence,
            by_subject,
            starts,
            hidden: vec![false; n_subjects],
        };
        x.recompute();
        x
    }

    /// Rebuild every sum from scratch (incremental updates are exact up to rounding;
    /// this removes even that).
    pub fn recompute(&mut self) {
        for s in &mut self.sums {
            s.iter_mut().for_each(|v| *v = 0.0);
        }
        self.feeding.iter_mut().for_each(|f| *f = 0);
        for p in &mut self.pointing {
            p.iter_mut().for_each(|v| *v = 0);
        }
        for slot in 0..self.hidden.len() {
            if self.hidden[slot] {
                continue;
            }
            let range = self.starts[slot] as usize..self.starts[slot + 1] as usize;
            for &ei in &self.by_subject[range] {
                let e = &self.evidence.list[ei];
                for (s, l) in self.sums[e.attribute()].iter_mut().zip(e.log_lr().iter()) {
                    *s += l;
                }
                for (n, l) in self.pointing[e.attribute()]
                    .iter_mut()
                    .zip(e.log_lr().iter())
                {
                    *n += usize::from(*l > 0.0);
                }
                self.feeding[e.attribute()] += 1;
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
        for &ei in &self.by_subject[range] {
            let e = &self.evidence.list[ei];
            for (sum, l) in self.sums[e.attribute()].iter_mut().zip(e.log_lr().iter()) {
                *sum += sign * l;
            }
            for (n, l) in self.pointing[e.attribute()]
                .iter_mut()
                .zip(e.log_lr().iter())
            {
                if *l > 0.0 {
                    if hidden {
                        *n -= 1;
                    } else {
                        *n += 1;
                    }
                }
            }
            if hidden {
                self.feeding[e.attribute()] -= 1;
            } else {
                self.feeding[e.attribute()] += 1;
            }
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

    /// The observer's current belief about attribute `a`.
    pub fn posterior(&self, a: usize) -> Posterior {
        self.models[a].posterior(&self.sums[a])
    }

    /// Summed log-likelihood ratios of the visible evidence for attribute `a`.
    pub fn sum(&self, a: usize) -> &[f64] {
        &self.sums[a]
    }

    /// How many visible pieces of evidence feed attribute `a`.
    pub fn feeding(&self, a: usize) -> usize {
        self.feeding[a]
    }

    /// How many visible pieces of evidence for attribute `a` point toward value `v`
    /// (likelihood ratio above 1). Kept up to date by [`Exposure::set_hidden`], so a
    /// front end can show it after every change without walking all the evidence.
    pub fn pointing_to(&self, a: usize, v: usize) -> usize {
        self.pointing[a][v]
    }

    /// The posterior for `a` if `subject` were hidden too (or shown, if hidden now).
    pub fn posterior_toggled(&self, a: usize, subject: Subject) -> Posterior {
        let s = slot(subject, self.evidence.n_items);
        let sign = if self.hidden[s] { 1.0 } else { -1.0 };
        let mut sum = self.sums[a].clone();
        for &ei in self.of_slot(s) {
            let e = &self.evidence.list[ei];
            if e.attribute() == a {
                for (x, l) in sum.iter_mut().zip(e.log_lr().iter()) {
                    *x += sign * l;
                }
            }
        }
        self.models[a].posterior(&sum)
    }

    /// Every visible subject's contribution to attribute `a`, largest push toward the
    /// best guess first.
    pub fn contributions(&self, a: usize) -> Vec<Contribution> {
        let post = self.posterior(a);
        let w = self.models[a].weight();
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
                    toward_best_bits: w * e.log_lr()[post.best] / std::f64::consts::LN_2,
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
mod tests {
    use super::*;
    use crate::evidence::{Evidence, Origin};

    fn model(base: &[f64], lambda: f64) -> AttrModel {
        AttrModel {
            log_base: base.iter().map(|b| b.ln()).collect(),
            calibration: Calibration::Temperature { lambda },
        }
    }

    fn ev(item: usize, p: &[f64], base: &[f64]) -> Evidence {
        Evidence::from_distribution(Subject::Item(item), 0, p.to_vec(), base, 10.0, Origin::Mark)
    }

    // Worked example by hand (Bayes' rule): prior (0.5, 0.5); two independent items
    // each with likelihood ratios (1.6, 0.4) give posterior odds 0.5·1.6² : 0.5·0.4²
    // = 1.28 : 0.08, so P(v0) = 1.28/1.36 ≈ 0.941176.
    #[test]
    fn naive_bayes_matches_bayes_rule() {
        let base = [0.5, 0.5];
        let mut set = EvidenceSet::new(2);
        set.push(ev(0, &[0.8, 0.2], &base));
        set.push(ev(1, &[0.8, 0.2], &base));
        let mut x = Exposure::with_models(vec![model(&base, 1.0)], set);
        let p = x.posterior(0);
        assert_eq!(p.best, 0);
        assert!((p.probability - 1.28 / 1.36).abs() < 1e-12);
        // Hiding one leaves one likelihood ratio: 0.8.
        assert!(x.set_hidden(Subject::Item(1), true));
        assert!((x.posterior(0).probability - 0.8).abs() < 1e-12);
        assert!(!x.set_hidden(Subject::Item(1), true));
        assert_eq!(x.feeding(0), 1);
        // Hiding both returns the prior.
        x.set_hidden(Subject::Item(0), true);
        assert!((x.posterior(0).probability - 0.5).abs() < 1e-12);
        assert_eq!(x.hidden_subjects().len(), 2);
    }

    #[test]
    fn temperature_tempers() {
        let base = [0.5, 0.5];
        let mut set = EvidenceSet::new(1);
        set.push(ev(0, &[0.8, 0.2], &base));
        let x = Exposure::with_models(vec![model(&base, 0.5)], set);
        // λ = 0.5: odds 4^0.5 = 2 → P = 2/3.
        assert!((x.posterior(0).probability - 2.0 / 3.0).abs() < 1e-12);
    }

    #[test]
    fn contributions_and_leave_one_out() {
        let base = [0.5, 0.5];
        let mut set = EvidenceSet::new(3);
        set.push(ev(0, &[0.8, 0.2], &base));
        set.push(ev(1, &[0.6, 0.4], &base));
        set.push(ev(2, &[0.3, 0.7], &base));
        let x = Exposure::with_models(vec![model(&base, 1.0)], set);
        let c = x.contributions(0);
        assert_eq!(c.len(), 3);
        assert_eq!(c[0].subject, Subject::Item(0));
        assert!((c[0].toward_best_bits - (1.6f64).log2()).abs() < 1e-12);
        assert!(c[2].toward_best_bits < 0.0);
        assert!(c[0].loo_drop > 0.0 && c[2].loo_drop < 0.0);
    }

    #[test]
    fn incremental_equals_recompute_after_many_toggles() {
        let base = [0.2, 0.3, 0.5];
        let mut set = EvidenceSet::new(50);
        for i in 0..50 {
            let a = 0.1 + (i % 7) as f64 * 0.1;
            let p = [a / 2.0, a / 2.0, 1.0 - a];
            set.push(ev(i, &p, &base));
        }
        let mut x = Exposure::with_models(vec![model(&base, 0.8)], set);
        for step in 0..1000 {
            let i = (step * 37) % 50;
            let hidden = x.is_hidden(Subject::Item(i));
            x.set_hidden(Subject::Item(i), !hidden);
        }
        let inc = x.posterior(0);
        let pointing: Vec<usize> = (0..3).map(|v| x.pointing_to(0, v)).collect();
        x.recompute();
        let full = x.posterior(0);
        for (a, b) in inc.probs.iter().zip(&full.probs) {
            assert!((a - b).abs() < 1e-12);
        }
        assert_eq!(
            pointing,
            (0..3).map(|v| x.pointing_to(0, v)).collect::<Vec<_>>()
        );
        // Counted directly: visible evidence with a likelihood ratio above 1 per value.
        for (v, &n) in pointing.iter().enumerate() {
            let direct = x
                .evidence()
                .list
                .iter()
                .filter(|e| !x.is_hidden(e.subject()) && e.log_lr()[v] > 0.0)
                .count();
            assert_eq!(n, direct);
        }
    }

    /// The flat grouping gives each subject exactly its own evidence, in evidence
    /// order, whatever order the evidence list mixes subjects in (counted directly).
    #[test]
    fn evidence_of_lists_each_subjects_own_evidence_in_order() {
        let base = [0.5, 0.5];
        let mut set = EvidenceSet::new(6);
        // Subjects out of order, some repeated, item 4 without evidence.
        for &i in &[3, 0, 5, 3, 1, 0, 3, 2, 5] {
            set.push(ev(i, &[0.7, 0.3], &base));
        }
        set.push(Evidence::from_distribution(
            Subject::FriendList,
            0,
            vec![0.4, 0.6],
            &base,
            10.0,
            Origin::Mark,
        ));
        let x = Exposure::with_models(vec![model(&base, 1.0)], set);
        let subjects = (0..6).map(Subject::Item).chain([Subject::FriendList]);
        let mut seen = 0;
        for subject in subjects {
            let direct: Vec<usize> = x
                .evidence()
                .list
                .iter()
                .enumerate()
                .filter(|(_, e)| e.subject() == subject)
                .map(|(i, _)| i)
                .collect();
            assert_eq!(x.evidence_of(subject), direct.as_slice(), "{subject:?}");
            seen += direct.len();
        }
        assert_eq!(seen, x.evidence().list.len());
        assert!(x.evidence_of(Subject::Item(4)).is_empty());
    }
}
