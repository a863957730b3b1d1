package main

import (
	"fmt"
	"strings"
)

// meshStatements are the meshed feeder's parameters (V_s, Z_s, Z_l, Z_t,
// S_p, Z_p) and results (I_in, S_in, u_end, one check).
const meshStatements = 10

// branch is one series element of the meshed feeder: it joins node From
// to node To (numbered from 1; From 0 is the source) through the
// impedance named Z.
type branch struct {
	From, To int
	Z        string // "Z_s", "Z_l" or "Z_t"
}

// meshBranches lists the branches of the meshed feeder of n nodes (n a
// multiple of 5), a network of our own design: a trunk of t = n/5 nodes
// (1 to t) fed from the source V_s, each trunk section Z_s; from every
// trunk node k a lateral of four nodes (t + 4(k−1) + 1 to t + 4k), each
// lateral section Z_l; and ties Z_t joining the far ends of the laterals
// of trunk nodes 5 and 15, 25 and 35, 45 and 55, ... (as far as the
// trunk reaches: five ties at 500 nodes). Every node is loaded by the
// same constant impedance Z_p. The node numbering puts a lateral's nodes
// far from its trunk node, and the ties close loops across the laterals,
// so the nodal matrix is not banded. The list holds the trunk, the
// laterals, then the ties; both the document's KCL equations and the
// script's admittance matrix are written from it.
func meshBranches(n int) []branch {
	t := n / 5
	var out []branch
	for k := 1; k <= t; k++ {
		out = append(out, branch{k - 1, k, "Z_s"})
	}
	for k := 1; k <= t; k++ {
		prev := k
		for i := 1; i <= 4; i++ {
			node := lateralNode(t, k, i)
			out = append(out, branch{prev, node, "Z_l"})
			prev = node
		}
	}
	for _, tie := range meshTies(t) {
		out = append(out, branch{lateralNode(t, tie[0], 4), lateralNode(t, tie[1], 4), "Z_t"})
	}
	return out
}

// lateralNode is the number of the i-th node (1 to 4) of the lateral
// hanging from trunk node k, in a feeder of t trunk nodes.
func lateralNode(t, k, i int) int { return t + 4*(k-1) + i }

// meshTies are the trunk nodes whose laterals' far ends a tie joins:
// (5, 15), (25, 35), (45, 55), ... while the second is a trunk node.
func meshTies(t int) [][2]int {
	var out [][2]int
	for a := 5; a+10 <= t; a += 20 {
		out = append(out, [2]int{a, a + 10})
	}
	return out
}

// mesh writes the meshed feeder of n nodes: its parameters, its solve
// block and its results into the document, and the same into the script,
// the node voltages solved with numpy.linalg.solve on the nodal
// admittance matrix (see meshBranches).
func (g *gen) mesh(n int) {
	g.doc.WriteString("# Meshed feeder\n\nA trunk with a lateral of four nodes at each trunk node, and ties between the far ends of some laterals; every node loaded by the same constant impedance.\n\n```calc\n")
	g.py.WriteString("\n# Meshed feeder\n")
	for _, s := range meshParams {
		g.stmt(s.calc, s.py, &s.show)
	}
	g.doc.WriteString("```\n\nKCL at each node: the current arriving from the source side equals the load's and the currents leaving.\n\n```solve ")
	for k := 1; k <= n; k++ {
		if k > 1 {
			g.doc.WriteString(", ")
		}
		fmt.Fprintf(&g.doc, "V_%d[kV]", k)
	}
	g.doc.WriteString("\n")
	g.doc.WriteString(meshEquations(n))
	g.doc.WriteString("```\n\n```calc\n")
	g.py.WriteString(meshMatrixPy(n))
	g.py.WriteString("V = np.linalg.solve(Y, b)\nfor k in range(N):\n    rows.append((\"V_%d\" % (k + 1), complex(V[k]), \"kV\", 1e3, \"polar\"))\n")
	g.stmt("I_in[A] = (V_s - V_1)/Z_s        # current sent into the trunk", "I_in = (V_s - V[0]) / Z_s  # current sent into the trunk", &shown{"I_in", "A", "1.0", "polar"})
	g.stmt("S_in[kVA] = V_s * conj(I_in)     # power sent, one phase", "S_in = V_s * I_in.conjugate()  # power sent, one phase", &shown{"S_in", "kVA", "1e3", "rect"})
	g.stmt(fmt.Sprintf("u_end[%%] = abs(V_%d) / abs(V_s)   # far end of the last lateral", n), fmt.Sprintf("u_end = abs(V[%d]) / abs(V_s)", n-1), &shown{"u_end", "%", "0.01", "real"})
	g.check("u_end <= 1", "u_end <= 1", "no rise along the feeder")
	g.doc.WriteString("```\n")
}

// meshParams are the meshed feeder's parameters (values of our own
// choosing), in the document and in the script.
var meshParams = []struct {
	calc, py string
	show     shown
}{
	{"V_s = 11 kV / sqrt(3)            # source phase voltage", "V_s = 11e3 / math.sqrt(3)", shown{"V_s", "kV", "1e3", "polar"}},
	{"Z_s = (0.03 + j0.08) Ω           # one trunk section", "Z_s = 0.03 + 0.08j", shown{"Z_s", "Ω", "1.0", "rect"}},
	{"Z_l = (0.12 + j0.09) Ω           # one lateral section", "Z_l = 0.12 + 0.09j", shown{"Z_l", "Ω", "1.0", "rect"}},
	{"Z_t = (0.25 + j0.2) Ω            # a tie between laterals", "Z_t = 0.25 + 0.2j", shown{"Z_t", "Ω", "1.0", "rect"}},
	{"S_p = (2.5 + j1) kVA             # load at each node, at V_s", "S_p = 2.5e3 + 1e3j", shown{"S_p", "kVA", "1e3", "rect"}},
	{"Z_p = V_s^2 / conj(S_p)          # taken as a constant impedance", "Z_p = V_s**2 / S_p.conjugate()", shown{"Z_p", "Ω", "1.0", "rect"}},
}

// meshEquations writes the solve block's equations, one a node: the
// current from the branch that feeds it (its first branch in the list,
// which comes from the source side) equals its load current plus the
// currents into every other branch at it.
func meshEquations(n int) string {
	feed := make([]branch, n+1)
	out := make([][]string, n+1)
	for _, br := range meshBranches(n) {
		if feed[br.To].Z == "" && br.Z != "Z_t" {
			feed[br.To] = br
		} else {
			out[br.To] = append(out[br.To], fmt.Sprintf("(V_%d - V_%d)/%s", br.To, br.From, br.Z))
		}
		if br.From > 0 {
			out[br.From] = append(out[br.From], fmt.Sprintf("(V_%d - V_%d)/%s", br.From, br.To, br.Z))
		}
	}
	var b strings.Builder
	for k := 1; k <= n; k++ {
		src := "V_s"
		if f := feed[k].From; f > 0 {
			src = fmt.Sprintf("V_%d", f)
		}
		fmt.Fprintf(&b, "n_%d: (%s - V_%d)/%s = V_%d/Z_p", k, src, k, feed[k].Z, k)
		for _, o := range out[k] {
			b.WriteString(" + " + o)
		}
		b.WriteString("\n")
	}
	return b.String()
}

// meshMatrixPy is the Python that builds the nodal admittance matrix Y
// and the source's injection b of the meshed feeder from its branch list
// (from, to, admittance; node 0 the source), with the load's admittance
// on every node's diagonal. It needs V_s, Z_s, Z_l, Z_t and Z_p defined,
// and defines N, Y and b.
func meshMatrixPy(n int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "N = %d\nbranches = [\n", n)
	for i, br := range meshBranches(n) {
		fmt.Fprintf(&b, "(%d, %d, %s),", br.From, br.To, br.Z)
		if i%8 == 7 {
			b.WriteString("\n")
		}
	}
	b.WriteString(`]
Y = np.zeros((N, N), dtype=complex)
b = np.zeros(N, dtype=complex)
for k in range(N):
    Y[k, k] = 1 / Z_p
for f, t, z in branches:
    y = 1 / z
    Y[t - 1, t - 1] += y
    if f == 0:
        b[t - 1] += V_s * y
    else:
        Y[f - 1, f - 1] += y
        Y[f - 1, t - 1] -= y
        Y[t - 1, f - 1] -= y
`)
	return b.String()
}
