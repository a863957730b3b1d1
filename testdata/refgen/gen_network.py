#!/usr/bin/python3
"""Generate network blocks and their NumPy reference solutions.

Run from the repository root with Debian's interpreter and python3-numpy:

    /usr/bin/python3 testdata/refgen/gen_network.py

It writes testdata/network/generated.json: random networks of 3 to 200
nodes in the text of a network block (LANGUAGE.md section 11), each with
its solution by an independent modified nodal analysis written here with
NumPy.  The Go tests in calcdoc/kind/network/mna read each network's text,
solve it, and compare node by node and branch by branch.

The reference formulation differs from calcdoc's on purpose: here EVERY
branch current is an unknown (node voltages of the non-ground nodes plus
one current per branch), with Kirchhoff's current law at each non-ground
node and one equation per branch:

    Z  (coupled or not):  V_F - V_T - Z I - sum(z_m I_other) = 0
    Y:                    I - Y (V_F - V_T) = 0
    source e, Z z:        V_T - V_F + z I - e = 0
    current i:            I - i = 0
    ratio r to F2 -> T2:  V_F - V_T - r (V_F2 - V_T2) = 0, and the second
                          winding puts conj(r) I out at F2 (in at T2)

where a controlled e or i is a constant plus constants times node voltages
and branch currents.  The dense complex system is solved with
numpy.linalg.solve (LAPACK zgesv).  S = (V_F - V_T) conj(I) for Z, Y,
current and ratio, (V_T - V_F) conj(I) for source.

Every network has a main part (the first, of 3 nodes, nothing else) (ground "0" or "N") meshed from a random
spanning tree plus extra branches, shunts, sources with series Z, an ideal
source (no series Z) on some, current sources, controlled sources of the
four kinds (voltage or current, controlled by a node voltage or a branch
current), coupled Z branches, and one or two transformers with complex
ratios feeding secondary parts with their own grounds.  Some networks carry
a tag.  Values are written with 6 significant digits and the reference uses
the written values.  A draw whose matrix has a 2-norm condition number above
1e9 is drawn again.  Fixed seed.
"""

import json
import os

import numpy as np

SEED = 20261218
SIZES = [3, 3, 4, 5, 6, 8, 10, 13, 17, 24, 32, 45, 60, 80, 110, 150, 190]


def sig(x):
    return float("%.6g" % x)


def fnum(x):
    return repr(sig(x)) if x != 0 else "0"


def ctext(z, unit):
    re, im = sig(z.real), sig(z.imag)
    sign = "+" if im >= 0 else "-"
    return "(%s %s j%s) %s" % (fnum(re), sign, fnum(abs(im)), unit), complex(re, im)


class Net:
    def __init__(self, rng, tag):
        self.rng = rng
        self.tag = tag
        self.lines = []
        self.branches = []  # dicts
        self.couples = []
        self.nodes = []
        self.grounds = []
        self.count = 0

    def suffix(self):
        return "_" + self.tag if self.tag else ""

    def bname(self, prefix):
        self.count += 1
        return "%s%d" % (prefix, self.count)

    def add(self, kind, f, t, **kw):
        b = dict(kind=kind, f=f, t=t, name=self.bname(kw.pop("prefix", kind[0].lower())), **kw)
        self.branches.append(b)
        return b

    def rz(self, lo=0.2, hi=12.0):
        r = self.rng.uniform(lo, hi)
        x = self.rng.uniform(0.1, 3) * r
        return complex(r, x)


def build(rng, n, case):
    tag = ["", "", "pos", ""][case % 4]
    net = Net(rng, tag)
    numeric = case % 2 == 0
    g = "0" if numeric else "N"
    main = [g] + [(str(i) if numeric else "n%d" % i) for i in range(1, n)]
    net.grounds.append(g)
    net.nodes += main
    # spanning tree
    order = list(main[1:])
    rng.shuffle(order)
    connected = [g]
    src_nodes = set()
    zb = []
    for v in order:
        u = connected[int(rng.integers(len(connected)))]
        if u == g:
            b = net.add("source", g, v, e=complex(0), zs=net.rz(0.05, 1), prefix="g")
            mag = rng.uniform(200, 20000)
            b["e"] = mag * np.exp(1j * np.deg2rad(sig(rng.uniform(-40, 40))))
            b["polar"] = (sig(mag), None)
        else:
            b = net.add("Z", u, v, z=net.rz(), prefix="z")
            zb.append(b)
        connected.append(v)
    # meshing
    for _ in range(max(1, n // 3)):
        u, v = rng.choice(main[1:], 2, replace=True) if n > 2 else (main[1], main[-1])
        if u == v:
            continue
        b = net.add("Z", u, v, z=net.rz(), prefix="z")
        zb.append(b)
    # shunts: Y loads and capacitors, Z loads
    for v in main[1:]:
        k = rng.uniform()
        if k < 0.4:
            net.add("Y", v, g, y=complex(rng.uniform(1e-4, 1e-2), -rng.uniform(0, 5e-3)), prefix="y")
        elif k < 0.6:
            net.add("Y", v, g, y=complex(0, rng.uniform(1e-4, 5e-3)), prefix="c")
        elif k < 0.8:
            b = net.add("Z", v, g, z=net.rz(20, 400), prefix="l")
            zb.append(b)
    # an ideal source on even cases
    if case % 2 == 0 and n >= 3:
        v = main[1 + int(rng.integers(n - 1))]
        b = net.add("source", g, v, e=complex(0), zs=None, prefix="s")
        mag = rng.uniform(200, 20000)
        b["e"] = mag * np.exp(1j * np.deg2rad(sig(rng.uniform(-40, 40))))
        b["polar"] = (sig(mag), None)
        src_nodes.add(v)
    # independent current sources
    for _ in range(1 + n // 20):
        v = main[1 + int(rng.integers(n - 1))]
        net.add("current", g, v, i=complex(rng.uniform(-5, 5), rng.uniform(-5, 5)), ctrl=[], prefix="j")
    # coupled Z branches
    cand = [b for b in zb]
    rng.shuffle(cand)
    for a, b in zip(cand[0::2][: 1 + n // 15], cand[1::2][: 1 + n // 15]):
        zm = 0.3 * np.sqrt(a["z"] * b["z"])
        net.couples.append((a, b, zm))
    # controlled sources: voltage-controlled current, current-controlled current,
    # current-controlled voltage (series Z), voltage-controlled voltage (series Z)
    others = [v for v in main[1:]]
    if n >= 4:
        for kind in range(4):
            if rng.uniform() < 0.25 and n < 30:
                continue
            v1, v2 = rng.choice(others, 2, replace=False)
            ctl_node = others[int(rng.integers(len(others)))]
            ctl_br = zb[int(rng.integers(len(zb)))] if zb else None
            if kind == 0:
                net.add("current", v1, v2, i=complex(0), ctrl=[("V", ctl_node, complex(rng.uniform(1e-4, 1e-3), rng.uniform(-5e-4, 5e-4)))], prefix="vccs")
            elif kind == 1 and ctl_br:
                net.add("current", v1, g, i=complex(rng.uniform(-2, 2), 0), ctrl=[("I", ctl_br["name"], complex(rng.uniform(0.05, 0.3), 0))], prefix="cccs")
            elif kind == 2 and ctl_br:
                net.add("source", v1, v2, e=complex(0), zs=net.rz(0.5, 5), ctrl=[("I", ctl_br["name"], complex(rng.uniform(0.1, 2), rng.uniform(-0.5, 0.5)))], prefix="ccvs")
            elif kind == 3:
                net.add("source", g, v1, e=complex(0), zs=net.rz(0.5, 5), ctrl=[("V", ctl_node, complex(rng.uniform(0.05, 0.5), 0))], prefix="vcvs")
    # every node on at least two branches
    for v in main:
        if sum(1 for b in net.branches if v in (b["f"], b["t"])) < 2:
            net.add("Y", v, g if v != g else main[1], y=complex(rng.uniform(1e-4, 1e-2), 0), prefix="y")
    # transformers with secondary parts
    ntx = 1 if n < 40 else 2
    if n >= 4:
        for k in range(ntx):
            p = [v for v in main[1:] if v not in src_nodes][int(rng.integers(len([v for v in main[1:] if v not in src_nodes])))]
            gg = "g%d" % (k + 1) if not numeric else str(1000 + 100 * k)
            sec = [gg] + [("s%d_%d" % (k + 1, i) if not numeric else str(1000 + 100 * k + i)) for i in range(1, 2 + int(rng.integers(min(6, n))))]
            net.nodes += sec
            net.grounds.append(gg)
            a = rng.uniform(2, 40)
            ph = [0, -30, 30, -150, 12.5][int(rng.integers(5))]
            b = net.add("ratio", p, g, r=complex(0), f2=sec[1], t2=gg, prefix="t")
            b["r"] = sig(a) * np.exp(1j * np.deg2rad(ph))
            b["rtext"] = "%s∠%s°" % (fnum(a), fnum(ph)) if ph != 0 else fnum(a)
            # secondary: a chain from the first secondary node, with shunts
            for i in range(2, len(sec)):
                net.add("Z", sec[i - 1], sec[i], z=net.rz(0.01, 0.5), prefix="w")
            for v in sec[1:]:
                net.add("Z", v, gg, z=net.rz(1, 40), prefix="ld")
            if rng.uniform() < 0.5:
                net.add("current", gg, sec[-1], i=complex(rng.uniform(-3, 3), rng.uniform(-3, 3)), ctrl=[], prefix="j")
    return net


def text_of(net):
    lines = ["# generated by testdata/refgen/gen_network.py"]
    for gnd in net.grounds:
        lines.append("ground " + gnd)
    sfx = net.suffix()
    for b in net.branches:
        head = "%s: %s -> %s " % (b["name"], b["f"], b["t"])
        k = b["kind"]
        if k == "Z":
            s, b["z"] = ctext(b["z"], "Ω")
            lines.append(head + "Z " + s)
        elif k == "Y":
            s, b["y"] = ctext(b["y"], "S")
            lines.append(head + "Y " + s)
        elif k == "source":
            if b.get("ctrl"):
                terms = []
                for (what, ref, a) in b["ctrl"]:
                    unit = "" if what == "V" else " Ω"
                    s, aa = ctext(a, unit.strip()) if unit else (fnum(a.real), complex(sig(a.real), 0))
                    if unit:
                        terms.append("%s * I_%s%s" % (s, ref, sfx))
                    else:
                        terms.append("%s * V_%s%s" % (s, ref, sfx))
                    b.setdefault("coef", []).append((what, ref, aa))
                val = " + ".join(terms)
            else:
                mag = b["polar"][0]
                ang = sig(np.rad2deg(np.angle(b["e"])))
                b["e"] = mag * np.exp(1j * np.deg2rad(ang))
                val = "%s V∠%s°" % (fnum(mag), fnum(ang))
            if b["zs"] is not None:
                s, b["zs"] = ctext(b["zs"], "Ω")
                val += ", Z " + s
            lines.append(head + "source " + val)
        elif k == "current":
            terms = []
            if b["i"] != 0 or not b["ctrl"]:
                s, b["i"] = ctext(b["i"], "A")
                terms.append(s)
            for (what, ref, a) in b["ctrl"]:
                if what == "V":
                    s, aa = ctext(a, "S")
                    terms.append("%s * V_%s%s" % (s, ref, sfx))
                else:
                    aa = complex(sig(a.real), 0)
                    terms.append("%s * I_%s%s" % (fnum(a.real), ref, sfx))
                b.setdefault("coef", []).append((what, ref, aa))
            lines.append(head + "current " + " + ".join(terms))
        elif k == "ratio":
            lines.append(head + "ratio %s to %s -> %s" % (b["rtext"], b["f2"], b["t2"]))
    for (a, b, zm) in net.couples:
        s, zm2 = ctext(zm, "Ω")
        net.zm = getattr(net, "zm", {})
        net.zm[(a["name"], b["name"])] = zm2
        lines.append("couple %s, %s Z %s" % (a["name"], b["name"], s))
    return lines


def solve(net):
    nodes = [v for v in net.nodes if v not in net.grounds]
    ni = {v: i for i, v in enumerate(nodes)}
    nb = len(net.branches)
    bi = {b["name"]: k for k, b in enumerate(net.branches)}
    nv = len(nodes)
    m = nv + nb
    A = np.zeros((m, m), dtype=complex)
    rhs = np.zeros(m, dtype=complex)

    def vcol(v):
        return ni.get(v)

    def put(row, v, val):
        c = vcol(v)
        if c is not None:
            A[row, c] += val

    for k, b in enumerate(net.branches):
        ic = nv + k
        # KCL: leaving F, entering T
        if vcol(b["f"]) is not None:
            A[vcol(b["f"]), ic] += 1
        if vcol(b["t"]) is not None:
            A[vcol(b["t"]), ic] -= 1
        row = nv + k
        kind = b["kind"]
        if kind == "Z":
            put(row, b["f"], 1)
            put(row, b["t"], -1)
            A[row, ic] -= b["z"]
        elif kind == "Y":
            A[row, ic] += 1
            put(row, b["f"], -b["y"])
            put(row, b["t"], b["y"])
        elif kind == "source":
            put(row, b["t"], 1)
            put(row, b["f"], -1)
            if b["zs"] is not None:
                A[row, ic] += b["zs"]
            if b.get("coef"):
                for (what, ref, a) in b["coef"]:
                    if what == "V":
                        put(row, ref, -a)
                    else:
                        A[row, nv + bi[ref]] -= a
            else:
                rhs[row] = b["e"]
        elif kind == "current":
            A[row, ic] += 1
            rhs[row] = b["i"]
            for (what, ref, a) in b.get("coef", []):
                if what == "V":
                    put(row, ref, -a)
                else:
                    A[row, nv + bi[ref]] -= a
        elif kind == "ratio":
            r = b["r"]
            put(row, b["f"], 1)
            put(row, b["t"], -1)
            put(row, b["f2"], -r)
            put(row, b["t2"], r)
            if vcol(b["f2"]) is not None:
                A[vcol(b["f2"]), ic] -= np.conj(r)
            if vcol(b["t2"]) is not None:
                A[vcol(b["t2"]), ic] += np.conj(r)
    for (a, b, _) in net.couples:
        zm = net.zm[(a["name"], b["name"])]
        A[nv + bi[a["name"]], nv + bi[b["name"]]] -= zm
        A[nv + bi[b["name"]], nv + bi[a["name"]]] -= zm
    cond = np.linalg.cond(A)
    x = np.linalg.solve(A, rhs)
    V = {v: 0j for v in net.grounds}
    for v, i in ni.items():
        V[v] = x[i]
    I, S = {}, {}
    for k, b in enumerate(net.branches):
        cur = x[nv + k]
        d = V[b["f"]] - V[b["t"]]
        I[b["name"]] = cur
        S[b["name"]] = (-d if b["kind"] == "source" else d) * np.conj(cur)
    return V, I, S, cond


def pairs(d):
    return {k: [float(v.real), float(v.imag)] for k, v in d.items()}


def main():
    rng = np.random.default_rng(SEED)
    cases = []
    for case, n in enumerate(SIZES):
        while True:
            net = build(rng, n, case)
            lines = text_of(net)
            V, I, S, cond = solve(net)
            if cond < 1e9:
                break
        kinds = sorted(set(b["kind"] for b in net.branches) | ({"couple"} if net.couples else set())
                       | ({"controlled"} if any(b.get("coef") for b in net.branches) else set())
                       | ({"ideal source"} if any(b["kind"] == "source" and b["zs"] is None for b in net.branches) else set()))
        cases.append({
            "nodes": len(net.nodes),
            "tag": net.tag,
            "text": "\n".join(lines),
            "kinds": kinds,
            "V": pairs({v: V[v] for v in net.nodes if v not in net.grounds}),
            "I": pairs(I),
            "S": pairs(S),
            "cond": float(cond),
        })
    out = {"generator": "testdata/refgen/gen_network.py", "seed": SEED,
           "numpy": np.__version__, "networks": cases}
    path = os.path.join("testdata", "network", "generated.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=1, ensure_ascii=False)
        fh.write("\n")


if __name__ == "__main__":
    main()
