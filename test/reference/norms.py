"""Reference values for the norms of a final instrument (app/engine/norms.ts).

Run from the project root with Debian's Python and its python3-numpy and python3-scipy packages:

    /usr/bin/python3 test/reference/norms.py

It writes test/reference/fixtures/norms.json, which the unit tests read, so CI needs no Python.
The answers are random draws from a seeded numpy generator (five items answered 1-5, some answers
missing). Scores: numpy's nansum/nanmean over the answered items (a sum from fewer answers is their
mean times the number of items); percentile ranks with scipy.stats.percentileofscore(kind="mean");
z from numpy's mean and std(ddof=1); T = 50 + 10z.
"""

import json
import platform
from pathlib import Path

import numpy as np
import scipy
from scipy.stats import percentileofscore

SEED = 20261202
OUT = Path(__file__).resolve().parent / "fixtures" / "norms.json"
K = 5
LO, HI = 1, 5


def scores(answers, rule, min_answered):
    out = []
    for row in answers:
        answered = int(np.sum(~np.isnan(row)))
        if answered < min_answered:
            out.append(None)
            continue
        mean = float(np.nanmean(row))
        out.append(mean * len(row) if rule == "sum" else mean)
    return out


def norms(values, grid):
    present = np.array([v for v in values if v is not None], dtype=float)
    mean = float(np.mean(present))
    sd = float(np.std(present, ddof=1))
    rows = []
    for g in grid:
        z = (g - mean) / sd
        rows.append(
            {
                "score": float(g),
                "percentile": float(percentileofscore(present, g, kind="mean")),
                "z": float(z),
                "t": float(50 + 10 * z),
            }
        )
    return {"n": int(present.size), "mean": mean, "sd": sd, "rows": rows}


def main():
    rng = np.random.default_rng(SEED)
    n = 143
    trait = rng.normal(size=n)
    answers = np.clip(np.rint(3 + trait[:, None] + rng.normal(scale=0.9, size=(n, K))), LO, HI)
    missing = rng.random(size=(n, K)) < 0.06
    answers[missing] = np.nan
    cases = []
    for rule, min_answered in (("sum", K), ("mean", K), ("sum", 4), ("mean", 3)):
        values = scores(answers, rule, min_answered)
        sums = np.arange(K * LO, K * HI + 1, dtype=float)
        grid = sums if rule == "sum" else sums / K
        cases.append(
            {
                "rule": rule,
                "minAnswered": min_answered,
                "scores": values,
                "norms": norms(values, grid),
            }
        )
    fixture = {
        "generatedBy": "test/reference/norms.py",
        "seed": SEED,
        "versions": {"python": platform.python_version(), "numpy": np.__version__, "scipy": scipy.__version__},
        "bounds": {"min": LO, "max": HI},
        "answers": [[None if np.isnan(x) else int(x) for x in row] for row in answers],
        "cases": cases,
    }
    OUT.write_text(json.dumps(fixture, indent=1) + "\n")


if __name__ == "__main__":
    main()
