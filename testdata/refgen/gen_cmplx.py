#!/usr/bin/python3
"""Generate NumPy reference vectors for the complex functions of calcdoc/expr.

Run from the repository root with Debian's interpreter and python3-numpy:

    /usr/bin/python3 testdata/refgen/gen_cmplx.py

It writes testdata/expr/cmplx_ref.json.  For a fixed list of complex inputs
z it records NumPy's sqrt, exp, log, log10, sin, cos, tan, arcsin, arccos,
arctan, sinh, cosh, tanh, abs, angle and conj of z, and for a fixed list of
pairs (z, w) NumPy's power(z, w) = z**w (principal value exp(w log z)).

The inputs keep away from every branch cut of these functions: both parts
of every z have magnitude at least 0.25, so no z lies on or near the real
axis (the cuts of sqrt, log, log10, arcsin, arccos and of power's base) or
on the imaginary axis (the cuts of arctan).  Magnitudes stay below 3 so
that exp, sinh, cosh, tan stay well scaled.

The Go test (expr/ref_test.go) evaluates the calcdoc expression of each
case, e.g. "sqrt((0.5 + j0.25))", and compares with these values to 1e-12
relative.  Floats are written with Python's repr (json.dump does), which
round-trips IEEE doubles exactly.
"""

import json
import os

import numpy as np

INPUTS = [
    0.5 + 0.25j,
    1.3 - 0.7j,
    -0.8 + 1.1j,
    -1.7 - 0.45j,
    2.2 + 1.9j,
    0.3 - 2.4j,
    -0.25 + 0.6j,
    1.05 + 0.35j,
    -2.6 + 0.9j,
    0.75 - 0.3j,
    -0.4 - 1.6j,
    1.9 + 0.27j,
]

FUNCTIONS = [
    "sqrt", "exp", "log", "log10", "sin", "cos", "tan",
    "arcsin", "arccos", "arctan", "sinh", "cosh", "tanh",
    "abs", "angle", "conj",
]

EXPONENTS = [
    2.0 + 0.0j,
    -3.0 + 0.0j,
    0.5 + 0.0j,
    1.0 / 3.0 + 0.0j,
    1.5 - 0.5j,
    -0.75 + 1.25j,
]


def pair(z):
    z = complex(z)
    return [float(z.real), float(z.imag)]


def main():
    z = np.array(INPUTS, dtype=np.complex128)
    funcs = {}
    for name in FUNCTIONS:
        funcs[name] = [pair(v) for v in getattr(np, name)(z)]
    power = []
    for i, base in enumerate(INPUTS):
        # each base with two of the exponents, in turn, so every exponent
        # meets several bases
        for w in (EXPONENTS[i % len(EXPONENTS)], EXPONENTS[(i + 3) % len(EXPONENTS)]):
            r = np.power(np.complex128(base), np.complex128(w))
            power.append({"z": pair(base), "w": pair(w), "r": pair(r)})
    out = {
        "generator": "testdata/refgen/gen_cmplx.py",
        "numpy": np.__version__,
        "inputs": [pair(v) for v in INPUTS],
        "functions": funcs,
        "power": power,
    }
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "..", "expr", "cmplx_ref.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
