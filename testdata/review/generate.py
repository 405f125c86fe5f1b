#!/usr/bin/python3
"""Another person's PCA of the wine table written by scikit-learn, numpy and
pandas, in the shapes Python users send: the review tests read these files
as they are.

Run from the repository root with Debian's python3-sklearn 1.2.1, numpy
1.24.2 and pandas 1.5.3: /usr/bin/python3 testdata/review/generate.py

The PCA is scikit-learn's default, PCA(): centred, not scaled, all
components kept; the report shows the first two. testdata/datasets/wine.csv
is scikit-learn's own wine table (see testdata/datasets/README.md).
"""
import numpy as np
import pandas as pd
import sklearn
from sklearn.decomposition import PCA

OUT = "testdata/review/"
wine = pd.read_csv("testdata/datasets/wine.csv")
X = wine.drop(columns="cultivar")
pca = PCA().fit(X)
names = ["PC%d" % (a + 1) for a in range(2)]

# Loadings of the first two components, variables as rows (pandas index).
pd.DataFrame(pca.components_[:2].T, index=X.columns, columns=names).to_csv(OUT + "sklearn-wine-loadings.csv")
# Scores of the first two, without an index: matched by row order.
pd.DataFrame(pca.transform(X)[:, :2], columns=names).to_csv(OUT + "sklearn-wine-scores.csv", index=False)
# The same with pandas' default index (0, 1, 2 …) in a first column.
pd.DataFrame(pca.transform(X)[:, :2], columns=names).to_csv(OUT + "sklearn-wine-scores-indexed.csv")

# numpy savetxt: one bare column, no header.
np.savetxt(OUT + "numpy-explained-variance.txt", pca.explained_variance_)
np.savetxt(OUT + "numpy-explained-variance-ratio.txt", pca.explained_variance_ratio_)
# numpy savetxt with a header line, which numpy writes after "# ".
np.savetxt(OUT + "numpy-ratio-header.txt", pca.explained_variance_ratio_, header="explained_variance_ratio")
# A bare column of percentages rounded to two decimals.
np.savetxt(OUT + "numpy-percent-2dp.txt", 100 * pca.explained_variance_ratio_, fmt="%.2f")
# pandas: a Series (header ",0", index 0..12) ...
pd.Series(pca.explained_variance_ratio_).to_csv(OUT + "pandas-ratio-series.csv")
pd.Series(pca.explained_variance_).to_csv(OUT + "pandas-variance-series.csv")
# ... and a DataFrame with an index column and named columns.
pd.DataFrame({"explained_variance": pca.explained_variance_,
              "explained_variance_ratio": pca.explained_variance_ratio_,
              "cumulative": np.cumsum(pca.explained_variance_ratio_)}).to_csv(OUT + "pandas-variance-frame.csv")
# pandas with the components as the index.
pd.DataFrame({"sd": np.sqrt(pca.explained_variance_)},
             index=["PC%d" % (a + 1) for a in range(len(pca.explained_variance_))]).to_csv(OUT + "pandas-sd-named-index.csv")
print("scikit-learn", sklearn.__version__, "numpy", np.__version__, "pandas", pd.__version__,
      "PC1 share %.4f" % pca.explained_variance_ratio_[0])
