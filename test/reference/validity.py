"""Reference values for intraclass correlations and relations to other variables, computed with
numpy, scipy and statsmodels.

Run from the project root with Debian's Python:
    /usr/bin/python3 test/reference/validity.py
It writes test/reference/fixtures/validity.json (data, expected values, library versions).

Written from the published formulas without looking at the TypeScript engine:
- ICC: mean squares of the targets x raters table; the six forms of Shrout & Fleiss (1979); intervals
  and F tests of McGraw & Wong (1996, Tables 7 and 8) with quantiles from scipy.stats.f.ppf.
- Correlations: scipy.stats.pearsonr; Fisher-z interval tanh(atanh r +- z / sqrt(n - 3)) with
  scipy.stats.norm.ppf.
- Known groups: scipy.stats.ttest_ind(equal_var=False) for Welch's t and p; the Welch-Satterthwaite
  df and the difference interval from scipy.stats.t.ppf; Cohen's d with the pooled SD; Hedges' g =
  d (1 - 3 / (4 (n1 + n2) - 9)); scipy.stats.f_oneway for the one-way analysis of variance.
- Regression of a criterion on a score: statsmodels OLS.
"""

import json
import math
import pathlib
import platform

import numpy as np
import scipy
import scipy.stats
import statsmodels
import statsmodels.api as sm

SEED = 20261203
OUT = pathlib.Path(__file__).parent / "fixtures" / "validity.json"


def icc_forms(x, level=0.95):
    x = np.asarray(x, dtype=float)
    n, k = x.shape
    grand = x.mean()
    ss_rows = k * np.sum((x.mean(axis=1) - grand) ** 2)
    ss_cols = n * np.sum((x.mean(axis=0) - grand) ** 2)
    ss_total = np.sum((x - grand) ** 2)
    bms = ss_rows / (n - 1)
    wms = (ss_total - ss_rows) / (n * (k - 1))
    jms = ss_cols / (k - 1)
    ems = (ss_total - ss_rows - ss_cols) / ((n - 1) * (k - 1))
    q = 1 - (1 - level) / 2
    f = scipy.stats.f
    out = {}
    # One-way random.
    f1 = bms / wms
    d1, d2 = n - 1, n * (k - 1)
    fl = f1 / f.ppf(q, d1, d2)
    fu = f1 * f.ppf(q, d2, d1)
    p1 = f.sf(f1, d1, d2)
    out["ICC(1,1)"] = dict(value=(bms - wms) / (bms + (k - 1) * wms), lower=(fl - 1) / (fl + k - 1), upper=(fu - 1) / (fu + k - 1), F=f1, df1=d1, df2=d2, p=p1)
    out["ICC(1,k)"] = dict(value=(bms - wms) / bms, lower=1 - 1 / fl, upper=1 - 1 / fu, F=f1, df1=d1, df2=d2, p=p1)
    # Two-way, residual-based F.
    f3 = bms / ems
    d1, d2 = n - 1, (n - 1) * (k - 1)
    p3 = f.sf(f3, d1, d2)
    icc2 = (bms - ems) / (bms + (k - 1) * ems + k * (jms - ems) / n)
    a = k * icc2 / (n * (1 - icc2))
    b = 1 + k * icc2 * (n - 1) / (n * (1 - icc2))
    v = (a * jms + b * ems) ** 2 / ((a * jms) ** 2 / (k - 1) + (b * ems) ** 2 / ((n - 1) * (k - 1)))
    fs = f.ppf(q, n - 1, v)
    fss = f.ppf(q, v, n - 1)
    lo2 = n * (bms - fs * ems) / (fs * (k * jms + (k * n - k - n) * ems) + n * bms)
    hi2 = n * (fss * bms - ems) / (k * jms + (k * n - k - n) * ems + n * fss * bms)
    out["ICC(2,1)"] = dict(value=icc2, lower=lo2, upper=hi2, F=f3, df1=d1, df2=d2, p=p3)
    out["ICC(2,k)"] = dict(
        value=(bms - ems) / (bms + (jms - ems) / n),
        lower=k * lo2 / (1 + (k - 1) * lo2),
        upper=k * hi2 / (1 + (k - 1) * hi2),
        F=f3,
        df1=d1,
        df2=d2,
        p=p3,
    )
    fl = f3 / f.ppf(q, d1, d2)
    fu = f3 * f.ppf(q, d2, d1)
    out["ICC(3,1)"] = dict(value=(bms - ems) / (bms + (k - 1) * ems), lower=(fl - 1) / (fl + k - 1), upper=(fu - 1) / (fu + k - 1), F=f3, df1=d1, df2=d2, p=p3)
    out["ICC(3,k)"] = dict(value=(bms - ems) / bms, lower=1 - 1 / fl, upper=1 - 1 / fu, F=f3, df1=d1, df2=d2, p=p3)
    return {key: {kk: float(vv) for kk, vv in val.items()} for key, val in out.items()}


def fisher(r, n, level=0.95):
    z = math.atanh(r)
    h = scipy.stats.norm.ppf(1 - (1 - level) / 2) / math.sqrt(n - 3)
    return [math.tanh(z - h), math.tanh(z + h)]


def welch(a, b, level=0.95):
    res = scipy.stats.ttest_ind(a, b, equal_var=False)
    na, nb = len(a), len(b)
    va, vb = np.var(a, ddof=1) / na, np.var(b, ddof=1) / nb
    df = (va + vb) ** 2 / (va**2 / (na - 1) + vb**2 / (nb - 1))
    diff = np.mean(a) - np.mean(b)
    half = scipy.stats.t.ppf(1 - (1 - level) / 2, df) * math.sqrt(va + vb)
    pooled = math.sqrt(((na - 1) * np.var(a, ddof=1) + (nb - 1) * np.var(b, ddof=1)) / (na + nb - 2))
    d = diff / pooled
    return {
        "t": float(res.statistic),
        "p": float(res.pvalue),
        "df": float(df),
        "difference": float(diff),
        "lower": float(diff - half),
        "upper": float(diff + half),
        "cohensD": float(d),
        "hedgesG": float(d * (1 - 3 / (4 * (na + nb) - 9))),
    }


def main():
    rng = np.random.default_rng(SEED)
    # Test-retest of an invented 20-point score: 40 respondents, 3 occasions, a small practice effect.
    true = rng.normal(12, 3, size=40)
    retest = np.round(np.column_stack([true + rng.normal(d, 1.5, size=40) for d in (0, 0.4, 0.7)]), 2)
    shrout_fleiss = [[9, 2, 5, 8], [6, 1, 3, 2], [8, 4, 6, 8], [7, 1, 2, 6], [10, 5, 6, 9], [6, 2, 4, 7]]

    score = np.round(rng.normal(30, 6, size=120), 2)
    criterion = np.round(0.45 * (score - 30) / 6 + rng.normal(0, 0.9, size=120), 4)
    r, p_r = scipy.stats.pearsonr(score, criterion)
    ols = sm.OLS(criterion, sm.add_constant(score)).fit()
    ci = ols.conf_int(0.05)

    group_a = np.round(rng.normal(33, 5, size=45), 2)
    group_b = np.round(rng.normal(29, 7, size=60), 2)
    group_c = np.round(rng.normal(31, 6, size=38), 2)
    anova = scipy.stats.f_oneway(group_a, group_b, group_c)

    fixture = {
        "generator": "test/reference/validity.py",
        "seed": SEED,
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "statsmodels": statsmodels.__version__,
        },
        "icc": {
            "shroutFleiss": {"data": shrout_fleiss, "expected": icc_forms(shrout_fleiss)},
            "retest": {"data": retest.tolist(), "expected": icc_forms(retest), "expected90": icc_forms(retest, 0.9)},
        },
        "correlation": {
            "score": score.tolist(),
            "criterion": criterion.tolist(),
            "r": float(r),
            "p": float(p_r),
            "ci95": fisher(r, len(score)),
            "ci90": fisher(r, len(score), 0.9),
            "fisherOnly": {"r": -0.42, "n": 57, "ci95": fisher(-0.42, 57)},
        },
        "regression": {
            "intercept": float(ols.params[0]),
            "slope": float(ols.params[1]),
            "interceptSE": float(ols.bse[0]),
            "slopeSE": float(ols.bse[1]),
            "t": float(ols.tvalues[1]),
            "p": float(ols.pvalues[1]),
            "slopeLower": float(ci[1][0]),
            "slopeUpper": float(ci[1][1]),
            "rSquared": float(ols.rsquared),
        },
        "knownGroups": {
            "a": group_a.tolist(),
            "b": group_b.tolist(),
            "c": group_c.tolist(),
            "welch": welch(group_a, group_b),
            "anova": {"F": float(anova.statistic), "p": float(anova.pvalue), "df1": 2, "df2": 45 + 60 + 38 - 3},
        },
    }
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(fixture, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
