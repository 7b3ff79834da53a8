"""Reference values for the dimensionality, factor-analysis, rotation and polychoric engine.

Run from the project root with Debian's Python:
    /usr/bin/python3 test/reference/factor.py
It writes test/reference/fixtures/factor.json (inputs, expected values, library versions).

Sources of each value, written from the published formulas without looking at the TypeScript engine:
- eigenvalues: numpy.linalg.eigvalsh;
- KMO and MSA from the anti-image correlations of numpy.linalg.inv(R) (Kaiser 1970; Kaiser & Rice 1974);
- Bartlett's (1950) sphericity test: numpy log-determinant, scipy.stats.chi2.sf;
- Velicer's (1976) MAP, squared and 4th-power, written here with numpy;
- principal axis factoring and maximum likelihood: statsmodels.multivariate.factor.Factor;
- ML χ² with Bartlett's correction, RMSEA and its 90% interval (scipy.stats.ncx2), TLI: from the
  statsmodels uniquenesses with the formulas of Lawley & Maxwell (1971), Steiger (1990), Tucker & Lewis (1973);
- varimax, quartimax, oblimin: statsmodels.multivariate.factor_rotation.rotate_factors (gradient
  projection); geomin: statsmodels' GPA with the geomin criterion written here (Browne 2001);
  promax: statsmodels varimax, then the Hendrickson & White (1964) target step with numpy.linalg.lstsq;
  Kaiser normalization done here around the rotation;
- bivariate normal probabilities: scipy.stats.multivariate_normal.cdf;
- polychoric correlations: thresholds from scipy.stats.norm.ppf, ρ by scipy.optimize.minimize_scalar
  on the likelihood built from scipy.stats.multivariate_normal.cdf (Olsson 1979, two-step);
- Guttman's (1945) λ2 and λ6 with numpy.

The data are invented: responses of a simulated pilot of an invented cycling-confidence scale.
"""

import json
import math
import pathlib
import platform

import numpy as np
import scipy
import scipy.optimize
import scipy.stats
import statsmodels
from statsmodels.multivariate.factor import Factor
from statsmodels.multivariate.factor_rotation import rotate_factors
from statsmodels.multivariate.factor_rotation._gpa_rotation import GPA

SEED = 20261201
OUT = pathlib.Path(__file__).parent / "fixtures" / "factor.json"
rng = np.random.default_rng(SEED)

# Three correlated facets of an invented cycling-confidence scale, three items each.
TRUE_LOADINGS = np.array(
    [
        [0.75, 0.00, 0.00],
        [0.65, 0.10, 0.00],
        [0.60, 0.00, 0.00],
        [0.00, 0.70, 0.00],
        [0.00, 0.60, 0.00],
        [0.10, 0.55, 0.00],
        [0.00, 0.00, 0.70],
        [0.00, 0.00, 0.65],
        [0.00, 0.10, 0.50],
    ]
)
TRUE_PHI = np.array([[1.0, 0.4, 0.3], [0.4, 1.0, 0.35], [0.3, 0.35, 1.0]])
NAMES = ["traffic1", "traffic2", "traffic3", "route1", "route2", "route3", "repair1", "repair2", "repair3"]
N = 400


def simulate(n):
    p, m = TRUE_LOADINGS.shape
    chol = np.linalg.cholesky(TRUE_PHI)
    f = rng.standard_normal((n, m)) @ chol.T
    common = f @ TRUE_LOADINGS.T
    unique_sd = np.sqrt(1 - np.sum((TRUE_LOADINGS @ TRUE_PHI) * TRUE_LOADINGS, axis=1))
    return common + rng.standard_normal((n, p)) * unique_sd


continuous = simulate(N)
R = np.corrcoef(continuous, rowvar=False)
p = R.shape[0]


def kmo(r):
    q = np.linalg.inv(r)
    d = np.sqrt(np.diag(q))
    a = -q / np.outer(d, d)
    off = ~np.eye(r.shape[0], dtype=bool)
    r2 = np.where(off, r**2, 0)
    a2 = np.where(off, a**2, 0)
    return float(r2.sum() / (r2.sum() + a2.sum())), (r2.sum(1) / (r2.sum(1) + a2.sum(1))).tolist()


def bartlett(r, n):
    k = r.shape[0]
    sign, logdet = np.linalg.slogdet(r)
    chi = -(n - 1 - (2 * k + 5) / 6) * logdet
    df = k * (k - 1) / 2
    return {"chiSquare": float(chi), "df": df, "p": float(scipy.stats.chi2.sf(chi, df)), "logDeterminant": float(logdet)}


def velicer_map(r):
    k = r.shape[0]
    w, v = np.linalg.eigh(r)
    order = np.argsort(w)[::-1]
    w, v = w[order], v[:, order]
    sq, fourth = [], []
    off = ~np.eye(k, dtype=bool)
    for m in range(0, k - 1):
        a = v[:, :m] * np.sqrt(w[:m])
        c = r - a @ a.T
        d = np.sqrt(np.diag(c))
        partial = c / np.outer(d, d)
        sq.append(float(np.mean(partial[off] ** 2)))
        fourth.append(float(np.mean(partial[off] ** 4)))
    return {"squared": sq, "fourth": fourth, "suggestedSquared": int(np.argmin(sq)), "suggestedFourth": int(np.argmin(fourth))}


def reduced_eigenvalues(r):
    smc = 1 - 1 / np.diag(np.linalg.inv(r))
    rr = r.copy()
    np.fill_diagonal(rr, smc)
    return sorted(np.linalg.eigvalsh(rr).tolist(), reverse=True)


def sign_columns(l):
    l = np.array(l, dtype=float)
    for k in range(l.shape[1]):
        if l[:, k].sum() < 0:
            l[:, k] = -l[:, k]
    return l


def ml_fit(r, uniq, n, m):
    """F_ML at the ML estimate (loadings concentrated out), Bartlett-corrected χ², RMSEA, TLI."""
    k = r.shape[0]
    sc = 1 / np.sqrt(uniq)
    s = r * np.outer(sc, sc)
    theta = np.sort(np.linalg.eigvalsh(s))[::-1]
    f = float(np.sum(theta[m:] - np.log(theta[m:]) - 1))
    chi = (n - 1 - (2 * k + 5) / 6 - 2 * m / 3) * f
    df = ((k - m) ** 2 - (k + m)) / 2
    rmsea = math.sqrt(max(chi - df, 0) / (df * (n - 1)))

    def bound(target):
        if scipy.stats.ncx2.cdf(chi, df, 1e-12) < target:
            return 0.0
        return scipy.optimize.brentq(lambda lam: scipy.stats.ncx2.cdf(chi, df, lam) - target, 1e-12, 10 * chi + 100, xtol=1e-12)

    lo, hi = bound(0.95), bound(0.05)
    null = bartlett(r, n)
    ratio0 = null["chiSquare"] / null["df"]
    tli = (ratio0 - chi / df) / (ratio0 - 1)
    return {
        "discrepancy": f,
        "chiSquare": chi,
        "df": df,
        "p": float(scipy.stats.chi2.sf(chi, df)),
        "rmsea": rmsea,
        "rmseaLower": math.sqrt(lo / (df * (n - 1))),
        "rmseaUpper": math.sqrt(hi / (df * (n - 1))),
        "tli": tli,
    }


def geomin_vgq(delta):
    def vgq(L=None, A=None, T=None):
        k = L.shape[1]
        l2 = L**2 + delta
        pro = np.exp(np.log(l2).sum(axis=1) / k)
        return float(pro.sum()), (2 / k) * (L / l2) * pro[:, None]

    return vgq


def normalized(a, fn):
    h = np.sqrt((a**2).sum(axis=1))
    out = fn(a / h[:, None])
    return (out[0] * h[:, None],) + tuple(out[1:])


def oblique_out(L, T):
    return L, T.T @ T


def promax_hw(a, power, normalize):
    """Varimax (normalized when asked), then the least-squares target step on the varimax loadings."""
    if normalize:
        h = np.sqrt((a**2).sum(axis=1))
        _, tv = rotate_factors(a / h[:, None], "varimax", tol=1e-7, max_tries=5000)
    else:
        _, tv = rotate_factors(a, "varimax", tol=1e-7, max_tries=5000)
    v = a @ tv
    target = v * np.abs(v) ** (power - 1)
    u = np.linalg.lstsq(v, target, rcond=None)[0]
    d = np.sqrt(np.diag(np.linalg.inv(u.T @ u)))
    u = u * d[None, :]
    return v @ u, np.linalg.inv(u.T @ u)


def rotations(a):
    out = {}
    kw = {"tol": 1e-7, "max_tries": 5000}
    for normalize in (True, False):
        tag = "normalized" if normalize else "raw"

        def run(fn):
            return normalized(a, fn) if normalize else fn(a)

        out[f"varimax/{tag}"] = {"loadings": run(lambda x: rotate_factors(x, "varimax", **kw))[0].tolist()}
        out[f"quartimax/{tag}"] = {"loadings": run(lambda x: rotate_factors(x, "quartimax", **kw))[0].tolist()}
        for gamma in (0.0, 0.5):
            L, T = run(lambda x: rotate_factors(x, "oblimin", gamma, "oblique", **kw))
            out[f"oblimin{gamma}/{tag}"] = {"loadings": L.tolist(), "phi": (T.T @ T).tolist()}
        L, phi, T, _ = (lambda res: res)(None) if False else (None, None, None, None)
        if normalize:
            h = np.sqrt((a**2).sum(axis=1))
            L, _, T, _ = GPA(a / h[:, None], vgQ=geomin_vgq(0.01), rotation_method="oblique", **kw)
            L = L * h[:, None]
        else:
            L, _, T, _ = GPA(a, vgQ=geomin_vgq(0.01), rotation_method="oblique", **kw)
        out[f"geomin/{tag}"] = {"loadings": L.tolist(), "phi": (T.T @ T).tolist()}
        for power in (4, 3):
            L, phi = promax_hw(a, power, normalize)
            out[f"promax{power}/{tag}"] = {"loadings": L.tolist(), "phi": phi.tolist()}
    return out


def schmid_leiman_omega(r, pattern, phi, communalities):
    """Three factors: the one-factor model of Φ is exactly identified, γᵢ = √(φᵢⱼφᵢₖ/φⱼₖ)."""
    g = np.array(
        [
            math.sqrt(phi[0, 1] * phi[0, 2] / phi[1, 2]),
            math.sqrt(phi[0, 1] * phi[1, 2] / phi[0, 2]),
            math.sqrt(phi[0, 2] * phi[1, 2] / phi[0, 1]),
        ]
    )
    general = pattern @ g
    u = 1 - np.asarray(communalities)
    vt = r.sum()
    return {
        "higherOrder": g.tolist(),
        "general": general.tolist(),
        "omegaHierarchical": float(general.sum() ** 2 / vt),
        "omegaTotal": float(1 - u.sum() / vt),
    }


def guttman(c):
    k = c.shape[0]
    v = c.sum()
    l1 = 1 - np.trace(c) / v
    off = c - np.diag(np.diag(c))
    l2 = l1 + math.sqrt(k / (k - 1) * (off**2).sum()) / v
    e2 = 1 / np.diag(np.linalg.inv(c))
    return {"lambda1": float(l1), "lambda2": float(l2), "lambda6": float(1 - e2.sum() / v)}


def bvn(x, y, r):
    return float(scipy.stats.multivariate_normal.cdf([x, y], mean=[0, 0], cov=[[1, r], [r, 1]], abseps=1e-14, releps=1e-14))


BIG = 38.0


def polychoric_pair(x, y):
    cx, cy = np.unique(x), np.unique(y)
    table = np.array([[np.sum((x == a) & (y == b)) for b in cy] for a in cx], dtype=float)
    n = table.sum()
    tx = scipy.stats.norm.ppf(np.cumsum(table.sum(1))[:-1] / n)
    ty = scipy.stats.norm.ppf(np.cumsum(table.sum(0))[:-1] / n)
    ax = np.concatenate([[-BIG], tx, [BIG]])
    ay = np.concatenate([[-BIG], ty, [BIG]])

    def negll(rho):
        cdf = np.array([[bvn(a, b, rho) for b in ay] for a in ax])
        pi = cdf[1:, 1:] - cdf[:-1, 1:] - cdf[1:, :-1] + cdf[:-1, :-1]
        return -float(np.sum(table * np.log(np.maximum(pi, 1e-300))))

    res = scipy.optimize.minimize_scalar(negll, bounds=(-0.9999, 0.9999), method="bounded", options={"xatol": 1e-10})
    return float(res.x), tx.tolist(), ty.tolist()


# ── dimensionality ──
eig = sorted(np.linalg.eigvalsh(R).tolist(), reverse=True)
k_value, msa = kmo(R)
dimensionality = {
    "eigenvalues": eig,
    "reducedEigenvalues": reduced_eigenvalues(R),
    "kmo": k_value,
    "msa": msa,
    "bartlett": bartlett(R, N),
    "map": velicer_map(R),
    "kaiser": int(sum(1 for e in eig if e > 1)),
}

# ── extraction ──
M = 3
pa = Factor(corr=R, n_factor=M, method="pa", smc=True, nobs=N).fit(maxiter=20000, tol=1e-12)
print("principal axis done", flush=True)
ml = Factor(corr=R, n_factor=M, method="ml", nobs=N).fit(opt={"gtol": 1e-9, "maxiter": 20000})
print("maximum likelihood done", flush=True)
ml_uniq = np.asarray(ml.uniqueness)
extraction = {
    "paf": {"loadings": sign_columns(pa.loadings).tolist(), "communalities": np.asarray(pa.communality).tolist()},
    "ml": {
        "uniquenesses": ml_uniq.tolist(),
        "implied": (np.asarray(ml.loadings) @ np.asarray(ml.loadings).T).tolist(),
        "fit": ml_fit(R, ml_uniq, N, M),
    },
}

# ── rotations of the PAF loadings ──
A = sign_columns(pa.loadings)
rot = rotations(A)
print("rotations done", flush=True)
obl = rot["oblimin0.0/normalized"]
omega = schmid_leiman_omega(R, np.array(obl["loadings"]), np.array(obl["phi"]), (A**2).sum(1))

# ── polychoric ──
latent = simulate(600)[:, :6]
cuts = np.array([-1.2, -0.4, 0.3, 1.1])
ordinal = (np.searchsorted(cuts, latent) + 1).astype(int)
poly = np.eye(6)
thresholds = [None] * 6
for i in range(6):
    for j in range(i):
        rho, ti, tj = polychoric_pair(ordinal[:, i], ordinal[:, j])
        poly[i, j] = poly[j, i] = rho
        thresholds[i], thresholds[j] = ti, tj
print("polychoric done", flush=True)
bvn_cases = [
    [x, y, r]
    for x, y, r in [
        (0, 0, 0.5), (0.3, -0.2, 0.95), (0.3, -0.2, -0.95), (1, 2, -0.4), (-1.5, 0.7, 0.2),
        (0.5, 0.5, 0.99), (-0.5, 1.5, -0.99), (2.5, -2.5, 0.8), (-2, -2, 0.6), (1.2, 0.4, -0.7), (0, 0, 0),
        (-0.3, 0.9, 0.93), (0.1, -1.1, 0.3),
    ]
]
bivariate = [{"x": x, "y": y, "r": r, "cdf": bvn(x, y, r)} for x, y, r in bvn_cases]

# ── Guttman ──
cov = np.cov(continuous, rowvar=False)

fixture = {
    "generator": "test/reference/factor.py",
    "versions": {
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "statsmodels": statsmodels.__version__,
    },
    "seed": SEED,
    "items": NAMES,
    "n": N,
    "factors": M,
    "correlation": R.tolist(),
    "covariance": cov.tolist(),
    "dimensionality": dimensionality,
    "extraction": extraction,
    "rotationInput": A.tolist(),
    "rotations": rot,
    "omega": omega,
    "guttman": guttman(cov),
    "bivariateNormal": bivariate,
    "polychoric": {
        "items": NAMES[:6],
        "data": ordinal.tolist(),
        "matrix": poly.tolist(),
        "thresholds": thresholds,
    },
}
OUT.write_text(json.dumps(fixture, indent=1) + "\n")
print(f"wrote {OUT}")
