#!/usr/bin/python3
"""Reference PRESS for element-wise k-fold cross-validation of PCA on USArrests.

An independent numpy implementation of the algorithm pcqc documents in
analysis/crossval.go (Bro, Kjeldahl, Smilde & Kiers 2008, Anal. Bioanal. Chem.
390:1241-1251, "ekf"): each fold's elements are treated as missing; centring
and unit scaling are refitted on the remaining elements of each column; an
a-component PCA model with column offsets is fitted by EM imputation (missing
elements start at the training mean and are replaced by the model's
reconstruction until they stop changing; the imputation of a-1 components is
the start for a); the left-out elements are predicted by the model. PRESS is
in units of the full table's standard deviations.

The fold assignment is fixed in usarrests_folds.csv (written here on the first
run with a diagonal pattern, fold = (r_i + j) mod 7, r a permutation drawn by
numpy's default_rng(20240612)); both implementations read it.

Run: /usr/bin/python3 testdata/crossval/ekf_reference.py   (numpy 1.24.2)
Writes usarrests_press.csv: components, press, press_fold1..7.
"""
import csv
import os

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
K = 7
TOL = 1e-13
MAXITER = 100000


def main():
    with open(os.path.join(HERE, "..", "datasets", "usarrests.csv")) as f:
        rows = list(csv.reader(f))[1:]
    x = np.array([[float(v) for v in r[1:]] for r in rows])
    n, p = x.shape
    path = os.path.join(HERE, "usarrests_folds.csv")
    if not os.path.exists(path):
        r = np.random.default_rng(20240612).permutation(n)
        folds = (r[:, None] + np.arange(p)[None, :]) % K
        np.savetxt(path, folds, fmt="%d", delimiter=",")
    folds = np.loadtxt(path, dtype=int, delimiter=",")
    unit = x.std(axis=0, ddof=1)
    A = p - 2  # a = p - 1 leaves a left-out element undetermined (see crossval.go)
    press = np.zeros((K, A + 1))
    for f in range(K):
        miss = folds == f
        m = np.array([x[~miss[:, j], j].mean() for j in range(p)])
        s = np.array([x[~miss[:, j], j].std(ddof=1) for j in range(p)])
        w = (x - m) / s
        w[miss] = 0.0
        ss_obs = (w[~miss] ** 2).sum()
        n_obs, n_miss = (~miss).sum(), miss.sum()
        limit = TOL * TOL * ss_obs / n_obs * n_miss

        def err():
            pred = m + s * w
            return ((((x - pred) / unit)[miss]) ** 2).sum()

        press[f, 0] = err()
        for a in range(1, A + 1):
            for _ in range(MAXITER):
                mu = w.mean(axis=0)
                wc = w - mu
                vals, vecs = np.linalg.eigh(wc.T @ wc)
                v = vecs[:, ::-1][:, :a]
                fit = mu + wc @ v @ v.T
                change = ((fit[miss] - w[miss]) ** 2).sum()
                w[miss] = fit[miss]
                if change <= limit:
                    break
            else:
                raise SystemExit("no convergence")
            press[f, a] = err()
    with open(os.path.join(HERE, "usarrests_press.csv"), "w", newline="") as f:
        out = csv.writer(f, lineterminator="\n")
        out.writerow(["components", "press"] + ["press_fold%d" % (i + 1) for i in range(K)])
        for a in range(A + 1):
            out.writerow([a, repr(press[:, a].sum())] + [repr(v) for v in press[:, a]])


if __name__ == "__main__":
    main()
