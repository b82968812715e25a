"""Reference values for telltale's information measures, computed with scipy.

scipy.stats.entropy(pk) gives Shannon entropy and scipy.stats.entropy(pk, qk) the
Kullback-Leibler divergence; base=2 gives bits. The Rust test tests/reference_stats.rs
reads the output (checked in as tests/data/entropy.json) and compares telltale's
stats::entropy_bits, stats::kl_bits and stats::homogeneity with it.

Usage: python gen_entropy.py OUT.json
"""
import json
import sys

import numpy as np
import scipy
from scipy.stats import entropy

rng = np.random.default_rng(20261202)

cases = []
# Hand-picked edge cases: point masses, uniform, zeros, tiny probabilities.
fixed = [
    ([1.0, 0.0, 0.0], [1 / 3, 1 / 3, 1 / 3]),
    ([0.5, 0.5], [0.75, 0.25]),
    ([0.25, 0.25, 0.25, 0.25], [0.1, 0.2, 0.3, 0.4]),
    ([0.999999, 0.000001], [0.5, 0.5]),
    ([0.2, 0.0, 0.8], [0.4, 0.3, 0.3]),
]
for p, q in fixed:
    cases.append((np.array(p), np.array(q)))
# Random distributions over 2..60 values (a location attribute has ~50).
for k in [2, 3, 5, 7, 12, 51, 55, 60]:
    for _ in range(4):
        p = rng.dirichlet(np.full(k, rng.uniform(0.05, 3.0)))
        q = rng.dirichlet(np.full(k, 5.0))
        cases.append((p, q))

out = {
    "source": f"scipy.stats.entropy (scipy {scipy.__version__}), base 2",
    "cases": [
        {
            "p": [float(x) for x in p],
            "q": [float(x) for x in q],
            "entropy_bits": float(entropy(p, base=2)),
            "kl_bits": float(entropy(p, q, base=2)),
            # Homogeneity 1 - H(p)/log2(K) from scipy's entropy.
            "homogeneity": float(1.0 - entropy(p, base=2) / np.log2(len(p))),
        }
        for p, q in cases
    ],
}
with open(sys.argv[1] if len(sys.argv) > 1 else "tests/data/entropy.json", "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
