# Reference values for analysis/contrib_test.go (TestContributionLimits):
# the per-variable contribution limits computed with scipy.
#   python3 testdata/contrib/limits.py
import scipy
from scipy.stats import chi2, norm

print("# scipy", scipy.__version__)
for mean, var, conf in [(0.8, 1.3, 0.99), (0.05, 0.004, 0.99), (2.0, 8.0, 0.95)]:
    g, h = var / (2 * mean), 2 * mean * mean / var
    print("Q", mean, var, conf, repr(g * chi2.ppf(conf, h)))

# predictionQuantile: numpy's percentile, method "weibull" (Hyndman & Fan 6)
import numpy as np

print("# numpy", np.__version__)
x = np.array([3.1, -0.4, 2.2, 7.9, 0.5, 1.0, 4.4, -2.0, 6.1, 0.0])
for q in [0.99, 0.9, 0.5, 0.05, 0.3]:
    print("weibull", q, repr(np.percentile(x, 100 * q, method="weibull")))
