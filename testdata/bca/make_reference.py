"""Reference values for analysis.BCaInterval (run with /usr/bin/python3).

scipy.stats.bootstrap(method='BCa') (scipy 1.10.1, numpy 1.24.2) is run on
small fixed samples with a known statistic; its bootstrap distribution
(res.bootstrap_distribution, new in scipy 1.10), the leave-one-out
(jackknife) values of the statistic and scipy's interval are stored in
reference.json. The Go test feeds the stored replicates and jackknife
values to BCaInterval and compares its interval with scipy's.

    /usr/bin/python3 testdata/bca/make_reference.py > testdata/bca/reference.json
"""
import json

import numpy as np
import scipy
from scipy import stats

rng = np.random.default_rng(20240612)
cases = []


def add(name, data, statistic, level, n_resamples):
    res = stats.bootstrap((data,), statistic, vectorized=True, axis=-1,
                          confidence_level=level, n_resamples=n_resamples,
                          method='BCa', random_state=np.random.default_rng(7))
    est = float(statistic(data, axis=-1))
    jack = [float(statistic(np.delete(data, i), axis=-1)) for i in range(len(data))]
    cases.append({
        "name": name,
        "level": level,
        "estimate": est,
        "replicates": [float(v) for v in res.bootstrap_distribution],
        "jackknife": jack,
        "low": float(res.confidence_interval.low),
        "high": float(res.confidence_interval.high),
    })


def var1(x, axis=-1):
    return np.var(x, ddof=1, axis=axis)


def mean(x, axis=-1):
    return np.mean(x, axis=axis)


# Skewed data, where BCa and percentile intervals differ.
add("variance of exponential, n=30", rng.exponential(2.0, 30), var1, 0.95, 999)
add("mean of lognormal, n=25", rng.lognormal(0.0, 1.0, 25), mean, 0.90, 1500)
add("variance of normal, n=40", rng.normal(5.0, 2.0, 40), var1, 0.95, 2000)

print(json.dumps({
    "provenance": "scipy %s, numpy %s: scipy.stats.bootstrap(method='BCa'); see make_reference.py" % (scipy.__version__, np.__version__),
    "cases": cases,
}, indent=1))
