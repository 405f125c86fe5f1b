#!/usr/bin/python3
"""Export scikit-learn's bundled wine, breast-cancer and diabetes tables to
tidy CSVs in testdata/datasets/, and compute the reference values of their
correlation PCA with numpy (testdata/datasets/sklearn_reference.json).

Run from the repository root with Debian's python3-sklearn 1.2.1 and numpy
1.24.2: /usr/bin/python3 testdata/datasets/sklearn_export.py

The numbers are copied as text from sklearn's own CSV files, so the CSVs hold
exactly the published values; the feature names come from the load_*
functions, made into snake_case identifiers.
"""
import csv, gzip, json, os, re
import numpy as np
import sklearn
from sklearn.datasets import load_wine, load_breast_cancer, load_diabetes

SRC = "/usr/lib/python3/dist-packages/sklearn/datasets/data"
OUT = "testdata/datasets"


def ident(name):
    return re.sub(r"[^a-z0-9]+", "_", name.lower()).strip("_")


def rows_of(path, delim):
    opener = gzip.open if path.endswith(".gz") else open
    with opener(path, "rt") as f:
        return [line.split(delim) if delim else line.split() for line in f.read().splitlines() if line.strip()]


def write(name, header, rows):
    with open(os.path.join(OUT, name), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(header)
        w.writerows(rows)


ref = {"generator": "numpy %s, scikit-learn %s" % (np.__version__, sklearn.__version__)}

# wine: 178 × 13, class label (cultivar 0, 1, 2) as a group column.
d = load_wine()
raw = rows_of(os.path.join(SRC, "wine_data.csv"), ",")[1:]
names = [ident(n) for n in d.feature_names]
names[names.index("od280_od315_of_diluted_wines")] = "od280_od315"
write("wine.csv", names + ["cultivar"], [r[:13] + ["cultivar_" + r[13]] for r in raw])
assert np.allclose(np.array([[float(v) for v in r[:13]] for r in raw]), d.data)
tables = {"wine.csv": (names, d.data)}

# breast cancer: 569 × 30, diagnosis (sklearn's 0 = malignant, 1 = benign) as a group column.
d = load_breast_cancer()
raw = rows_of(os.path.join(SRC, "breast_cancer.csv"), ",")[1:]
names = [ident(n) for n in d.feature_names]
labels = {"0": "malignant", "1": "benign"}
write("breast_cancer.csv", names + ["diagnosis"], [r[:30] + [labels[r[30]]] for r in raw])
assert np.allclose(np.array([[float(v) for v in r[:30]] for r in raw]), d.data)
tables["breast_cancer.csv"] = (names, d.data)

# diabetes: 442 × 10 unscaled; the numeric target (disease progression after
# a year) is a response, not a feature, and is left out.
d = load_diabetes(scaled=False)
raw = rows_of(os.path.join(SRC, "diabetes_data_raw.csv.gz"), None)
names = list(d.feature_names)
write("diabetes.csv", names, raw)
assert np.allclose(np.array([[float(v) for v in r] for r in raw]), d.data)
tables["diabetes.csv"] = (names, d.data)

for file, (names, x) in tables.items():
    # Correlation PCA: centre, divide by the n−1 standard deviation, SVD.
    z = (x - x.mean(axis=0)) / x.std(axis=0, ddof=1)
    u, s, vt = np.linalg.svd(z, full_matrices=False)
    eig = s**2 / (x.shape[0] - 1)
    load = vt[:3].T
    load *= np.sign(load[np.argmax(np.abs(load), axis=0), range(3)])  # largest element positive
    ref[file] = {"rows": x.shape[0], "variables": names, "eigenvalues": eig.tolist(),
                 "loadings_pc1_pc3": load.tolist()}
with open(os.path.join(OUT, "sklearn_reference.json"), "w") as f:
    json.dump(ref, f, indent=1)
    f.write("\n")
