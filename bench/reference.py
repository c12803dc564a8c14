"""Vectorised reference for the large-samples benchmark (bench/largeAudit.bench.ts).

Reads the same CSV with pandas' C parser and computes, with numpy, the one-pass statistics of the
sample checks: the entropy production of every realisation, its mean and spread, the exponential
average <exp(-Sigma)> in log space, the means and variances of the currents, the weighted
currents <x exp(-Sigma)> and a histogram of Sigma. With --fit it adds the logistic fit of the
exchange relation on the realisations and their mirror images (Newton's method, three
coefficients), which transport-audit also does (on its cell summary). Prints one JSON line: parse
and statistics times and the peak resident memory.

Usage: python3 bench/reference.py <csv> <beta_bar 1/meV> <a_Q 1/meV> <a_N> [--fit]
"""
import json
import resource
import sys
import time

import numpy as np
import pandas as pd


def main() -> None:
    path = sys.argv[1]
    beta_bar, a_q, a_n = (float(x) for x in sys.argv[2:5])
    t0 = time.perf_counter()
    frame = pd.read_csv(path, engine="c", dtype={"W": np.float64, "Q": np.float64, "dN": np.float64}, comment="#")
    t1 = time.perf_counter()
    w = frame["W"].to_numpy()
    q = frame["Q"].to_numpy()
    n = frame["dN"].to_numpy()
    sigma = beta_bar * w + a_q * q + a_n * n
    out = {"rows": int(sigma.size), "mean_sigma": float(sigma.mean()), "sd_sigma": float(sigma.std(ddof=1))}
    m = float((-sigma).max())
    out["log_mean_exp_minus_sigma"] = m + float(np.log(np.mean(np.exp(-sigma - m))))
    for name, x in (("W", w), ("Q", q), ("dN", n)):
        out[f"mean_{name}"] = float(x.mean())
        out[f"var_{name}"] = float(x.var(ddof=1))
        out[f"weighted_{name}"] = float(np.mean(x * np.exp(-sigma)))
    hist, _ = np.histogram(sigma, bins=200)
    out["histogram_cells"] = int((hist > 0).sum())
    if "--fit" in sys.argv:
        out["theta"] = logistic_fit(w, q, n)
    t2 = time.perf_counter()
    out["parse_seconds"] = t1 - t0
    out["stats_seconds"] = t2 - t1
    out["total_seconds"] = t2 - t0
    out["peak_rss_mib"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(json.dumps(out))


def logistic_fit(w, q, n):
    """Logistic fit of "original vs mirror image" on features (W, Q, dN): the no-bin estimator."""
    features = np.column_stack((w, q, n))
    x = np.vstack((features, -features))
    y = np.concatenate((np.ones(w.size), np.zeros(w.size)))
    theta = np.zeros(3)
    for _ in range(8):
        eta = x @ theta
        p = 1.0 / (1.0 + np.exp(-eta))
        grad = x.T @ (y - p)
        hess = (x * (p * (1 - p))[:, None]).T @ x
        theta = theta + np.linalg.solve(hess, grad)
    return theta.tolist()


if __name__ == "__main__":
    main()
