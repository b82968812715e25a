"""Reference reliability bins and expected calibration error from scikit-learn.

sklearn.calibration.calibration_curve(y_true, y_prob, n_bins=10, strategy="uniform")
gives, for each non-empty bin of width 0.1, the share of right guesses (prob_true) and
the mean confidence (prob_pred). The expected calibration error is then computed as in
Guo et al. 2017, "On Calibration of Modern Neural Networks", eq. 3: the bins' gaps
|prob_true - prob_pred| weighted by the share of guesses in each bin (the bin counts
from numpy.histogram on the same edges). Confidences are drawn at random (seeded) so
none falls exactly on a bin edge, where two binning conventions could differ.
tests/reference_stats.rs compares telltale's stats::expected_calibration_error and
eval::reliability with these figures.

Usage: python gen_calibration.py OUT.json
"""
import json
import sys

import numpy as np
import sklearn
from sklearn.calibration import calibration_curve

N_BINS = 10


def case(name, rng, n, skew):
    conf = rng.uniform(0.0, 1.0, n) ** skew
    # Right more often than the confidence says in some bins, less in others.
    p_right = np.clip(conf + 0.15 * np.sin(6.0 * conf), 0.0, 1.0)
    right = rng.uniform(0.0, 1.0, n) < p_right
    prob_true, prob_pred = calibration_curve(right, conf, n_bins=N_BINS, strategy="uniform")
    counts, _ = np.histogram(conf, bins=np.linspace(0.0, 1.0, N_BINS + 1))
    nonempty = counts[counts > 0]
    ece = float(np.sum(nonempty / n * np.abs(prob_true - prob_pred)))
    return {
        "name": name,
        "confidence": [float(c) for c in conf],
        "correct": [bool(r) for r in right],
        "n_bins": N_BINS,
        "prob_true": [float(x) for x in prob_true],
        "prob_pred": [float(x) for x in prob_pred],
        "counts": [int(c) for c in nonempty],
        "ece": ece,
    }


def main(out):
    rng = np.random.default_rng(2017)
    cases = [
        case("uniform confidences, 400 guesses", rng, 400, 1.0),
        case("mostly high confidences, 300 guesses", rng, 300, 0.3),
        case("mostly low confidences with empty bins, 60 guesses", rng, 60, 4.0),
    ]
    with open(out, "w") as f:
        json.dump({"source": f"scikit-learn {sklearn.__version__} calibration_curve; ECE as Guo et al. 2017 eq. 3",
                   "cases": cases}, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main(sys.argv[1])
