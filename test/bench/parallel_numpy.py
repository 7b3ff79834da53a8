"""The numpy side of the factor benchmark (test/bench/factor.ts): Horn's parallel analysis, vectorized.

    python3 test/bench/parallel_numpy.py raw|wishart N P ITERATIONS [CSV]

raw: standard-normal data sets of N × P, their correlation matrices (batched matmul) and eigenvalues
(batched eigvalsh), with SMC-reduced eigenvalues from batched inverses, in chunks of 100 data sets.
wishart: the same matrices drawn by Bartlett's decomposition (numpy chisquare and normal arrays).
With CSV, the observed correlation matrix is read from that file first (as a whole command would).
Prints the elapsed seconds of the computation on stdout.
"""

import sys
import time

import numpy as np

mode, n, p, iterations = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4])
start = time.perf_counter()
if len(sys.argv) > 5:
    data = np.loadtxt(sys.argv[5], delimiter=",", skiprows=1, usecols=range(1, p + 1))
    r = np.corrcoef(data, rowvar=False)
    observed = np.linalg.eigvalsh(r)[::-1]
rng = np.random.default_rng(1)
components = np.empty((iterations, p))
factors = np.empty((iterations, p))
CHUNK = 100
idx = np.arange(p)
for start_rep in range(0, iterations, CHUNK):
    count = min(CHUNK, iterations - start_rep)
    if mode == "raw":
        x = rng.standard_normal((count, n, p))
        x -= x.mean(axis=1, keepdims=True)
        a = np.einsum("rij,rik->rjk", x, x, optimize=True)
    else:
        l = np.tril(rng.standard_normal((count, p, p)), -1)
        df = n - 1 - np.arange(p)
        l[:, idx, idx] = np.sqrt(rng.chisquare(df, size=(count, p)))
        a = l @ np.transpose(l, (0, 2, 1))
    d = 1 / np.sqrt(np.einsum("rii->ri", a))
    corr = a * d[:, :, None] * d[:, None, :]
    components[start_rep : start_rep + count] = np.linalg.eigvalsh(corr)[:, ::-1]
    smc = 1 - 1 / np.einsum("rii->ri", np.linalg.inv(corr))
    corr[:, idx, idx] = smc
    factors[start_rep : start_rep + count] = np.linalg.eigvalsh(corr)[:, ::-1]
pct = np.percentile(components, 95, axis=0)
pct_f = np.percentile(factors, 95, axis=0)
print(f"{time.perf_counter() - start:.4f}")
