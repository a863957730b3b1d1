#!/usr/bin/python3
"""Check the CSV of `calcdoc values --csv --sweep LINE` against NumPy.

Run by cmd/calcdoc/valuescsv_test.go (TestSweepCSVAgainstNumPy), or by hand
from the repository root with Debian's interpreter and python3-numpy:

    go run ./cmd/calcdoc values testdata/refgen/sweep_csv.md > /tmp/d/values.json
    go run ./cmd/calcdoc values --csv --sweep 27 testdata/refgen/sweep_csv.md > /tmp/d/sweep-27.csv
    (the same for every sweep of the document)
    /usr/bin/python3 testdata/refgen/check_sweep_csv.py /tmp/d

DIR holds values.json and one sweep-LINE.csv per sweep of
testdata/refgen/sweep_csv.md. Each CSV is read with Python's csv module
(RFC 4180), and:

  * every number is compared with the same number in values.json: they
    must be equal as doubles (the CSV writes numbers in full precision, so
    float() of the field gives back exactly the value);
  * the sweep's grid is compared with the grid the header asks for
    (numpy.linspace, or numpy.geomspace for a log sweep), to 1e-13;
  * every column is recomputed with NumPy from the CSV's own x and the
    document's values, by the formulas written in the document, and
    compared to 1e-12 relative (the same IEEE doubles, so only the order
    of operations differs);
  * the power factor is recomputed from its definition in IEEE Std
    1459-2010, PF = P/S with S = |P + jQ|, taken as |P|/|S|, and its sense
    from the four-quadrant convention of LANGUAGE.md section 3: lagging when
    P*Q > 0, leading when P*Q < 0, no word when Q = 0, and ", export" when
    P < 0;
  * a point where calcdoc has no value (empty fields) must be one where
    NumPy's value is not finite.

It prints one line with the count of numbers compared, and exits 1 with
a message naming the sweep, the point and the column at the first
disagreement.
"""

import csv
import json
import math
import os
import re
import sys

import numpy as np

# The document's values (testdata/refgen/sweep_csv.md), in SI units.
R_1 = 12.0
L_1 = 35e-3
C_1 = 2.2e-6
P_L = 455e3
Q_L = 300e3
Q_ST = 50e3

RTOL = 1e-12
# the sweeps of the document with points spaced on a log scale
LOG = {"f": True}
compared = 0


def fail(msg):
    print("check_sweep_csv: " + msg)
    sys.exit(1)


def pf_and_sense(s):
    """IEEE 1459 PF = |P|/|S| and the four-quadrant sense of a power s."""
    p, q = s.real, s.imag
    mag = abs(s)
    pf = abs(p) / mag
    if q == 0 or abs(q) <= 1e-12 * mag:
        word, pf = "", 1.0
    elif p * q > 0 or (p == 0 and q > 0):
        word = "lagging"
    else:
        word = "leading"
    if p < 0:
        word = word + ", export" if word else "export"
    return pf, word


def expected(var, x):
    """The columns of the sweep of var at the points x: a list of
    (header text, complex values, senses or None)."""
    x = np.asarray(x, dtype=float)
    if var == "f":
        w = 2 * np.pi * x
        z = R_1 + 1j * w * L_1 + 1 / (1j * w * C_1)
        mag = np.abs(z).astype(complex)
        return [
            ("Z_in", z, None),
            ("|Z_in|", mag, None),
            ("arg(Z_in)", np.angle(z).astype(complex), None),
            ("max(|Z_in|, 100 Ω)", np.maximum(np.abs(z), 100.0).astype(complex), None),
        ]
    if var == "n":
        q = Q_L - x * Q_ST
        s = P_L + 1j * q
        pfs = [pf_and_sense(v) for v in s]
        pfx = [pf_and_sense(-v) for v in s]
        with np.errstate(divide="ignore", invalid="ignore"):
            k = 1 / (x - 4).astype(complex)
        return [
            ("Q_n", q.astype(complex), None),
            ("pf_n", np.array([p for p, _ in pfs], dtype=complex), [w for _, w in pfs]),
            ("pf_x", np.array([p for p, _ in pfx], dtype=complex), [w for _, w in pfx]),
            ("k", k, None),
        ]
    if var == "theta":
        return [("V_t", 230 * np.exp(1j * x), None)]
    fail("no reference for the sweep of %r" % var)


HEAD = re.compile(r"^(re|im|sense)\((.*)\)(?: \[(.*)\])?$")


def close(got, want, colmax):
    # relative to the value, with a floor for values that come out of a
    # cancellation (w*L - 1/(w*C) near resonance): 1e-14 of the column's
    # largest magnitude
    return abs(got - want) <= RTOL * abs(want) + 1e-14 * colmax


def check_sweep(path, sweep):
    global compared
    with open(path, newline="", encoding="utf-8") as f:
        raw = f.read()
    if raw.startswith("\ufeff"):
        fail("%s: starts with a byte-order mark" % path)
    if raw.count("\n") != raw.count("\r\n") or not raw.endswith("\r\n"):
        fail("%s: records do not all end in CRLF (RFC 4180)" % path)
    rows = list(csv.reader(raw.splitlines(keepends=True)))
    header, body = rows[0], rows[1:]
    var_head = header[0]
    m = re.match(r"^(\S+)(?: \[(.*)\])?$", var_head)
    var, var_unit = m.group(1), m.group(2) or ""
    if var != sweep["variable"] or var_unit != sweep["unit"]:
        fail("%s: header %r, JSON variable %r in %r" % (path, var_head, sweep["variable"], sweep["unit"]))
    if len(body) != len(sweep["points"]):
        fail("%s: %d rows, JSON has %d points" % (path, len(body), len(sweep["points"])))

    # the columns the header names, against the JSON's
    cols = []  # (text, unit, has sense)
    i = 1
    while i < len(header):
        mre, mim = HEAD.match(header[i]), HEAD.match(header[i + 1])
        if not mre or mre.group(1) != "re" or mim.group(1) != "im" or mre.group(2) != mim.group(2):
            fail("%s: header %r %r is not re(X) [u], im(X) [u]" % (path, header[i], header[i + 1]))
        text, unit = mre.group(2), mre.group(3) or ""
        i += 2
        has_sense = i < len(header) and header[i] == "sense(%s)" % text
        if has_sense:
            i += 1
        cols.append((text, unit, has_sense))
    js_cols = [(c["text"], c["unit"]) for c in sweep["columns"]]
    if [(t, u) for t, u, _ in cols] != js_cols:
        fail("%s: columns %r, JSON has %r" % (path, cols, js_cols))

    # every number against the JSON, exactly
    xs, vals, senses = [], [[] for _ in cols], [[] for _ in cols]
    for r, (row, pt) in enumerate(zip(body, sweep["points"])):
        if len(row) != len(header):
            fail("%s row %d: %d fields, header has %d" % (path, r + 2, len(row), len(header)))
        x = float(row[0])
        if x != pt["x"]:
            fail("%s row %d: x %r, JSON %r" % (path, r + 2, row[0], pt["x"]))
        compared += 1
        xs.append(x)
        k = 1
        for c, (text, unit, has_sense) in enumerate(cols):
            re_f, im_f = row[k], row[k + 1]
            k += 2
            jv = pt["values"][c]
            if re_f == "" and im_f == "":
                if jv["re"] is not None or jv["im"] is not None:
                    fail("%s row %d %s: empty, JSON %r" % (path, r + 2, text, jv))
                vals[c].append(complex(math.nan, math.nan))
            else:
                z = complex(float(re_f), float(im_f))
                if z.real != jv["re"] or z.imag != jv["im"]:
                    fail("%s row %d %s: %r %r, JSON %r %r" % (path, r + 2, text, re_f, im_f, jv["re"], jv["im"]))
                compared += 2
                vals[c].append(z)
            if has_sense:
                word = row[k]
                k += 1
                js = ""
                if "sense" in jv:
                    js = jv["sense"] or ""
                    if jv["export"]:
                        js = js + ", export" if js else "export"
                if word != js:
                    fail("%s row %d sense(%s): %r, JSON %r" % (path, r + 2, text, word, js))
                senses[c].append(word)

    # the grid against NumPy's
    n = len(xs)
    a, z = xs[0], xs[-1]
    grid = np.geomspace(a, z, n) if LOG.get(var) else np.linspace(a, z, n)
    for i, (got, want) in enumerate(zip(xs, grid)):
        if abs(got - want) > 1e-13 * max(abs(want), abs(z)):
            fail("%s: point %d is %r, NumPy's grid %r" % (path, i + 1, got, want))
        compared += 1

    # every column against NumPy, from the CSV's own x
    ref = expected(var, xs)
    if [t for t, _, _ in ref] != [t for t, _, _ in cols]:
        fail("%s: columns %r, the reference has %r" % (path, [c[0] for c in cols], [t for t, _, _ in ref]))
    for c, (text, want, want_sense) in enumerate(ref):
        finite = want[np.isfinite(want)]
        colmax = float(np.max(np.abs(finite))) if finite.size else 0.0
        for i in range(n):
            got, w = vals[c][i], complex(want[i])
            if math.isnan(got.real):
                if np.isfinite(w):
                    fail("%s: %s has no value at point %d, NumPy gives %r" % (path, text, i + 1, w))
                continue
            if not close(got, w, colmax):
                fail("%s: %s at point %d (x = %r) is %r, NumPy %r" % (path, text, i + 1, xs[i], got, w))
            compared += 1
            if want_sense is not None:
                if senses[c][i] != want_sense[i]:
                    fail("%s: sense of %s at point %d is %r, IEEE 1459 four-quadrant %r" % (path, text, i + 1, senses[c][i], want_sense[i]))
                compared += 1


def main():
    if len(sys.argv) != 2:
        fail("usage: check_sweep_csv.py DIR")
    d = sys.argv[1]
    with open(os.path.join(d, "values.json"), encoding="utf-8") as f:
        js = json.load(f)
    if len(js["sweeps"]) != 3:
        fail("values.json has %d sweeps, the document 3" % len(js["sweeps"]))
    for sw in js["sweeps"]:
        check_sweep(os.path.join(d, "sweep-%d.csv" % sw["line"]), sw)
    print("check_sweep_csv: %d numbers and senses agree (NumPy %s)" % (compared, np.__version__))


if __name__ == "__main__":
    main()
