//! Proven lower bounds on what a search node still has to hide.
//!
//! A constraint `P(v) ≤ τ` is `F = LSE_{u≠v}(D_u) ≥ κ` with `D_u = z_u − z_v` (the
//! logit gaps) and `κ = ln((1−τ)/τ)`. Hiding candidate `i` adds
//! `δ_iu = λ·(w_iv − w_iu)` to every gap. Three facts give the bounds (each is proved
//! in docs/plan.md):
//!
//! 1. LSE is increasing in every argument, so hiding any set of at most `K` candidates
//!    gives at most `LSE_u(D_u + T_u(K))`, where `T_u(K)` is the sum of the `K`
//!    largest positive `δ_iu` (for costs: the fractional-knapsack value at that cost).
//!    If that stays below κ the node cannot be completed; the smallest `K` (or cost)
//!    that reaches κ bounds this constraint alone.
//! 2. LSE is convex, so `F(D+Δ) − F(D) ≤ ⟨p', Δ⟩` with `p'` the softmax after hiding.
//!    Bounding `p'_u` from above by `p̄_u` (largest gap growth for `u`, smallest for the
//!    rest) bounds each candidate's share of the gain by `g_i = max ⟨p, δ_i⟩` over the
//!    distributions `p ≤ p̄`. So `Σ_{i hidden} g_i ≥ κ − F` is necessary.
//! 3. Those linear conditions for every violated constraint together form a covering
//!    LP whose Lagrangian dual `Σ_j μ_j r_j − Σ_i max(0, Σ_j μ_j g_ij − c_i)` is a lower
//!    bound on the cost for any `μ ≥ 0` (weak duality); a few rounds of exact
//!    coordinate ascent pick `μ`. This is what makes attributes fed by different items
//!    add up.
//!
//! 4. With the alternatives' current shares `s_u = e^{D_u − F}`, the constraint reads
//!    `Σ_u s_u e^{Δ_u} ≥ e^{κ−F}`: a weighted mean of `e^{Δ_u}`. So some likely
//!    alternative `u` must have its gap widened by about the whole deficit, or the
//!    unlikely ones together by much more (see `constraint_bound`). Each case is a
//!    linear condition with the exact widenings; the bound is the smallest Lagrangian
//!    bound over the combinations of one case per violated constraint.
//!
//! 5. Any split of each candidate's cost among the violated constraints
//!    (`Σ_j c_ij = c_i`) gives `cost(X) = Σ_j Σ_{i∈X} c_ij ≥ Σ_j bound_j(c_·j)`: the
//!    constraints' own bounds (fact 1 with the split costs) add up. The split follows
//!    how much each candidate can do for each constraint.
//!
//! 6. **Cause groups.** A group of `n` visible pieces with gap contributions `c_p`
//!    (`c_p = λ·w_g·(l_pu − l_pv)`, summed `C`) adds `s(n)·C` to gap `u`, where
//!    `s(n) = f(n)/n` is the share ([`crate::combine::share`]). Hiding a set `R` of its
//!    pieces (`m = n − |R|` left, their sum `T = C − Σ_R c_p`) changes the gap by
//!
//!    `Δ = s(m)·T − s(n)·C = −s(n)·Σ_R c_p + (s(m) − s(n))·T`.
//!
//!    The first term is linear: each piece at the share it has now. In the second,
//!    `s` falls with `n` (`d/dn (1 + ln n)/n = −ln n / n² ≤ 0`), so `s(m) − s(n) ≥ 0`
//!    for `1 ≤ m ≤ n` (with `m = 0`, `T = 0`); and `T` lies between the sums of the `m`
//!    smallest and the `m` largest `c_p` (`bot_m ≤ T ≤ top_m`). So with
//!
//!    `e↑ = max_{1≤r<n} (s(n−r) − s(n))·max(top_{n−r}, 0)/r` and
//!    `e↓ = max_{1≤r<n} (s(n−r) − s(n))·max(−bot_{n−r}, 0)/r`,
//!
//!    `−s(n)·Σ_R c_p − |R|·e↓ ≤ Δ ≤ −s(n)·Σ_R c_p + |R|·e↑` for every `R` (`|R| = r`
//!    pieces, and the second term is at most `(s(n−r) − s(n))·max(top_{n−r}, 0)`, which is
//!    at most `r·e↑`). Each grouped piece therefore widens the gap by at most
//!    `−s(n)·c_p + e↑` and at least `−s(n)·c_p − e↓`; a candidate's bounds are those of
//!    its pieces added to the exact effect of its pieces that stand alone, and every
//!    fact above uses them in place of `δ_iu` (upper bounds where the gain is bounded
//!    from above, lower bounds for the softmax caps of fact 2). Groups are independent
//!    of each other, so the bounds add. They are worked out at each node from the
//!    pieces still visible there; the gaps `D_u` are the node's true (combined) gaps.
//!
//! 7. **The rules-of-thumb ceiling.** When only rules of thumb stay visible, the best
//!    guess's odds `o` become `o' = 1/(1/o + 1/O)` (`O` the ceiling's odds; it may then
//!    be raised to the runner-up's level, and the other values rise in proportion,
//!    [`crate::combine::cap_top`]). So a value that is not the best guess only gets
//!    more likely, and the best guess `v` meets `P(v) ≤ τ` only if
//!    `1/o ≥ (1−τ)/τ − 1/O`, i.e. `F ≥ κ' = ln((1−τ)/τ − 1/O)` (no condition when that
//!    is not positive). Where a completion of the node can end with only rules of thumb
//!    visible (no data piece stays visible outside the free candidates, and hiding all
//!    free data-carrying candidates costs less than the room), the bounds aim for
//!    `min(κ, κ')` instead of `κ`: necessary in every case. A node violated only
//!    through the ceiling (its uncapped gap already at that level) cannot say which
//!    candidates help, so it branches on every free candidate with evidence for the
//!    attribute, and its bound is the cheapest of them.
//!
//! All comparisons leave a small slack in the conservative direction, so rounding can
//! only weaken a bound, never cut off a plan.

use super::problem::{KEPT, PAttr, Problem};
use crate::combine::{RULES_OF_THUMB_CEILING, share};

/// Slack on deficits: bounds aim for `κ − SLACK`.
const SLACK: f64 = 1e-9;

/// Fact 4: how many alternatives per constraint get their own option.
const ALONE: usize = 8;

/// Fact 4: group weights grow as the group's share to this power (1 would give every
/// group the plain deficit; smaller values ask more of unlikely alternatives).
const BETA: f64 = 0.5;

/// Fact 4: at most this many combinations are tried.
const MAX_COMBINATIONS: usize = 1024;

/// The bound's view of a node.
pub(crate) struct NodeView<'a> {
    pub state: &'a [f64],
    /// Candidates hidden at the node.
    pub hidden: &'a [usize],
    /// Candidates not yet decided.
    pub free: &'a [usize],
    /// Only completions costing less than this are of interest (the incumbent's cost
    /// minus the node's); infinity when there is no incumbent.
    pub room: f64,
}

/// What one violated constraint says about a node.
#[derive(Debug, Clone)]
pub(crate) struct ConstraintBound {
    /// Index into `Problem::attrs`.
    pub attr: usize,
    pub value: usize,
    /// `κ − F`: how far the logit gap is from the threshold.
    pub deficit: f64,
    /// Lower bound on the extra cost from this constraint alone.
    pub single: f64,
    /// Free candidates that can help (`g > 0`), with `g`.
    pub helpers: Vec<(usize, f64)>,
    /// The logit gaps `D_u` (with `D_v` unused).
    pub gaps: Vec<f64>,
    /// The level the bounds aim for: `κ_v`, or lower where the ceiling may apply
    /// (fact 7).
    pub kappa: f64,
    /// Bounds on what each free candidate can do to the gaps (fact 6).
    pub widen: Widen,
    /// Fact 4's options: a required widening and its row `(candidate, δ_iu)`; one
    /// option per likely alternative `u`, and one for the rest merged by taking the
    /// largest widening per candidate.
    pub options: Vec<(f64, Vec<(usize, f64)>)>,
}

pub(crate) enum Bound {
    /// No completion of the node costing less than `room` is feasible.
    Infeasible,
    Lower {
        /// Lower bound on the extra cost of any feasible completion.
        extra: f64,
        constraints: Vec<ConstraintBound>,
    },
}

/// `ln Σ exp(x)` over the entries not equal to `skip`.
pub(crate) fn lse_except(x: &[f64], skip: usize) -> f64 {
    let m = x
        .iter()
        .enumerate()
        .filter(|(u, _)| *u != skip)
        .map(|(_, &v)| v)
        .fold(f64::NEG_INFINITY, f64::max);
    if m == f64::NEG_INFINITY {
        return m;
    }
    let s: f64 = x
        .iter()
        .enumerate()
        .filter(|(u, _)| *u != skip)
        .map(|(_, &v)| (v - m).exp())
        .sum();
    m + s.ln()
}

/// The logit gaps `D_u = z_u − z_v` of a state (its combined sums, group shares at
/// their visible counts).
pub(crate) fn gaps(a: &PAttr, state: &[f64], v: usize) -> Vec<f64> {
    let z = a.logits(&a.combined_sums(state));
    z.iter().map(|&zu| zu - z[v]).collect()
}

/// Per free candidate with evidence for one attribute, bounds on how much hiding it
/// widens each gap `u` of a constraint on `v`, whatever else is hidden (fact 6; exact,
/// `hi = lo = δ_iu = λ·(w_iv − w_iu)`, where no piece of it shares a cause).
#[derive(Debug, Clone)]
pub(crate) struct Widen {
    /// The candidates.
    pub rows: Vec<usize>,
    k: usize,
    /// `rows × k`: upper bounds.
    hi: Vec<f64>,
    /// `rows × k`: lower bounds.
    lo: Vec<f64>,
}

impl Widen {
    /// Upper bound for row `r`, gap `u`.
    pub fn hi(&self, r: usize, u: usize) -> f64 {
        self.hi[r * self.k + u]
    }

    fn lo(&self, r: usize, u: usize) -> f64 {
        self.lo[r * self.k + u]
    }

    fn hi_row(&self, r: usize) -> &[f64] {
        &self.hi[r * self.k..(r + 1) * self.k]
    }
}

/// Fact 6: the widenings of the free candidates touching `a`, for value `v`.
pub(crate) fn widenings(a: &PAttr, view: &NodeView, v: usize) -> Widen {
    let k = a.k;
    let rows: Vec<usize> = view
        .free
        .iter()
        .copied()
        .filter(|&i| a.touches[i])
        .collect();
    let alone = !a.groups.is_empty();
    let mut hi = vec![0.0; rows.len() * k];
    for (r, &i) in rows.iter().enumerate() {
        let w = if alone {
            &a.w_alone[i * k..(i + 1) * k]
        } else {
            a.w(i)
        };
        for u in (0..k).filter(|&u| u != v) {
            hi[r * k + u] = a.lambda * (w[v] - w[u]);
        }
    }
    let mut lo = hi.clone();
    if alone {
        let n = a.touches.len();
        let mut row_of = vec![usize::MAX; n];
        for (r, &i) in rows.iter().enumerate() {
            row_of[i] = r;
        }
        let mut hidden = vec![false; n];
        for &i in view.hidden {
            hidden[i] = true;
        }
        let mut c = Vec::new();
        for g in &a.groups {
            let visible: Vec<(u32, u32)> = g
                .members
                .iter()
                .copied()
                .filter(|&(ci, _)| ci == KEPT || !hidden[ci as usize])
                .collect();
            if !visible
                .iter()
                .any(|&(ci, _)| ci != KEPT && row_of[ci as usize] != usize::MAX)
            {
                continue;
            }
            let m = visible.len();
            let s_n = share(m);
            let scale = a.lambda * g.weight;
            for u in (0..k).filter(|&u| u != v) {
                c.clear();
                c.extend(visible.iter().map(|&(_, e)| {
                    let l = a.pieces[e as usize].log_lr();
                    scale * (l[u] - l[v])
                }));
                let (up, down) = share_changes(&mut c);
                for &(ci, e) in &visible {
                    if ci == KEPT || row_of[ci as usize] == usize::MAX {
                        continue;
                    }
                    let r = row_of[ci as usize];
                    let l = a.pieces[e as usize].log_lr();
                    let cp = scale * (l[u] - l[v]);
                    hi[r * k + u] += -s_n * cp + up;
                    lo[r * k + u] += -s_n * cp - down;
                }
            }
        }
    }
    Widen { rows, k, hi, lo }
}

/// Fact 6's `(e↑, e↓)` for the gap contributions `c` of a group's visible pieces
/// (reordered).
pub(crate) fn share_changes(c: &mut [f64]) -> (f64, f64) {
    let n = c.len();
    if n < 2 {
        return (0.0, 0.0);
    }
    c.sort_by(|x, y| y.total_cmp(x));
    let total: f64 = c.iter().sum();
    // top[m]: the m largest summed.
    let mut top = vec![0.0; n + 1];
    for (j, &x) in c.iter().enumerate() {
        top[j + 1] = top[j] + x;
    }
    let s_n = share(n);
    let (mut up, mut down) = (0.0f64, 0.0f64);
    for r in 1..n {
        let m = n - r;
        let gain = (share(m) - s_n).max(0.0);
        let bot = total - top[n - m];
        up = up.max(gain * top[m].max(0.0) / r as f64);
        down = down.max(gain * (-bot).max(0.0) / r as f64);
    }
    // Rounding in the sums only ever loosens these, by a hair.
    (up * (1.0 + 1e-12) + 1e-12, down * (1.0 + 1e-12) + 1e-12)
}

/// Fact 7: the level the bounds for `(a, v)` aim for at a node.
fn aimed_level(p: &Problem, a: &PAttr, view: &NodeView, v: usize) -> f64 {
    let kappa = a.kappa[v];
    let (data, rules) = a.footing_counts(view.state);
    if rules < 0.5 {
        return kappa;
    }
    let free_data: f64 = view.free.iter().map(|&i| a.footing[i].0 as f64).sum();
    if data - free_data > 0.5 {
        return kappa;
    }
    if data > 0.5 {
        let cost: f64 = view
            .free
            .iter()
            .filter(|&&i| a.footing[i].0 > 0)
            .map(|&i| p.cost[i])
            .sum();
        if cost >= view.room - SLACK {
            return kappa;
        }
    }
    let tau = a.tau[v];
    let ceiling = RULES_OF_THUMB_CEILING;
    let x = (1.0 - tau) / tau - (1.0 - ceiling) / ceiling;
    if x <= 0.0 {
        f64::NEG_INFINITY
    } else {
        kappa.min(x.ln())
    }
}

/// How many of the free candidates fit, cheapest first, at a cost below `room`.
fn max_count(p: &Problem, free: &[usize], room: f64) -> usize {
    if room.is_infinite() {
        return free.len();
    }
    if p.unit_costs {
        return ((room - SLACK).ceil() as i64 - 1).clamp(0, free.len() as i64) as usize;
    }
    let mut costs: Vec<f64> = free.iter().map(|&i| p.cost[i]).collect();
    costs.sort_by(f64::total_cmp);
    let mut total = 0.0;
    let mut k = 0;
    for c in costs {
        total += c;
        if total < room - SLACK {
            k += 1;
        } else {
            break;
        }
    }
    k
}

/// The bound for a node whose `violated` constraints are given (non-empty).
pub(crate) fn bound(p: &Problem, view: &NodeView, violated: &[(usize, usize)]) -> Bound {
    let k_max = max_count(p, view.free, view.room);
    if k_max == 0 {
        return Bound::Infeasible;
    }
    let mut constraints = Vec::with_capacity(violated.len());
    for &(ai, v) in violated {
        match constraint_bound(p, view, ai, v, k_max) {
            Some(c) => constraints.push(c),
            None => return Bound::Infeasible,
        }
    }
    let single = constraints.iter().map(|c| c.single).fold(0.0, f64::max);
    let dual = lagrangian(p, view.free, &constraints);
    if dual.is_infinite() {
        return Bound::Infeasible;
    }
    let mut extra = single.max(dual);
    let disj = disjunctive(p, &constraints, extra);
    let mut split = 0.0f64;
    for normalise in [true, false] {
        match split_bound(p, view, &constraints, normalise) {
            Some(x) => split = split.max(x),
            None => return Bound::Infeasible,
        }
    }
    if disj.is_infinite() {
        return Bound::Infeasible;
    }
    extra = extra.max(disj).max(split);
    if p.integral_costs {
        extra = (extra - 1e-7).ceil().max(0.0);
    }
    if extra >= view.room - SLACK {
        return Bound::Infeasible;
    }
    Bound::Lower { extra, constraints }
}

fn constraint_bound(
    p: &Problem,
    view: &NodeView,
    ai: usize,
    v: usize,
    k_max: usize,
) -> Option<ConstraintBound> {
    let a = &p.attrs[ai];
    let d = gaps(a, view.state, v);
    let f = lse_except(&d, v);
    let kappa = aimed_level(p, a, view, v);
    let target = kappa - SLACK;
    let wd = widenings(a, view, v);
    if wd.rows.is_empty() {
        return None;
    }
    let rows = wd.rows.len();
    // Fact 7: violated only through the ceiling (or by a rounding hair): some free
    // candidate with evidence for the attribute must be hidden; which one is not known.
    if f >= target {
        let single = wd
            .rows
            .iter()
            .map(|&i| p.cost[i])
            .fold(f64::INFINITY, f64::min);
        if single >= view.room - SLACK {
            return None;
        }
        return Some(ConstraintBound {
            attr: ai,
            value: v,
            deficit: 1e-12,
            single,
            helpers: wd.rows.iter().map(|&i| (i, 1e-12)).collect(),
            gaps: d,
            kappa,
            options: Vec::new(),
            widen: wd,
        });
    }
    let deficit = (kappa - f).max(1e-12);
    // Per gap u: the widenings sorted largest first.
    let mut top = vec![0.0; a.k];
    let mut bottom = vec![0.0; a.k];
    let mut sorted: Vec<Vec<f64>> = vec![Vec::new(); a.k];
    for u in (0..a.k).filter(|&u| u != v) {
        let mut ds: Vec<f64> = (0..rows).map(|r| wd.hi(r, u)).collect();
        ds.sort_by(|x, y| y.total_cmp(x));
        top[u] = ds.iter().take(k_max).filter(|&&x| x > 0.0).sum();
        let mut lows: Vec<f64> = (0..rows).map(|r| wd.lo(r, u)).collect();
        lows.sort_by(f64::total_cmp);
        bottom[u] = lows.iter().take(k_max).filter(|&&x| x < 0.0).sum();
        sorted[u] = ds;
    }
    let reach: Vec<f64> = (0..a.k).map(|u| d[u] + top[u]).collect();
    if lse_except(&reach, v) < target {
        return None;
    }

    // Fact 2: caps on the final softmax, then each candidate's largest share.
    let low: Vec<f64> = (0..a.k).map(|u| d[u] + bottom[u]).collect();
    let cap = softmax_caps(&reach, &low, v);
    let mut helpers = Vec::new();
    let mut idx: Vec<usize> = Vec::with_capacity(a.k);
    for (r, &i) in wd.rows.iter().enumerate() {
        let row = wd.hi_row(r);
        idx.clear();
        idx.extend((0..a.k).filter(|&u| u != v));
        idx.sort_by(|&x, &y| row[y].total_cmp(&row[x]));
        let mut left = 1.0;
        let mut g = 0.0;
        for &u in &idx {
            let take = cap[u].min(left);
            g += take * row[u];
            left -= take;
            if left <= 0.0 {
                break;
            }
        }
        if left > 0.0 {
            g += left * idx.first().map_or(0.0, |&u| row[u]);
        }
        if g > 1e-15 {
            helpers.push((i, g));
        }
    }
    if helpers.is_empty() {
        return None;
    }
    let min_helper_cost = helpers
        .iter()
        .map(|&(i, _)| p.cost[i])
        .fold(f64::INFINITY, f64::min);

    // Fact 1: the smallest count (or cost) whose best conceivable widening reaches κ.
    let single = if p.unit_costs {
        let mut found = None;
        let mut acc = d.clone();
        for k in 1..=k_max {
            for u in (0..a.k).filter(|&u| u != v) {
                if let Some(&x) = sorted[u].get(k - 1)
                    && x > 0.0
                {
                    acc[u] += x;
                }
            }
            if lse_except(&acc, v) >= target {
                found = Some(k as f64);
                break;
            }
        }
        found?
    } else {
        let costs: Vec<f64> = wd.rows.iter().map(|&i| p.cost[i]).collect();
        let c = single_by_cost(&wd, v, &d, &costs, target)?;
        if c >= view.room - SLACK {
            return None;
        }
        c
    };
    // Fact 4: with shares s_u = e^{D_u − F}, the constraint is Σ_u s_u e^{Δ_u} ≥ e^r.
    // Split the alternatives into the most likely ones A (one option each) and the
    // rest L (one merged option); for θ in (0, 1) either Σ_A ≥ (1−θ)e^r, so some u in
    // A has Δ_u ≥ r + ln((1−θ)/S_A), or Σ_L ≥ θe^r, so some u in L has
    // Δ_u ≥ r + ln(θ/S_L).
    let r = kappa - f;
    let mut alts: Vec<usize> = (0..a.k).filter(|&u| u != v).collect();
    alts.sort_by(|&x, &y| d[y].total_cmp(&d[x]));
    let share = |u: usize| (d[u] - f).exp();
    let alone = &alts[..alts.len().min(ALONE)];
    let rest = &alts[alone.len()..];
    // Groups: each likely alternative alone, the rest together; group shares S_G,
    // weights θ_G ∝ S_G^β (summing to 1), required widening r + ln(θ_G/S_G).
    let mut groups: Vec<(f64, Vec<usize>)> = alone.iter().map(|&u| (share(u), vec![u])).collect();
    if !rest.is_empty() {
        groups.push((rest.iter().map(|&u| share(u)).sum(), rest.to_vec()));
    }
    let beta = BETA;
    let z: f64 = groups.iter().map(|(sg, _)| sg.powf(beta)).sum();
    let mut options: Vec<(f64, Vec<(usize, f64)>)> = Vec::new();
    for (sg, members) in &groups {
        let need = if *sg > 0.0 && z > 0.0 {
            r + (sg.powf(beta) / z / sg).ln() - SLACK
        } else {
            r - SLACK
        };
        if !members.iter().any(|&u| top[u] >= need) {
            continue;
        }
        let row = wd
            .rows
            .iter()
            .enumerate()
            .map(|(ri, &i)| {
                let m = members
                    .iter()
                    .map(|&u| wd.hi(ri, u))
                    .fold(f64::NEG_INFINITY, f64::max);
                (i, m)
            })
            .collect();
        options.push((need, row));
    }
    if options.is_empty() {
        return None;
    }
    Some(ConstraintBound {
        attr: ai,
        value: v,
        deficit,
        single: single.max(min_helper_cost),
        helpers,
        gaps: d,
        kappa,
        options,
        widen: wd,
    })
}

/// Upper bounds on each value's share of the softmax over `u ≠ v` after hiding:
/// `e^{hi_u} / (e^{hi_u} + Σ_{u'≠u,v} e^{lo_u'})`.
fn softmax_caps(hi: &[f64], lo: &[f64], v: usize) -> Vec<f64> {
    let k = hi.len();
    let m = hi
        .iter()
        .chain(lo)
        .enumerate()
        .filter(|(j, _)| j % k != v)
        .map(|(_, &x)| x)
        .fold(f64::NEG_INFINITY, f64::max);
    let el: Vec<f64> = (0..k)
        .map(|u| if u == v { 0.0 } else { (lo[u] - m).exp() })
        .collect();
    // Sums of the others without cancellation: prefix and suffix sums.
    let mut prefix = vec![0.0; k + 1];
    for u in 0..k {
        prefix[u + 1] = prefix[u] + el[u];
    }
    let mut suffix = vec![0.0; k + 1];
    for u in (0..k).rev() {
        suffix[u] = suffix[u + 1] + el[u];
    }
    (0..k)
        .map(|u| {
            if u == v {
                return 0.0;
            }
            let eh = (hi[u] - m).exp();
            let others = prefix[u] + suffix[u + 1];
            if eh + others > 0.0 {
                (eh / (eh + others)).min(1.0)
            } else {
                1.0
            }
        })
        .collect()
}

/// Fact 1 with costs: bisection on the cost `C` at which the fractional-knapsack
/// widening of every gap first reaches κ (`costs` per candidate, zero allowed). Returns
/// the lower end of the bracket, or `None` when even all of `free` cannot reach κ.
fn single_by_cost(wd: &Widen, v: usize, d: &[f64], costs: &[f64], target: f64) -> Option<f64> {
    let k = wd.k;
    // Per gap: (prefix cost, prefix widening) in order of widening per unit cost.
    let mut tables: Vec<(Vec<f64>, Vec<f64>)> = vec![(vec![0.0], vec![0.0]); k];
    for (u, table) in tables.iter_mut().enumerate() {
        if u == v {
            continue;
        }
        let mut items: Vec<(f64, f64)> = (0..wd.rows.len())
            .map(|r| (wd.hi(r, u), costs[r]))
            .filter(|(x, _)| *x > 0.0)
            .collect();
        items.sort_by(|x, y| (y.0 / y.1).total_cmp(&(x.0 / x.1)));
        for (x, c) in items {
            let (pc, px) = (
                *table.0.last().unwrap_or(&0.0),
                *table.1.last().unwrap_or(&0.0),
            );
            table.0.push(pc + c);
            table.1.push(px + x);
        }
    }
    let widen = |c: f64| -> f64 {
        let reach: Vec<f64> = (0..k)
            .map(|u| {
                if u == v {
                    return d[u];
                }
                let (pc, px) = &tables[u];
                let j = pc.partition_point(|&x| x <= c);
                let extra = if j >= pc.len() {
                    px[px.len() - 1]
                } else {
                    let f = (c - pc[j - 1]) / (pc[j] - pc[j - 1]);
                    px[j - 1] + f * (px[j] - px[j - 1])
                };
                d[u] + extra
            })
            .collect();
        lse_except(&reach, v)
    };
    let mut hi: f64 = costs.iter().sum();
    if widen(hi) < target {
        return None;
    }
    if widen(0.0) >= target {
        return Some(0.0);
    }
    let mut lo = 0.0;
    for _ in 0..50 {
        let mid = 0.5 * (lo + hi);
        if widen(mid) >= target {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    Some(lo)
}

/// Fact 5: split every candidate's cost among the violated constraints it helps (in
/// proportion to the square of what it can cover, of each deficit when `normalise`)
/// and add up each constraint's own bound under its share of the costs.
fn split_bound(
    p: &Problem,
    view: &NodeView,
    cons: &[ConstraintBound],
    normalise: bool,
) -> Option<f64> {
    let m = cons.len();
    if m < 2 {
        return Some(0.0);
    }
    let n = p.n();
    let mut use_ = vec![0.0; n * m];
    for (j, c) in cons.iter().enumerate() {
        let norm = if normalise { c.deficit } else { 1.0 };
        for &(i, g) in &c.helpers {
            // Squared, so a candidate's cost goes mostly where it helps most.
            use_[i * m + j] = (g / norm).powi(2);
        }
    }
    let mut costs: Vec<Vec<f64>> = vec![vec![0.0; n]; m];
    for &i in view.free {
        let total: f64 = (0..m).map(|j| use_[i * m + j]).sum();
        for j in 0..m {
            costs[j][i] = if total > 0.0 {
                p.cost[i] * use_[i * m + j] / total
            } else {
                p.cost[i] / m as f64
            };
        }
    }
    let mut sum = 0.0;
    for (j, c) in cons.iter().enumerate() {
        let row_costs: Vec<f64> = c.widen.rows.iter().map(|&i| costs[j][i]).collect();
        sum += single_by_cost(&c.widen, c.value, &c.gaps, &row_costs, c.kappa - SLACK)?;
    }
    Some(sum)
}

/// The Lagrangian dual of the covering LP `min c·x, Σ_i g_ij x_i ≥ r_j, 0 ≤ x ≤ 1`,
/// maximised by coordinate ascent. Infinite when some constraint cannot be covered.
fn lagrangian(p: &Problem, free: &[usize], cons: &[ConstraintBound]) -> f64 {
    let m = cons.len();
    let n = p.n();
    let mut g = vec![0.0; n * m];
    let mut items: Vec<usize> = Vec::new();
    let mut seen = vec![false; n];
    let r: Vec<f64> = cons.iter().map(|c| (c.deficit - SLACK).max(0.0)).collect();
    for (j, c) in cons.iter().enumerate() {
        let coverable: f64 = c.helpers.iter().map(|h| h.1).sum();
        if coverable < r[j] {
            return f64::INFINITY;
        }
        for &(i, gi) in &c.helpers {
            g[i * m + j] = gi;
            if !std::mem::replace(&mut seen[i], true) {
                items.push(i);
            }
        }
    }
    // Helpers carry only positive g; candidates that would harm a constraint are
    // counted as neutral there, which only weakens the bound.
    let _ = free;
    let mut mu = vec![0.0; m];
    let value = |mu: &[f64]| -> f64 {
        let mut lb: f64 = mu.iter().zip(&r).map(|(a, b)| a * b).sum();
        for &i in &items {
            let s: f64 = (0..m).map(|j| mu[j] * g[i * m + j]).sum();
            lb -= (s - p.cost[i]).max(0.0);
        }
        lb
    };
    let mut best = 0.0f64;
    let rounds = if m == 1 { 1 } else { 4 };
    for _ in 0..rounds {
        for j in 0..m {
            // φ(μ_j) = μ_j r_j − Σ_i max(0, μ_j g_ij + a_i − c_i): concave, piecewise
            // linear; walk its breakpoints while the slope is positive.
            let mut bps: Vec<(f64, f64)> = Vec::new();
            let mut slope = r[j];
            for &i in &items {
                let gij = g[i * m + j];
                if gij <= 0.0 {
                    continue;
                }
                let rest: f64 = (0..m)
                    .filter(|&q| q != j)
                    .map(|q| mu[q] * g[i * m + q])
                    .sum();
                let t = (p.cost[i] - rest) / gij;
                if t <= 0.0 {
                    slope -= gij;
                } else {
                    bps.push((t, gij));
                }
            }
            if slope <= 0.0 {
                mu[j] = 0.0;
                continue;
            }
            bps.sort_by(|x, y| x.0.total_cmp(&y.0));
            let mut at = 0.0;
            for (t, gij) in bps {
                at = t;
                slope -= gij;
                if slope <= 0.0 {
                    break;
                }
            }
            mu[j] = at;
        }
        best = best.max(value(&mu));
    }
    best
}

/// Fact 4: the smallest Lagrangian bound over the combinations of options, or `floor`
/// as soon as one combination shows the disjunction cannot beat it.
fn disjunctive(p: &Problem, cons: &[ConstraintBound], floor: f64) -> f64 {
    let sizes: Vec<usize> = cons.iter().map(|c| c.options.len()).collect();
    let total: usize = sizes.iter().product();
    if total == 0 || total > MAX_COMBINATIONS {
        return floor;
    }
    let m = cons.len();
    let mut r = vec![0.0; m];
    let mut pick = vec![0usize; m];
    let mut lowest = f64::INFINITY;
    let mut slot = vec![usize::MAX; p.n()];
    for _ in 0..total {
        // Rows of this combination, on the candidates any of them mentions.
        let mut items: Vec<usize> = Vec::new();
        let mut rows: Vec<f64> = Vec::new();
        for (j, c) in cons.iter().enumerate() {
            let (need, row) = &c.options[pick[j]];
            r[j] = need.max(0.0);
            for &(i, x) in row {
                if slot[i] == usize::MAX {
                    slot[i] = items.len();
                    items.push(i);
                    rows.extend(std::iter::repeat_n(0.0, m));
                }
                rows[slot[i] * m + j] = x;
            }
        }
        let costs: Vec<f64> = items.iter().map(|&i| p.cost[i]).collect();
        for &i in &items {
            slot[i] = usize::MAX;
        }
        let lb = dual_bound(&rows, &costs, &r, m);
        lowest = lowest.min(lb);
        if lowest <= floor {
            return floor;
        }
        // Next combination.
        for j in 0..m {
            pick[j] += 1;
            if pick[j] < sizes[j] {
                break;
            }
            pick[j] = 0;
        }
    }
    lowest
}

/// Lagrangian bound of `min c·x, A x ≥ r, 0 ≤ x ≤ 1` (rows of `a` per item, any
/// signs), by exact coordinate ascent; infinite when some row cannot reach its `r`.
fn dual_bound(a: &[f64], c: &[f64], r: &[f64], m: usize) -> f64 {
    let n = c.len();
    for j in 0..m {
        let most: f64 = (0..n).map(|i| a[i * m + j].max(0.0)).sum();
        if most < r[j] {
            return f64::INFINITY;
        }
    }
    let mut mu = vec![0.0; m];
    let value = |mu: &[f64]| -> f64 {
        let mut lb: f64 = mu.iter().zip(r).map(|(x, y)| x * y).sum();
        for i in 0..n {
            let s: f64 = (0..m).map(|j| mu[j] * a[i * m + j]).sum();
            lb -= (s - c[i]).max(0.0);
        }
        lb
    };
    let mut best = 0.0f64;
    let rounds = if m == 1 { 1 } else { 4 };
    let mut bps: Vec<(f64, f64)> = Vec::with_capacity(n);
    for _ in 0..rounds {
        for j in 0..m {
            // φ(μ) = μ r − Σ_i max(0, μ a_i + b_i), b_i = rest_i − c_i; its slope drops
            // by |a_i| at each breakpoint −b_i/a_i.
            bps.clear();
            let mut slope = r[j];
            for i in 0..n {
                let ai = a[i * m + j];
                if ai == 0.0 {
                    continue;
                }
                let rest: f64 = (0..m)
                    .filter(|&q| q != j)
                    .map(|q| mu[q] * a[i * m + q])
                    .sum();
                let b = rest - c[i];
                let active = b > 0.0 || (b == 0.0 && ai > 0.0);
                if active {
                    slope -= ai;
                }
                let t = -b / ai;
                if t > 0.0 {
                    bps.push((t, ai.abs()));
                }
            }
            if slope <= 0.0 {
                mu[j] = 0.0;
                continue;
            }
            bps.sort_by(|x, y| x.0.total_cmp(&y.0));
            let mut at = mu[j];
            let mut reached = false;
            for &(t, d) in &bps {
                at = t;
                slope -= d;
                if slope <= 0.0 {
                    reached = true;
                    break;
                }
            }
            if !reached {
                return f64::INFINITY;
            }
            mu[j] = at;
        }
        best = best.max(value(&mu));
    }
    best
}
