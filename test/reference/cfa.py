"""Reference values for the confirmatory factor analysis engine, computed with numpy, scipy and
scikit-learn.

Run from the project root with Debian's Python:
    /usr/bin/python3 test/reference/cfa.py
It writes test/reference/fixtures/cfa.json (data, expected values, library versions).

Written from the published formulas without looking at the TypeScript engine:
- ML discrepancy F = ln|Sigma| + tr(S Sigma^-1) - ln|S| - p with S of divisor N (Joreskog 1969),
  minimised by scipy.optimize.minimize (BFGS on numerical gradients, then a Powell polish), in a
  parameterization of its own: loadings, residual variances, factor correlations, residual
  covariances.
- T = N F; baseline = independence model; CFI (Bentler 1990), TLI (Tucker & Lewis 1973), RMSEA =
  sqrt(max(T - df, 0) / (df (N - 1))) (Steiger 1990) with its 90% interval from scipy.stats.ncx2 and
  scipy.optimize.brentq; SRMR over the p(p + 1)/2 observed-minus-implied correlations.
- Standard errors from the expected information in its Kronecker form, D'(W kron W)D, with the
  derivatives D of vec(Sigma) by central differences; standardized-loading SEs by the delta method.
- The one-factor ML exploratory factor analysis from sklearn.decomposition.FactorAnalysis, whose
  discrepancy times N must equal the one-factor CFA's T; its chi-square with Bartlett's correction is
  (N - 1 - (2p + 5)/6 - 2m/3) F.
"""

import json
import math
import pathlib
import platform

import numpy as np
import scipy
import scipy.optimize
import scipy.stats
import sklearn
from sklearn.decomposition import FactorAnalysis

SEED = 20261202
OUT = pathlib.Path(__file__).parent / "fixtures" / "cfa.json"


def f_ml(sigma, s):
    p = s.shape[0]
    sign, logdet = np.linalg.slogdet(sigma)
    if sign <= 0:
        return 1e10
    return logdet + np.trace(s @ np.linalg.inv(sigma)) - np.linalg.slogdet(s)[1] - p


def implied(params, pattern, resid_pairs):
    p, m = pattern.shape
    k = int(pattern.sum())
    lam = np.zeros((p, m))
    lam[pattern] = params[:k]
    theta = np.diag(params[k : k + p])
    nc = m * (m - 1) // 2
    phi = np.eye(m)
    iu = np.triu_indices(m, 1)
    phi[iu] = params[k + p : k + p + nc]
    phi[(iu[1], iu[0])] = params[k + p : k + p + nc]
    for n, (a, b) in enumerate(resid_pairs):
        theta[a, b] = theta[b, a] = params[k + p + nc + n]
    return lam @ phi @ lam.T + theta, lam, phi, theta


def fit_cfa(s, n, pattern, resid_pairs=()):
    p, m = pattern.shape
    k = int(pattern.sum())
    start = np.concatenate(
        [
            np.full(k, 0.6),
            np.diag(s) * 0.5,
            np.full(m * (m - 1) // 2, 0.3),
            np.zeros(len(resid_pairs)),
        ]
    )

    def obj(x):
        return f_ml(implied(x, pattern, resid_pairs)[0], s)

    res = scipy.optimize.minimize(obj, start, method="BFGS", options={"gtol": 1e-11, "maxiter": 20000})
    res = scipy.optimize.minimize(obj, res.x, method="Powell", options={"xtol": 1e-12, "ftol": 1e-15, "maxiter": 200000})
    res = scipy.optimize.minimize(obj, res.x, method="BFGS", options={"gtol": 1e-12, "maxiter": 20000})
    sigma, lam, phi, theta = implied(res.x, pattern, resid_pairs)
    q = res.x.size
    df = p * (p + 1) // 2 - q
    t = n * res.fun
    t0 = n * (np.sum(np.log(np.diag(s))) - np.linalg.slogdet(s)[1])
    df0 = p * (p - 1) // 2
    cfi = 1 - max(t - df, 0) / max(t0 - df0, t - df, 0)
    tli = (t0 / df0 - t / df) / (t0 / df0 - 1)
    rmsea = math.sqrt(max(t - df, 0) / (df * (n - 1)))

    def ncp_for(target):
        if scipy.stats.chi2.cdf(t, df) < target:
            return 0.0
        hi = max(1.0, t)
        while scipy.stats.ncx2.cdf(t, df, hi) > target:
            hi *= 2
        return scipy.optimize.brentq(lambda lam_: scipy.stats.ncx2.cdf(t, df, lam_) - target, 1e-12, hi, xtol=1e-12)

    lo = math.sqrt(ncp_for(0.95) / (df * (n - 1)))
    hi = math.sqrt(ncp_for(0.05) / (df * (n - 1)))
    d_s = 1 / np.sqrt(np.diag(s))
    d_m = 1 / np.sqrt(np.diag(sigma))
    resid = s * np.outer(d_s, d_s) - sigma * np.outer(d_m, d_m)
    il = np.tril_indices(p)
    srmr = math.sqrt(np.mean(resid[il] ** 2))
    std = lam * (np.sqrt(np.diag(phi))[None, :]) * d_m[:, None]
    sign = np.sign(std.sum(axis=0))
    std = std * sign[None, :]
    phi_std = phi * np.outer(sign, sign)
    # Standard errors from the expected information of F, built here in its Kronecker form
    # H = D' (W kron W) D with D = d vec(Sigma) / d theta by central differences and W = Sigma^-1;
    # cov = (2 / N) H^-1. Standardized loadings by the delta method on a numerical Jacobian.
    w = np.linalg.inv(sigma)
    step = 1e-6
    cols = []
    jac = []

    def std_of(x):
        sg, lm, ph, _ = implied(x, pattern, resid_pairs)
        st = lm * np.sqrt(np.diag(ph))[None, :] / np.sqrt(np.diag(sg))[:, None]
        return st[pattern]

    for a in range(q):
        up = res.x.copy()
        dn = res.x.copy()
        up[a] += step
        dn[a] -= step
        cols.append(((implied(up, pattern, resid_pairs)[0] - implied(dn, pattern, resid_pairs)[0]) / (2 * step)).ravel())
        jac.append((std_of(up) - std_of(dn)) / (2 * step))
    d = np.column_stack(cols)
    info = d.T @ np.kron(w, w) @ d
    cov = 2 / n * np.linalg.inv(info)
    k = int(pattern.sum())
    jac = np.array(jac)
    std_cov = jac.T @ cov @ jac
    return {
        "loadingSE": np.sqrt(np.diag(cov)[:k]).tolist(),
        "standardizedLoadingSE": np.sqrt(np.diag(std_cov)).tolist(),
        "fmin": float(res.fun),
        "chiSquare": float(t),
        "df": int(df),
        "p": float(scipy.stats.chi2.sf(t, df)),
        "baselineChiSquare": float(t0),
        "baselineDf": int(df0),
        "cfi": float(cfi),
        "tli": float(tli),
        "rmsea": float(rmsea),
        "rmseaCI": [float(lo), float(hi)],
        "srmr": float(srmr),
        "standardizedLoadings": [float(std[i, j]) for i in range(p) for j in range(m) if pattern[i, j]],
        "factorCorrelations": phi_std.tolist(),
    }


def main():
    rng = np.random.default_rng(SEED)
    n = 400
    # Three correlated factors, three items each; item 4 also loads .30 on the first factor, which
    # the fitted model leaves out, so the fit is imperfect and the indices are informative.
    lam = np.zeros((9, 3))
    lam[0:3, 0] = [0.75, 0.65, 0.7]
    lam[3:6, 1] = [0.6, 0.7, 0.55]
    lam[6:9, 2] = [0.8, 0.6, 0.65]
    lam[3, 0] = 0.3
    phi = np.array([[1, 0.4, 0.3], [0.4, 1, 0.5], [0.3, 0.5, 1]])
    common = lam @ phi @ lam.T
    theta = np.diag(1 - np.diag(common))
    theta[7, 8] = theta[8, 7] = 0.15
    pop = common + theta
    data = rng.multivariate_normal(np.zeros(9), pop, size=n)
    data = np.round(data * 2 + 3, 4)
    s = np.cov(data, rowvar=False, bias=True)
    names = [f"c{i + 1}" for i in range(9)]
    pattern = np.zeros((9, 3), dtype=bool)
    pattern[0:3, 0] = pattern[3:6, 1] = pattern[6:9, 2] = True
    three = fit_cfa(s, n, pattern)
    with_resid = fit_cfa(s, n, pattern, [(7, 8)])

    # One factor on the first six items: CFA by scipy and EFA by scikit-learn.
    one_pattern = np.ones((6, 1), dtype=bool)
    s6 = s[:6, :6]
    one = fit_cfa(s6, n, one_pattern)
    fa = FactorAnalysis(n_components=1, tol=1e-12, max_iter=100000, svd_method="lapack").fit(data[:, :6])
    f_efa = f_ml(fa.get_covariance(), s6)
    bartlett = n - 1 - (2 * 6 + 5) / 6 - 2 * 1 / 3

    fixture = {
        "generator": "test/reference/cfa.py",
        "seed": SEED,
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "sklearn": sklearn.__version__,
        },
        "names": names,
        "data": data.tolist(),
        "models": {
            "threeFactors": {
                "factors": {"A": names[0:3], "B": names[3:6], "C": names[6:9]},
                "expected": three,
            },
            "withResidualCovariance": {
                "factors": {"A": names[0:3], "B": names[3:6], "C": names[6:9]},
                "residualCovariances": [[names[7], names[8]]],
                "expected": with_resid,
            },
            "oneFactor": {
                "factors": {"G": names[0:6]},
                "expected": one,
            },
        },
        "efaOneFactor": {
            "items": names[0:6],
            "fmin": float(f_efa),
            "nTimesF": float(n * f_efa),
            "bartlettFactor": float(bartlett),
            "chiSquareBartlett": float(bartlett * f_efa),
            "df": int(((6 - 1) ** 2 - (6 + 1)) // 2),
        },
    }
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(fixture, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
