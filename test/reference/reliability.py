"""Reference values for the item-analysis and reliability engine, computed with numpy and scipy.

Run from the project root with Debian's Python:
    /usr/bin/python3 test/reference/reliability.py
It writes test/reference/fixtures/reliability.json (data, expected values, library versions).

Everything here is written from the published formulas (the sources in app/engine/methods/) without looking at the
TypeScript engine: alpha from item and total variances (Cronbach 1951), standardized alpha from the
mean inter-item correlation, Feldt (1965) limits from scipy.stats.f.ppf, omega total (McDonald 1999)
from a one-factor model fitted by scipy.optimize.minimize on the unweighted least-squares
discrepancy over the off-diagonal correlations, skewness and kurtosis from scipy.stats with
bias=False (adjusted Fisher-Pearson G1 and G2).
"""

import json
import math
import pathlib
import platform

import numpy as np
import scipy
import scipy.optimize
import scipy.stats

SEED = 20240517
OUT = pathlib.Path(__file__).parent / "fixtures" / "reliability.json"


def likert_one_factor(rng, n, loadings, lo=1, hi=5):
    """Continuous one-factor responses cut into lo..hi categories."""
    loadings = np.asarray(loadings, dtype=float)
    factor = rng.standard_normal(n)
    noise = rng.standard_normal((n, loadings.size)) * np.sqrt(1 - loadings**2)
    latent = factor[:, None] * loadings[None, :] + noise
    cuts = np.array([-1.5, -0.5, 0.5, 1.5])
    cats = np.searchsorted(cuts, latent) + lo
    return np.clip(cats, lo, hi).astype(float)


def alpha_from_cov(c):
    k = c.shape[0]
    return k / (k - 1) * (1 - np.trace(c) / c.sum())


def omega_uls(r):
    """One-factor ULS (minres) fit: minimise the sum of squared off-diagonal residuals r_ij - l_i l_j
    with scipy.optimize.least_squares, started from the first principal component."""
    k = r.shape[0]
    iu = np.triu_indices(k, 1)

    def resid(lam):
        return (r - np.outer(lam, lam))[iu]

    w, v = np.linalg.eigh(r)
    start = v[:, -1] * math.sqrt(w[-1])
    res = scipy.optimize.least_squares(resid, start, method="lm", xtol=1e-15, ftol=1e-15, gtol=1e-15)
    lam = res.x
    if lam.sum() < 0:
        lam = -lam
    psi = 1 - lam**2
    omega = lam.sum() ** 2 / (lam.sum() ** 2 + psi.sum())
    return {
        "omegaTotal": float(omega),
        "loadings": lam.tolist(),
        "gradientNorm": float(np.linalg.norm(res.jac.T @ res.fun)),
    }


def feldt(alpha, n, k, level):
    g = 1 - level
    df1 = n - 1
    df2 = (n - 1) * (k - 1)
    lower = 1 - (1 - alpha) * scipy.stats.f.ppf(1 - g / 2, df1, df2)
    upper = 1 - (1 - alpha) * scipy.stats.f.ppf(g / 2, df1, df2)
    return {"level": level, "df1": df1, "df2": df2, "lower": float(lower), "upper": float(upper)}


def complete_case_expected(x, lo, hi):
    n, k = x.shape
    c = np.cov(x, rowvar=False, ddof=1)
    r = np.corrcoef(x, rowvar=False)
    total = x.sum(axis=1)
    alpha = alpha_from_cov(c)
    rbar = r[np.triu_indices(k, 1)].mean()
    items = []
    for i in range(k):
        rest = np.delete(x, i, axis=1)
        col = x[:, i]
        items.append(
            {
                "mean": float(col.mean()),
                "sd": float(col.std(ddof=1)),
                "skewness": float(scipy.stats.skew(col, bias=False)),
                "kurtosis": float(scipy.stats.kurtosis(col, fisher=True, bias=False)),
                "floorShare": float(np.mean(col == lo)),
                "ceilingShare": float(np.mean(col == hi)),
                "correctedItemTotal": float(np.corrcoef(col, rest.sum(axis=1))[0, 1]),
                "alphaIfDeleted": float(alpha_from_cov(np.cov(rest, rowvar=False, ddof=1))),
            }
        )
    odd = x[:, 0::2].sum(axis=1)
    even = x[:, 1::2].sum(axis=1)
    r_half = float(np.corrcoef(odd, even)[0, 1])
    sd_total = float(total.std(ddof=1))
    sem = sd_total * math.sqrt(1 - alpha)
    return {
        "n": n,
        "k": k,
        "alpha": float(alpha),
        "alphaStandardized": float(k * rbar / (1 + (k - 1) * rbar)),
        "meanInterItemR": float(rbar),
        "correlation": r.tolist(),
        "items": items,
        "feldt95": feldt(alpha, n, k, 0.95),
        "feldt90": feldt(alpha, n, k, 0.90),
        "splitHalf": {"correlation": r_half, "spearmanBrown": 2 * r_half / (1 + r_half)},
        "sdTotal": sd_total,
        "sem": sem,
        "mdc95": 1.96 * math.sqrt(2) * sem,
        "omega": omega_uls(r),
    }


def pairwise_expected(x):
    """Pairwise convention: r_ij from the cases answering both items; item SDs from each item's answers;
    covariances c_ij = r_ij * s_i * s_j; alpha and corrected item-total from that matrix."""
    n, k = x.shape
    obs = ~np.isnan(x)
    s = np.array([np.std(x[obs[:, i], i], ddof=1) for i in range(k)])
    r = np.eye(k)
    pair_n = np.zeros((k, k), dtype=int)
    for i in range(k):
        for j in range(k):
            both = obs[:, i] & obs[:, j]
            pair_n[i, j] = both.sum()
            if i < j:
                r[i, j] = r[j, i] = np.corrcoef(x[both, i], x[both, j])[0, 1]
    c = r * np.outer(s, s)
    alpha = alpha_from_cov(c)
    rbar = r[np.triu_indices(k, 1)].mean()
    corrected = []
    for i in range(k):
        keep = [j for j in range(k) if j != i]
        cov_rest = c[i, keep].sum()
        var_rest = c[np.ix_(keep, keep)].sum()
        corrected.append(float(cov_rest / math.sqrt(c[i, i] * var_rest)))
    return {
        "respondents": int(obs.any(axis=1).sum()),
        "minPairN": int(pair_n[np.triu_indices(k, 1)].min()),
        "alpha": float(alpha),
        "alphaStandardized": float(k * rbar / (1 + (k - 1) * rbar)),
        "meanInterItemR": float(rbar),
        "correlation": r.tolist(),
        "correctedItemTotal": corrected,
        "omega": omega_uls(r),
    }


def main():
    rng = np.random.default_rng(SEED)
    names = ["traffic1", "traffic2", "route1", "route2", "handling1", "handling2", "repair1"]
    loadings = [0.75, 0.70, 0.60, 0.65, 0.55, 0.50, 0.40]
    complete = likert_one_factor(rng, 240, loadings)

    with_missing = likert_one_factor(rng, 180, loadings[:6])
    holes = rng.random(with_missing.shape) < 0.08
    with_missing[holes] = np.nan
    complete_rows = ~np.isnan(with_missing).any(axis=1)

    fixture = {
        "generator": "test/reference/reliability.py",
        "seed": SEED,
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
        },
        "bounds": {"min": 1, "max": 5},
        "complete": {
            "names": names,
            "data": complete.tolist(),
            "expected": complete_case_expected(complete, 1, 5),
        },
        "missing": {
            "names": names[:6],
            "data": [[None if math.isnan(v) else v for v in row] for row in with_missing.tolist()],
            "listwise": complete_case_expected(with_missing[complete_rows], 1, 5),
            "pairwise": pairwise_expected(with_missing),
        },
    }
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(fixture, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
