#!/usr/bin/env python3
"""Reference fits for lategame's logistic regression tests.

Usage: logit_ref.py FILE binary|multinomial

FILE is a CSV with header `y,w,x0,...,x{p-1}` (x0 is the intercept column).
binary: statsmodels GLM Binomial (logit link) with freq_weights=w; y may be
fractional. multinomial: statsmodels MNLogit (unweighted; class 0 is the
reference). No penalty. Prints {"coef": [[...] per non-reference class]} as JSON.
"""
import json
import sys

try:
    import numpy as np
    import statsmodels.api as sm
except ImportError as e:  # the Rust test turns this into a failure
    sys.stderr.write(f"logit_ref.py needs numpy and statsmodels: {e}\n")
    sys.exit(3)


def main():
    if len(sys.argv) != 3 or sys.argv[2] not in ("binary", "multinomial"):
        sys.stderr.write(__doc__)
        sys.exit(2)
    data = np.genfromtxt(sys.argv[1], delimiter=",", names=True)
    names = data.dtype.names
    xs = [n for n in names if n.startswith("x")]
    X = np.column_stack([data[n] for n in xs])
    y = data["y"]
    w = data["w"]
    if sys.argv[2] == "binary":
        model = sm.GLM(y, X, family=sm.families.Binomial(), freq_weights=w)
        res = model.fit(tol=1e-12, maxiter=200)
        coef = [list(map(float, res.params))]
    else:
        model = sm.MNLogit(y.astype(int), X)
        res = model.fit(method="newton", tol=1e-12, maxiter=200, disp=0)
        params = np.asarray(res.params)  # p x (K-1)
        coef = [list(map(float, params[:, j])) for j in range(params.shape[1])]
    print(json.dumps({"coef": coef}))


if __name__ == "__main__":
    main()
