#!/usr/bin/python3
"""Reference values for analysis.TestAndersonEqualPair.

Anderson (1963, Ann. Math. Statist. 34:122-148) likelihood-ratio statistic
for the equality of two neighbouring eigenvalues la, lb of a covariance
from n samples, chi2 = (n-1) [2 ln((la+lb)/2) - ln la - ln lb], referred to
chi-squared on 2 degrees of freedom. Computed with numpy 1.24.2 and
scipy 1.10.1 (Debian bookworm); prints Go literals for the test table.
"""
import numpy as np
from scipy import stats

for la, lb, n in [(3.2, 2.9, 300), (4.8, 3.2, 300), (2.0, 1.0, 100)]:
    chi2 = (n - 1) * (2 * np.log((la + lb) / 2) - np.log(la) - np.log(lb))
    print("{%r, %r, %d, %r, %r}," % (la, lb, n, float(chi2), float(stats.chi2.sf(chi2, 2))))
