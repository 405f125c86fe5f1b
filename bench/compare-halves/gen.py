"""Clean tables for bench/compare-halves/run.sh: design a (n 600, p 8, three
factors of sd 5, 3, 2), b (n 200, p 20, sd 3, 2), c (n 400, p 6, noise only),
d (n 1000, p 12, sd 4, 3.5, 1.5); unit noise; halves by row parity."""
import numpy as np, sys
design, seed = sys.argv[1], int(sys.argv[2])
rng = np.random.default_rng(1000 + seed)
if design == "a":
    n, p, sd, noise = 600, 8, [5, 3, 2], 1.0
elif design == "b":
    n, p, sd, noise = 200, 20, [3, 2], 1.0
elif design == "c":
    n, p, sd, noise = 400, 6, [], 1.0
else:
    n, p, sd, noise = 1000, 12, [4, 3.5, 1.5], 1.0
f = rng.normal(size=(n, len(sd))) * sd
L = rng.normal(size=(p, len(sd)))
x = f @ L.T + noise * rng.normal(size=(n, p))
h = ",".join(f"v{j}" for j in range(p))
np.savetxt(f"{design}{seed}-odd.csv", x[1::2], delimiter=",", header=h, comments="")
np.savetxt(f"{design}{seed}-even.csv", x[0::2], delimiter=",", header=h, comments="")
