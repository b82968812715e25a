"""Reference optima for the hiding planner on binary-attribute instances.

For an attribute with two values the planner's constraint is linear in the hide
indicators x_i: with logits z_u = ln pi(u) + lambda * sum_{i visible} w_iu, the
posterior P(v) <= tau  <=>  z_u - z_v >= ln((1 - tau) / tau) for the other value u, and
z_u - z_v = ln(pi(u)/pi(v)) + lambda * sum_i (1 - x_i) (w_iu - w_iv).  So the smallest
(cheapest) hide set is the integer programme

    min  sum_i c_i x_i
    s.t. lambda * sum_i (w_iv - w_iu) x_i >= kappa - ln(pi(u)/pi(v)) - lambda * sum_i (w_iu - w_iv)
         for every attribute and every constrained value v (both values, or the true one),
         x_i = 0 for kept items, x_i in {0, 1},

which this script solves with scipy.optimize.milp (HiGHS). Instances are drawn from a
seeded numpy generator; an instance is kept only when the optimum is the same with the
right-hand sides moved by +-1e-6 (so solver tolerances cannot decide it); a few
trivial (optimum 0) and infeasible ones are kept too. Writes {"instances": [...]} to argv[1].
"""
import json
import math
import sys

import numpy as np
from scipy.optimize import Bounds, LinearConstraint, milp

SEED = 20240611
COUNT = 60


def draw(rng):
    n = int(rng.integers(4, 26))
    m = int(rng.integers(1, 5))
    attrs = []
    for _ in range(m):
        p0 = float(rng.uniform(0.2, 0.8))
        lam = float(rng.uniform(0.6, 1.5))
        # Items lean one way or the other; log-likelihood ratios of member shares.
        lean = rng.uniform(0.15, 0.85, size=n)
        mix = rng.uniform(0.0, 1.0, size=n) < 0.7
        share = np.where(mix, lean, p0)
        log_lr = [[float(math.log(s / p0)), float(math.log((1 - s) / (1 - p0)))] for s in share]
        tau = float(rng.uniform(0.5, 0.9))
        true_value = None if rng.uniform() < 0.6 else int(rng.integers(0, 2))
        attrs.append({
            "base": [p0, 1 - p0],
            "lambda": lam,
            "threshold": tau,
            "true_value": true_value,
            "log_lr": log_lr,
        })
    keep = [int(i) for i in range(n) if rng.uniform() < 0.1]
    if rng.uniform() < 0.5:
        costs = [1.0] * n
    else:
        costs = [float(c) for c in rng.integers(1, 5, size=n)]
    return {"n": n, "attributes": attrs, "keep": keep, "costs": costs}


def solve(inst, shift):
    n = inst["n"]
    rows, lo = [], []
    for a in inst["attributes"]:
        lam, base, tau = a["lambda"], a["base"], a["threshold"]
        kappa = math.log((1 - tau) / tau)
        w = np.array(a["log_lr"])
        values = [0, 1] if a["true_value"] is None else [a["true_value"]]
        for v in values:
            u = 1 - v
            coef = lam * (w[:, v] - w[:, u])
            rhs = kappa - math.log(base[u] / base[v]) - lam * float(np.sum(w[:, u] - w[:, v]))
            rows.append(coef)
            lo.append(rhs + shift)
    upper = np.ones(n)
    for k in inst["keep"]:
        upper[k] = 0.0
    res = milp(
        c=np.array(inst["costs"]),
        constraints=[LinearConstraint(np.array(rows), np.array(lo), np.full(len(lo), np.inf))],
        integrality=np.ones(n),
        bounds=Bounds(np.zeros(n), upper),
        options={"mip_rel_gap": 0.0},
    )
    if res.status == 2:  # infeasible
        return None
    if res.status != 0:
        raise RuntimeError(f"HiGHS status {res.status}: {res.message}")
    return float(round(res.fun, 9))


def main():
    rng = np.random.default_rng(SEED)
    out = []
    while len(out) < COUNT:
        inst = draw(rng)
        a, b = solve(inst, 1e-6), solve(inst, -1e-6)
        if a != b:
            continue
        # Most instances should need some hiding; a few trivial and infeasible ones stay.
        if (a is None or a == 0.0) and rng.uniform() > 0.2:
            continue
        inst["optimum"] = a
        out.append(inst)
    with open(sys.argv[1], "w") as f:
        json.dump({"source": "scipy.optimize.milp (HiGHS)", "seed": SEED, "instances": out}, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
