#!/usr/bin/python3
"""Generate NumPy reference solutions for expr/linalg/sparse.

Run from the repository root with Debian's interpreter and python3-numpy:

    /usr/bin/python3 testdata/refgen/gen_sparse.py

It writes testdata/sparse/systems.json: random sparse complex systems
A x = b of orders 1 to 300, each solved with numpy.linalg.solve (LAPACK
zgesv, dense LU with partial pivoting) on the dense form of A.

Construction (fixed seed): each row gets about 4 off-diagonal entries at
random columns, (g + j h) with g, h standard normal and scaled by 10^u, u
uniform in [-3, 3] row by row and again column by column (so that the
equilibration has work to do); the diagonal is the sum of the moduli of its
row plus 1, times a random unit phasor, on half the rows, and a random entry
elsewhere.  A draw is kept when numpy.linalg.cond of the equilibrated matrix
is below 1e8.  Some systems have zero diagonal entries, so that the pivot
order has to leave the diagonal.  Floats are written with Python's repr,
which round-trips IEEE doubles exactly.
"""

import json
import os

import numpy as np

SEED = 20261202
SIZES = [1, 2, 3, 5, 8, 13, 30, 60, 100, 300]


def draw(rng, n):
    a = np.zeros((n, n), dtype=complex)
    for i in range(n):
        for _ in range(min(4, n - 1)):
            j = int(rng.integers(n))
            a[i, j] += rng.standard_normal() + 1j * rng.standard_normal()
    for i in range(n):
        if i % 2 == 0:
            a[i, i] = (np.abs(a[i]).sum() + 1) * np.exp(1j * rng.uniform(-np.pi, np.pi))
        elif i % 4 == 1:
            a[i, i] = 0
        else:
            a[i, i] = rng.standard_normal() + 1j * rng.standard_normal()
    r = 10.0 ** rng.uniform(-3, 3, n)
    c = 10.0 ** rng.uniform(-3, 3, n)
    return (a * r[:, None]) * c[None, :], r, c


def main():
    rng = np.random.default_rng(SEED)
    cases = []
    for n in SIZES:
        while True:
            a, r, c = draw(rng, n)
            eq = a / r[:, None] / c[None, :]
            if np.linalg.cond(eq) < 1e8 and np.linalg.cond(a) < 1e15:
                break
        b = (rng.standard_normal(n) + 1j * rng.standard_normal(n)) * r
        x = np.linalg.solve(a, b)
        ent = [[int(i), int(j), float(a[i, j].real), float(a[i, j].imag)]
               for i in range(n) for j in range(n) if a[i, j] != 0]
        cases.append({
            "n": n,
            "entries": ent,
            "b": [[float(z.real), float(z.imag)] for z in b],
            "x": [[float(z.real), float(z.imag)] for z in x],
            "cond": float(np.linalg.cond(a)),
        })
    out = {"generator": "testdata/refgen/gen_sparse.py", "seed": SEED,
           "numpy": np.__version__, "systems": cases}
    path = os.path.join("testdata", "sparse", "systems.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=0)
        fh.write("\n")


if __name__ == "__main__":
    main()
