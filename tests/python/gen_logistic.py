"""Reference fit for telltale's calibration regression, computed with scikit-learn.

scikit-learn's LogisticRegression (lbfgs, l1_ratio=0 i.e. an L2 penalty) minimises
    0.5*||w||^2 + C * sum_i log(1 + exp(-y_i (x_i.w + b)))
with the intercept b unpenalised. linfa-logistic minimises
    sum_i log(1 + exp(-y_i (x_i.w + b))) + (alpha/2)*||w||^2,
the same objective divided by C when alpha = 1/C. The Rust test
tests/cohort_reference.rs fits the same data with telltale's cohort::fit::fit_logistic
(linfa-logistic) and compares the fitted probabilities.

The data look like calibration features: a log-odds, a log base rate and a log spread,
with labels drawn from a known logistic model (seeded).

Usage: python gen_logistic.py OUT.json
"""
import json
import sys

import numpy as np
import sklearn
from sklearn.linear_model import LogisticRegression

rng = np.random.default_rng(20261202)
n = 400
x1 = rng.normal(1.0, 2.0, n)  # naive-Bayes log-odds of the best guess
x2 = np.log(rng.uniform(0.02, 0.5, n))  # log base rate of the guess
x3 = np.log1p(rng.gamma(2.0, 3.0, n))  # log(1 + evidence spread)
X = np.column_stack([x1, x2, x3])
true_w = np.array([0.7, 0.3, -0.4])
p = 1.0 / (1.0 + np.exp(-(0.5 + X @ true_w)))
y = rng.uniform(size=n) < p

cases = []
for alpha in [0.1, 1.0, 10.0]:
    model = LogisticRegression(C=1.0 / alpha, l1_ratio=0.0, solver="lbfgs", tol=1e-12, max_iter=100000)
    model.fit(X, y)
    cases.append(
        {
            "alpha": alpha,
            "intercept": float(model.intercept_[0]),
            "coef": [float(c) for c in model.coef_[0]],
            "probabilities": [float(q) for q in model.predict_proba(X)[:, 1]],
        }
    )

out = {
    "source": f"sklearn.linear_model.LogisticRegression (scikit-learn {sklearn.__version__}), lbfgs, L2, C = 1/alpha",
    "x": [[float(v) for v in row] for row in X],
    "y": [bool(v) for v in y],
    "cases": cases,
}
with open(sys.argv[1] if len(sys.argv) > 1 else "tests/data/logistic.json", "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
