#!/usr/bin/python3
"""Generate NumPy reference vectors for calcdoc/solve.

Run from the repository root with Debian's interpreter and python3-numpy:

    /usr/bin/python3 testdata/refgen/gen_solve.py

It writes testdata/solve/complex_systems.json: random well-conditioned dense
complex systems A x = b of sizes n = 2, 3, 5, 8, 13, 21, 34, 50, each solved
with numpy.linalg.solve (LAPACK gesv: LU with partial pivoting).  The Go tests
in calcdoc/solve turn each complex system into its real 2n x 2n form and
compare their solution with NumPy's x.

Construction (fixed seed, so the output is the same on every run with the same
NumPy): A has entries (g + j h)/sqrt(2) with g, h standard normal, plus
2*sqrt(n) on the diagonal, which keeps the spectrum away from zero; a draw is
kept only if numpy.linalg.cond(A) (2-norm) is below 1e3, otherwise it is drawn
again.  b has entries (g + j h)/sqrt(2).  Floats are written with Python's
repr, which round-trips IEEE doubles exactly.
"""

import json
import os

import numpy as np

SEED = 20240611
SIZES = [2, 3, 5, 8, 13, 21, 34, 50]
COND_LIMIT = 1e3


def cnormal(rng, shape):
    return (rng.standard_normal(shape) + 1j * rng.standard_normal(shape)) / np.sqrt(2.0)


def pairs(v):
    return [[float(z.real), float(z.imag)] for z in v]


def main():
    rng = np.random.default_rng(SEED)
    cases = []
    for n in SIZES:
        while True:
            a = cnormal(rng, (n, n)) + 2.0 * np.sqrt(n) * np.eye(n)
            cond = float(np.linalg.cond(a))
            if cond < COND_LIMIT:
                break
        b = cnormal(rng, n)
        x = np.linalg.solve(a, b)
        cases.append(
            {
                "n": n,
                "cond2": cond,
                "A": [pairs(row) for row in a],
                "b": pairs(b),
                "x": pairs(x),
            }
        )
    out = {
        "generator": "testdata/refgen/gen_solve.py",
        "numpy": np.__version__,
        "seed": SEED,
        "cases": cases,
    }
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    path = os.path.join(root, "solve", "complex_systems.json")
    with open(path, "w", encoding="utf-8") as f:
        json.dump(out, f, separators=(",", ":"))
        f.write("\n")


if __name__ == "__main__":
    main()
