#!/usr/bin/python3
"""Reference principal angles for analysis.PrincipalAngles, computed with
scipy.linalg.subspace_angles (Debian's python3-scipy 1.10.1, numpy 1.24.2).

Run from the repository root: /usr/bin/python3 testdata/review/angles.py
It writes testdata/review/angles.json: pairs of orthonormal bases (6 x 2
and 6 x 3) whose subspaces meet at known tiny angles, a pair at 0 (the same
subspace in another basis) and a pair with large angles, with scipy's
angles in degrees, ascending.
"""
import json
import numpy as np
import scipy
from scipy.linalg import subspace_angles, qr

rng = np.random.default_rng(13)


def basis(p, k):
    q, _ = qr(rng.standard_normal((p, k)), mode="economic")
    return q


def tilt(a, angles):
    """Turn each column of the orthonormal a by its angle (radians) towards
    a direction orthogonal to all of a, so the principal angles are known."""
    p, k = a.shape
    full, _ = qr(np.hstack([a, rng.standard_normal((p, k))]), mode="economic")
    perp = full[:, k:2 * k]
    return a * np.cos(angles) + perp * np.sin(angles)


cases = []
a = basis(6, 2)
cases.append(("same subspace, rotated basis", a, a @ np.array([[0.6, -0.8], [0.8, 0.6]]), [0.0, 0.0]))
cases.append(("tiny angles 1e-9 and 3e-7 rad", a, tilt(a, np.array([1e-9, 3e-7])), [1e-9, 3e-7]))
b = basis(6, 3)
cases.append(("tiny angles 2e-12, 5e-10, 1e-8 rad", b, tilt(b, np.array([2e-12, 5e-10, 1e-8])), [2e-12, 5e-10, 1e-8]))
cases.append(("large angles", basis(6, 3), basis(6, 3), None))

out = {"generator": "scipy %s, numpy %s: scipy.linalg.subspace_angles" % (scipy.__version__, np.__version__), "cases": []}
for name, x, y, planted in cases:
    deg = np.sort(np.degrees(subspace_angles(x, y)))
    out["cases"].append({
        "name": name,
        "a": x.tolist(),
        "b": y.tolist(),
        "planted_rad": planted,
        "scipy_deg": deg.tolist(),
    })
with open("testdata/review/angles.json", "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
