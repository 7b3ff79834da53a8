"""Reference values for the content-validity engine (app/engine/content.ts).

Run from the project root with Debian's Python and its python3-numpy, python3-scipy,
python3-statsmodels and python3-sklearn packages:

    /usr/bin/python3 test/reference/content.py

It writes test/reference/fixtures/content.json, which the unit tests read, so CI needs no Python.
The panels are random draws from a seeded numpy generator; their statistics are computed here
with numpy straight from the published formulas (Lynn 1986; Polit, Beck & Owen 2007; Lawshe 1975;
Aiken 1985), the critical CVR with scipy.stats.binom, Fleiss' kappa with statsmodels and Cohen's
kappa with scikit-learn.
"""

import json
import math
import platform
from pathlib import Path

import numpy as np
import scipy
import sklearn
import statsmodels
from scipy.stats import binom
from sklearn.metrics import cohen_kappa_score
from statsmodels.stats.inter_rater import aggregate_raters, fleiss_kappa

SEED = 20261201
ALPHA = 0.05
OUT = Path(__file__).resolve().parent / "fixtures" / "content.json"


def critical_cvr(n):
    """Smallest n_e with P(X >= n_e) <= .05 for X ~ Binomial(n, 1/2), as Lawshe's CVR."""
    for ne in range(n + 1):
        tail = float(binom.sf(ne - 1, n, 0.5))  # sf(k) = P(X > k), so sf(ne - 1) = P(X >= ne)
        if tail <= ALPHA:
            return {"experts": n, "essentialNeeded": ne, "cvr": (ne - n / 2) / (n / 2), "tailProbability": tail}
    return {"experts": n, "essentialNeeded": None, "cvr": None, "tailProbability": None}


def panel(rng, items, experts, lo, hi, missing_share, with_essential):
    """A random panel: relevance drawn with more weight on the upper categories, some cells blank."""
    categories = hi - lo + 1
    weights = np.arange(1, categories + 1, dtype=float) ** 2
    weights /= weights.sum()
    relevance = rng.choice(np.arange(lo, hi + 1), size=(items, experts), p=weights).astype(float)
    relevance[rng.random((items, experts)) < missing_share] = np.nan
    essential = (rng.random((items, experts)) < 0.75).astype(float)
    essential[rng.random((items, experts)) < missing_share] = np.nan
    item_codes = [f"it{i + 1}" for i in range(items)]
    expert_codes = [f"X{j + 1}" for j in range(experts)]
    ratings = []
    for i in range(items):
        for j in range(experts):
            r = relevance[i, j]
            e = essential[i, j]
            row = {"item": item_codes[i], "expert": expert_codes[j], "relevance": None if np.isnan(r) else int(r)}
            if with_essential:
                row["essential"] = None if np.isnan(e) else bool(e == 1)
            ratings.append(row)

    midpoint = (lo + hi) / 2
    results = []
    for i in range(items):
        r = relevance[i][~np.isnan(relevance[i])]
        n = int(r.size)
        a = int(np.sum(r > midpoint))
        icvi = a / n
        pc = math.comb(n, a) * 0.5**n
        kappa = (icvi - pc) / (1 - pc)
        v = float(np.sum(r - lo) / (n * (categories - 1)))
        out = {"item": item_codes[i], "rated": n, "relevant": a, "iCvi": icvi, "pc": pc, "modifiedKappa": kappa, "aikenV": v}
        if with_essential:
            e = essential[i][~np.isnan(essential[i])]
            ne = int(np.sum(e == 1))
            out["essentialAnswered"] = int(e.size)
            out["cvr"] = (ne - e.size / 2) / (e.size / 2)
        results.append(out)
    icvis = np.array([x["iCvi"] for x in results])
    return {
        "scale": {"min": lo, "max": hi},
        "experts": experts,
        "ratings": ratings,
        "items": results,
        "sCviAve": float(np.mean(icvis)),
        "sCviUa": float(np.mean(icvis == 1.0)),
    }


def sorting(rng, items, raters, facets, accuracy):
    """Experts sorting items into facets: the intended facet with probability `accuracy`, else any facet."""
    names = [f"facet{f + 1}" for f in range(facets)]
    intended = rng.integers(0, facets, size=items)
    placed = np.where(rng.random((items, raters)) < accuracy, intended[:, None], rng.integers(0, facets, size=(items, raters)))
    table, _ = aggregate_raters(placed, n_cat=facets)
    return {
        "categories": names,
        "placements": [[names[int(c)] for c in row] for row in placed],
        "counts": table.astype(int).tolist(),
        "fleissKappa": float(fleiss_kappa(table, method="fleiss")),
    }


def cohen(rng, n, labels, accuracy):
    a = rng.choice(labels, size=n)
    b = np.where(rng.random(n) < accuracy, a, rng.choice(labels, size=n))
    return {"a": a.tolist(), "b": b.tolist(), "kappa": float(cohen_kappa_score(a, b))}


def main():
    rng = np.random.default_rng(SEED)
    fixture = {
        "generator": "test/reference/content.py",
        "seed": SEED,
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "statsmodels": statsmodels.__version__,
            "sklearn": sklearn.__version__,
        },
        "criticalCvr": [critical_cvr(n) for n in range(1, 41)],
        "panels": [
            panel(rng, items=15, experts=9, lo=1, hi=4, missing_share=0.08, with_essential=True),
            panel(rng, items=12, experts=6, lo=1, hi=5, missing_share=0.0, with_essential=True),
            panel(rng, items=10, experts=4, lo=0, hi=3, missing_share=0.1, with_essential=False),
        ],
        "fleiss": [
            sorting(rng, items=20, raters=6, facets=4, accuracy=0.7),
            sorting(rng, items=30, raters=3, facets=3, accuracy=0.5),
        ],
        "cohen": [
            cohen(rng, 30, ["traffic", "routes", "handling", "repairs"], 0.7),
            cohen(rng, 25, ["traffic", "routes"], 0.4),
        ],
    }
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(fixture, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
