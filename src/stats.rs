//! The information measures the model is built on: Dirichlet-smoothed member
//! distributions, Shannon entropy, normalised-entropy homogeneity, Kullback–Leibler
//! divergence in bits, and a numerically safe softmax in log space.

/// Smoothed member distribution `p(v) = (c(v) + α·π(v)) / (n + α)`: the item's member
/// counts pulled toward the population base rates `π` with prior strength `α`.
/// Items with few members stay close to the population; zero counts never give zero
/// probability (as long as `π(v) > 0`).
pub fn smooth(counts: &[f64], base: &[f64], alpha: f64) -> Vec<f64> {
    debug_assert_eq!(counts.len(), base.len());
    let n: f64 = counts.iter().map(|c| c.max(0.0)).sum();
    let denom = n + alpha;
    if denom <= 0.0 {
        return base.to_vec();
    }
    counts
        .iter()
        .zip(base)
        .map(|(&c, &b)| (c.max(0.0) + alpha * b) / denom)
        .collect()
}

/// Shannon entropy in bits, with `0·log 0 = 0`.
pub fn entropy_bits(p: &[f64]) -> f64 {
    -p.iter()
        .filter(|&&x| x > 0.0)
        .map(|&x| x * x.log2())
        .sum::<f64>()
}

/// Homogeneity `1 − H(p)/log₂|V|`: 0 when members are spread like a uniform
/// distribution, 1 when they all share one value.
pub fn homogeneity(p: &[f64]) -> f64 {
    if p.len() < 2 {
        return 1.0;
    }
    (1.0 - entropy_bits(p) / (p.len() as f64).log2()).clamp(0.0, 1.0)
}

/// Kullback–Leibler divergence `KL(p ‖ q)` in bits. Terms with `p = 0` are 0; a value
/// with `p > 0` and `q = 0` makes it infinite.
pub fn kl_bits(p: &[f64], q: &[f64]) -> f64 {
    p.iter()
        .zip(q)
        .filter(|(pi, _)| **pi > 0.0)
        .map(|(&pi, &qi)| {
            if qi <= 0.0 {
                f64::INFINITY
            } else {
                pi * (pi / qi).log2()
            }
        })
        .sum()
}

/// `log Σ exp(x)`, stable for large and very negative inputs.
pub fn log_sum_exp(x: &[f64]) -> f64 {
    let m = x.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if !m.is_finite() {
        return m;
    }
    m + x.iter().map(|&v| (v - m).exp()).sum::<f64>().ln()
}

/// Normalise log-weights into probabilities.
pub fn softmax(logits: &[f64]) -> Vec<f64> {
    let z = log_sum_exp(logits);
    if !z.is_finite() {
        let k = logits.len().max(1) as f64;
        return vec![1.0 / k; logits.len()];
    }
    logits.iter().map(|&l| (l - z).exp()).collect()
}

/// Index and value of the largest entry (first one on ties).
pub fn argmax(p: &[f64]) -> (usize, f64) {
    p.iter()
        .copied()
        .enumerate()
        .fold((0, f64::NEG_INFINITY), |best, (i, v)| {
            if v > best.1 { (i, v) } else { best }
        })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() < 1e-12
    }

    // Handbook values: H(fair coin) = 1 bit; H(uniform over 8) = 3 bits (Cover &
    // Thomas, Elements of Information Theory, 2nd ed., ch. 2).
    #[test]
    fn entropy_handbook_values() {
        assert!(close(entropy_bits(&[0.5, 0.5]), 1.0));
        assert!(close(entropy_bits(&[0.125; 8]), 3.0));
        assert!(close(entropy_bits(&[1.0, 0.0, 0.0]), 0.0));
        assert!(close(homogeneity(&[0.25; 4]), 0.0));
        assert!(close(homogeneity(&[1.0, 0.0, 0.0, 0.0]), 1.0));
    }

    // Cover & Thomas example 2.3.1: p = (1/2, 1/2), q = (3/4, 1/4) gives
    // D(p‖q) = 1 − ½·log₂3 ≈ 0.2075 bits and D(q‖p) = ¾·log₂3 − 1 ≈ 0.1887 bits.
    #[test]
    fn kl_worked_example() {
        let p = [0.5, 0.5];
        let q = [0.75, 0.25];
        assert!(close(kl_bits(&p, &q), 1.0 - 0.5 * 3f64.log2()));
        assert!(close(kl_bits(&q, &p), 0.75 * 3f64.log2() - 1.0));
        assert_eq!(kl_bits(&[0.5, 0.5], &[1.0, 0.0]), f64::INFINITY);
        assert_eq!(kl_bits(&p, &p), 0.0);
    }

    #[test]
    fn smoothing_handles_empty_and_single_member_items() {
        let base = [0.5, 0.25, 0.25];
        assert_eq!(smooth(&[0.0, 0.0, 0.0], &base, 4.0), base.to_vec());
        let p = smooth(&[1.0, 0.0, 0.0], &base, 4.0);
        assert!(close(p.iter().sum::<f64>(), 1.0));
        assert!(p.iter().all(|&x| x > 0.0));
        assert!(close(p[0], (1.0 + 2.0) / 5.0));
        // Negative (noisy) counts are treated as zero.
        assert_eq!(smooth(&[-3.0, 0.0, 0.0], &base, 4.0), base.to_vec());
    }

    #[test]
    fn softmax_is_stable() {
        let p = softmax(&[1000.0, 1000.0]);
        assert!(close(p[0], 0.5));
        let p = softmax(&[-1e6, 0.0]);
        assert!(close(p[1], 1.0));
        assert!(close(log_sum_exp(&[0.0, 0.0]), 2f64.ln()));
        assert_eq!(argmax(&[0.1, 0.7, 0.7]), (1, 0.7));
    }
}
