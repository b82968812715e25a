//! Turning summed evidence into probabilities. Every calibration here is a function of
//! the attribute's log base rates and the per-value sums of visible log-likelihood
//! ratios, so [`crate::infer::Exposure`] can keep updating sums incrementally.
//!
//! Two methods (docs/model-card.md, "Calibration"):
//!
//! - **temperature**: naive Bayes with a temperature λ,
//!   `z(v) = log π(v) + λ·S(v)`, `P = softmax(z)`;
//! - **logistic** (top-label logistic calibration, Platt scaling of the best guess's
//!   log-odds with two more features): from the tempered logits `z`, take the best
//!   guess `t`, and the features
//!   `x₁ = z(t) − log Σ_{v≠t} exp z(v)` (the naive-Bayes log-odds of `t`),
//!   `x₂ = log π(t)` (how common the guessed value is) and
//!   `x₃ = ln(1 + max S − min S)` (how much evidence there is).
//!   `P(t) = σ(b + w₁x₁ + w₂x₂ + w₃x₃)`, never below the runner-up's share (so the best
//!   guess stays the best guess), and the other values share `1 − P(t)` in their
//!   tempered naive-Bayes proportions. The weights are fitted by logistic regression
//!   (linfa-logistic) on whether the best guess was right, in a labelled cohort.
//!   With `b = w₂ = w₃ = 0, w₁ = 1` it equals the temperature model.

use crate::priors::Calibration;
use crate::stats::log_sum_exp;

/// The three features of the logistic calibration for one attribute, and the pieces
/// needed to turn a top-label probability back into a distribution.
#[derive(Debug, Clone, PartialEq)]
pub struct TopLabel {
    /// Index of the naive-Bayes best guess.
    pub best: usize,
    /// `[x₁, x₂, x₃]`: top log-odds, log base rate of the guess, log(1 + evidence spread).
    pub features: [f64; 3],
    /// Tempered logits `z(v) = log π(v) + λ·S(v)`.
    pub logits: Vec<f64>,
    /// `log Σ_{v≠best} exp z(v)`.
    pub rest: f64,
}

/// Tempered naive-Bayes logits.
pub fn tempered(log_base: &[f64], sum: &[f64], lambda: f64) -> Vec<f64> {
    log_base
        .iter()
        .zip(sum)
        .map(|(b, s)| b + lambda * s)
        .collect()
}

/// Features for the logistic calibration (needs at least two values).
pub fn top_label(log_base: &[f64], sum: &[f64], lambda: f64) -> TopLabel {
    let logits = tempered(log_base, sum, lambda);
    let best = logits
        .iter()
        .enumerate()
        .fold(
            (0, f64::NEG_INFINITY),
            |b, (i, &z)| {
                if z > b.1 { (i, z) } else { b }
            },
        )
        .0;
    let others: Vec<f64> = logits
        .iter()
        .enumerate()
        .filter(|(i, _)| *i != best)
        .map(|(_, &z)| z)
        .collect();
    let rest = log_sum_exp(&others);
    let (lo, hi) = sum
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &s| {
            (lo.min(s), hi.max(s))
        });
    let spread = if hi >= lo { hi - lo } else { 0.0 };
    TopLabel {
        best,
        features: [logits[best] - rest, log_base[best], spread.ln_1p()],
        logits,
        rest,
    }
}

fn sigmoid(x: f64) -> f64 {
    if x >= 0.0 {
        1.0 / (1.0 + (-x).exp())
    } else {
        let e = x.exp();
        e / (1.0 + e)
    }
}

/// Log-probabilities from the logistic calibration.
pub fn logistic_log_probs(
    log_base: &[f64],
    sum: &[f64],
    lambda: f64,
    intercept: f64,
    weights: [f64; 3],
) -> Vec<f64> {
    let t = top_label(log_base, sum, lambda);
    if t.logits.len() < 2 || !t.rest.is_finite() {
        return t.logits;
    }
    let x = t.features;
    let raw = intercept + weights[0] * x[0] + weights[1] * x[1] + weights[2] * x[2];
    let mut p_top = sigmoid(raw);
    // The runner-up's share of the rest: r = max_{v≠t} exp(z(v) − rest); keep
    // P(t) ≥ (1 − P(t))·r, i.e. P(t) ≥ r/(1 + r), so the best guess stays the best.
    let r = t
        .logits
        .iter()
        .enumerate()
        .filter(|(i, _)| *i != t.best)
        .map(|(_, z)| (z - t.rest).exp())
        .fold(0.0, f64::max);
    p_top = p_top.max(r / (1.0 + r));
    if !p_top.is_finite() {
        return t.logits;
    }
    let log_rest = (1.0 - p_top).max(f64::MIN_POSITIVE).ln();
    t.logits
        .iter()
        .enumerate()
        .map(|(i, z)| {
            if i == t.best {
                p_top.max(f64::MIN_POSITIVE).ln()
            } else {
                log_rest + z - t.rest
            }
        })
        .collect()
}

/// Logits (log-probabilities up to a constant) for a calibration.
pub fn logits(calibration: &Calibration, log_base: &[f64], sum: &[f64]) -> Vec<f64> {
    match calibration {
        Calibration::Temperature { lambda } => tempered(log_base, sum, *lambda),
        Calibration::Logistic {
            lambda,
            intercept,
            log_odds,
            log_base_rate,
            evidence_spread,
        } => logistic_log_probs(
            log_base,
            sum,
            *lambda,
            *intercept,
            [*log_odds, *log_base_rate, *evidence_spread],
        ),
    }
}

/// Logits from combined sums that already carry their weights (λ for table evidence,
/// each source's own weight otherwise; [`crate::combine`]): `log π + weighted` for the
/// temperature model. The logistic calibration reads the same tempered logits, and its
/// evidence-spread feature the weighted spread divided by λ (the raw spread when all
/// the evidence is table evidence, as in the fit).
pub fn weighted_logits(calibration: &Calibration, log_base: &[f64], weighted: &[f64]) -> Vec<f64> {
    match calibration {
        Calibration::Temperature { .. } => tempered(log_base, weighted, 1.0),
        Calibration::Logistic {
            lambda,
            intercept,
            log_odds,
            log_base_rate,
            evidence_spread,
        } => {
            let scale = if *lambda > 0.0 { *lambda } else { 1.0 };
            let sum: Vec<f64> = weighted.iter().map(|w| w / scale).collect();
            logistic_log_probs(
                log_base,
                &sum,
                scale,
                *intercept,
                [*log_odds, *log_base_rate, *evidence_spread],
            )
        }
    }
}

/// The temperature λ a calibration applies to summed evidence.
pub fn lambda(calibration: &Calibration) -> f64 {
    match calibration {
        Calibration::Temperature { lambda } | Calibration::Logistic { lambda, .. } => *lambda,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::stats::softmax;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() < 1e-12
    }

    // With intercept 0, weights (1, 0, 0) the logistic calibration is the temperature
    // model: σ(log-odds of the top value) is its naive-Bayes probability (algebra).
    #[test]
    fn identity_weights_give_naive_bayes() {
        let base: Vec<f64> = [0.2f64, 0.3, 0.5].iter().map(|p| p.ln()).collect();
        let sum = [1.5, -0.25, 0.4];
        let nb = softmax(&tempered(&base, &sum, 0.8));
        let lg = softmax(&logistic_log_probs(&base, &sum, 0.8, 0.0, [1.0, 0.0, 0.0]));
        for (a, b) in nb.iter().zip(&lg) {
            assert!(close(*a, *b), "{nb:?} vs {lg:?}");
        }
    }

    #[test]
    fn shrinking_keeps_best_guess_and_proportions() {
        let base: Vec<f64> = [0.25f64; 4].iter().map(|p| p.ln()).collect();
        let sum = [4.0, 1.0, 0.0, -2.0];
        let nb = softmax(&tempered(&base, &sum, 1.0));
        // Weight 0.3 on the log-odds shrinks the top probability a lot; the runner-up
        // bound holds it at least level with value 1.
        let p = softmax(&logistic_log_probs(&base, &sum, 1.0, -2.0, [0.3, 0.0, 0.0]));
        assert!((p.iter().sum::<f64>() - 1.0).abs() < 1e-12);
        assert!(p[0] < nb[0]);
        assert!(p[0] >= p[1] - 1e-12);
        assert!(close(p[2] / p[3], nb[2] / nb[3]));
    }

    #[test]
    fn features_are_finite_on_extreme_sums() {
        let base: Vec<f64> = [0.5f64, 0.5].iter().map(|p| p.ln()).collect();
        let t = top_label(&base, &[800.0, -800.0], 1.0);
        assert!(t.features.iter().all(|x| x.is_finite()));
        assert_eq!(t.best, 0);
        let lp = logistic_log_probs(&base, &[800.0, -800.0], 1.0, 0.0, [0.5, 0.0, 0.0]);
        assert!(lp.iter().all(|x| x.is_finite()));
    }
}
