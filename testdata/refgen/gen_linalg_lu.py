#!/usr/bin/python3
"""Generate NumPy reference vectors for calcdoc/expr/linalg.

Run from the repository root with Debian's interpreter and python3-numpy:

    /usr/bin/python3 testdata/refgen/gen_linalg_lu.py

It writes testdata/linalg/lu_ref.json with, for each case, a square matrix
A (complex or real), a right-hand side b, and from NumPy:

  x       numpy.linalg.solve(A, b)
  inv     numpy.linalg.inv(A)
  det     numpy.linalg.det(A) (for the small cases)
  logdet  numpy.linalg.slogdet(A): sign (a unit complex number) and
          log|det A|, which stay finite where det itself over- or underflows
  cond1B  numpy.linalg.cond(B, 1), the exact 1-norm condition number of the
          matrix B that expr/linalg factors: A with row i, then column j,
          multiplied by the power of two that brings its largest modulus
          into [0.5, 1) (the same rule, computed here with math.frexp)
  cond2   numpy.linalg.cond(A) (2-norm)

Construction (fixed seed): entries (g + j h)/sqrt(2), g and h standard
normal (h = 0 for the real cases), then row i multiplied by 10^r_i and
column j by 10^c_j with r, c uniform integers in [-8, 8] so that the
equilibration matters (the scaled matrix is well conditioned, A is not).
Two larger cases (n = 60) have all entries multiplied by 1e12 and 1e-12,
so that det A overflows and underflows binary64; for them the inverse is
left out (inv is null) to keep the file small. Floats are written with
Python's repr (json.dump does), which round-trips IEEE doubles exactly.
"""

import json
import math
import os

import numpy as np

SEED = 20261202


def pair(z):
    return [float(np.real(z)), float(np.imag(z))]


def equilibrate(a):
    n = a.shape[0]
    b = a.copy()
    for i in range(n):
        m = np.max(np.abs(b[i, :]))
        if m > 0:
            b[i, :] = b[i, :] * 2.0 ** (-math.frexp(m)[1])
    for j in range(n):
        m = np.max(np.abs(b[:, j]))
        if m > 0:
            b[:, j] = b[:, j] * 2.0 ** (-math.frexp(m)[1])
    return b


def case(rng, n, is_complex, spread, factor=1.0):
    g = rng.standard_normal((n, n))
    h = rng.standard_normal((n, n)) if is_complex else np.zeros((n, n))
    a = (g + 1j * h) / (math.sqrt(2) if is_complex else 1.0)
    a = a + 2 * math.sqrt(n) * np.eye(n)  # keeps the scaled matrix regular
    r = rng.integers(-spread, spread + 1, n)
    c = rng.integers(-spread, spread + 1, n)
    a = (10.0 ** r)[:, None] * a * (10.0 ** c)[None, :] * factor
    if not is_complex:
        a = a.real
    bv = rng.standard_normal(n) + (1j * rng.standard_normal(n) if is_complex else 0)
    if not is_complex:
        bv = bv.real
    bv = bv * (10.0 ** r) * factor
    x = np.linalg.solve(a, bv)
    sign, logabs = np.linalg.slogdet(a)
    out = {
        "n": n,
        "complex": is_complex,
        "A": [[pair(v) for v in row] for row in a],
        "b": [pair(v) for v in bv],
        "x": [pair(v) for v in x],
        "inv": [[pair(v) for v in row] for row in np.linalg.inv(a)] if n <= 20 else None,
        "sign": pair(sign),
        "logabsdet": float(logabs),
        "cond1B": float(np.real(np.linalg.cond(equilibrate(a), 1))),
        "cond2": float(np.linalg.cond(a)),
    }
    d = complex(np.linalg.det(a)) if n <= 12 else None
    out["det"] = pair(d) if d is not None else None
    return out


def main():
    rng = np.random.default_rng(SEED)
    cases = []
    for n in [1, 2, 3, 4, 5, 8, 12, 20]:
        cases.append(case(rng, n, True, 8))
    for n in [2, 3, 6, 10]:
        cases.append(case(rng, n, False, 8))
    cases.append(case(rng, 60, True, 0, 1e12))
    cases.append(case(rng, 60, True, 0, 1e-12))
    out = {"numpy": np.__version__, "seed": SEED, "cases": cases}
    path = os.path.join("testdata", "linalg", "lu_ref.json")
    with open(path, "w") as f:
        json.dump(out, f)
        f.write("\n")


if __name__ == "__main__":
    main()
