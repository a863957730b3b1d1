#!/usr/bin/python3
"""Generate NumPy reference vectors for inv and det of matrices whose
entries carry units of very different magnitudes (calcdoc/expr).

Run from the repository root with Debian's interpreter and python3-numpy:

    /usr/bin/python3 testdata/refgen/gen_linalg_units.py

It writes testdata/expr/linalg_units_ref.json.  Each case is
A = diag(10^r) . A0 . diag(10^c), where A0 is a random complex n x n
matrix, entries (g + j h)/sqrt(2) with g, h standard normal, kept only if
numpy.linalg.cond(A0) < 100 (fixed seed), and r, c are whole exponents
drawn from -12..12.  In SI units such a matrix has entries from about
1e-24 to 1e24, as an impedance/admittance mix in ohms and siemens does;
a pivot test that ignores the scales calls it singular.  The inverse is
numpy.linalg.inv(A) and the determinant numpy.linalg.det(A) (LAPACK getrf,
whose pivoting has no absolute threshold, so it is correct however the
rows are scaled).  Row i of A carries the unit UNITS[i % 4] in the Go test,
so det has the product of the row units and inv's (i, j) entry 1/unit_j.

Also the hand case of issue 12, [1e6, 0; 0, 1e-9] (1 MOhm, 1 nS), with
numpy's det 1e-3 and inverse diag(1e-6, 1e9).

Floats are written with Python's repr (json.dump does), which round-trips
IEEE doubles exactly.
"""

import json
import os

import numpy as np

SEED = 20261202
SIZES = [2, 3, 4, 5]
PER_SIZE = 3
COND_LIMIT = 100.0


def cnormal(rng, shape):
    return (rng.standard_normal(shape) + 1j * rng.standard_normal(shape)) / np.sqrt(2.0)


def pairs(m):
    return [[[float(z.real), float(z.imag)] for z in row] for row in m]


def case(a):
    d = complex(np.linalg.det(a))
    return {
        "n": int(a.shape[0]),
        "A": pairs(a),
        "inv": pairs(np.linalg.inv(a)),
        "det": [d.real, d.imag],
    }


def main():
    rng = np.random.default_rng(SEED)
    cases = [case(np.array([[1e6, 0], [0, 1e-9]], dtype=complex))]
    for n in SIZES:
        for _ in range(PER_SIZE):
            while True:
                a0 = cnormal(rng, (n, n))
                if float(np.linalg.cond(a0)) < COND_LIMIT:
                    break
            r = rng.integers(-12, 13, n)
            c = rng.integers(-12, 13, n)
            a = np.diag(10.0 ** r) @ a0 @ np.diag(10.0 ** c)
            cases.append(case(a))
    out = {
        "generator": "testdata/refgen/gen_linalg_units.py",
        "numpy": np.__version__,
        "seed": SEED,
        "cases": cases,
    }
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "..", "expr", "linalg_units_ref.json")
    with open(path, "w") as f:
        json.dump(out, f)
        f.write("\n")


if __name__ == "__main__":
    main()
