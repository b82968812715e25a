//! Fitting smoothing and calibration on a labelled cohort. Each labelled member's
//! evidence sums are computed from the table with that member's own counted
//! memberships taken out (leave-one-out), so the fit sees the member as the statistics
//! would see a stranger. Per attribute: smoothing α and pseudo-count k from a small
//! grid and the temperature λ by golden-section search, all by minimum mean log loss;
//! then the top-label logistic calibration ([`crate::calibration`]) by logistic
//! regression (linfa-logistic, L2 penalty) on whether the tempered best guess was right.

use linfa::Dataset;
use linfa::prelude::*;
use linfa_logistic::LogisticRegression;
use ndarray::{Array1, Array2};

use rand::Rng;

use super::load::Member;
use super::release::Table;
use crate::calibration::top_label;
use crate::infer::AttrModel;
use crate::priors::Calibration;
use crate::stats::{expected_calibration_error, smooth_against};

/// Smoothing strengths α tried (common practice, no source: powers of eight).
pub const SMOOTHING_GRID: [f64; 3] = [4.0, 32.0, 256.0];
/// Per-value pseudo-counts k tried (common practice, no source).
pub const PSEUDOCOUNT_GRID: [f64; 3] = [0.0, 2.0, 16.0];
/// L2 penalty of the calibration regression, `(α/2)·‖w‖²` beside the summed log loss
/// (equivalent to scikit-learn's `C = 1/α`; common practice, no source: weak).
pub const L2_PENALTY: f64 = 1.0;
/// ECE bins (Guo et al. 2017 use 15; 10 is common practice, no source).
pub const ECE_BINS: usize = 10;

/// One labelled member's evidence for one attribute.
#[derive(Debug, Clone, PartialEq)]
pub struct Case {
    pub sum: Vec<f64>,
    pub truth: usize,
}

/// Evidence sums for attribute `a` of every member who declared it. `counted[j]` are
/// member j's memberships inside `table` (taken out before their own sums are formed);
/// `None` when the members were not counted into the table.
pub fn cases(
    table: &Table,
    members: &[Member],
    counted: Option<&[Vec<u32>]>,
    a: usize,
    alpha: f64,
    k: f64,
) -> Vec<Case> {
    let mu = Table::rates(&table.memberships[a]);
    let mut out = Vec::new();
    let mut c = vec![0.0; mu.len()];
    for (j, m) in members.iter().enumerate() {
        let Some(truth) = m.values.get(a).copied().flatten() else {
            continue;
        };
        let own: &[u32] = counted.map(|c| c[j].as_slice()).unwrap_or(&[]);
        let mut sum = vec![0.0; mu.len()];
        for &i in &m.items {
            let i = i as usize;
            if !table.keep[i] {
                continue;
            }
            c.copy_from_slice(&table.items[i][a]);
            if own.binary_search(&(i as u32)).is_ok() {
                c[truth] = (c[truth] - 1.0).max(0.0);
            }
            let (p, q) = smooth_against(&c, &mu, alpha, k);
            for ((s, pv), qv) in sum.iter_mut().zip(&p).zip(&q) {
                *s += (pv.max(f64::MIN_POSITIVE) / qv).ln();
            }
        }
        out.push(Case { sum, truth });
    }
    out
}

/// Accuracy, mean log loss and ECE of a model on cases.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct Scores {
    pub accuracy: f64,
    pub log_loss: f64,
    pub ece: f64,
}

/// Score a model; also returns each case's (confidence, correct) pair.
pub fn score(model: &AttrModel, cases: &[Case]) -> (Scores, Vec<(f64, bool)>) {
    let mut preds = Vec::with_capacity(cases.len());
    let mut nll = 0.0;
    for c in cases {
        let p = model.posterior(&c.sum);
        nll -= p.probs[c.truth].max(1e-300).ln();
        preds.push((p.probability, p.best == c.truth));
    }
    let n = cases.len().max(1) as f64;
    let hits = preds.iter().filter(|p| p.1).count() as f64;
    (
        Scores {
            accuracy: hits / n,
            log_loss: nll / n,
            ece: expected_calibration_error(&preds, ECE_BINS),
        },
        preds,
    )
}

fn temperature(log_base: &[f64], lambda: f64) -> AttrModel {
    AttrModel {
        log_base: log_base.to_vec(),
        calibration: Calibration::Temperature { lambda },
    }
}

/// The temperature with the least log loss in [0.02, 3] (golden-section search; the
/// loss is smooth and in practice unimodal in λ).
pub fn best_lambda(log_base: &[f64], cases: &[Case]) -> f64 {
    let loss = |l: f64| score(&temperature(log_base, l), cases).0.log_loss;
    let g = (5f64.sqrt() - 1.0) / 2.0;
    let (mut lo, mut hi) = (0.02, 3.0);
    let mut x1 = hi - g * (hi - lo);
    let mut x2 = lo + g * (hi - lo);
    let (mut f1, mut f2) = (loss(x1), loss(x2));
    for _ in 0..30 {
        if f1 <= f2 {
            hi = x2;
            x2 = x1;
            f2 = f1;
            x1 = hi - g * (hi - lo);
            f1 = loss(x1);
        } else {
            lo = x1;
            x1 = x2;
            f1 = f2;
            x2 = lo + g * (hi - lo);
            f2 = loss(x2);
        }
    }
    (((lo + hi) / 2.0) * 1000.0).round() / 1000.0
}

/// Fit an L2-penalised binary logistic regression with linfa-logistic: minimises
/// `Σ log(1 + exp(−yᵢ(b + w·xᵢ))) + (l2/2)·‖w‖²` (the intercept b is not penalised).
/// Returns `(b, w)` for the probability of `true`, or `None` if the fit fails (for
/// example when every label is the same).
pub fn fit_logistic(x: &[Vec<f64>], y: &[bool], l2: f64) -> Option<(f64, Vec<f64>)> {
    let d = x.first()?.len();
    let flat: Vec<f64> = x.iter().flat_map(|r| r.iter().copied()).collect();
    let xs = Array2::from_shape_vec((x.len(), d), flat).ok()?;
    let ys = Array1::from_vec(y.to_vec());
    let data = Dataset::new(xs, ys);
    let model = LogisticRegression::default()
        .alpha(l2)
        .max_iterations(1000)
        .gradient_tolerance(1e-10)
        .fit(&data)
        .ok()?;
    // linfa's probabilities are for its "positive" class; make them P(true).
    let sign = if model.labels().pos.class { 1.0 } else { -1.0 };
    let w: Vec<f64> = model.params().iter().map(|w| sign * w).collect();
    let b = sign * model.intercept();
    (b.is_finite() && w.iter().all(|v| v.is_finite())).then_some((b, w))
}

/// The logistic calibration for cases, on top of temperature λ (falls back to the
/// temperature model when the regression cannot be fitted).
pub fn fit_calibration(log_base: &[f64], cases: &[Case], lambda: f64) -> Calibration {
    let mut x = Vec::with_capacity(cases.len());
    let mut y = Vec::with_capacity(cases.len());
    for c in cases {
        let t = top_label(log_base, &c.sum, lambda);
        x.push(t.features.to_vec());
        y.push(t.best == c.truth);
    }
    match fit_logistic(&x, &y, L2_PENALTY) {
        Some((b, w)) => Calibration::Logistic {
            lambda,
            intercept: round9(b),
            log_odds: round9(w[0]),
            log_base_rate: round9(w[1]),
            evidence_spread: round9(w[2]),
        },
        None => Calibration::Temperature { lambda },
    }
}

fn round9(x: f64) -> f64 {
    (x * 1e9).round() / 1e9
}

/// What fitting found for one attribute.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct AttrFit {
    pub attribute: String,
    /// Members who declared this attribute.
    pub members: usize,
    pub smoothing: f64,
    pub pseudocount: f64,
    #[serde(skip)]
    pub calibration: Calibration,
    /// Naive Bayes (λ = 1) with the fitted smoothing, on the fitting members.
    pub naive: Scores,
    /// With the fitted temperature.
    pub temperature: Scores,
    /// With the logistic calibration (in-sample for its four weights).
    pub logistic: Scores,
}

/// Fit smoothing, temperature and logistic calibration for every attribute.
pub fn fit_all(
    table: &Table,
    members: &[Member],
    counted: Option<&[Vec<u32>]>,
    attributes: &[(String, Vec<f64>)],
) -> Vec<AttrFit> {
    attributes
        .iter()
        .enumerate()
        .map(|(a, (id, log_base))| {
            let mut best = (f64::INFINITY, 4.0, 0.0, 1.0, Vec::new());
            for alpha in SMOOTHING_GRID {
                for k in PSEUDOCOUNT_GRID {
                    let cs = cases(table, members, counted, a, alpha, k);
                    let lambda = best_lambda(log_base, &cs);
                    let loss = score(&temperature(log_base, lambda), &cs).0.log_loss;
                    if loss < best.0 {
                        best = (loss, alpha, k, lambda, cs);
                    }
                }
            }
            let (_, alpha, k, lambda, cs) = best;
            let calibration = fit_calibration(log_base, &cs, lambda);
            let model = AttrModel {
                log_base: log_base.clone(),
                calibration: calibration.clone(),
            };
            AttrFit {
                attribute: id.clone(),
                members: cs.len(),
                smoothing: alpha,
                pseudocount: k,
                naive: score(&temperature(log_base, 1.0), &cs).0,
                temperature: score(&temperature(log_base, lambda), &cs).0,
                logistic: score(&model, &cs).0,
                calibration,
            }
        })
        .collect()
}

/// Members drawn per attribute at most by [`pseudo_members`] (common practice, no
/// source: enough for a four-weight regression, few enough to fit in a moment).
pub const PSEUDO_MEMBERS_PER_ATTRIBUTE: usize = 2000;

/// Invented labelled members drawn from a *released* table, so smoothing and
/// calibration can be fitted without looking at the real contributors again: a fit on
/// them is post-processing of the noisy release and costs no privacy budget (Dwork &
/// Roth 2014, Proposition 2.1). For each attribute, about `people[a][v]` members (all
/// scaled down to at most [`PSEUDO_MEMBERS_PER_ATTRIBUTE`]) declare value `v` and
/// nothing else; each shows every kept item independently with probability
/// `items[i][a][v] / people[a][v]` (capped at 1). The draw knows only the released
/// marginal counts, not which items go together, so a calibration fitted on it
/// corrects less overconfidence than one fitted on the real members would.
pub fn pseudo_members(table: &Table, rng: &mut impl Rng) -> Vec<Member> {
    let n_attr = table.people.len();
    let mut out = Vec::new();
    for a in 0..n_attr {
        let people = &table.people[a];
        let total: f64 = people.iter().map(|p| p.max(0.0)).sum();
        if total <= 0.0 {
            continue;
        }
        let scale = (PSEUDO_MEMBERS_PER_ATTRIBUTE as f64 / total).min(1.0);
        for (v, &n_v) in people.iter().enumerate() {
            if n_v <= 0.0 {
                continue;
            }
            let draws = (n_v * scale).round() as usize;
            let rates: Vec<(u32, f64)> = table
                .items
                .iter()
                .enumerate()
                .filter(|(i, _)| table.keep[*i])
                .filter_map(|(i, per_attr)| {
                    let r = (per_attr[a][v].max(0.0) / n_v).min(1.0);
                    (r > 0.0).then_some((i as u32, r))
                })
                .collect();
            for _ in 0..draws {
                let mut values = vec![None; n_attr];
                values[a] = Some(v);
                let items = rates
                    .iter()
                    .filter(|(_, r)| rng.random_bool(*r))
                    .map(|(i, _)| *i)
                    .collect();
                out.push(Member { items, values });
            }
        }
    }
    out
}
