#!/usr/bin/python3
"""Generate large sparse solve blocks and their NumPy reference solutions.

Run from the repository root with Debian's interpreter and python3-numpy:

    /usr/bin/python3 testdata/refgen/gen_solve_sparse.py

It writes testdata/solve/sparse_sets.json: documents in calcdoc's language
(LANGUAGE.md section 5), each a calc block of values and one solve block
that writes a network node by node (Kirchhoff's current law at every node,
the currents leaving the node summing to zero), with the solution of the
same equations by numpy.linalg.solve (LAPACK zgesv, dense LU with partial
pivoting) on the dense matrix assembled here.  The Go tests in
calcdoc/kind/solve read each document, solve it and compare every unknown,
and the size and non-zero entries of the matrix the sheet names.

Networks (values of our own invention, fixed seed):

  ladder N:  a source E behind Z_g feeds node 1; node k is joined to node
             k+1 by a series impedance and has a shunt load to ground;
             section values drawn at random.
  mesh N:    a random spanning tree of N nodes (each node joined to an
             earlier one), N/4 extra tie branches between distinct pairs not
             yet joined, a shunt load at every node and three sources behind
             impedances at random nodes.
  mesh-real N: a mesh with one more unknown, a real current I_x injected at
             node m, and one more equation re(V_m) = c (a real-valued
             equation, one real equation): the set has a real unknown, so it
             is solved in its real form (2N + 1 real unknowns).  NumPy solves
             that real form.

Impedances are written with 6 significant digits and the reference uses
the written values.  For the complex sets the reference also gives the
order and the number of non-zero entries of the complex matrix (KCL: one
diagonal entry a node, one entry each way a branch between two unknown
nodes); for the real form, those of the real matrix.
"""

import json
import os

import numpy as np

SEED = 20261202
CASES = [
    ("ladder", 40),
    ("ladder", 50),
    ("ladder", 200),
    ("mesh", 120),
    ("mesh", 500),
    ("mesh-real", 150),
]


def sig(x):
    return float("%.6g" % x)


def fnum(x):
    return repr(sig(x)) if x != 0 else "0"


def ztext(z):
    re, im = sig(z.real), sig(z.imag)
    sign = "+" if im >= 0 else "-"
    return "(%s %s j%s) Ω" % (fnum(re), sign, fnum(abs(im))), complex(re, im)


def rz(rng, lo, hi):
    r = rng.uniform(lo, hi)
    return complex(r, rng.uniform(0.2, 3.0) * r)


def network(rng, kind, n):
    """Branches (a, b, name) between nodes 1..n, shunts, sources."""
    branches = []
    joined = set()
    if kind == "ladder":
        for k in range(1, n):
            branches.append((k, k + 1))
            joined.add((k, k + 1))
        sources = [1]
    else:
        for k in range(2, n + 1):
            j = int(rng.integers(1, k))
            branches.append((j, k))
            joined.add((min(j, k), max(j, k)))
        extra = 0
        while extra < n // 4:
            a, b = sorted(int(v) for v in rng.integers(1, n + 1, size=2))
            if a == b or (a, b) in joined:
                continue
            joined.add((a, b))
            branches.append((a, b))
            extra += 1
        sources = sorted(set(int(v) for v in rng.choice(np.arange(1, n + 1), size=3, replace=False)))
    return branches, sources


def build(rng, kind, n):
    branches, sources = network(rng, kind, n)
    calc = []
    vals = {}

    def define(name, z):
        text, v = ztext(z)
        calc.append("%s = %s" % (name, text))
        vals[name] = v

    for t, (a, b) in enumerate(branches, 1):
        define("Z_%d" % t, rz(rng, 0.05, 2.0))
    for k in range(1, n + 1):
        define("Z_sh%d" % k, rz(rng, 300.0, 3000.0))
    emf = {}
    for s in sources:
        define("Z_g%d" % s, rz(rng, 0.05, 0.5))
        mag = sig(rng.uniform(10e3, 12e3))
        ang = sig(rng.uniform(-10, 10))
        calc.append("E_%d = polar(%s V, %s°)" % (s, fnum(mag), fnum(ang)))
        emf[s] = mag * np.exp(1j * np.deg2rad(ang))

    # KCL at each node: currents leaving through the shunt and the branches
    # on the left side, the source's current into the node on the right
    terms = {k: ["V_%d/Z_sh%d" % (k, k)] for k in range(1, n + 1)}
    y = np.zeros((n, n), dtype=complex)
    rhs = np.zeros(n, dtype=complex)
    for k in range(1, n + 1):
        y[k - 1, k - 1] += 1 / vals["Z_sh%d" % k]
    for t, (a, b) in enumerate(branches, 1):
        ya = 1 / vals["Z_%d" % t]
        terms[a].append("(V_%d - V_%d)/Z_%d" % (a, b, t))
        terms[b].append("(V_%d - V_%d)/Z_%d" % (b, a, t))
        y[a - 1, a - 1] += ya
        y[b - 1, b - 1] += ya
        y[a - 1, b - 1] -= ya
        y[b - 1, a - 1] -= ya
    right = {k: "0 A" for k in range(1, n + 1)}
    for s in sources:
        yg = 1 / vals["Z_g%d" % s]
        right[s] = "(E_%d - V_%d)/Z_g%d" % (s, s, s)
        y[s - 1, s - 1] += yg
        rhs[s - 1] += emf[s] * yg

    unknowns = ["V_%d" % k for k in range(1, n + 1)]
    header = ", ".join("V_%d[kV]" % k for k in range(1, n + 1))
    eqs = ["n_%d: %s = %s" % (k, " + ".join(terms[k]), right[k]) for k in range(1, n + 1)]
    case = {"name": "%s %d" % (kind, n), "unknowns": unknowns}

    if kind != "mesh-real":
        x = np.linalg.solve(y, rhs)
        case.update(complex_form=True, order=n, nnz=int(np.count_nonzero(y)),
                    x=[[float(v.real), float(v.imag)] for v in x])
    else:
        # one more unknown: a real current I_x injected at node m, fixed by
        # re(V_m) = c
        m = int(rng.integers(1, n + 1))
        c = sig(rng.uniform(10.2e3, 10.8e3))
        header += ", I_x[A] real"
        eqs[m - 1] = "n_%d: %s = %s + I_x" % (m, " + ".join(terms[m]), right[m])
        eqs.append("fix: re(V_%d) = %s V" % (m, fnum(c)))
        unknowns.append("I_x")
        # the real form: x = [Re V_1, Im V_1, ..., Re V_n, Im V_n, I_x],
        # rows Re and Im of each KCL, then the fix
        nr = 2 * n + 1
        a = np.zeros((nr, nr))
        b = np.zeros(nr)
        for i in range(n):
            for k in range(n):
                g, h = y[i, k].real, y[i, k].imag
                a[2 * i, 2 * k], a[2 * i, 2 * k + 1] = g, -h
                a[2 * i + 1, 2 * k], a[2 * i + 1, 2 * k + 1] = h, g
            b[2 * i], b[2 * i + 1] = rhs[i].real, rhs[i].imag
        a[2 * (m - 1), nr - 1] = -1.0  # I_x enters node m: a current into it
        a[nr - 1, 2 * (m - 1)] = 1.0
        b[nr - 1] = c
        xr = np.linalg.solve(a, b)
        x = [[float(xr[2 * k]), float(xr[2 * k + 1])] for k in range(n)] + [[float(xr[-1]), 0.0]]
        case.update(complex_form=False, order=nr, nnz=int(np.count_nonzero(a)), x=x)

    doc = "```calc\n" + "\n".join(calc) + "\n```\n\n```solve " + header + "\n" + "\n".join(eqs) + "\n```\n"
    case["doc"] = doc
    return case


def main():
    rng = np.random.default_rng(SEED)
    cases = [build(rng, kind, n) for kind, n in CASES]
    out = {
        "generator": "testdata/refgen/gen_solve_sparse.py",
        "numpy": np.__version__,
        "seed": SEED,
        "cases": cases,
    }
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    path = os.path.join(root, "solve", "sparse_sets.json")
    with open(path, "w", encoding="utf-8") as f:
        json.dump(out, f, separators=(",", ":"), ensure_ascii=False)
        f.write("\n")


if __name__ == "__main__":
    main()
