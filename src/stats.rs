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

/// An item's smoothed member distribution and its reference, for likelihood ratios.
///
/// Each value gets the prior pseudo-count `a(v) = α·μ(v) + k` (α spreads pseudo-members
/// in proportion to the membership rates μ, `k` adds the same small number to every
/// value). Then `p(v) = (c(v) + a(v)) / (n + A)` is the item's smoothed distribution
/// and `q(v) = (n·μ(v) + a(v)) / (n + A)` what an item of the same size would look like
/// if its members were like everyone's memberships. The likelihood ratio is
/// `p(v)/q(v) = (c(v) + a(v)) / (n·μ(v) + a(v))`: the Poisson–gamma posterior mean of
/// the rate ratio, which stays near 1 where few members are expected (small values are
/// not given weight by chance) and follows the counts where many are. With `k = 0`,
/// `q = μ` and `p` is the plain Dirichlet smoothing of [`smooth`].
pub fn smooth_against(
    counts: &[f64],
    member_rates: &[f64],
    alpha: f64,
    k: f64,
) -> (Vec<f64>, Vec<f64>) {
    debug_assert_eq!(counts.len(), member_rates.len());
    let n: f64 = counts.iter().map(|c| c.max(0.0)).sum();
    let prior: Vec<f64> = member_rates.iter().map(|m| alpha * m + k).collect();
    let denom = n + prior.iter().sum::<f64>();
    if denom <= 0.0 {
        return (member_rates.to_vec(), member_rates.to_vec());
    }
    let p = counts
        .iter()
        .zip(&prior)
        .map(|(&c, &a)| (c.max(0.0) + a) / denom)
        .collect();
    let q = member_rates
        .iter()
        .zip(&prior)
        .map(|(&m, &a)| (n * m + a) / denom)
        .collect();
    (p, q)
}

/// Member counts released with noise of variance `σ²` on every count and then clamped
/// at 0 (as `priors build` releases them), scaled to the clean sample they are worth:
/// `n_eff = n̂² / (n̂ + K·σ²)` for `K` values, where `n̂` is the item's size with the
/// clamping's bias taken off. The share `c(v)/n` of a sample of `n` has variance about
/// `p(1−p)/n`, and the noise adds `σ²/n²`; taking `p(1−p) ≈ 1/K` (an average cell;
/// common practice, no source), the sum is the variance of a clean sample of `n_eff`.
/// Clamping at 0 lifts a cell whose true count is 0 to `E[max(0, X)]` on average
/// ([`clamped_noise_mean`]): about 28 at the discrete Laplace scale 55.6 that ε = 4
/// gives, so `K` such cells look like a sizeable item with no member in it. So
/// `n̂ = max(0, n − K·E[max(0, X)])`, where `n` is the released total (conservative:
/// a cell with many true members is lifted less). Counts well inside the noise shrink
/// to a small fraction of one member, so the item then adds about nothing; with no
/// noise the counts are returned unchanged.
pub fn noise_equivalent(counts: &[f64], noise_variance: f64) -> Vec<f64> {
    let n: f64 = counts.iter().map(|c| c.max(0.0)).sum();
    if noise_variance.is_nan() || noise_variance <= 0.0 || n <= 0.0 {
        return counts.to_vec();
    }
    let k = counts.len().max(1) as f64;
    let size = (n - k * clamped_noise_mean(noise_variance)).max(0.0);
    let worth = size * size / (size + k * noise_variance);
    let ratio = worth / n;
    counts.iter().map(|c| c.max(0.0) * ratio).collect()
}

/// `E[max(0, X)]` for discrete Laplace noise `X` of variance `σ²` (Canonne, Kamath &
/// Steinke 2020: `P(X = x) ∝ t^|x|`, variance `2t/(1−t)²`): solving the variance for
/// `t` gives `E[max(0, X)] = t / ((1 + t)(1 − t))`, about half the scale (`σ/√8`) for
/// large scales (arithmetic from the distribution's definition).
pub fn clamped_noise_mean(noise_variance: f64) -> f64 {
    if noise_variance.is_nan() || noise_variance <= 0.0 {
        return 0.0;
    }
    let v = noise_variance;
    // σ²(1−t)² = 2t  ⇔  σ²t² − (2σ² + 2)t + σ² = 0, the root in (0, 1).
    let b = 2.0 * v + 2.0;
    let t = (b - (b * b - 4.0 * v * v).sqrt()) / (2.0 * v);
    t / ((1.0 + t) * (1.0 - t))
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

/// Expected calibration error of top-guess confidences: predictions are put in `bins`
/// equal-width confidence bins and `Σ_b (n_b/N)·|accuracy_b − confidence_b|` is
/// returned (Guo et al. 2017, "On Calibration of Modern Neural Networks", eq. 3).
pub fn expected_calibration_error(predictions: &[(f64, bool)], bins: usize) -> f64 {
    if predictions.is_empty() || bins == 0 {
        return 0.0;
    }
    let mut conf = vec![0.0; bins];
    let mut hits = vec![0.0; bins];
    let mut n = vec![0usize; bins];
    for &(c, correct) in predictions {
        let b = ((c.clamp(0.0, 1.0) * bins as f64) as usize).min(bins - 1);
        conf[b] += c;
        hits[b] += if correct { 1.0 } else { 0.0 };
        n[b] += 1;
    }
    let total = predictions.len() as f64;
    (0..bins)
        .filter(|&b| n[b] > 0)
        .map(|b| {
            let nb = n[b] as f64;
            (nb / total) * (hits[b] / nb - conf[b] / nb).abs()
        })
        .sum()
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

    // Worked by hand from the definition (Guo et al. 2017, eq. 3): two bins, bin
    // [0.5,1) holds confidences 0.6, 0.8 with one hit → |0.5 − 0.7| · 2/4; bin [0,0.5)
    // holds 0.2, 0.4 with one hit → |0.5 − 0.3| · 2/4; ECE = 0.2.
    #[test]
    fn ece_worked_example() {
        let preds = [(0.6, true), (0.8, false), (0.2, true), (0.4, false)];
        assert!(close(expected_calibration_error(&preds, 2), 0.2));
        assert!(close(expected_calibration_error(&[(1.0, true)], 10), 0.0));
        assert_eq!(expected_calibration_error(&[], 10), 0.0);
    }

    #[test]
    fn smoothing_against_membership_rates() {
        let mu = [0.5, 0.25, 0.25];
        // k = 0: p is the Dirichlet smoothing and q the membership rates.
        let (p, q) = smooth_against(&[6.0, 2.0, 2.0], &mu, 4.0, 0.0);
        assert_eq!(p, smooth(&[6.0, 2.0, 2.0], &mu, 4.0));
        for (a, b) in q.iter().zip(&mu) {
            assert!(close(*a, *b));
        }
        // k > 0: likelihood ratio (c + a)/(nμ + a), Poisson–gamma posterior mean.
        let (p, q) = smooth_against(&[6.0, 2.0, 2.0], &mu, 0.0, 5.0);
        assert!(close(p[0] / q[0], (6.0 + 5.0) / (5.0 + 5.0)));
        assert!(close(p.iter().sum::<f64>(), 1.0));
        assert!(close(q.iter().sum::<f64>(), 1.0));
        // An item whose members match the memberships carries no evidence.
        let (p, q) = smooth_against(&[50.0, 25.0, 25.0], &mu, 4.0, 2.0);
        for (a, b) in p.iter().zip(&q) {
            assert!(close(*a, *b));
        }
    }

    #[test]
    fn softmax_is_stable() {
        let p = softmax(&[1000.0, 1000.0]);
        assert!(close(p[0], 0.5));
        let p = softmax(&[-1e6, 0.0]);
        assert!(close(p[1], 1.0));
        assert!(close(log_sum_exp(&[0.0, 0.0]), 2f64.ln()));
        // Noise: 400 members over 4 values with noise variance 100 per count: the
        // clamping lifts each cell by E[max(0, X)] = m, so the item is worth
        // n̂²/(n̂ + 4·100) clean members with n̂ = 400 − 4m (arithmetic).
        let m = clamped_noise_mean(100.0);
        let n = 400.0 - 4.0 * m;
        let c = noise_equivalent(&[100.0, 100.0, 150.0, 50.0], 100.0);
        assert!(close(c.iter().sum::<f64>(), n * n / (n + 400.0)));
        assert!(close(c[2] / c[3], 3.0));
        // E[max(0, X)] from the discrete Laplace distribution summed directly
        // (P(x) = (1−t)/(1+t)·t^|x|, Canonne, Kamath & Steinke 2020), at the scale
        // ε = 4 gives (b = 55.56, t = e^(−1/b)) and at a small one.
        for b in [55.5555_f64, 0.7] {
            let t = (-1.0 / b).exp();
            let p0 = (1.0 - t) / (1.0 + t);
            let variance: f64 = (1..20_000)
                .map(|x| 2.0 * p0 * t.powi(x) * (x * x) as f64)
                .sum();
            let mean: f64 = (1..20_000).map(|x| p0 * t.powi(x) * x as f64).sum();
            assert!((clamped_noise_mean(variance) - mean).abs() < 1e-6 * mean.max(1.0));
        }
        assert!((clamped_noise_mean(6172.84) - 55.5555 / 2.0).abs() < 0.05);
        // Pure noise over K = 5 cells (a typical clamped release of an empty item)
        // is worth almost nothing.
        let empty = noise_equivalent(&[0.0, 0.0, 30.0, 60.0, 45.0], 6172.84);
        assert!(empty.iter().sum::<f64>() < 0.01, "{empty:?}");
        assert_eq!(noise_equivalent(&[3.0, 1.0], 0.0), vec![3.0, 1.0]);
        assert_eq!(argmax(&[0.1, 0.7, 0.7]), (1, 0.7));
    }
}
