//! The information measures against outside references: scipy's entropy and
//! Kullback–Leibler values (tests/data/entropy.json, made by
//! tests/python/gen_entropy.py and re-checked by scripts/test), the uniform-guess rate,
//! and properties that must hold for any item.

use proptest::prelude::*;
use telltale::evidence::{Evidence, Origin, Subject};
use telltale::infer::{AttrModel, Exposure};
use telltale::priors::Calibration;
use telltale::stats::{entropy_bits, homogeneity, kl_bits, smooth_against};

#[derive(serde::Deserialize)]
struct Case {
    p: Vec<f64>,
    q: Vec<f64>,
    entropy_bits: f64,
    kl_bits: f64,
    homogeneity: f64,
}

#[derive(serde::Deserialize)]
struct Fixture {
    source: String,
    cases: Vec<Case>,
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-10 * (1.0 + a.abs().max(b.abs()))
}

// Source: scipy.stats.entropy (pinned in tests/python/requirements.txt).
#[test]
fn entropy_and_kl_match_scipy() {
    let text = std::fs::read_to_string("tests/data/entropy.json").expect("fixture");
    let fx: Fixture = serde_json::from_str(&text).expect("fixture parses");
    assert!(fx.source.contains("scipy"));
    assert!(fx.cases.len() >= 30, "fixture has {} cases", fx.cases.len());
    for (i, c) in fx.cases.iter().enumerate() {
        let h = entropy_bits(&c.p);
        let kl = kl_bits(&c.p, &c.q);
        let hom = homogeneity(&c.p);
        assert!(
            close(h, c.entropy_bits),
            "case {i}: H {h} vs scipy {}",
            c.entropy_bits
        );
        assert!(
            close(kl, c.kl_bits),
            "case {i}: KL {kl} vs scipy {}",
            c.kl_bits
        );
        assert!(
            close(hom, c.homogeneity),
            "case {i}: h {hom} vs {}",
            c.homogeneity
        );
    }
}

// With no evidence the observer can only guess by population rates; with 55 equally
// common values that is right 1 time in 55 ≈ 1.8% (common practice, no source).
#[test]
fn uniform_guessing_over_55_values() {
    let k = 55;
    let model = AttrModel {
        log_base: vec![(1.0 / k as f64).ln(); k],
        calibration: Calibration::Temperature { lambda: 1.0 },
    };
    let x = Exposure::with_models(vec![model], telltale::evidence::EvidenceSet::new(0));
    let p = x.posterior(0);
    assert!((p.probability - 1.0 / 55.0).abs() < 1e-12);
    assert_eq!(telltale::reading::percent(p.probability), "1.8%");
}

fn bits_of(counts: &[f64], mu: &[f64], alpha: f64, k: f64) -> (f64, f64) {
    let (p, q) = smooth_against(counts, mu, alpha, k);
    let e = Evidence::from_distribution(
        Subject::Item(0),
        0,
        p,
        &q,
        counts.iter().sum(),
        Origin::Mark,
    );
    (e.homogeneity(), e.info_bits())
}

proptest! {
    // With the same support (number of members) and a population spread evenly over
    // the values, a more homogeneous item never scores fewer bits: KL(p‖uniform) =
    // log₂K − H(p) (Cover & Thomas, Elements of Information Theory, eq. 2.93 ff.).
    #[test]
    fn more_homogeneous_never_fewer_bits_uniform_population(
        a in prop::collection::vec(0u32..200, 2..12),
        b_seed in prop::collection::vec(0u32..200, 12),
        alpha in 0.0f64..50.0,
    ) {
        let k = a.len();
        let n: u32 = a.iter().sum();
        prop_assume!(n > 0);
        // Second item: same support, different spread.
        let raw: Vec<u32> = b_seed[..k].to_vec();
        let raw_total: u32 = raw.iter().sum();
        prop_assume!(raw_total > 0);
        let mut b: Vec<f64> = raw.iter().map(|&x| (x as f64 * n as f64 / raw_total as f64).floor()).collect();
        let short = n as f64 - b.iter().sum::<f64>();
        b[0] += short;
        let a: Vec<f64> = a.iter().map(|&x| x as f64).collect();
        let mu = vec![1.0 / k as f64; k];
        let (ha, ia) = bits_of(&a, &mu, alpha + 0.1, 0.0);
        let (hb, ib) = bits_of(&b, &mu, alpha + 0.1, 0.0);
        if ha > hb + 1e-12 {
            prop_assert!(ia >= ib - 1e-12, "h {ha} > {hb} but bits {ia} < {ib}");
        } else if hb > ha + 1e-12 {
            prop_assert!(ib >= ia - 1e-12, "h {hb} > {ha} but bits {ib} < {ia}");
        }
    }

    // For any population, moving members to the value an item leans to (its highest
    // likelihood ratio) never lowers its bits: ∂KL/∂p_m − ∂KL/∂p_j = log(p_m/q_m) −
    // log(p_j/q_j) ≥ 0 along the move (worked from the definition of KL divergence).
    #[test]
    fn concentrating_on_the_leaning_value_never_lowers_bits(
        counts in prop::collection::vec(0u32..100, 2..10),
        mu_raw in prop::collection::vec(1u32..100, 10),
        from in 0usize..10,
        moved in 1u32..50,
        alpha in 0.1f64..100.0,
        k in 0.0f64..20.0,
    ) {
        let n = counts.len();
        let mu_total: u32 = mu_raw[..n].iter().sum();
        let mu: Vec<f64> = mu_raw[..n].iter().map(|&m| m as f64 / mu_total as f64).collect();
        let c: Vec<f64> = counts.iter().map(|&x| x as f64).collect();
        let (p, q) = smooth_against(&c, &mu, alpha, k);
        let lean = (0..n).max_by(|&i, &j| (p[i] / q[i]).total_cmp(&(p[j] / q[j]))).unwrap_or(0);
        let from = from % n;
        prop_assume!(from != lean && c[from] > 0.0);
        let m = (moved as f64).min(c[from]);
        let mut c2 = c.clone();
        c2[from] -= m;
        c2[lean] += m;
        let (_, before) = bits_of(&c, &mu, alpha, k);
        let (_, after) = bits_of(&c2, &mu, alpha, k);
        prop_assert!(after >= before - 1e-12, "bits fell from {before} to {after}");
    }
}

/// Reliability bins and expected calibration error against scikit-learn's
/// `calibration_curve` (strategy "uniform", 10 bins) and ECE as in Guo et al. 2017,
/// eq. 3 (tests/data/calibration.json, made by tests/python/gen_calibration.py): every
/// non-empty bin's share right, mean confidence and count, and the ECE.
#[test]
fn reliability_and_ece_match_scikit_learn() {
    let text = std::fs::read_to_string("tests/data/calibration.json").expect("fixture");
    let data: serde_json::Value = serde_json::from_str(&text).expect("json");
    let cases = data["cases"].as_array().expect("cases");
    assert_eq!(cases.len(), 3);
    let floats = |v: &serde_json::Value| -> Vec<f64> {
        v.as_array()
            .expect("array")
            .iter()
            .map(|x| x.as_f64().expect("number"))
            .collect()
    };
    for case in cases {
        let name = case["name"].as_str().expect("name");
        let conf = floats(&case["confidence"]);
        let correct: Vec<bool> = case["correct"]
            .as_array()
            .expect("correct")
            .iter()
            .map(|x| x.as_bool().expect("bool"))
            .collect();
        let preds: Vec<(f64, bool)> = conf.into_iter().zip(correct).collect();
        let ece = telltale::stats::expected_calibration_error(&preds, 10);
        let want = case["ece"].as_f64().expect("ece");
        assert!((ece - want).abs() < 1e-12, "{name}: ECE {ece} vs {want}");
        let bins: Vec<_> = telltale::eval::reliability(&preds)
            .into_iter()
            .filter(|b| b.count > 0)
            .collect();
        let (truth, pred) = (floats(&case["prob_true"]), floats(&case["prob_pred"]));
        let counts = floats(&case["counts"]);
        assert_eq!(bins.len(), truth.len(), "{name}: non-empty bins");
        for (((b, t), p), n) in bins.iter().zip(&truth).zip(&pred).zip(&counts) {
            assert!(
                (b.accuracy - t).abs() < 1e-12,
                "{name}: share right {} vs {t}",
                b.accuracy
            );
            assert!(
                (b.confidence - p).abs() < 1e-12,
                "{name}: confidence {} vs {p}",
                b.confidence
            );
            assert_eq!(b.count as f64, *n, "{name}: count");
        }
    }
}
