"""Reference values for the family-wise outlier limits (pcqc issue 12).

Run with /usr/bin/python3 (numpy 1.24, scipy 1.10, Debian bookworm) and
paste the printed lines into analysis/familywise_test.go:

    /usr/bin/python3 testdata/reference/familywise.py

Each line: n, k, Šidák confidence, T² limit (beta form, Tracy, Young & Mason
1992), Box's χ² Q limit for the listed eigenvalues, the Jackson–Mudholkar Q
limit computed in mpmath-free double precision from scipy's normal quantile,
and binomial upper tails P(X >= x | n, 0.05).
"""
import numpy as np
import scipy
from scipy import stats

print("# numpy", np.__version__, "scipy", scipy.__version__)
alpha = 0.05
discarded = [0.9, 0.7, 0.5, 0.3, 0.2, 0.1]
t1 = sum(discarded); t2 = sum(l**2 for l in discarded); t3 = sum(l**3 for l in discarded)
h0 = 1 - 2*t1*t3/(3*t2*t2)
for n, k in [(100, 2), (500, 3), (5000, 4), (40, 1)]:
    # 1 - conf without cancellation: -expm1(log1p(-alpha)/n)
    tail = -np.expm1(np.log1p(-alpha)/n)
    conf = 1 - tail
    t2lim = (n-1)**2/n * stats.beta.isf(tail, k/2, (n-k-1)/2)
    g, h = t2/t1, t1*t1/t2
    qbox = g * stats.chi2.isf(tail, h)
    z = stats.norm.isf(tail)
    qjm = t1 * (z*np.sqrt(2*t2*h0*h0)/t1 + 1 + t2*h0*(h0-1)/t1**2)**(1/h0)
    print(f"{n} {k} {conf!r} {t2lim!r} {qbox!r} {qjm!r}")
for x, n in [(10, 100), (13, 100), (40, 500), (50, 500), (0, 100), (290, 5000)]:
    print("binom", x, n, repr(stats.binom.sf(x-1, n, 0.05)))
