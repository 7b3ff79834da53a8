"""Reference values for respondent screening (app/engine/screening.ts).

Run from the project root with Debian's Python and its python3-numpy and python3-scipy packages:

    /usr/bin/python3 test/reference/screening.py

It writes test/reference/fixtures/screening.json, which the unit tests read, so CI needs no Python.
The responses are random draws from a seeded numpy generator (correlated normal scores cut into
five categories), with a few planted straight-liners, outliers, skipped answers and fast
respondents. Mahalanobis D^2 is computed with numpy (np.cov, np.linalg.inv) over the complete
cases and its p-value with scipy.stats.chi2.sf; longstring and the intra-individual response
variability are computed by plain Python loops written independently of the TypeScript code.
"""

import json
import math
import platform
from pathlib import Path

import numpy as np
import scipy
from scipy.stats import chi2

SEED = 20261201
OUT = Path(__file__).resolve().parent / "fixtures" / "screening.json"


def longstring(row):
    best = 0
    run = 0
    prev = None
    for v in row:
        if v is None:
            run = 0
            prev = None
            continue
        run = run + 1 if v == prev else 1
        prev = v
        best = max(best, run)
    return best


def irv(row):
    present = [v for v in row if v is not None]
    if len(present) < 2:
        return None
    m = sum(present) / len(present)
    return math.sqrt(sum((v - m) ** 2 for v in present) / (len(present) - 1))


def dataset(rng, n, k, missing_share):
    loadings = rng.uniform(0.5, 0.8, size=k)
    factor = rng.standard_normal(n)
    noise = rng.standard_normal((n, k))
    latent = factor[:, None] * loadings[None, :] + noise * np.sqrt(1 - loadings**2)[None, :]
    answers = np.clip(np.round(latent * 1.1 + 3), 1, 5)
    # planted straight-liners and outliers
    answers[0, :] = 3
    answers[1, :] = 5
    answers[2, :] = np.array([1, 5] * k)[:k]
    answers[3, : k // 2] = 1
    answers[3, k // 2 :] = 5
    values = answers.astype(float)
    mask = rng.random((n, k)) < missing_share
    mask[:4, :] = False
    mask[4, : k // 2 + 1] = True
    values[mask] = np.nan
    durations = rng.lognormal(mean=6.0, sigma=0.35, size=n)
    durations[5] = 40.0
    durations[6] = 55.0
    durations[7] = np.nan
    return values, durations


def screen(values, durations):
    n, k = values.shape
    rows = [[None if math.isnan(v) else float(v) for v in row] for row in values]
    complete = ~np.isnan(values).any(axis=1)
    x = values[complete]
    mean = x.mean(axis=0)
    cov = np.cov(x, rowvar=False, ddof=1)
    inv = np.linalg.inv(cov)
    dev = x - mean
    d2 = np.einsum("ij,jk,ik->i", dev, inv, dev)
    p = chi2.sf(d2, k)
    d2_full = [None] * n
    p_full = [None] * n
    for idx, d, pv in zip(np.flatnonzero(complete), d2, p):
        d2_full[idx] = float(d)
        p_full[idx] = float(pv)
    present = durations[~np.isnan(durations)]
    med = float(np.median(present))
    return {
        "longstring": [longstring(r) for r in rows],
        "irv": [irv(r) for r in rows],
        "mahalanobis": d2_full,
        "mahalanobisP": p_full,
        "missingPerRespondent": [int(np.isnan(values[i]).sum()) for i in range(n)],
        "missingPerItem": [int(np.isnan(values[:, j]).sum()) for j in range(k)],
        "medianDuration": med,
        "speeders": [i for i in range(n) if not math.isnan(durations[i]) and durations[i] < 0.5 * med],
        "mahalanobisFlagged": [i for i in range(n) if p_full[i] is not None and p_full[i] < 0.001],
    }


def main():
    rng = np.random.default_rng(SEED)
    cases = []
    for n, k, missing_share in [(300, 8, 0.02), (120, 12, 0.0), (500, 5, 0.05)]:
        values, durations = dataset(rng, n, k, missing_share)
        cases.append(
            {
                "n": n,
                "k": k,
                "items": [[None if math.isnan(v) else float(v) for v in values[:, j]] for j in range(k)],
                "durations": [None if math.isnan(d) else float(d) for d in durations],
                "expected": screen(values, durations),
            }
        )
    fixture = {
        "generator": "test/reference/screening.py",
        "seed": SEED,
        "versions": {"python": platform.python_version(), "numpy": np.__version__, "scipy": scipy.__version__},
        "cases": cases,
    }
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(fixture, indent=1) + "\n")


if __name__ == "__main__":
    main()
