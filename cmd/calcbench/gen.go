package main

import (
	"fmt"
	"strings"
)

// Params fixes one generated calculation. The calculation document and the
// Python script are both written from it, statement for statement, so that
// the two do the same arithmetic and the same solve.
type Params struct {
	// Statements is the number of statements in the document's calc
	// blocks, the ladder's parameters and results included (checks count
	// as statements; notes, prose and the solve block's equations do not).
	Statements int
	// Nodes is the number of nodes of the network solved by the solve
	// block; 0 for a document without it.
	Nodes int
	// Mesh makes the network the meshed feeder (trunk, laterals and ties;
	// see meshBranches) instead of the ladder; Nodes must then be a
	// multiple of 5.
	Mesh bool
}

const (
	// headerStatements open the feeder schedule: V_n, Z_src, I_min.
	headerStatements = 3
	// feederStatements is the length of one feeder's group of statements.
	feederStatements = 9
	// ladderStatements are the ladder's parameters (V_s, Z_s, S_p, Z_p)
	// and results (I_in, S_in, u_end, one check).
	ladderStatements = 8
	// feedersPerBlock is the number of feeders in one calc block; prose
	// stands between the blocks.
	feedersPerBlock = 5
	// MaxStatements and MaxNodes bound what the generator writes.
	MaxStatements = 1_000_000
	MaxNodes      = 5_000
)

// Validate reports whether p describes a calculation the generator can
// write: at least the ladder's statements when there is a ladder, and at
// least the schedule's header when there are feeder statements.
func (p Params) Validate() error {
	if p.Nodes < 0 || p.Nodes > MaxNodes {
		return fmt.Errorf("nodes %d: must be 0 (no ladder) to %d", p.Nodes, MaxNodes)
	}
	if p.Statements < 1 || p.Statements > MaxStatements {
		return fmt.Errorf("statements %d: must be 1 to %d", p.Statements, MaxStatements)
	}
	if p.Mesh && (p.Nodes < 5 || p.Nodes%5 != 0) {
		return fmt.Errorf("nodes %d: a meshed feeder has 5 nodes for each trunk node (a multiple of 5, at least 5)", p.Nodes)
	}
	f := p.feederPart()
	if f < 0 {
		return fmt.Errorf("statements %d: a %d-node %s needs %d statements of its own", p.Statements, p.Nodes, p.netName(), p.netStatements())
	}
	if f > 0 && f < headerStatements {
		return fmt.Errorf("statements %d: the feeder schedule needs at least %d statements (or none)", p.Statements, headerStatements)
	}
	return nil
}

// feederPart is the number of statements of the feeder schedule.
func (p Params) feederPart() int { return p.Statements - p.netStatements() }

// netStatements is the number of statements of the network part: the
// ladder's or the meshed feeder's parameters and results, none without a
// network.
func (p Params) netStatements() int {
	switch {
	case p.Nodes == 0:
		return 0
	case p.Mesh:
		return meshStatements
	}
	return ladderStatements
}

// netName names the network in messages.
func (p Params) netName() string {
	if p.Mesh {
		return "meshed feeder"
	}
	return "ladder"
}

// shown is one value of the Python script's results table: its name, the
// unit it is shown in and that unit's size in coherent SI units, and
// whether it is shown in polar or rectangular form or as a real number.
type shown struct {
	name  string
	unit  string
	scale string // a Python float literal
	form  string // "polar", "rect" or "real"
}

// gen writes the document and the script side by side.
type gen struct {
	doc, py strings.Builder
}

// stmt writes one calc statement and its Python equivalent; show, when
// not nil, lists the value in the script's results table.
func (g *gen) stmt(calc, py string, show *shown) {
	g.doc.WriteString(calc)
	g.doc.WriteByte('\n')
	g.py.WriteString(py)
	g.py.WriteByte('\n')
	if show != nil {
		fmt.Fprintf(&g.py, "show(%q, %s, %q, %s, %q)\n", show.name, show.name, show.unit, show.scale, show.form)
	}
}

// check writes one check and its Python equivalent, which records the
// check's text and whether it holds.
func (g *gen) check(text, cond, comment string) {
	line := "check " + text
	if comment != "" {
		line += "    # " + comment
	}
	g.doc.WriteString(line + "\n")
	fmt.Fprintf(&g.py, "checks.append((%q, %s))\n", text, cond)
}

// Generate writes the calculation document (Markdown) and the Python +
// NumPy script that does the same work: the same statements, as complex
// numbers in coherent SI units, the same checks, and the same ladder
// network (or the meshed feeder of meshBranches, with Mesh) solved with numpy.linalg.solve on its nodal admittance matrix.
// The script takes the path of the HTML table it writes as its one
// argument.
//
// The feeder schedule is, for feeder k = 1, 2, ... (values of our own
// choosing; D = 20 + k mod 80, A = 10 + k mod 30, B = 25 + k mod 10):
//
//	L_k = D m                                route length
//	Z_ck = (0.727 + j0.08) Ω/km · L_k        cable impedance
//	Z_tk = Z_src + Z_ck ∥ (2·Z_ck)           loop impedance, a∥b = ab/(a+b)
//	I_fk = V_n / Z_tk                        prospective fault current
//	I_lk = A A∠−B°                           load current
//	S_k = 3·V_n·conj(I_lk)                   three-phase load power
//	dV_k = |I_lk·Z_ck| / V_n                 voltage drop
//	check |I_fk| ≥ I_min,  check dV_k ≤ 4 %
//
// after V_n = 230 V, Z_src = (0.02 + j0.05) Ω and I_min = 160 A; the
// schedule stops after exactly its share of the statements, wherever that
// falls in a feeder's group. The ladder has a source V_s = 11 kV/√3 behind
// a section Z_s = (0.05 + j0.12) Ω, then Nodes nodes, each loaded by
// Z_p = V_s²/conj(S_p) with S_p = (8 + j3) kVA and joined to the next by
// Z_s; KCL at node k reads
//
//	(V_{k−1} − V_k)/Z_s = V_k/Z_p + (V_k − V_{k+1})/Z_s
//
// (V_0 = V_s; the last node has no section beyond it), and its results are
// I_in = (V_s − V_1)/Z_s, S_in = V_s·conj(I_in), u_end = |V_N|/|V_s| and
// the check u_end ≤ 1.
func Generate(p Params) (doc, script string, err error) {
	if err := p.Validate(); err != nil {
		return "", "", err
	}
	g := &gen{}
	title := "ladder network"
	if p.Mesh {
		title = "meshed feeder"
	}
	fmt.Fprintf(&g.doc, "---\ntitle: Generated feeder schedule and %s\nproject: calcbench\nnumber: BENCH-E-%d-%d\nrevision: A\nprepared: calcbench\ndate: 2026-11-30\n---\n\n", title, p.Statements, p.Nodes)
	fmt.Fprintf(&g.py, pyHeader, p.Statements, p.Nodes)

	if f := p.feederPart(); f > 0 {
		g.doc.WriteString("# Final circuits\n\nEach feeder's fault loop and voltage drop, from the board's source impedance.\n\n```calc\n")
		g.py.WriteString("\n# Final circuits\n")
		g.stmt("V_n = 230 V                      # nominal phase voltage", "V_n = 230.0", &shown{"V_n", "V", "1.0", "real"})
		g.stmt("Z_src = (0.02 + j0.05) Ω         # source impedance at the board", "Z_src = 0.02 + 0.05j", &shown{"Z_src", "Ω", "1.0", "rect"})
		g.stmt("I_min = 160 A                    # least fault current for disconnection", "I_min = 160.0", &shown{"I_min", "A", "1.0", "real"})
		count := headerStatements
		for k := 1; count < f; k++ {
			if k > 1 && (k-1)%feedersPerBlock == 0 {
				fmt.Fprintf(&g.doc, "```\n\nFeeders %d to %d.\n\n```calc\n", k, k+feedersPerBlock-1)
			}
			d, a, bdeg := 20+k%80, 10+k%30, 25+k%10
			group := []func(){
				func() {
					g.stmt(fmt.Sprintf("L_%d = %d m                    # route length", k, d),
						fmt.Sprintf("L_%d = %d.0  # route length, m", k, d), &shown{fmt.Sprintf("L_%d", k), "m", "1.0", "real"})
				},
				func() {
					g.stmt(fmt.Sprintf("Z_c%d = (0.727 + j0.08) Ω/km * L_%d   # cable impedance", k, k),
						fmt.Sprintf("Z_c%d = (0.727 + 0.08j) / 1000 * L_%d  # cable impedance", k, k), &shown{fmt.Sprintf("Z_c%d", k), "mΩ", "1e-3", "rect"})
				},
				func() {
					g.stmt(fmt.Sprintf("Z_t%d = Z_src + Z_c%d ∥ (2 * Z_c%d)", k, k, k),
						fmt.Sprintf("Z_t%d = Z_src + par(Z_c%d, 2 * Z_c%d)", k, k, k), &shown{fmt.Sprintf("Z_t%d", k), "mΩ", "1e-3", "rect"})
				},
				func() {
					g.stmt(fmt.Sprintf("I_f%d[kA] = V_n / Z_t%d              # prospective fault current", k, k),
						fmt.Sprintf("I_f%d = V_n / Z_t%d  # prospective fault current", k, k), &shown{fmt.Sprintf("I_f%d", k), "kA", "1e3", "polar"})
				},
				func() {
					g.stmt(fmt.Sprintf("I_l%d = %d A∠-%d°", k, a, bdeg),
						fmt.Sprintf("I_l%d = cmath.rect(%d, math.radians(-%d))", k, a, bdeg), &shown{fmt.Sprintf("I_l%d", k), "A", "1.0", "polar"})
				},
				func() {
					g.stmt(fmt.Sprintf("S_%d[kVA] = 3 * V_n * conj(I_l%d)    # three-phase load", k, k),
						fmt.Sprintf("S_%d = 3 * V_n * I_l%d.conjugate()  # three-phase load", k, k), &shown{fmt.Sprintf("S_%d", k), "kVA", "1e3", "rect"})
				},
				func() {
					g.stmt(fmt.Sprintf("dV_%d[%%] = abs(I_l%d * Z_c%d) / V_n", k, k, k),
						fmt.Sprintf("dV_%d = abs(I_l%d * Z_c%d) / V_n", k, k, k), &shown{fmt.Sprintf("dV_%d", k), "%", "0.01", "real"})
				},
				func() {
					g.check(fmt.Sprintf("|I_f%d| >= I_min", k), fmt.Sprintf("abs(I_f%d) >= I_min", k), "disconnection")
				},
				func() {
					g.check(fmt.Sprintf("dV_%d <= 4 %%", k), fmt.Sprintf("dV_%d <= 0.04", k), "")
				},
			}
			for _, w := range group {
				if count >= f {
					break
				}
				w()
				count++
			}
		}
		g.doc.WriteString("```\n\n")
	}

	if p.Nodes > 0 && p.Mesh {
		g.mesh(p.Nodes)
	} else if n := p.Nodes; n > 0 {
		g.doc.WriteString("# Ladder network\n\nA radial line of equal sections, each node loaded by the same constant impedance.\n\n```calc\n")
		g.py.WriteString("\n# Ladder network\n")
		g.stmt("V_s = 11 kV / sqrt(3)            # source phase voltage", "V_s = 11e3 / math.sqrt(3)", &shown{"V_s", "kV", "1e3", "polar"})
		g.stmt("Z_s = (0.05 + j0.12) Ω           # one line section", "Z_s = 0.05 + 0.12j", &shown{"Z_s", "Ω", "1.0", "rect"})
		g.stmt("S_p = (8 + j3) kVA               # load at each node, at V_s", "S_p = 8e3 + 3e3j", &shown{"S_p", "kVA", "1e3", "rect"})
		g.stmt("Z_p = V_s^2 / conj(S_p)          # taken as a constant impedance", "Z_p = V_s**2 / S_p.conjugate()", &shown{"Z_p", "Ω", "1.0", "rect"})
		g.doc.WriteString("```\n\nKCL at each node, currents leaving on the right.\n\n```solve ")
		for k := 1; k <= n; k++ {
			if k > 1 {
				g.doc.WriteString(", ")
			}
			fmt.Fprintf(&g.doc, "V_%d[kV]", k)
		}
		g.doc.WriteString("\n")
		for k := 1; k <= n; k++ {
			prev := fmt.Sprintf("V_%d", k-1)
			if k == 1 {
				prev = "V_s"
			}
			fmt.Fprintf(&g.doc, "n_%d: (%s - V_%d)/Z_s = V_%d/Z_p", k, prev, k, k)
			if k < n {
				fmt.Fprintf(&g.doc, " + (V_%d - V_%d)/Z_s", k, k+1)
			}
			g.doc.WriteString("\n")
		}
		g.doc.WriteString("```\n\n```calc\n")
		fmt.Fprintf(&g.py, pyLadder, n)
		g.stmt("I_in[A] = (V_s - V_1)/Z_s        # current sent into the line", "I_in = (V_s - V[0]) / Z_s  # current sent into the line", &shown{"I_in", "A", "1.0", "polar"})
		g.stmt("S_in[kVA] = V_s * conj(I_in)     # power sent, one phase", "S_in = V_s * I_in.conjugate()  # power sent, one phase", &shown{"S_in", "kVA", "1e3", "rect"})
		g.stmt(fmt.Sprintf("u_end[%%] = abs(V_%d) / abs(V_s)", n), fmt.Sprintf("u_end = abs(V[%d]) / abs(V_s)", n-1), &shown{"u_end", "%", "0.01", "real"})
		g.check("u_end <= 1", "u_end <= 1", "no rise along the line")
		g.doc.WriteString("```\n")
	}
	g.py.WriteString(pyFooter)
	return g.doc.String(), g.py.String(), nil
}

// pyHeader opens the script: imports, the parallel combination, the
// results table and the formatting of a value in a unit. Arguments: the
// statement and node counts.
const pyHeader = `#!/usr/bin/python3
# Written by calcbench (cmd/calcbench) for %d statements and a %d-node
# ladder: the same calculation as its Markdown document, in Python with
# NumPy, writing an HTML table of the results. Run: python3 THIS.py OUT.html
import cmath
import html
import math
import sys

import numpy as np


def par(a, b):
    """Parallel combination a*b/(a+b)."""
    return a * b / (a + b)


rows = []    # (name, value in SI units, unit shown, its size in SI units, form)
checks = []  # (text, holds)


def show(name, value, unit, scale, form):
    rows.append((name, complex(value), unit, scale, form))


def fmt(z, scale, form):
    z = z / scale
    if form == "polar":
        return "%%.4g∠%%.2f°" %% (abs(z), math.degrees(cmath.phase(z)))
    if form == "rect":
        return "%%.4g %%s j%%.4g" %% (z.real, "-" if z.imag < 0 else "+", abs(z.imag))
    return "%%.4g" %% z.real
`

// pyLadder solves the ladder: the nodal admittance matrix Y (y_s + y_p on
// the diagonal, plus y_s but at the last node; −y_s beside it) and the
// source's injection V_s·y_s at node 1. Argument: the number of nodes.
const pyLadder = `N = %d
y_s, y_p = 1 / Z_s, 1 / Z_p
Y = np.zeros((N, N), dtype=complex)
for k in range(N):
    Y[k, k] = y_s + y_p + (y_s if k < N - 1 else 0)
    if k > 0:
        Y[k, k - 1] = -y_s
    if k < N - 1:
        Y[k, k + 1] = -y_s
b = np.zeros(N, dtype=complex)
b[0] = V_s * y_s
V = np.linalg.solve(Y, b)
for k in range(N):
    rows.append(("V_%%d" %% (k + 1), complex(V[k]), "kV", 1e3, "polar"))
`

// pyFooter writes the HTML table: one row per value (name, value shown,
// unit, real and imaginary parts in SI units at full precision) and one
// per check.
const pyFooter = `
out = ["<!DOCTYPE html>", "<html><head><meta charset=\"utf-8\"><title>Results</title></head><body>",
       "<table><thead><tr><th>name</th><th>value</th><th>unit</th><th>re (SI)</th><th>im (SI)</th></tr></thead><tbody>"]
for name, z, unit, scale, form in rows:
    out.append("<tr class=\"v\"><td>%s</td><td>%s</td><td>%s</td><td>%r</td><td>%r</td></tr>"
               % (html.escape(name), html.escape(fmt(z, scale, form)), html.escape(unit), z.real, z.imag))
out.append("</tbody></table>")
out.append("<table><thead><tr><th>check</th><th>result</th></tr></thead><tbody>")
for text, ok in checks:
    out.append("<tr class=\"c\"><td>%s</td><td>%s</td></tr>" % (html.escape(text), "holds" if ok else "FAILS"))
out.append("</tbody></table></body></html>")
with open(sys.argv[1], "w", encoding="utf-8") as f:
    f.write("\n".join(out) + "\n")
`
