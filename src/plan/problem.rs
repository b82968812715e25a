//! The planning problem in the form the solvers use: the candidates (visible subjects
//! that are not kept and carry evidence; the rest are pruned), their costs, and for
//! each protected attribute the summed log-likelihood ratios each candidate adds, the
//! visible sums with every candidate shown, and the constraint. Feasibility is always
//! decided by the same combined, calibrated posterior the scan uses
//! ([`AttrModel::posterior_combined`], [`crate::combine`]). The sums are weighted (each
//! piece's source weight and its cause group's share with every candidate shown), so
//! the bounds and greedy's scores use logits `ln π(v) + sum(v)` (λ = 1 here). Where
//! pieces share a cause, hiding some of them changes the others' share: the state then
//! also carries each such group's visible count and plain sums, and the counts of
//! visible data and rule-of-thumb pieces, and the posterior is worked out from those.
//! The bounds ([`super::bound`]) widen each grouped piece's effect so that they hold
//! whatever the group's share becomes, and relax a level where the rules-of-thumb
//! ceiling can come into play; they are proven except under logistic calibration
//! ([`Problem::bounds_proven`]).

use std::collections::HashMap;

use super::request::{Error, PlanRequest};
use crate::combine::{ALONE, Footing, share};
use crate::evidence::{Evidence, Subject};
use crate::infer::{AttrModel, Exposure, Posterior};
use crate::priors::Calibration;

/// A cause group whose visible count can change when candidates are hidden.
#[derive(Debug, Clone)]
pub(crate) struct PGroup {
    /// Source weight of its pieces.
    pub weight: f64,
    /// Its share `f(n)/n` with every candidate shown (what the linear sums assume).
    pub start_share: f64,
    /// Where its `k` plain sums and then its visible count sit in a state (relative to
    /// the attribute's `extra_at`).
    pub at: usize,
    /// Its pieces visible with every candidate shown: (candidate, or [`KEPT`] for a
    /// subject that is not a candidate; index into `PAttr::pieces`).
    pub members: Vec<(u32, u32)>,
}

/// A group member whose subject is not a candidate (kept, or carrying no spread): it
/// stays visible in every plan.
pub(crate) const KEPT: u32 = u32::MAX;

/// One protected attribute, ready for the solvers.
#[derive(Debug, Clone)]
pub(crate) struct PAttr {
    /// Index into the exposure's attributes.
    pub attribute: usize,
    /// Number of values.
    pub k: usize,
    /// Offset of this attribute's sums in a state vector.
    pub offset: usize,
    /// λ: the logits are `log_base + λ·sum`.
    pub lambda: f64,
    pub log_base: Vec<f64>,
    pub model: AttrModel,
    /// The attribute's alert level (what reports show as its level).
    pub threshold: f64,
    /// Per value, its own level `τ_v` (the rarity-aware rule; `threshold` for every
    /// value without it).
    pub tau: Vec<f64>,
    /// Per value, `κ_v = ln((1−τ_v)/τ_v)`: value `v`'s probability is at most `τ_v`
    /// exactly when `LSE_{u≠v}(z_u − z_v) ≥ κ_v`.
    pub kappa: Vec<f64>,
    pub true_value: Option<usize>,
    /// Per candidate, its summed log-likelihood ratios for this attribute (`n × k`),
    /// each piece at its source weight and grouped pieces at their group's share with
    /// every candidate shown.
    pub w: Vec<f64>,
    /// The same from the candidate's pieces that stand alone (not in `groups`): what
    /// hiding it does to the sums whatever else is hidden (`n × k`).
    pub w_alone: Vec<f64>,
    /// Per candidate: whether it has evidence for this attribute.
    pub touches: Vec<bool>,
    /// Cause groups some candidate belongs to (empty: the sums are exact).
    pub groups: Vec<PGroup>,
    /// Per candidate, its pieces in those groups: (group, index into `pieces`).
    pub in_groups: Vec<Vec<(u32, u32)>>,
    /// The evidence pieces `in_groups` and the groups' `members` refer to.
    pub pieces: Vec<Evidence>,
    /// Per candidate, its visible pieces resting on data and on rules of thumb.
    pub footing: Vec<(u32, u32)>,
    /// Where this attribute's extra state starts: each group's sums and count, then
    /// the visible data and rule-of-thumb counts.
    pub extra_at: usize,
}

impl PAttr {
    pub fn w(&self, i: usize) -> &[f64] {
        &self.w[i * self.k..(i + 1) * self.k]
    }

    /// The logits for this attribute's part of a state.
    pub fn logits(&self, sums: &[f64]) -> Vec<f64> {
        self.log_base
            .iter()
            .zip(sums)
            .map(|(b, s)| b + self.lambda * s)
            .collect()
    }

    /// Length of the extra state.
    pub fn extra_len(&self) -> usize {
        self.groups.len() * (self.k + 1) + 2
    }

    /// Hide (`sign` −1) or show (1) candidate `i` in the extra state.
    fn move_extra(&self, state: &mut [f64], i: usize, sign: f64) {
        let base = self.extra_at;
        for &(g, e) in &self.in_groups[i] {
            let at = base + self.groups[g as usize].at;
            let l = self.pieces[e as usize].log_lr();
            for (x, l) in state[at..at + self.k].iter_mut().zip(l) {
                *x += sign * l;
            }
            state[at + self.k] += sign;
        }
        let (data, rules) = self.footing[i];
        let counts = base + self.groups.len() * (self.k + 1);
        state[counts] += sign * data as f64;
        state[counts + 1] += sign * rules as f64;
    }

    /// The combined posterior in a state: the linear sums, corrected for each group's
    /// share at its visible count, and the rules-of-thumb ceiling.
    pub fn posterior_in(&self, state: &[f64]) -> Posterior {
        let weighted = self.combined_sums(state);
        self.model
            .posterior_combined(&weighted, self.rests_on_rules(state))
    }

    /// The combined weighted sums in a state: the linear sums, corrected for each
    /// group's share at its visible count (what the logits are built from).
    pub fn combined_sums(&self, state: &[f64]) -> Vec<f64> {
        let mut weighted = state[self.offset..self.offset + self.k].to_vec();
        let base = self.extra_at;
        for g in &self.groups {
            let at = base + g.at;
            let n = self.group_count(state, g);
            let d = g.weight * (share(n) - g.start_share);
            for (x, s) in weighted.iter_mut().zip(&state[at..at + self.k]) {
                *x += d * s;
            }
        }
        weighted
    }

    /// A group's visible count in a state.
    pub fn group_count(&self, state: &[f64], g: &PGroup) -> usize {
        state[self.extra_at + g.at + self.k].round().max(0.0) as usize
    }

    /// Visible pieces resting on data and on rules of thumb in a state.
    pub fn footing_counts(&self, state: &[f64]) -> (f64, f64) {
        let counts = self.extra_at + self.groups.len() * (self.k + 1);
        (state[counts], state[counts + 1])
    }

    /// Whether only rules of thumb support the attribute in a state (the ceiling
    /// applies).
    pub fn rests_on_rules(&self, state: &[f64]) -> bool {
        let (data, rules) = self.footing_counts(state);
        data < 0.5 && rules > 0.5
    }

    /// Constrained values whose probability is over their level.
    pub fn violated(&self, post: &Posterior) -> Vec<usize> {
        (0..self.k)
            .filter(|&v| self.constrains(v) && post.probs[v] > self.tau[v])
            .collect()
    }

    /// Whether value `v` has a constraint: its level is under 1, and it is the true
    /// value when one is stated.
    pub fn constrains(&self, v: usize) -> bool {
        self.tau[v] < 1.0 && self.true_value.is_none_or(|t| t == v)
    }

    /// Whether any value of this attribute is constrained.
    pub fn active(&self) -> bool {
        (0..self.k).any(|v| self.constrains(v))
    }

    /// Whether the levels alone rule out a plan: with no true value every value must
    /// be at most its level, and probabilities add up to 1.
    pub fn levels_too_low(&self) -> bool {
        self.true_value.is_none() && self.tau.iter().sum::<f64>() < 1.0 - 1e-12
    }
}

/// The problem the solvers work on.
#[derive(Debug, Clone)]
pub(crate) struct Problem {
    /// Candidates: visible subjects that may be hidden and carry evidence.
    pub subjects: Vec<Subject>,
    pub cost: Vec<f64>,
    /// Every cost is 1.
    pub unit_costs: bool,
    /// Every cost is a whole number (so any plan's cost is one).
    pub integral_costs: bool,
    /// Candidates with bit-identical evidence and equal cost share a class; the search
    /// never tries one of a class while skipping an earlier one.
    pub class: Vec<usize>,
    pub attrs: Vec<PAttr>,
    /// Sums with every candidate visible (attributes concatenated).
    pub start: Vec<f64>,
    /// Visible, not kept, but carrying no evidence: hiding them changes nothing.
    pub pruned: Vec<Subject>,
    /// Every watched attribute uses temperature calibration, for which the search's
    /// bounds are proven (cause groups and the rules-of-thumb ceiling included; see
    /// [`super::bound`]). Under logistic calibration the search still only returns
    /// plans that meet every threshold under the calibrated model, but a proof of
    /// smallest or of impossibility does not follow.
    pub bounds_proven: bool,
}

/// Check a request against an exposure.
pub(crate) fn validate(exposure: &Exposure, request: &PlanRequest) -> Result<(), Error> {
    let models = exposure.models();
    let mut seen = vec![false; models.len()];
    for t in &request.targets {
        let Some(m) = models.get(t.attribute) else {
            return Err(Error::UnknownAttribute {
                attribute: t.attribute,
                count: models.len(),
            });
        };
        if std::mem::replace(&mut seen[t.attribute], true) {
            return Err(Error::DuplicateTarget {
                attribute: t.attribute,
            });
        }
        if !(t.threshold > 0.0 && t.threshold <= 1.0) {
            return Err(Error::Threshold {
                attribute: t.attribute,
                threshold: t.threshold,
            });
        }
        if let Some(levels) = &t.value_levels
            && (levels.len() != m.log_base.len() || levels.iter().any(|&l| !(l > 0.0 && l <= 1.0)))
        {
            return Err(Error::ValueLevels {
                attribute: t.attribute,
                given: levels.len(),
                count: m.log_base.len(),
            });
        }
        if let Some(v) = t.true_value
            && v >= m.log_base.len()
        {
            return Err(Error::UnknownValue {
                attribute: t.attribute,
                value: v,
                count: m.log_base.len(),
            });
        }
    }
    let n_items = exposure.evidence().n_items;
    let known = |s: &Subject| match s {
        Subject::Item(i) => *i < n_items,
        Subject::FriendList => true,
    };
    for s in request.keep.iter().chain(request.costs.keys()) {
        if !known(s) {
            return Err(Error::UnknownSubject { subject: *s });
        }
    }
    for &cost in request.costs.values() {
        if !(cost.is_finite() && cost > 0.0) {
            return Err(Error::Cost { cost });
        }
    }
    Ok(())
}

impl Problem {
    /// Set up the problem: candidates are the visible, not kept subjects with evidence.
    /// Subjects already hidden in the exposure stay hidden and cost nothing.
    pub fn build(exposure: &Exposure, request: &PlanRequest) -> Problem {
        let n_items = exposure.evidence().n_items;
        let mut subjects = Vec::new();
        let mut pruned = Vec::new();
        for s in (0..n_items)
            .map(Subject::Item)
            .chain(std::iter::once(Subject::FriendList))
        {
            if exposure.is_hidden(s) || request.keep.contains(&s) {
                continue;
            }
            let ev = exposure.evidence_of(s);
            let carries = ev.iter().any(|&e| {
                let l = &exposure.evidence().list[e].log_lr();
                let (lo, hi) = l
                    .iter()
                    .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &x| {
                        (a.min(x), b.max(x))
                    });
                hi - lo > 0.0
            });
            if carries {
                subjects.push(s);
            } else if s != Subject::FriendList || !ev.is_empty() {
                // The friend list only counts as pruned when it has evidence at all.
                pruned.push(s);
            }
        }
        let n = subjects.len();
        let cost: Vec<f64> = subjects.iter().map(|&s| request.cost(s)).collect();
        let mut attrs = Vec::new();
        let mut start = Vec::new();
        let mut extras: Vec<Vec<f64>> = Vec::new();
        let mut bounds_proven = true;
        for t in &request.targets {
            let model = exposure.models()[t.attribute].clone();
            let k = model.log_base.len();
            if let Calibration::Logistic { .. } = &model.calibration {
                bounds_proven = false;
            }
            let grouping = exposure.grouping();
            let mut w = vec![0.0; n * k];
            let mut touching = Vec::new();
            let mut groups: Vec<PGroup> = Vec::new();
            let mut group_at: HashMap<u32, u32> = HashMap::new();
            let mut in_groups: Vec<Vec<(u32, u32)>> = vec![Vec::new(); n];
            let mut pieces: Vec<Evidence> = Vec::new();
            let mut footing = vec![(0u32, 0u32); n];
            let mut w_alone = vec![0.0; n * k];
            // Evidence index -> (candidate, piece) for the candidates' grouped pieces.
            let mut piece_of: HashMap<usize, (u32, u32)> = HashMap::new();
            for (ci, &s) in subjects.iter().enumerate() {
                let mut any = false;
                for &ei in exposure.evidence_of(s) {
                    let e = &exposure.evidence().list[ei];
                    if e.attribute() != t.attribute {
                        continue;
                    }
                    any = true;
                    let pw = exposure.piece_weight(ei);
                    for (x, l) in w[ci * k..(ci + 1) * k].iter_mut().zip(e.log_lr().iter()) {
                        *x += pw * l;
                    }
                    match grouping.footing[ei] {
                        Footing::Data => footing[ci].0 += 1,
                        Footing::RuleOfThumb => footing[ci].1 += 1,
                    }
                    let g = grouping.group_of[ei];
                    if g != ALONE {
                        let next = groups.len() as u32;
                        let at = *group_at.entry(g).or_insert(next);
                        if at == next {
                            groups.push(PGroup {
                                weight: grouping.weight[ei],
                                start_share: share(exposure.cause_size(ei)),
                                at: 0,
                                members: Vec::new(),
                            });
                        }
                        piece_of.insert(ei, (ci as u32, pieces.len() as u32));
                        in_groups[ci].push((at, pieces.len() as u32));
                        pieces.push(e.clone());
                    } else {
                        for (x, l) in w_alone[ci * k..(ci + 1) * k]
                            .iter_mut()
                            .zip(e.log_lr().iter())
                        {
                            *x += pw * l;
                        }
                    }
                }
                if any {
                    touching.push(ci);
                }
            }
            // Each group's plain sums and visible count with every candidate shown:
            // its whole visible membership (kept subjects included).
            let mut group_start: Vec<f64> = vec![0.0; groups.len() * (k + 1)];
            for (i, g) in groups.iter_mut().enumerate() {
                g.at = i * (k + 1);
            }
            if !groups.is_empty() {
                for (ei, e) in exposure.evidence().list.iter().enumerate() {
                    if e.attribute() != t.attribute || exposure.is_hidden(e.subject()) {
                        continue;
                    }
                    if let Some(&gi) = group_at.get(&grouping.group_of[ei]) {
                        let g = &mut groups[gi as usize];
                        let at = g.at;
                        for (x, l) in group_start[at..at + k].iter_mut().zip(e.log_lr()) {
                            *x += l;
                        }
                        group_start[at + k] += 1.0;
                        match piece_of.get(&ei) {
                            Some(&member) => g.members.push(member),
                            None => {
                                g.members.push((KEPT, pieces.len() as u32));
                                pieces.push(e.clone());
                            }
                        }
                    }
                }
            }
            let (data, rules) = exposure.footings(t.attribute);
            group_start.extend([data as f64, rules as f64]);
            extras.push(group_start);
            let mut touches = vec![false; n];
            for &ci in &touching {
                touches[ci] = true;
            }
            let tau: Vec<f64> = (0..k).map(|v| t.level(v)).collect();
            let kappa = tau.iter().map(|&x| ((1.0 - x) / x).ln()).collect();
            attrs.push(PAttr {
                attribute: t.attribute,
                k,
                offset: start.len(),
                lambda: 1.0,
                log_base: model.log_base.clone(),
                threshold: t.threshold,
                tau,
                kappa,
                true_value: t.true_value,
                model,
                w,
                w_alone,
                touches,
                groups,
                in_groups,
                pieces,
                footing,
                extra_at: 0,
            });
            start.extend_from_slice(exposure.weighted_sum(t.attribute));
        }
        for (a, extra) in attrs.iter_mut().zip(extras) {
            a.extra_at = start.len();
            start.extend(extra);
        }
        let unit_costs = cost.iter().all(|&c| c == 1.0);
        let integral_costs = cost.iter().all(|&c| c.fract() == 0.0);
        let class = twin_classes(&subjects, &cost, exposure);
        Problem {
            subjects,
            cost,
            unit_costs,
            integral_costs,
            class,
            attrs,
            start,
            pruned,
            bounds_proven,
        }
    }

    pub fn n(&self) -> usize {
        self.subjects.len()
    }

    /// The state (sums) with the given candidates hidden.
    pub fn state_with(&self, hidden: &[usize]) -> Vec<f64> {
        let mut s = self.start.clone();
        for &i in hidden {
            self.hide(&mut s, i);
        }
        s
    }

    /// Hide candidate `i` in a state.
    pub fn hide(&self, state: &mut [f64], i: usize) {
        for a in &self.attrs {
            for (x, w) in state[a.offset..a.offset + a.k].iter_mut().zip(a.w(i)) {
                *x -= w;
            }
            a.move_extra(state, i, -1.0);
        }
    }

    /// Show candidate `i` again in a state.
    pub fn show(&self, state: &mut [f64], i: usize) {
        for a in &self.attrs {
            for (x, w) in state[a.offset..a.offset + a.k].iter_mut().zip(a.w(i)) {
                *x += w;
            }
            a.move_extra(state, i, 1.0);
        }
    }

    pub fn sums<'a>(&self, a: &PAttr, state: &'a [f64]) -> &'a [f64] {
        &state[a.offset..a.offset + a.k]
    }

    /// The calibrated posterior of attribute `a` (index into `attrs`) in a state.
    pub fn posterior(&self, a: usize, state: &[f64]) -> Posterior {
        self.attrs[a].posterior_in(state)
    }

    /// Constraints (attribute index into `attrs`, value) that a state violates.
    pub fn violated(&self, state: &[f64]) -> Vec<(usize, usize)> {
        let mut out = Vec::new();
        for (ai, a) in self.attrs.iter().enumerate() {
            if !a.active() {
                continue;
            }
            let post = self.posterior(ai, state);
            out.extend(a.violated(&post).into_iter().map(|v| (ai, v)));
        }
        out
    }

    pub fn feasible(&self, state: &[f64]) -> bool {
        self.attrs
            .iter()
            .enumerate()
            .all(|(ai, a)| !a.active() || a.violated(&self.posterior(ai, state)).is_empty())
    }

    /// Total cost of a set of candidates.
    pub fn cost_of(&self, set: &[usize]) -> f64 {
        set.iter().map(|&i| self.cost[i]).sum()
    }

    /// Drop hidden candidates that are not needed (most expensive first) while the
    /// state stays feasible; the result is minimal under inclusion.
    pub fn trim(&self, set: &mut Vec<usize>) {
        let mut state = self.state_with(set);
        let mut order: Vec<usize> = set.clone();
        order.sort_by(|&a, &b| self.cost[b].total_cmp(&self.cost[a]).then(a.cmp(&b)));
        for i in order {
            self.show(&mut state, i);
            if self.feasible(&state) {
                set.retain(|&x| x != i);
            } else {
                self.hide(&mut state, i);
            }
        }
        set.sort_unstable();
    }

    /// The same problem restricted to some of its attributes (indices into `attrs`).
    pub fn restricted(&self, keep: &[usize]) -> Problem {
        let mut attrs = Vec::new();
        let mut start = Vec::new();
        for &ai in keep {
            let mut a = self.attrs[ai].clone();
            start.extend_from_slice(&self.start[a.offset..a.offset + a.k]);
            a.offset = start.len() - a.k;
            attrs.push(a);
        }
        for a in &mut attrs {
            let from = a.extra_at;
            a.extra_at = start.len();
            start.extend_from_slice(&self.start[from..from + a.extra_len()]);
        }
        Problem {
            attrs,
            start,
            ..self.clone()
        }
    }
}

/// Group candidates whose evidence is bit-for-bit the same (the same reference item
/// matched twice, say) and whose costs are equal.
fn twin_classes(subjects: &[Subject], cost: &[f64], exposure: &Exposure) -> Vec<usize> {
    let mut seen: HashMap<Vec<u64>, usize> = HashMap::new();
    let mut class = Vec::with_capacity(subjects.len());
    for (ci, &s) in subjects.iter().enumerate() {
        let mut key = vec![cost[ci].to_bits()];
        let mut ev: Vec<usize> = exposure.evidence_of(s).to_vec();
        ev.sort_by_key(|&e| exposure.evidence().list[e].attribute());
        for ei in ev {
            let e = &exposure.evidence().list[ei];
            key.push(e.attribute() as u64);
            key.push(u64::from(exposure.grouping().group_of[ei]));
            key.extend(e.log_lr().iter().map(|x| x.to_bits()));
        }
        let next = seen.len();
        class.push(*seen.entry(key).or_insert(next));
    }
    class
}
