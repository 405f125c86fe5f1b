"""Reference for pcqc's regularised iterative PCA imputation, written in numpy
from Josse & Husson (2012), J. Soc. Fr. Statistique 153(2):79-99, section 2,
not from any package's code. Run offline once:

    /usr/bin/python3 testdata/impute/reference.py

It removes 5 % and 15 % of the cells of the wine data (testdata/datasets/
wine.csv, 178 x 13, the cultivar column left out) at random with a fixed
seed, writes the tables with the cells blank (wine_missing5.csv,
wine_missing15.csv), imputes them with S components and unit scaling, and
writes the imputed cells and the loadings of the completed, standardised
table to reference.json.
"""
import csv, json, os
import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
TOL, MAXIT, S = 1e-9, 1000, 2


def impute(x, miss, s):
    """x: n x p with missing cells at their column means; miss: bool mask."""
    x = x.copy()
    n, p = x.shape
    m = min(n - 1, p)
    for it in range(1, MAXIT + 1):
        mean = x.mean(axis=0)
        sd = x.std(axis=0, ddof=1)          # unit scaling, refitted each time
        z = (x - mean) / sd
        u, d, vt = np.linalg.svd(z, full_matrices=False)
        sigma2 = np.sum(d[s:m] ** 2) / (m - s)   # mean of the remaining eigenvalues
        lam = d[:s] ** 2
        shrunk = d[:s] * (lam - sigma2) / lam    # (lambda_s - sigma2)/lambda_s
        fit = (u[:, :s] * shrunk) @ vt[:s, :]
        new = mean + sd * fit
        delta = ((new - x) / sd)[miss]
        x[miss] = new[miss]
        change = np.sqrt(np.sum(delta ** 2) / np.sum(d ** 2))
        if change < TOL:
            return x, it, change
    return x, MAXIT, change


def main():
    with open(os.path.join(HERE, "..", "datasets", "wine.csv")) as f:
        rows = list(csv.reader(f))
    names = rows[0][:13]
    x = np.array([[float(v) for v in r[:13]] for r in rows[1:]])
    n, p = x.shape
    out = {"source": "numpy %s, testdata/impute/reference.py" % np.__version__,
           "components": S, "tolerance": TOL, "max_iterations": MAXIT, "cases": {}}
    rng = np.random.default_rng(20120415)
    for share in (5, 15):
        k = int(round(share / 100 * n * p))
        flat = rng.choice(n * p, size=k, replace=False)
        miss = np.zeros(n * p, bool)
        miss[flat] = True
        miss = miss.reshape(n, p)
        assert miss.sum(axis=1).max() < p and miss.sum(axis=0).max() < n - 2
        fname = "wine_missing%d.csv" % share
        with open(os.path.join(HERE, fname), "w", newline="") as f:
            w = csv.writer(f, lineterminator="\n")
            w.writerow(names)
            for i in range(n):
                w.writerow(["" if miss[i, j] else rows[i + 1][j] for j in range(p)])
        start = x.copy()
        obs_mean = np.array([x[~miss[:, j], j].mean() for j in range(p)])
        for j in range(p):
            start[miss[:, j], j] = obs_mean[j]
        done, it, change = impute(start, miss, S)
        z = (done - done.mean(axis=0)) / done.std(axis=0, ddof=1)
        _, d, vt = np.linalg.svd(z, full_matrices=False)
        cells = [[int(i), int(j), float(done[i, j])] for i, j in zip(*np.nonzero(miss))]
        out["cases"][fname] = {"iterations": it, "change": float(change), "cells": cells,
                               "loadings": vt[:4].T.tolist(),
                               "eigenvalues": (d[:4] ** 2 / (n - 1)).tolist()}
    with open(os.path.join(HERE, "reference.json"), "w") as f:
        json.dump(out, f, indent=1)


main()
