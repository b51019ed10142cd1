#!/usr/bin/env python3
"""Reference values for the statistics module's distribution cross-check.

Reads JSON on stdin:
  {"beta_ppf": [[alpha, beta, p], ...],
   "norm_cdf": [[mu, sd, x], ...],
   "norm_ppf": [[mu, sd, p], ...],
   "beta_prior_mode": [{"k": [...], "n": [...], "lo": s_min, "hi": s_max}, ...]}
and writes the same keys with one scipy value per case on stdout. For
beta_prior_mode the value is the concentration s = alpha + beta that maximises
the beta-binomial log marginal likelihood (mean fixed at the pooled rate) minus
1.5 ln s, found with scipy.special.betaln and scipy.optimize.minimize_scalar.
Exits 2 with a message on stderr when scipy is not installed.
"""
import json
import sys

try:
    import numpy as np
    from scipy.optimize import minimize_scalar
    from scipy.special import betaln
    from scipy.stats import beta, norm
except ImportError as err:
    sys.stderr.write(f"dist_ref.py: scipy is not importable ({err})\n")
    sys.exit(2)


def beta_prior_mode(case) -> float:
    k = np.asarray(case["k"], dtype=float)
    n = np.asarray(case["n"], dtype=float)
    m = k.sum() / n.sum()

    def neg(u: float) -> float:
        s = np.exp(u)
        a, b = m * s, (1.0 - m) * s
        return -(np.sum(betaln(a + k, b + n - k) - betaln(a, b)) - 1.5 * u)

    lo, hi = np.log(case["lo"]), np.log(case["hi"])
    # A dense grid finds the best basin; bounded Brent polishes inside it.
    grid = np.linspace(lo, hi, 2001)
    i = int(np.argmin([neg(u) for u in grid]))
    a, b = grid[max(i - 1, 0)], grid[min(i + 1, len(grid) - 1)]
    res = minimize_scalar(neg, bounds=(a, b), method="bounded", options={"xatol": 1e-12})
    u = res.x if res.fun <= neg(grid[i]) else grid[i]
    return float(np.exp(u))


def main() -> None:
    cases = json.load(sys.stdin)
    out = {
        "beta_ppf": [float(beta.ppf(p, a, b)) for a, b, p in cases.get("beta_ppf", [])],
        "norm_cdf": [float(norm.cdf(x, loc=mu, scale=sd)) for mu, sd, x in cases.get("norm_cdf", [])],
        "norm_ppf": [float(norm.ppf(p, loc=mu, scale=sd)) for mu, sd, p in cases.get("norm_ppf", [])],
        "beta_prior_mode": [beta_prior_mode(c) for c in cases.get("beta_prior_mode", [])],
    }
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
