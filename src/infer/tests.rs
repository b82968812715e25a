//! Tests of inference: Bayes' rule by hand, the temperature, shared causes, the
//! rules-of-thumb ceiling, and incremental updates against a fresh count.

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

fn table(item: usize, p: &[f64], base: &[f64], reference: &str) -> Evidence {
    Evidence::from_distribution(
        Subject::Item(item),
        0,
        p.to_vec(),
        base,
        10.0,
        Origin::Table {
            matched_by: crate::priors::MatchedBy::Name,
            reference: reference.into(),
        },
    )
}

fn rule(item: usize, p: &[f64], base: &[f64]) -> Evidence {
    Evidence::from_distribution(
        Subject::Item(item),
        0,
        p.to_vec(),
        base,
        1.0,
        Origin::lexicon("places", "'eugene' → Oregon"),
    )
}

#[test]
fn temperature_tempers_table_evidence_only() {
    let base = [0.5, 0.5];
    let mut set = EvidenceSet::new(2);
    set.push(table(0, &[0.8, 0.2], &base, "Knitters"));
    let x = Exposure::with_models(vec![model(&base, 0.5)], set.clone());
    // λ = 0.5: odds 4^0.5 = 2 → P = 2/3.
    assert!((x.posterior(0).probability - 2.0 / 3.0).abs() < 1e-12);
    // A mark next to it counts at weight 1: odds 2·4 = 8 → P = 8/9.
    set.push(ev(1, &[0.8, 0.2], &base));
    let x = Exposure::with_models(vec![model(&base, 0.5)], set);
    assert!((x.posterior(0).probability - 8.0 / 9.0).abs() < 1e-12);
}

/// Three pieces of one cause with ratio 4 each count as f(3) = 1 + ln 3 pieces
/// (odds 4^2.0986), and the incremental sums match a fresh count after toggles.
#[test]
fn shared_causes_saturate_and_stay_incremental() {
    let base = [0.5, 0.5];
    let mut set = EvidenceSet::new(4);
    for i in 0..3 {
        set.push(table(i, &[0.8, 0.2], &base, "Same Reference"));
    }
    set.push(table(3, &[0.6, 0.4], &base, "Another"));
    let mut x = Exposure::with_models(vec![model(&base, 1.0)], set);
    let f3 = 1.0 + 3f64.ln();
    let odds = 4f64.powf(f3) * 1.5;
    assert!((x.posterior(0).probability - odds / (1.0 + odds)).abs() < 1e-12);
    assert_eq!(x.cause_size(0), 3);
    assert!((x.piece_weight(0) - f3 / 3.0).abs() < 1e-12);
    // Leave-one-out agrees with really hiding it.
    let toggled = x.posterior_toggled(0, Subject::Item(1));
    x.set_hidden(Subject::Item(1), true);
    let hidden = x.posterior(0);
    assert!((toggled.probability - hidden.probability).abs() < 1e-12);
    let f2 = 1.0 + 2f64.ln();
    let odds = 4f64.powf(f2) * 1.5;
    assert!((hidden.probability - odds / (1.0 + odds)).abs() < 1e-12);
    for s in [0, 2, 1, 0, 3, 2] {
        let h = x.is_hidden(Subject::Item(s));
        x.set_hidden(Subject::Item(s), !h);
    }
    let inc = x.posterior(0);
    x.recompute();
    assert!((inc.probability - x.posterior(0).probability).abs() < 1e-12);
}

/// Rules of thumb alone stay under the ceiling; one piece of data lifts it.
#[test]
fn rules_of_thumb_alone_have_a_ceiling() {
    let base = [0.5, 0.5];
    let mut set = EvidenceSet::new(2);
    set.push(rule(0, &[0.999, 0.001], &base));
    let x = Exposure::with_models(vec![model(&base, 1.0)], set.clone());
    let p = x.posterior(0);
    assert!(p.rests_on_rules && p.probability < RULES_OF_THUMB_CEILING);
    // Odds 999 combined harmonically with 0.85/0.15: 1/(1/999 + 0.15/0.85).
    let o = 1.0 / (1.0 / 999.0 + 0.15 / 0.85);
    assert!((p.probability - o / (1.0 + o)).abs() < 1e-9);
    set.push(table(1, &[0.6, 0.4], &base, "Knitters"));
    let x = Exposure::with_models(vec![model(&base, 1.0)], set);
    let p = x.posterior(0);
    assert!(!p.rests_on_rules && p.probability > 0.99);
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

/// A finer level is held under the coarser values it lies in (law of total
/// probability), worked by hand: regions A and B lie in country X, C in Y, D is
/// "somewhere else". A and B add up to 0.8 but X has 0.5, so both are scaled by
/// 0.5/0.8 (A 0.375, B 0.125) and the 0.3 taken goes to D; C (0.1 under Y's 0.5) is
/// left alone, and the probabilities still add up to 1.
#[test]
fn a_region_never_reads_likelier_than_its_country() {
    let n = crate::evidence::Nesting {
        child: 1,
        parent: 0,
        parent_of: vec![Some(0), Some(0), Some(1), None],
        remainder: 3,
    };
    let mut probs = vec![0.6, 0.2, 0.1, 0.1];
    assert!(super::nest(&mut probs, &[0.5, 0.5], &n));
    let want = [0.375, 0.125, 0.1, 0.4];
    for (p, w) in probs.iter().zip(want) {
        assert!((p - w).abs() < 1e-15, "{probs:?}");
    }
    assert!((probs.iter().sum::<f64>() - 1.0).abs() < 1e-15);
    // Nothing to do when every country holds its regions.
    let mut fine = vec![0.3, 0.1, 0.1, 0.5];
    assert!(!super::nest(&mut fine, &[0.5, 0.5], &n));
    assert_eq!(fine, vec![0.3, 0.1, 0.1, 0.5]);
}
