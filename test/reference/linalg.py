"""Reference values for app/engine/linalg.ts, computed with numpy.

Run with Debian's Python: /usr/bin/python3 test/reference/linalg.py
Writes test/reference/fixtures/linalg.json (committed, so CI needs no Python). The matrices are
generated here with a seeded numpy generator and stored in the fixture with their results.
"""

import json
import os
import platform

import numpy as np

OUT = os.path.join(os.path.dirname(__file__), "fixtures", "linalg.json")
rng = np.random.default_rng(20261201)


def spd(p, spread):
    """Symmetric positive-definite matrix with eigenvalues spread over `spread` orders of magnitude."""
    q, _ = np.linalg.qr(rng.standard_normal((p, p)))
    eig = np.logspace(0, -spread, p)
    return (q * eig) @ q.T


def correlation_like(p, n):
    data = rng.standard_normal((n, p)) @ rng.standard_normal((p, p))
    return np.corrcoef(data, rowvar=False)


def symmetric_case(a):
    a = (a + a.T) / 2
    values, vectors = np.linalg.eigh(a)
    order = np.argsort(values)[::-1]
    sign, logdet = np.linalg.slogdet(a)
    case = {
        "matrix": a.tolist(),
        "eigenvalues": values[order].tolist(),
        "eigenvectors": vectors[:, order].tolist(),
        "inverse": np.linalg.inv(a).tolist(),
        "condition": float(np.linalg.cond(a)),
    }
    if values.min() > 0:
        case["logDeterminant"] = float(logdet)
        case["cholesky"] = np.linalg.cholesky(a).tolist()
    return case


def data_case(n, p, scale):
    loadings = rng.uniform(0.3, 0.8, size=p)
    factor = rng.standard_normal(n)
    data = np.outer(factor, loadings) + rng.standard_normal((n, p)) * 0.6
    data = np.round(scale[0] + scale[1] * data, 3)
    return {
        "data": data.tolist(),
        "covariance": np.cov(data, rowvar=False, ddof=1).tolist(),
        "correlation": np.corrcoef(data, rowvar=False).tolist(),
    }


def pairwise_case(n, p, missing_share):
    data = rng.standard_normal((n, p)) @ rng.uniform(-1, 1, size=(p, p))
    mask = rng.uniform(size=(n, p)) < missing_share
    values = np.where(mask, np.nan, np.round(data, 4))
    r = np.eye(p)
    cov = np.zeros((p, p))
    counts = np.zeros((p, p), dtype=int)
    for j in range(p):
        counts[j, j] = int(np.sum(~np.isnan(values[:, j])))
        cov[j, j] = np.var(values[~np.isnan(values[:, j]), j], ddof=1)
        for k in range(j):
            both = ~np.isnan(values[:, j]) & ~np.isnan(values[:, k])
            r[j, k] = r[k, j] = np.corrcoef(values[both, j], values[both, k])[0, 1]
            cov[j, k] = cov[k, j] = np.cov(values[both, j], values[both, k], ddof=1)[0, 1]
            counts[j, k] = counts[k, j] = int(both.sum())
    return {
        "data": [[None if np.isnan(v) else float(v) for v in row] for row in values],
        "r": r.tolist(),
        "covariance": cov.tolist(),
        "n": counts.tolist(),
    }


def general_case(p):
    a = rng.standard_normal((p, p)) + p * 0.3 * np.eye(p)
    return {"matrix": a.tolist(), "inverse": np.linalg.inv(a).tolist(), "condition": float(np.linalg.cond(a))}


def indefinite_case():
    """A pairwise-style correlation matrix that is not positive semidefinite, with numpy's
    eigenvalue-clipping-and-rescaling of it (the method documented in linalg.ts)."""
    r = np.array([[1.0, 0.9, 0.1, 0.4], [0.9, 1.0, 0.9, 0.3], [0.1, 0.9, 1.0, 0.5], [0.4, 0.3, 0.5, 1.0]])
    values, vectors = np.linalg.eigh(r)
    clipped = np.maximum(values, 1e-6)
    rebuilt = (vectors * clipped) @ vectors.T
    d = np.sqrt(np.diag(rebuilt))
    smoothed = rebuilt / np.outer(d, d)
    return {"matrix": r.tolist(), "eigenvalues": sorted(values.tolist(), reverse=True), "smoothed": smoothed.tolist()}


def solve_case(a, columns):
    """A right-hand side drawn after every other case (so earlier cases keep their values) and
    numpy.linalg.solve's answer; a vector when columns is None."""
    b = rng.standard_normal(a.shape[0]) if columns is None else rng.standard_normal((a.shape[0], columns))
    return {
        "matrix": a.tolist(),
        "rhs": b.tolist(),
        "solution": np.linalg.solve(a, b).tolist(),
        "condition": float(np.linalg.cond(a)),
    }


fixture = {
    "generator": "test/reference/linalg.py",
    "versions": {"python": platform.python_version(), "numpy": np.__version__},
    "symmetric": [
        symmetric_case(spd(3, 1)),
        symmetric_case(spd(8, 4)),
        symmetric_case(spd(25, 8)),
        symmetric_case(correlation_like(12, 200)),
        symmetric_case(correlation_like(40, 500)),
        symmetric_case(rng.standard_normal((6, 6))),
    ],
    "general": [general_case(4), general_case(15)],
    "data": [data_case(50, 4, (3.0, 1.0)), data_case(300, 9, (1e6, 0.01)), data_case(1000, 20, (-2.0, 10.0))],
    "pairwise": [pairwise_case(60, 5, 0.15), pairwise_case(400, 12, 0.3)],
    "indefinite": indefinite_case(),
}
fixture["solve"] = {
    "general": [solve_case(np.array(c["matrix"]), None) for c in fixture["general"]]
    + [solve_case(np.array(fixture["general"][1]["matrix"]), 3)],
    "positiveDefinite": [solve_case(spd(10, 3), None), solve_case(spd(30, 6), 4),
                         solve_case(np.array(fixture["symmetric"][4]["matrix"]), None)],
}

with open(OUT, "w") as fh:
    json.dump(fixture, fh)
    fh.write("\n")
print("wrote", OUT)
