#!/usr/bin/python3
"""Generate NumPy reference vectors for inv and det of calcdoc/expr.

Run from the repository root with Debian's interpreter and python3-numpy:

    /usr/bin/python3 testdata/refgen/gen_linalg.py

It writes testdata/expr/linalg_ref.json: for each size n = 2..6, two random
complex n x n matrices A with their inverse (numpy.linalg.inv, LAPACK gesv
on the identity) and determinant (numpy.linalg.det, from the LU factors).

Construction (fixed seed, the same output on every run with the same
NumPy): entries (g + j h)/sqrt(2) with g, h standard normal; a draw is kept
only if numpy.linalg.cond(A) (2-norm) is below 100, so that the inverse is
determined to about 1e-14 and a comparison to 1e-12 tests the engine, not
the conditioning.  No diagonal is added, so pivoting matters.

The Go test (expr/ref_test.go) writes A as a calcdoc matrix literal, with
every entry in full precision, evaluates inv(...) and det(...), and
compares.  Floats are written with Python's repr (json.dump does), which
round-trips IEEE doubles exactly.
"""

import json
import os

import numpy as np

SEED = 20250417
SIZES = [2, 3, 4, 5, 6]
PER_SIZE = 2
COND_LIMIT = 100.0


def cnormal(rng, shape):
    return (rng.standard_normal(shape) + 1j * rng.standard_normal(shape)) / np.sqrt(2.0)


def pairs(m):
    return [[[float(z.real), float(z.imag)] for z in row] for row in m]


def main():
    rng = np.random.default_rng(SEED)
    cases = []
    for n in SIZES:
        for _ in range(PER_SIZE):
            while True:
                a = cnormal(rng, (n, n))
                cond = float(np.linalg.cond(a))
                if cond < COND_LIMIT:
                    break
            d = complex(np.linalg.det(a))
            cases.append(
                {
                    "n": n,
                    "cond2": cond,
                    "A": pairs(a),
                    "inv": pairs(np.linalg.inv(a)),
                    "det": [d.real, d.imag],
                }
            )
    out = {
        "generator": "testdata/refgen/gen_linalg.py",
        "numpy": np.__version__,
        "seed": SEED,
        "cases": cases,
    }
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "..", "expr", "linalg_ref.json")
    with open(path, "w") as f:
        json.dump(out, f)
        f.write("\n")


if __name__ == "__main__":
    main()
