//! Fitting the per-attribute smoothing (α, k) and temperature λ on members the counts
//! never saw: the settings minimising the mean negative log-likelihood of their true
//! values (grids). Also measures what the fit achieves: accuracy of the
//! best guess and expected calibration error before (α = 4, k = 0, λ = 1) and after.

use super::catalogue::CatItem;
use super::membership::Population;
use crate::evidence;
use crate::evidence::Subject;
use crate::footprint::{Footprint, Item, Origin};
use crate::infer::AttrModel;
use crate::priors::{Attribute, Calibration, DEFAULT_SMOOTHING, Priors, PriorsFile};
use crate::stats::expected_calibration_error;

/// What calibration found for one attribute.
#[derive(Debug, Clone, PartialEq)]
pub struct Fit {
    pub attribute: String,
    /// Dirichlet smoothing strength α.
    pub smoothing: f64,
    /// Per-value pseudo-count k.
    pub pseudocount: f64,
    pub lambda: f64,
    /// Share of held-out members whose best guess is right.
    pub accuracy: f64,
    /// Share a "guess the most common value" observer gets right.
    pub majority_rate: f64,
    pub log_loss: f64,
    pub ece_uncalibrated: f64,
    pub ece_calibrated: f64,
}

/// A member's footprint as the observer sees it (items by id).
pub fn member_footprint(catalogue: &[CatItem], affiliations: &[u32]) -> Footprint {
    Footprint {
        items: affiliations
            .iter()
            .map(|&i| {
                let c = &catalogue[i as usize];
                Item {
                    kind: c.kind,
                    name: c.name.as_str().into(),
                    id: Some(c.id.as_str().into()),
                    category: None,
                    date: None,
                    origin: Origin {
                        file: "synthetic".into(),
                        record: i as usize,
                    },
                }
            })
            .collect(),
        ..Footprint::default()
    }
}

fn evaluate(model: &AttrModel, sums: &[Vec<f64>], truth: &[usize]) -> (f64, f64, f64) {
    let mut nll = 0.0;
    let mut hits = 0usize;
    let mut preds = Vec::with_capacity(sums.len());
    for (s, &t) in sums.iter().zip(truth) {
        let p = model.posterior(s);
        nll -= p.probs[t].max(1e-300).ln();
        let correct = p.best == t;
        hits += usize::from(correct);
        preds.push((p.probability, correct));
    }
    let n = sums.len().max(1) as f64;
    (
        nll / n,
        hits as f64 / n,
        expected_calibration_error(&preds, 10),
    )
}

/// Evidence sums per attribute for every held-out member. The likelihood ratios come
/// from the library's own evidence path, computed once per catalogue item and then
/// summed per member.
fn held_out_sums(
    priors: &Priors,
    catalogue: &[CatItem],
    held_out: &Population,
) -> Vec<Vec<Vec<f64>>> {
    let all: Vec<u32> = (0..catalogue.len() as u32).collect();
    let fp = member_footprint(catalogue, &all);
    let ev = evidence::gather(&fp, priors, &evidence::Sources::table_only());
    let n_attr = priors.attributes.len();
    let mut per_item: Vec<Vec<Option<&[f64]>>> = vec![vec![None; n_attr]; catalogue.len()];
    for e in &ev.list {
        if let Subject::Item(i) = e.subject() {
            per_item[i][e.attribute()] = Some(e.log_lr());
        }
    }
    let mut sums: Vec<Vec<Vec<f64>>> = vec![Vec::with_capacity(held_out.profiles.len()); n_attr];
    for affs in &held_out.affiliations {
        for (a, attr) in priors.attributes.iter().enumerate() {
            let mut s = vec![0.0; attr.values.len()];
            for &i in affs {
                if let Some(l) = per_item[i as usize][a] {
                    s.iter_mut().zip(l).for_each(|(x, y)| *x += y);
                }
            }
            sums[a].push(s);
        }
    }
    sums
}

/// Smoothing strengths α tried (common practice, no source: powers of four).
pub const SMOOTHING_GRID: [f64; 6] = [0.0, 4.0, 16.0, 64.0, 256.0, 1024.0];
/// Per-value pseudo-counts k tried (common practice, no source).
pub const PSEUDOCOUNT_GRID: [f64; 5] = [0.0, 1.0, 4.0, 16.0, 64.0];

fn with_settings(file: &PriorsFile, settings: &[(f64, f64, f64)]) -> PriorsFile {
    let mut f = file.clone();
    for (spec, &(alpha, k, lambda)) in f.attributes.iter_mut().zip(settings) {
        spec.smoothing = Some(alpha);
        spec.pseudocount = Some(k);
        spec.calibration = Some(Calibration::Temperature { lambda });
    }
    f
}

/// Best temperature for given sums: a coarse grid, then a finer one around the best.
fn best_lambda(attr: &Attribute, sums: &[Vec<f64>], truth: &[usize]) -> (f64, f64) {
    let model = |lambda: f64| AttrModel {
        log_base: attr.log_base.clone(),
        calibration: Calibration::Temperature { lambda },
    };
    let mut best = (f64::INFINITY, 1.0);
    for step in 1..=40 {
        let l = step as f64 * 0.05;
        let loss = evaluate(&model(l), sums, truth).0;
        if loss < best.0 {
            best = (loss, l);
        }
    }
    let centre = best.1;
    for step in -10..=10 {
        let l = centre + step as f64 * 0.005;
        if l > 0.0 {
            let loss = evaluate(&model(l), sums, truth).0;
            if loss < best.0 {
                best = (loss, l);
            }
        }
    }
    (best.0, (best.1 * 1000.0).round() / 1000.0)
}

/// Fit smoothing α, pseudo-count k and temperature λ per attribute on held-out
/// members, by minimum log loss. Returns one fit per attribute, in attribute order.
pub fn fit(file: &PriorsFile, catalogue: &[CatItem], held_out: &Population) -> Vec<Fit> {
    let n_attr = file.attributes.len();
    // (loss, alpha, k, lambda) per attribute.
    let mut best = vec![(f64::INFINITY, DEFAULT_SMOOTHING, 0.0, 1.0); n_attr];
    let truth: Vec<Vec<usize>> = (0..n_attr)
        .map(|a| held_out.profiles.iter().map(|p| p[a]).collect())
        .collect();
    for alpha in SMOOTHING_GRID {
        for k in PSEUDOCOUNT_GRID {
            if alpha + k <= 0.0 {
                continue;
            }
            let f = with_settings(file, &vec![(alpha, k, 1.0); n_attr]);
            let Ok(priors) = Priors::from_file(f, "calibration") else {
                continue;
            };
            let sums = held_out_sums(&priors, catalogue, held_out);
            for (a, attr) in priors.attributes.iter().enumerate() {
                let (loss, lambda) = best_lambda(attr, &sums[a], &truth[a]);
                if loss < best[a].0 {
                    best[a] = (loss, alpha, k, lambda);
                }
            }
        }
    }
    // Measure the defaults (α = 4, k = 0, λ = 1) and the chosen settings.
    let measure = |settings: &[(f64, f64, f64)]| -> Vec<(f64, f64, f64)> {
        let f = with_settings(file, settings);
        let Ok(priors) = Priors::from_file(f, "calibration") else {
            return vec![(f64::NAN, f64::NAN, f64::NAN); n_attr];
        };
        let sums = held_out_sums(&priors, catalogue, held_out);
        priors
            .attributes
            .iter()
            .enumerate()
            .map(|(a, attr)| evaluate(&AttrModel::from_attribute(attr), &sums[a], &truth[a]))
            .collect()
    };
    let before = measure(&vec![(DEFAULT_SMOOTHING, 0.0, 1.0); n_attr]);
    let chosen: Vec<(f64, f64, f64)> = best.iter().map(|b| (b.1, b.2, b.3)).collect();
    let after = measure(&chosen);
    file.attributes
        .iter()
        .enumerate()
        .map(|(a, attr)| {
            let mut counts = vec![0usize; attr.values.len()];
            truth[a].iter().for_each(|&t| counts[t] += 1);
            let majority = *counts.iter().max().unwrap_or(&0) as f64 / truth[a].len().max(1) as f64;
            Fit {
                attribute: attr.id.clone(),
                smoothing: chosen[a].0,
                pseudocount: chosen[a].1,
                lambda: chosen[a].2,
                accuracy: after[a].1,
                majority_rate: majority,
                log_loss: after[a].0,
                ece_uncalibrated: before[a].2,
                ece_calibrated: after[a].2,
            }
        })
        .collect()
}
