"""Reference values for purification rounds, computed with numpy and scipy.

Run from the project root with Debian's Python:
    /usr/bin/python3 test/reference/purification.py
It writes test/reference/fixtures/purification.json: an invented pilot data set (raw answers as a
respondent would give them, reverse-keyed item not yet reversed, a few missing answers, a few
straight-liners), and what two purification rounds on it must report.

The data set is test data only: four facets of four items driven by a general factor and a facet
factor, plus one item ("OD1", filed under the first facet) that measures almost nothing the others
share, as an item outside the construct's domain would. BH3 is reverse-keyed. Respondents listed in
`straight_liners` answered 5 to everything.

The expected values are written from the published formulas (the sources in app/engine/methods/), independently of the
TypeScript code: reverse keying x' = min + max - x with the declared bounds 1 and 5; listwise
deletion; alpha from item and total variances (Cronbach 1951); corrected item-total correlation
with the sum of the other items; alpha if item deleted; Feldt (1965) limits from scipy.stats.f.ppf.
"""

import json
import pathlib
import platform

import numpy as np
import scipy
import scipy.stats

SEED = 20250611
OUT = pathlib.Path(__file__).parent / "fixtures" / "purification.json"
LO, HI = 1, 5
FACETS = ["TR", "RP", "BH", "RR"]
REVERSE = ["BH3"]
OFF_DOMAIN = "OD1"


def make_data(rng):
    n = 260
    general = rng.standard_normal(n)
    codes, columns = [], []
    for facet in FACETS:
        specific = rng.standard_normal(n)
        for i in range(1, 5):
            code = f"{facet}{i}"
            latent = 0.62 * general + 0.45 * specific + 0.64 * rng.standard_normal(n)
            codes.append(code)
            columns.append(latent)
        if facet == "TR":
            codes.append(OFF_DOMAIN)
            columns.append(0.08 * general + rng.standard_normal(n))
    latent = np.column_stack(columns)
    latent = latent / latent.std(axis=0)
    cuts = np.array([-1.4, -0.45, 0.45, 1.4])
    answers = (np.searchsorted(cuts, latent) + LO).astype(float)
    for code in REVERSE:
        j = codes.index(code)
        answers[:, j] = LO + HI - answers[:, j]
    straight = sorted(rng.choice(n, size=12, replace=False).tolist())
    answers[straight, :] = HI
    holes = rng.choice(n * len(codes), size=14, replace=False)
    for h in holes:
        r, c = divmod(int(h), len(codes))
        if r not in straight:
            answers[r, c] = np.nan
    return codes, answers, straight


def alpha(x):
    k = x.shape[1]
    return k / (k - 1) * (1 - x.var(axis=0, ddof=1).sum() / x.sum(axis=1).var(ddof=1))


def feldt(a, n, k, level=0.95):
    df1, df2 = n - 1, (n - 1) * (k - 1)
    g = 1 - level
    return 1 - (1 - a) * scipy.stats.f.ppf(1 - g / 2, df1, df2), 1 - (1 - a) * scipy.stats.f.ppf(g / 2, df1, df2)


def guttman(x):
    """Guttman (1945) lambda 2 and lambda 6 from the sample covariance matrix (divisor n - 1)."""
    c = np.cov(x, rowvar=False, ddof=1)
    k = c.shape[0]
    v = c.sum()
    l1 = 1 - np.trace(c) / v
    off = c - np.diag(np.diag(c))
    l2 = l1 + np.sqrt(k / (k - 1) * (off**2).sum()) / v
    l6 = 1 - (1 / np.diag(np.linalg.inv(c))).sum() / v
    return float(l2), float(l6)


def round_values(codes, answers, keep_rows, items):
    cols = [codes.index(c) for c in items]
    x = answers[np.ix_(keep_rows, cols)].copy()
    for code in REVERSE:
        if code in items:
            j = items.index(code)
            x[:, j] = LO + HI - x[:, j]
    complete = ~np.isnan(x).any(axis=1)
    x = x[complete]
    n, k = x.shape
    a = alpha(x)
    lower, upper = feldt(a, n, k)
    per_item = {}
    for j, code in enumerate(items):
        rest = np.delete(x, j, axis=1)
        per_item[code] = {
            "mean": float(x[:, j].mean()),
            "sd": float(x[:, j].std(ddof=1)),
            "correctedItemTotal": float(np.corrcoef(x[:, j], rest.sum(axis=1))[0, 1]),
            "alphaIfDeleted": float(alpha(rest)),
            "counts": [int((x[:, j] == v).sum()) for v in range(LO, HI + 1)],
        }
    facets = {}
    for facet in FACETS:
        members = [j for j, c in enumerate(items) if c.startswith(facet) or (facet == "TR" and c == OFF_DOMAIN)]
        facets[facet] = float(alpha(x[:, members]))
    lambda2, lambda6 = guttman(x)
    return {
        "n": int(n),
        "k": int(k),
        "alpha": float(a),
        "lambda2": lambda2,
        "lambda6": lambda6,
        "feldt": [float(lower), float(upper)],
        "items": per_item,
        "facetAlpha": facets,
    }


def main():
    rng = np.random.default_rng(SEED)
    codes, answers, straight = make_data(rng)
    everyone = np.arange(answers.shape[0])
    kept = np.array([r for r in everyone if r not in straight])
    without_od = [c for c in codes if c != OFF_DOMAIN]
    rows = [[None if np.isnan(v) else int(v) for v in row] for row in answers]
    fixture = {
        "generator": "test/reference/purification.py",
        "seed": SEED,
        "versions": {"python": platform.python_version(), "numpy": np.__version__, "scipy": scipy.__version__},
        "bounds": [LO, HI],
        "codes": codes,
        "reverse": REVERSE,
        "offDomain": OFF_DOMAIN,
        "straightLiners": straight,
        "rows": rows,
        "round1": round_values(codes, answers, kept, codes),
        "round2": round_values(codes, answers, kept, without_od),
        "round1WithStraightLiners": round_values(codes, answers, everyone, codes),
    }
    OUT.write_text(json.dumps(fixture, indent=1) + "\n")
    r1, r2 = fixture["round1"], fixture["round2"]
    print(
        f"round 1: alpha {r1['alpha']:.4f}, OD1 r_it {r1['items'][OFF_DOMAIN]['correctedItemTotal']:.3f}, "
        f"alpha without OD1 {r1['items'][OFF_DOMAIN]['alphaIfDeleted']:.4f}; round 2: alpha {r2['alpha']:.4f}"
    )


if __name__ == "__main__":
    main()
