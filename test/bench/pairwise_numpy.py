"""The numpy side of the pairwise benchmark (test/bench/pairwise.ts): item statistics under pairwise
deletion, computed over the missing masks with matrix products, as one whole process.

    python3 test/bench/pairwise_numpy.py CSV

Reads the CSV (header row; first column an id, the rest items, an empty cell for a missing answer)
with numpy's own text reader (empty cells written as nan first), then: each item's mean and SD (divisor
n - 1) over its answers; every pair's count, sums, sums of squares and cross-products over the cases
answering both, from products of the masked data and the masks; the Pearson r of each pair over its
shared cases; covariances r * s_i * s_j; alpha, standardized alpha, the mean inter-item r, corrected
item-total correlations and alpha if item deleted from that matrix. Prints them as one JSON object.
"""

import io
import json
import sys

import numpy as np

with open(sys.argv[1], encoding="utf-8") as handle:
    header = handle.readline().rstrip("\n").split(",")
    text = handle.read()
# numpy's reader refuses empty fields: write them as nan (twice for runs of gaps, then line ends).
text = text.replace(",,", ",nan,").replace(",,", ",nan,").replace(",\n", ",nan\n")
x = np.loadtxt(io.StringIO(text), delimiter=",", usecols=range(1, len(header)), dtype=np.float64)
names = header[1:]
k = x.shape[1]

present = ~np.isnan(x)
m = present.astype(np.float64)
count = m.sum(axis=0)
means = np.nansum(x, axis=0) / count
d = np.where(present, x - means, 0.0)
sds = np.sqrt((d * d).sum(axis=0) / (count - 1))

pair_n = m.T @ m
sx = d.T @ m  # sx[j, k]: sum of d_j over the cases where k is present (and j, since d_j is 0 elsewhere)
sxx = (d * d).T @ m
sxy = d.T @ d
ssx = sxx - sx * sx / pair_n
ssy = ssx.T
cross = sxy - sx * sx.T / pair_n
r = cross / np.sqrt(ssx * ssy)
np.fill_diagonal(r, 1.0)
cov = r * np.outer(sds, sds)

total = cov.sum()
trace = np.trace(cov)
alpha = k / (k - 1) * (1 - trace / total)
upper = np.triu_indices(k, 1)
mean_r = r[upper].mean()
row = cov.sum(axis=1)
diag = np.diag(cov)
rest = total - 2 * row + diag
corrected = (row - diag) / np.sqrt(diag * rest)
if_deleted = (k - 1) / (k - 2) * (1 - (trace - diag) / rest)

print(
    json.dumps(
        {
            "n": int(present.any(axis=1).sum()),
            "k": k,
            "alpha": float(alpha),
            "alphaStandardized": float(k * mean_r / (1 + (k - 1) * mean_r)),
            "meanInterItemR": float(mean_r),
            "minPairN": int(pair_n[upper].min()),
            "items": [
                {
                    "name": names[j],
                    "mean": float(means[j]),
                    "sd": float(sds[j]),
                    "correctedItemTotal": float(corrected[j]),
                    "alphaIfDeleted": float(if_deleted[j]),
                }
                for j in range(k)
            ],
            "correlations": r.tolist(),
        }
    )
)
