"""Reference values for pcqc compare (acceptance item 4 of issue 14).

Splits testdata/datasets/wine.csv (UCI Wine, as exported by scikit-learn;
see ../datasets/README.md) into two halves by row parity: wine_a.csv holds
data rows 1, 3, 5, ... and every variable; wine_b.csv holds rows 2, 4, 6, ...
without the variable "ash" and with the columns in reverse order, so that
variables must be matched by name. Then, independently of pcqc, it fits a
PCA to each half (centred, unit-scaled with n-1 standard deviations, 3
components) and compares them over the common variables:

  * Tucker's congruence between every pair of components,
  * the optimal pairing by scipy.optimize.linear_sum_assignment on -|phi|,
  * the principal angles by scipy.linalg.subspace_angles,
  * eigenvalue and percentage differences, and each pair's largest loading
    difference after sign alignment.

Run with /usr/bin/python3 (numpy 1.24.2, scipy 1.10.1) from this folder:
    python3 make_reference.py
It rewrites wine_a.csv, wine_b.csv and reference.json.
"""
import csv
import json

import numpy as np
import scipy
from scipy.linalg import subspace_angles
from scipy.optimize import linear_sum_assignment

K = 3

with open("../datasets/wine.csv", newline="") as f:
    rows = list(csv.reader(f))
header, data = rows[0], rows[1:]
a_rows = data[0::2]
b_rows = data[1::2]

b_cols = [c for c in reversed(header) if c != "ash"]
b_index = [header.index(c) for c in b_cols]

with open("wine_a.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(header)
    w.writerows(a_rows)
with open("wine_b.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(b_cols)
    w.writerows([[r[j] for j in b_index] for r in b_rows])


def pca(names, rows):
    variables = [c for c in names if c != "cultivar"]
    x = np.array([[float(r[names.index(v)]) for v in variables] for r in rows])
    z = (x - x.mean(axis=0)) / x.std(axis=0, ddof=1)
    _, s, vt = np.linalg.svd(z, full_matrices=False)
    eig = s**2 / (len(rows) - 1)
    return variables, eig, vt[:K].T


va, ea, la = pca(header, a_rows)
vb, eb, lb = pca(b_cols, [[r[j] for j in b_index] for r in b_rows])
common = [v for v in va if v in vb]
ra = la[[va.index(v) for v in common]]
rb = lb[[vb.index(v) for v in common]]
phi = np.array([[ra[:, i] @ rb[:, j] / np.sqrt((ra[:, i] @ ra[:, i]) * (rb[:, j] @ rb[:, j]))
                 for j in range(K)] for i in range(K)])
rows_i, cols_j = linear_sum_assignment(-np.abs(phi))
pa, pb = 100 * ea / ea.sum(), 100 * eb / eb.sum()
pairs = []
for i, j in zip(rows_i, cols_j):
    sign = 1.0 if phi[i, j] >= 0 else -1.0
    diff = sign * rb[:, j] - ra[:, i]
    top = int(np.argmax(np.abs(diff)))
    pairs.append({
        "a": int(i), "b": int(j), "congruence": float(abs(phi[i, j])), "sign": sign,
        "eigenvalue_difference": float(eb[j] - ea[i]),
        "percent_difference": float(pb[j] - pa[i]),
        "largest_variable": common[top], "largest_difference": float(diff[top]),
    })
angles = np.sort(np.degrees(subspace_angles(ra, rb)))
out = {
    "provenance": "make_reference.py in this folder; numpy %s, scipy %s; halves of ../datasets/wine.csv" % (np.__version__, scipy.__version__),
    "components": K,
    "only_a": [v for v in va if v not in vb],
    "only_b": [v for v in vb if v not in va],
    "congruence": phi.tolist(),
    "pairs": pairs,
    "principal_angles_deg": angles.tolist(),
}
with open("reference.json", "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
