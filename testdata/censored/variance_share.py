# Reference values for checks/censored_values_test.go: the share of cells
# written as a limit in each variable of planted.csv and the share of the
# variable's centred sum of squares those cells carry, with "<L" read as
# L/2 and ">L" as L (pcqc --censored half). Run: /usr/bin/python3 variance_share.py (numpy 1.24.2)
import csv
import numpy as np

rows = list(csv.reader(open("planted.csv")))
names, data = rows[0][1:], rows[1:]
for j, name in enumerate(names):
    vals, cens = [], []
    for r in data:
        c = r[j + 1].strip()
        if c.startswith("<"):
            vals.append(float(c[1:]) / 2); cens.append(True)
        elif c.startswith(">"):
            vals.append(float(c[1:])); cens.append(True)
        else:
            vals.append(float(c)); cens.append(False)
    x = np.array(vals); z = x - x.mean(); m = np.array(cens)
    print(name, "share %.6f" % m.mean(), "variance share %.6f" % ((z[m] ** 2).sum() / (z ** 2).sum()))
