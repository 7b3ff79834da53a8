"""Reference values for item analysis under pairwise deletion, computed with numpy and scipy.

Run from the project root with Debian's Python:
    /usr/bin/python3 test/reference/pairwise.py
It writes test/reference/fixtures/pairwise.json (data, expected values, library versions).

Written from the pairwise convention alone, pair by pair, without the engine's sums over masks: each
r_ij is numpy.corrcoef on the rows answering both items; each item's mean and SD (ddof = 1) over its
own answers; covariances c_ij = r_ij * s_i * s_j; alpha (Cronbach 1951) from that matrix; standardized
alpha from the mean inter-item r; corrected item-total r and alpha if item deleted from the matrix;
skewness and kurtosis with scipy.stats (bias=False) over each item's answers. The cases are chosen to
reach every path: several blocks of rows, an item count that is not a multiple of four, an item most
respondents skipped, respondents who answered nothing, and an item constant on most of its answers.
"""

import json
import math
import pathlib
import platform

import numpy as np
import scipy
import scipy.stats

SEED = 20261202
OUT = pathlib.Path(__file__).parent / "fixtures" / "pairwise.json"


def likert(rng, n, loadings):
    loadings = np.asarray(loadings, dtype=float)
    factor = rng.standard_normal(n)
    noise = rng.standard_normal((n, loadings.size)) * np.sqrt(1 - loadings**2)
    latent = factor[:, None] * loadings[None, :] + noise
    return (np.searchsorted(np.array([-1.5, -0.5, 0.5, 1.5]), latent) + 1).astype(float)


def expected(x):
    n, k = x.shape
    obs = ~np.isnan(x)
    answered = obs.any(axis=1)
    r = np.eye(k)
    pair_n = np.zeros((k, k), dtype=int)
    for i in range(k):
        for j in range(k):
            both = obs[:, i] & obs[:, j]
            pair_n[i, j] = int(both.sum())
            if i < j:
                r[i, j] = r[j, i] = np.corrcoef(x[both, i], x[both, j])[0, 1]
    items = []
    s = np.empty(k)
    for i in range(k):
        v = x[obs[:, i], i]
        s[i] = np.std(v, ddof=1)
        items.append(
            {
                "n": int(v.size),
                "missing": int(n - v.size),
                "mean": float(v.mean()),
                "sd": float(s[i]),
                "skewness": float(scipy.stats.skew(v, bias=False)),
                "kurtosis": float(scipy.stats.kurtosis(v, bias=False)),
            }
        )
    c = r * np.outer(s, s)
    total = c.sum()
    trace = np.trace(c)
    alpha = k / (k - 1) * (1 - trace / total)
    rbar = r[np.triu_indices(k, 1)].mean()
    for i in range(k):
        keep = [j for j in range(k) if j != i]
        rest = c[np.ix_(keep, keep)]
        items[i]["correctedItemTotal"] = float(c[i, keep].sum() / math.sqrt(c[i, i] * rest.sum()))
        items[i]["alphaIfDeleted"] = float((k - 1) / (k - 2) * (1 - np.trace(rest) / rest.sum()))
    return {
        "analysed": int(answered.sum()),
        "dropped": int(n - answered.sum()),
        "pairN": pair_n.tolist(),
        "minPairN": int(pair_n[np.triu_indices(k, 1)].min()),
        "correlation": r.tolist(),
        "covariance": c.tolist(),
        "alpha": float(alpha),
        "alphaStandardized": float(k * rbar / (1 + (k - 1) * rbar)),
        "meanInterItemR": float(rbar),
        "items": items,
    }


def case(name, x):
    k = x.shape[1]
    return {
        "name": name,
        "names": [f"cc{j + 1}" for j in range(k)],
        "data": [[None if math.isnan(v) else v for v in row] for row in x.tolist()],
        "expected": expected(x),
    }


def main():
    rng = np.random.default_rng(SEED)
    # 1,300 respondents x 23 items, 3% missing at random: three blocks of rows, 23 = 5 * 4 + 3 items.
    a = likert(rng, 1300, np.linspace(0.35, 0.8, 23))
    a[rng.random(a.shape) < 0.03] = np.nan
    # 400 x 7: item 3 skipped by about 75%, rows 10-14 answer nothing, item 6 is 3 except on 12 rows
    # (so on the rows it shares with item 3 it may take one value only on few answers).
    b = likert(rng, 400, [0.7, 0.6, 0.65, 0.5, 0.55, 0.6, 0.45])
    b[rng.random(b.shape) < 0.08] = np.nan
    b[rng.random(400) < 0.75, 2] = np.nan
    b[10:15, :] = np.nan
    b[:, 5] = np.where(np.isnan(b[:, 5]), np.nan, 3.0)
    b[rng.choice(np.arange(20, 400), 12, replace=False), 5] = 4.0
    fixture = {
        "generator": "test/reference/pairwise.py",
        "seed": SEED,
        "versions": {"python": platform.python_version(), "numpy": np.__version__, "scipy": scipy.__version__},
        "cases": [case("1300 x 23, 3% missing", a), case("400 x 7, a mostly skipped item", b)],
    }
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(fixture) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
