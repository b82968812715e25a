//! Cross-validation. Members are shuffled (seeded) into k folds; for each fold the
//! statistics are counted from the other folds' members exactly as `priors build`
//! counts them (bounded contributions, optionally the Laplace release), smoothing and
//! calibration are fitted on those members (leave-one-out), the priors file is built
//! and read back, and the held-out members are guessed through the library's own
//! evidence and inference path. The public-share curve repeats this with only a share
//! of the training members counted.

use rand::seq::SliceRandom;
use rand::seq::index::sample;
use rand_chacha::ChaCha8Rng;

use super::report::{AttrEval, BestGuess, Bin, EVAL_FORMAT, EvalReport, MixEval, ShareRow};
use crate::cohort::fit::{ECE_BINS, fit_all, pseudo_members};
use crate::cohort::privacy::{Budget, DEFAULT_PEOPLE_SHARE};
use crate::cohort::{
    BuildParams, Cohort, Error, Member, Result, Schema, Table, bound_contributions, build_file,
    count, exact_table, noisy_table,
};
use crate::evidence::{self, Subject};
use crate::footprint::{Footprint, Item, ItemKind, Origin};
use crate::infer::AttrModel;
use crate::priors::{Calibration, Priors};
use crate::stats::{argmax, expected_calibration_error};

/// How to evaluate.
#[derive(Debug, Clone, PartialEq)]
pub struct EvalParams {
    pub folds: usize,
    /// Public shares for the accuracy curve, each in (0, 1].
    pub shares: Vec<f64>,
    /// Release the training statistics with the discrete Laplace mechanism at this ε
    /// (the calibration then fitted from the released table, as `priors build` does).
    pub epsilon: Option<f64>,
    pub max_items: usize,
    pub min_members: f64,
    pub seed: u64,
}

/// A model trained on some members.
struct Trained {
    /// Per candidate item, per attribute: log-likelihood ratios (None: not in the file).
    lrs: Vec<Vec<Option<Vec<f64>>>>,
    calibrated: Vec<AttrModel>,
    naive: Vec<AttrModel>,
    temperature: Vec<AttrModel>,
    majority: Vec<usize>,
    /// The fold's priors file as read back (for the scan's own path, [`guess_mixes`]).
    priors: Priors,
}

fn train(
    schema: &Schema,
    members: &[Member],
    params: &EvalParams,
    rng: &mut ChaCha8Rng,
) -> Result<Trained> {
    let cards: Vec<usize> = schema
        .priors
        .attributes
        .iter()
        .map(|a| a.values.len())
        .collect();
    let counted = bound_contributions(members, params.max_items, rng);
    let counts = count(members, &counted, schema.n_items(), &cards);
    let table = match params.epsilon {
        Some(epsilon) => {
            let budget = Budget {
                epsilon,
                people_share: DEFAULT_PEOPLE_SHARE,
                n_attributes: cards.len(),
                max_items: params.max_items,
            };
            noisy_table(&counts, &budget, params.min_members, rng)?
        }
        None => exact_table(&counts, params.min_members),
    };
    let attrs: Vec<(String, Vec<f64>)> = schema
        .priors
        .attributes
        .iter()
        .zip(&table.people)
        .map(|(a, people)| {
            (
                a.id.clone(),
                Table::rates(people).iter().map(|p| p.ln()).collect(),
            )
        })
        .collect();
    // Released with noise, the calibration is fitted as `priors build` fits it: on
    // members drawn from the released table (post-processing, inside ε).
    let fits = if params.epsilon.is_some() {
        let pseudo = pseudo_members(&table, rng);
        fit_all(&table, &pseudo, None, &attrs)
    } else {
        fit_all(&table, members, Some(&counted), &attrs)
    };
    let settings = fits
        .iter()
        .map(|f| (f.smoothing, f.pseudocount, f.calibration.clone()))
        .collect();
    let built = build_file(
        schema,
        &table,
        &BuildParams {
            budget: None,
            min_members: params.min_members,
            source: "evaluation fold".into(),
            licence: "none".into(),
            created: "2000-01-01".into(),
            settings: Some(settings),
            method_note: String::new(),
            synthetic: false,
        },
    );
    let priors = Priors::from_file(built.file, "evaluation fold")
        .map_err(|e| Error::Params(e.to_string()))?;
    Ok(Trained {
        lrs: item_lrs(schema, &priors),
        calibrated: priors
            .attributes
            .iter()
            .map(AttrModel::from_attribute)
            .collect(),
        naive: with_lambda(&priors, |_| 1.0),
        temperature: with_lambda(&priors, crate::calibration::lambda),
        majority: priors
            .attributes
            .iter()
            .map(|a| argmax(&a.base_rates).0)
            .collect(),
        priors,
    })
}

fn with_lambda(priors: &Priors, lambda: impl Fn(&Calibration) -> f64) -> Vec<AttrModel> {
    priors
        .attributes
        .iter()
        .map(|a| AttrModel {
            log_base: a.log_base.clone(),
            calibration: Calibration::Temperature {
                lambda: lambda(&a.calibration),
            },
        })
        .collect()
}

/// Log-likelihood ratios of every candidate item under `priors`, through the library's
/// evidence path (the candidates as a footprint, matched like any archive's items).
fn item_lrs(schema: &Schema, priors: &Priors) -> Vec<Vec<Option<Vec<f64>>>> {
    let footprint = candidates_footprint(schema, (0..schema.n_items() as u32).collect());
    let set = evidence::gather(&footprint, priors, &evidence::Sources::table_only());
    let mut out = vec![vec![None; priors.attributes.len()]; schema.n_items()];
    for e in set.list {
        if let Subject::Item(i) = e.subject() {
            out[i][e.attribute()] = Some(e.log_lr().to_vec());
        }
    }
    out
}

/// Some of the schema's candidate items as a footprint, matched like any archive's.
fn candidates_footprint(schema: &Schema, which: Vec<u32>) -> Footprint {
    let all: Vec<_> = schema.priors.items().collect();
    Footprint {
        items: which
            .into_iter()
            .filter_map(|i| all.get(i as usize).map(|it| (i as usize, it)))
            .map(|(i, it)| Item {
                kind: it.kind().unwrap_or(ItemKind::Like),
                name: it.name().into(),
                id: it.id().map(Into::into),
                category: None,
                date: None,
                origin: Origin {
                    file: "candidates".into(),
                    record: i + 1,
                },
            })
            .collect(),
        ..Footprint::default()
    }
}

/// What evidence a guess rested on: the reference table alone, the table and word
/// lists, or word lists alone.
pub const MIXES: [&str; 3] = ["table only", "table and word lists", "word lists only"];

/// Per attribute and mix (in [`MIXES`] order): (confidence, correct) of the guesses
/// made the way a scan makes them — every source but friends on the member's matched
/// items, combined by [`crate::infer::Exposure`] (source weights, cause groups, the
/// rules-of-thumb ceiling) — for the held-out members.
type MixPreds = Vec<[Vec<(f64, bool)>; 3]>;

fn guess_mixes(schema: &Schema, t: &Trained, members: &[Member], out: &mut MixPreds) {
    let mut sources = evidence::Sources::all();
    sources.friends = false;
    // The cohort keeps no join dates; ages are read as of the demo network's "now".
    sources.reference_time = Some(crate::synth::personas::demo_now());
    for m in members {
        let footprint = candidates_footprint(schema, m.items.clone());
        let set = evidence::gather(&footprint, &t.priors, &sources);
        let mut feeds = vec![(false, false); t.priors.attributes.len()];
        for e in &set.list {
            let f = &mut feeds[e.attribute()];
            match e.origin {
                evidence::Origin::Table { .. } => f.0 = true,
                evidence::Origin::Lexicon(_) => f.1 = true,
                _ => {}
            }
        }
        let exposure = crate::infer::Exposure::new(&t.priors, set);
        for (a, preds) in out.iter_mut().enumerate() {
            let Some(truth) = m.values.get(a).copied().flatten() else {
                continue;
            };
            let mix = match feeds[a] {
                (true, false) => 0,
                (true, true) => 1,
                (false, true) => 2,
                (false, false) => continue,
            };
            let post = exposure.posterior(a);
            preds[mix].push((post.probability, post.best == truth));
        }
    }
}

/// Per attribute: (confidence, correct) for naive, temperature, calibrated, and
/// majority hits.
#[derive(Default, Clone)]
struct Pooled {
    naive: Vec<(f64, bool)>,
    temperature: Vec<(f64, bool)>,
    calibrated: Vec<(f64, bool)>,
    log_loss: f64,
    majority_hits: usize,
}

fn guess(t: &Trained, members: &[Member], pooled: &mut [Pooled]) {
    for m in members {
        for (a, p) in pooled.iter_mut().enumerate() {
            let Some(truth) = m.values.get(a).copied().flatten() else {
                continue;
            };
            let k = t.naive[a].log_base.len();
            let mut sum = vec![0.0; k];
            for &i in &m.items {
                if let Some(l) = &t.lrs[i as usize][a] {
                    sum.iter_mut().zip(l).for_each(|(s, x)| *s += x);
                }
            }
            let nb = t.naive[a].posterior(&sum);
            p.naive.push((nb.probability, nb.best == truth));
            let tp = t.temperature[a].posterior(&sum);
            p.temperature.push((tp.probability, tp.best == truth));
            let cp = t.calibrated[a].posterior(&sum);
            p.calibrated.push((cp.probability, cp.best == truth));
            p.log_loss -= cp.probs[truth].max(1e-300).ln();
            p.majority_hits += usize::from(t.majority[a] == truth);
        }
    }
}

/// The reliability diagram of (confidence, correct) pairs: ten bins 0.1 wide, each
/// with its count, mean confidence and share right (the bins of
/// `sklearn.calibration.calibration_curve` with `strategy="uniform"`, empty ones kept).
pub fn reliability(preds: &[(f64, bool)]) -> Vec<Bin> {
    let mut bins: Vec<Bin> = (0..ECE_BINS)
        .map(|b| Bin {
            from: b as f64 / ECE_BINS as f64,
            count: 0,
            confidence: 0.0,
            accuracy: 0.0,
        })
        .collect();
    for &(c, ok) in preds {
        let b = ((c.clamp(0.0, 1.0) * ECE_BINS as f64) as usize).min(ECE_BINS - 1);
        bins[b].count += 1;
        bins[b].confidence += c;
        bins[b].accuracy += f64::from(u8::from(ok));
    }
    for b in &mut bins {
        if b.count > 0 {
            b.confidence /= b.count as f64;
            b.accuracy /= b.count as f64;
        }
    }
    bins
}

fn accuracy(preds: &[(f64, bool)]) -> f64 {
    preds.iter().filter(|p| p.1).count() as f64 / preds.len().max(1) as f64
}

/// Cross-validate the observer model on a labelled cohort. `progress(done, total)` is
/// called after each trained model.
pub fn evaluate(
    schema: &Schema,
    cohort: &Cohort,
    params: &EvalParams,
    synthetic: bool,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<EvalReport> {
    evaluate_against(schema, cohort, params, synthetic, None, progress)
}

/// [`evaluate`], and where the model that made the cohort is known, the accuracy of
/// its best possible guesses for the same members and each attribute's ratio to it.
pub fn evaluate_against(
    schema: &Schema,
    cohort: &Cohort,
    params: &EvalParams,
    synthetic: bool,
    best: Option<&dyn BestGuess>,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<EvalReport> {
    let n = cohort.members.len();
    if params.folds < 2 || params.folds > n {
        return Err(Error::Params(format!(
            "--folds must be between 2 and the number of members ({n})"
        )));
    }
    if let Some(bad) = params.shares.iter().find(|s| !(**s > 0.0 && **s <= 1.0)) {
        return Err(Error::Params(format!(
            "public share {bad} is outside (0, 1]"
        )));
    }
    if schema.n_items() == 0 {
        return Err(Error::NoCandidates);
    }
    let mut rng = crate::synth::stream(params.seed, 0xe7a1);
    let mut order: Vec<usize> = (0..n).collect();
    order.shuffle(&mut rng);
    let n_attr = schema.n_attributes();
    let mut pooled = vec![Pooled::default(); n_attr];
    let mut mixes: MixPreds = vec![Default::default(); n_attr];
    let mut share_hits = vec![vec![(0usize, 0usize); n_attr]; params.shares.len()];
    // Per attribute: the best possible guess's hits and the members it was asked about.
    let mut best_hits = vec![(0usize, 0usize); n_attr];
    let mut best_preds: Vec<Vec<(f64, bool)>> = vec![Vec::new(); n_attr];
    let mut best_ok = best.is_some();
    let total = params.folds * (1 + params.shares.len());
    let mut done = 0;
    for f in 0..params.folds {
        let (mut train_m, mut test_m) = (Vec::new(), Vec::new());
        for (pos, &j) in order.iter().enumerate() {
            if pos % params.folds == f {
                test_m.push(cohort.members[j].clone());
            } else {
                train_m.push(cohort.members[j].clone());
            }
        }
        let trained = train(schema, &train_m, params, &mut rng)?;
        guess(&trained, &test_m, &mut pooled);
        guess_mixes(schema, &trained, &test_m, &mut mixes);
        if let Some(b) = best.filter(|_| best_ok) {
            for m in &test_m {
                let Some(post) = b.posteriors(&m.items).filter(|p| p.len() == n_attr) else {
                    best_ok = false;
                    break;
                };
                for (a, hits) in best_hits.iter_mut().enumerate() {
                    if let Some(truth) = m.values.get(a).copied().flatten() {
                        let (best, confidence) = argmax(&post[a]);
                        hits.0 += usize::from(best == truth);
                        hits.1 += 1;
                        best_preds[a].push((confidence, best == truth));
                    }
                }
            }
        }
        done += 1;
        progress(done, total);
        for (si, &share) in params.shares.iter().enumerate() {
            let keep = ((share * train_m.len() as f64).round() as usize).clamp(1, train_m.len());
            let mut pick: Vec<usize> = sample(&mut rng, train_m.len(), keep).into_vec();
            pick.sort_unstable();
            let public: Vec<Member> = pick.iter().map(|&j| train_m[j].clone()).collect();
            let t = train(schema, &public, params, &mut rng)?;
            let mut p = vec![Pooled::default(); n_attr];
            guess(&t, &test_m, &mut p);
            for (a, pa) in p.iter().enumerate() {
                share_hits[si][a].0 += pa.calibrated.iter().filter(|x| x.1).count();
                share_hits[si][a].1 += pa.calibrated.len();
            }
            done += 1;
            progress(done, total);
        }
    }
    let attributes = schema
        .priors
        .attributes
        .iter()
        .zip(&pooled)
        .zip(best_hits.iter().zip(&best_preds))
        .zip(&mixes)
        .map(|(((a, p), (&(hits, asked), best_p)), mix)| {
            let accuracy = accuracy(&p.calibrated);
            let bayes_optimal = (best_ok && asked > 0).then(|| hits as f64 / asked as f64);
            AttrEval {
                id: a.id.clone(),
                label: a.label.clone(),
                values: a.values.len(),
                members: p.calibrated.len(),
                accuracy,
                majority_rate: p.majority_hits as f64 / p.calibrated.len().max(1) as f64,
                uniform_rate: a.uniform_rate(),
                log_loss: p.log_loss / p.calibrated.len().max(1) as f64,
                ece_naive: expected_calibration_error(&p.naive, ECE_BINS),
                ece_temperature: expected_calibration_error(&p.temperature, ECE_BINS),
                ece_calibrated: expected_calibration_error(&p.calibrated, ECE_BINS),
                reliability_naive: reliability(&p.naive),
                reliability_calibrated: reliability(&p.calibrated),
                bayes_optimal,
                bayes_optimal_ece: bayes_optimal
                    .map(|_| expected_calibration_error(best_p, ECE_BINS)),
                ratio_to_best: bayes_optimal.filter(|&b| b > 0.0).map(|b| accuracy / b),
                by_mix: MIXES
                    .iter()
                    .zip(mix)
                    .filter(|(_, preds)| !preds.is_empty())
                    .map(|(name, preds)| MixEval {
                        mix: (*name).to_string(),
                        members: preds.len(),
                        accuracy: self::accuracy(preds),
                        ece: expected_calibration_error(preds, ECE_BINS),
                    })
                    .collect(),
            }
        })
        .collect();
    let public_share = params
        .shares
        .iter()
        .zip(&share_hits)
        .map(|(&share, hits)| ShareRow {
            share,
            accuracy: hits
                .iter()
                .map(|(h, t)| *h as f64 / (*t).max(1) as f64)
                .collect(),
        })
        .collect();
    Ok(EvalReport {
        format: EVAL_FORMAT,
        archives: cohort.archives,
        members: n,
        folds: params.folds,
        seed: params.seed,
        epsilon: params.epsilon,
        max_items: params.max_items,
        min_members: params.min_members,
        candidate_items: schema.n_items(),
        attributes,
        public_share,
        synthetic,
        best_possible: best.filter(|_| best_ok).map(|b| b.describe()),
    })
}

/// Parse public shares: one value (`0.5`), a list (`0.1,0.5,0.9`), or a range
/// `FROM..TO` in steps of 0.1 (`0.1..0.9`) or of a given step (`0.1..0.9:0.2`).
pub fn parse_shares(spec: &str) -> std::result::Result<Vec<f64>, String> {
    let num = |s: &str| -> std::result::Result<f64, String> {
        let v: f64 = s
            .trim()
            .parse()
            .map_err(|_| format!("'{s}' is not a number"))?;
        if v > 0.0 && v <= 1.0 {
            Ok(v)
        } else {
            Err(format!("public share {v} is outside (0, 1]"))
        }
    };
    if let Some((from, rest)) = spec.split_once("..") {
        let (to, step) = match rest.split_once(':') {
            Some((t, s)) => (
                t,
                s.trim()
                    .parse::<f64>()
                    .map_err(|_| format!("step '{s}' is not a number"))?,
            ),
            None => (rest, 0.1),
        };
        let (from, to) = (num(from)?, num(to)?);
        if step.is_nan() || step <= 0.0 || to < from {
            return Err(format!(
                "'{spec}' is not an increasing range with a positive step"
            ));
        }
        let n = ((to - from) / step + 1e-9).floor() as usize;
        return Ok((0..=n)
            .map(|k| ((from + k as f64 * step) * 1e6).round() / 1e6)
            .collect());
    }
    spec.split(',').map(num).collect()
}

#[cfg(test)]
mod tests {
    use super::parse_shares;

    #[test]
    fn shares_parse() {
        assert_eq!(parse_shares("0.5").unwrap(), vec![0.5]);
        assert_eq!(parse_shares("0.1,0.9").unwrap(), vec![0.1, 0.9]);
        assert_eq!(
            parse_shares("0.1..0.5").unwrap(),
            vec![0.1, 0.2, 0.3, 0.4, 0.5]
        );
        assert_eq!(parse_shares("0.1..0.9:0.4").unwrap(), vec![0.1, 0.5, 0.9]);
        assert!(parse_shares("0..0.5").is_err());
        assert!(parse_shares("0.5..0.1").is_err());
        assert!(parse_shares("x").is_err());
        assert!(parse_shares("1.5").is_err());
    }
}
