"""Reference probabilities for telltale's exact discrete Laplace sampler, from scipy.

scipy.stats.dlaplace(a) is the discrete Laplace (two-sided geometric) distribution
with pmf tanh(a/2)·exp(-a|k|). telltale's sampler (src/cohort/privacy.rs, Canonne,
Kamath & Steinke 2020, Algorithm 2) draws it with scale t/s, i.e. a = s/t. For each
case this writes the scale as integers, scipy's variance, and a partition of the
integers into bins (each with an expected count of at least 50 in the test's sample)
with their probabilities from dlaplace.cdf, plus the chi-square critical value at
significance 0.001 (scipy.stats.chi2.ppf). tests/cohort_reference.rs draws a fixed
seed's sample and runs the goodness-of-fit test against these bins.

Usage: python gen_dlaplace.py OUT.json
"""
import json
import math
import sys

import scipy
from scipy.stats import chi2, dlaplace

# Draws per case in the Rust test (kept in the file so both sides agree).
N = 200_000
ALPHA = 0.001
MIN_EXPECTED = 50.0

# (name, t, s) with scale t/s; the last comes from a budget: Δ = 50, ε = 0.45
# rounded down to a multiple of 2^-20, exactly as DiscreteLaplace::for_budget does.
eps_scaled = math.floor(0.45 * 2**20)
t_budget, s_budget = 50 * 2**20, eps_scaled
g = math.gcd(t_budget, s_budget)
cases_in = [
    ("scale 1", 1, 1),
    ("scale 2.5", 5, 2),
    ("scale 1/3", 1, 3),
    ("scale 12", 12, 1),
    ("delta 50, epsilon 0.45", t_budget // g, s_budget // g),
]


def bins_for(a, scale):
    width = max(1, int(math.ceil(scale / 4)))
    dist = dlaplace(a)
    # Central bins [lo, hi] of `width` integers, symmetric around 0, while the
    # outermost still expects MIN_EXPECTED draws; then two tails.
    out = [[-(width // 2), width // 2]]
    lo, hi = out[0]
    while True:
        nxt = [hi + 1, hi + width]
        p = dist.cdf(nxt[1]) - dist.cdf(nxt[0] - 1)
        if N * p < MIN_EXPECTED:
            break
        out.append(nxt)
        out.insert(0, [-nxt[1], -nxt[0]])
        hi = nxt[1]
    lowest, highest = out[0][0], out[-1][1]
    # Tails as open intervals (None: unbounded).
    bins = [[None, lowest - 1]] + out + [[highest + 1, None]]
    probs = []
    for b0, b1 in bins:
        upper = 1.0 if b1 is None else float(dist.cdf(b1))
        lower = 0.0 if b0 is None else float(dist.cdf(b0 - 1))
        probs.append(upper - lower)
    return bins, probs


cases = []
for name, t, s in cases_in:
    a = s / t
    bins, probs = bins_for(a, t / s)
    cases.append(
        {
            "name": name,
            "t": t,
            "s": s,
            "a": a,
            "variance": float(dlaplace(a).var()),
            "pmf_0": float(dlaplace(a).pmf(0)),
            "bins": bins,
            "probabilities": probs,
            "critical": float(chi2.ppf(1 - ALPHA, len(bins) - 1)),
        }
    )

out = {
    "source": f"scipy.stats.dlaplace and scipy.stats.chi2 (scipy {scipy.__version__})",
    "draws": N,
    "alpha": ALPHA,
    "cases": cases,
}
with open(sys.argv[1], "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
