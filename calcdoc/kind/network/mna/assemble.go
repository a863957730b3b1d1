// Package mna writes and solves the equations of a network block by
// modified nodal analysis (LANGUAGE.md section 11).
//
// The unknowns are the voltages of the nodes that are not grounds and the
// currents of the sources (voltage and current), transformers and coupled
// branches. The equations are Kirchhoff's current law at every node but
// the grounds (the currents leaving the node sum to zero) and one equation
// for each source, transformer and coupled branch:
//
//	source  NAME: F -> T source e, Z z:   V_T − V_F + z·I_NAME = e
//	current NAME: F -> T current i:       I_NAME = i
//	ratio   NAME: F -> T ratio r to F2 -> T2:
//	                                      V_F − V_T − r·(V_F2 − V_T2) = 0
//	coupled NAME: F -> T Z z (couple NAME, B Z z_m):
//	                                      V_F − V_T − z·I_NAME − z_m·I_B = 0
//
// with every branch current taken from FROM to TO. A Z or Y branch that
// is not coupled carries (V_F − V_T)/Z or Y·(V_F − V_T). A transformer's
// first winding carries I_NAME into FROM; its second winding gives
// conj(r)·I_NAME out at FROM2, so that the complex power into one winding
// equals the power out of the other. A controlled source's value is the
// affine model of its expression (Affine), with the quantities it uses
// written in the unknowns.
//
// The set is solved with the sparse complex LU of expr/linalg/sparse and
// accepted as a solve block's solution is: every equation, evaluated as
// written at the solution (a controlled value through the engine again),
// must have a componentwise backward error of at most AcceptTol.
package mna

import (
	"fmt"

	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/expr"
	"calcdoc/expr/linalg/sparse"
)

// UnknownKind says what an unknown is.
type UnknownKind int

// The kinds of unknowns.
const (
	NodeVoltage   UnknownKind = iota // the voltage of a node that is not a ground
	BranchCurrent                    // the current of a source, transformer or coupled branch
)

// Unknown is one unknown of the set.
type Unknown struct {
	Kind   UnknownKind
	Node   int    // NodeVoltage: the node (Topology index)
	Branch int    // BranchCurrent: the branch (Netlist.Branches index)
	Name   string // V_NODE or I_NAME, with the tag
}

// EquationKind says what an equation is.
type EquationKind int

// The kinds of equations.
const (
	KCL       EquationKind = iota // Kirchhoff's current law at a node
	SourceEq                      // a voltage source
	CurrentEq                     // a current source
	RatioEq                       // a transformer's voltage ratio
	CoupledEq                     // a coupled Z branch
)

// Equation is one row of the set (its coefficients are that row of
// Network.A, its right-hand side that entry of Network.B): what it is, and
// the node or branch it belongs to.
type Equation struct {
	Kind   EquationKind
	Node   int // KCL: the node
	Branch int // otherwise: the branch
}

// Element is a branch's evaluated element.
type Element struct {
	Z, Y    complex128 // Impedance (Z, and Y = 1/Z when not coupled), Admittance (Y)
	Value   *Affine    // Source (the voltage e), Current (the current)
	SeriesZ complex128 // Source: the series impedance (0 for none)
	Ratio   complex128 // Ratio
	Coupled bool       // Impedance: coupled, so its current is an unknown
	// Mutual lists the couplings of a coupled Z branch: the other branch
	// and the mutual impedance.
	Mutual []Mutual
}

// Mutual is one coupling of a branch.
type Mutual struct {
	Branch int
	Z      complex128
}

// Network is the assembled set of a network block.
type Network struct {
	Net  *netlist.Netlist
	Topo *netlist.Topology
	Elem []Element // by branch

	Unknowns  []Unknown
	Equations []Equation
	// NodeCol[i] is the column of node i's voltage, −1 for a ground;
	// BranchCol[b] the column of branch b's current, −1 when its current
	// is not an unknown.
	NodeCol, BranchCol []int
	A                  *sparse.Matrix
	B                  []complex128

	env *expr.Env
	nm  *names
}

// Evaluate evaluates every element of a checked netlist in env: Z in Ω,
// Y in S, source in V (its series Z in Ω), current in A, ratio a plain
// number, a mutual impedance in Ω. A source or current value may use the
// network's quantities linearly. Errors are the block's; an
// *expr.UnavailableError (a name whose definition failed above) is
// returned apart, not as a new error.
func Evaluate(n *netlist.Netlist, t *netlist.Topology, env *expr.Env) (*Network, expr.ErrorList, *expr.UnavailableError) {
	nw := &Network{Net: n, Topo: t, Elem: make([]Element, len(n.Branches)), env: env, nm: networkNames(n, t)}
	var ee evalErrs
	coupled := map[string]int{}
	for i, b := range n.Branches {
		coupled[b.Key] = i
	}
	for _, c := range n.Couples {
		a, b := coupled[c.AKey], coupled[c.BKey]
		zm, err := fixed(env, nw.nm, c.Value, expr.DimImpedance, "mutual impedance of "+c.A+" and "+c.B, "Ω")
		if err != nil {
			ee.add(err)
			continue
		}
		nw.Elem[a].Coupled, nw.Elem[b].Coupled = true, true
		nw.Elem[a].Mutual = append(nw.Elem[a].Mutual, Mutual{Branch: b, Z: zm})
		nw.Elem[b].Mutual = append(nw.Elem[b].Mutual, Mutual{Branch: a, Z: zm})
	}
	for i, b := range n.Branches {
		e := &nw.Elem[i]
		var err error
		switch b.Element {
		case netlist.Impedance:
			e.Z, err = fixed(env, nw.nm, b.Value, expr.DimImpedance, "impedance of "+b.Name, "Ω")
			if err == nil && !e.Coupled {
				if e.Z == 0 {
					err = expr.Errorf(b.Value.Pos(), "the impedance of %s is 0 Ω, a short circuit: join %s and %s into one node, or give the branch its (small) impedance", b.Name, b.From.Name, b.To.Name)
				} else {
					e.Y = 1 / e.Z
				}
			}
		case netlist.Admittance:
			e.Y, err = fixed(env, nw.nm, b.Value, expr.DimAdmittance, "admittance of "+b.Name, "S")
		case netlist.Source:
			e.Value, err = controlled(env, nw.nm, b.Value, expr.DimVoltage, "voltage of the source "+b.Name, "V")
			if err == nil && b.SeriesZ != nil {
				e.SeriesZ, err = fixed(env, nw.nm, b.SeriesZ, expr.DimImpedance, "series impedance of the source "+b.Name, "Ω")
			}
		case netlist.Current:
			e.Value, err = controlled(env, nw.nm, b.Value, expr.DimCurrent, "current of the source "+b.Name, "A")
		case netlist.Ratio:
			e.Ratio, err = fixed(env, nw.nm, b.Value, expr.Dim{}, "ratio of the transformer "+b.Name, "a plain number (a ratio of two voltages, say)")
			if err == nil && e.Ratio == 0 {
				err = expr.Errorf(b.Value.Pos(), "the ratio of the transformer %s is 0: an ideal transformer's ratio is not zero", b.Name)
			}
		}
		if err != nil {
			ee.add(err)
		}
	}
	if len(ee.errs) > 0 || ee.unavailable != nil {
		ee.errs.Sort()
		return nil, ee.errs, ee.unavailable
	}
	return nw, nil, nil
}

// Assemble writes the equations of an evaluated network into the sparse
// matrix A and the right-hand side B.
func (nw *Network) Assemble() {
	n, t := nw.Net, nw.Topo
	nw.NodeCol = make([]int, len(t.Nodes))
	nw.Unknowns, nw.Equations = nil, nil
	for i, nd := range t.Nodes {
		nw.NodeCol[i] = -1
		if t.Ground[i] {
			continue
		}
		nw.NodeCol[i] = len(nw.Unknowns)
		nw.Unknowns = append(nw.Unknowns, Unknown{Kind: NodeVoltage, Node: i, Branch: -1, Name: n.VoltageName(nd.Name)})
		nw.Equations = append(nw.Equations, Equation{Kind: KCL, Node: i, Branch: -1})
	}
	nw.BranchCol = make([]int, len(n.Branches))
	for i, b := range n.Branches {
		nw.BranchCol[i] = -1
		var k EquationKind
		switch {
		case b.Element == netlist.Source:
			k = SourceEq
		case b.Element == netlist.Current:
			k = CurrentEq
		case b.Element == netlist.Ratio:
			k = RatioEq
		case b.Element == netlist.Impedance && nw.Elem[i].Coupled:
			k = CoupledEq
		default:
			continue
		}
		nw.BranchCol[i] = len(nw.Unknowns)
		nw.Unknowns = append(nw.Unknowns, Unknown{Kind: BranchCurrent, Node: -1, Branch: i, Name: n.CurrentName(b.Name)})
		nw.Equations = append(nw.Equations, Equation{Kind: k, Node: -1, Branch: i})
	}
	size := len(nw.Unknowns)
	bl := sparse.NewBuilder(size)
	nw.B = make([]complex128, size)
	put := func(row, node int, v complex128) {
		if c := nw.NodeCol[node]; c >= 0 && row >= 0 {
			bl.Add(row, c, v)
		}
	}
	kclRow := func(node int) int { return nw.NodeCol[node] } // the KCL row of a node has its voltage's index
	// the current of branch bi from FROM to TO, as coefficients on the unknowns, added into row with factor f
	var current func(row, bi int, f complex128)
	current = func(row, bi int, f complex128) {
		b := n.Branches[bi]
		if c := nw.BranchCol[bi]; c >= 0 {
			bl.Add(row, c, f)
			return
		}
		y := nw.Elem[bi].Y
		put(row, t.Index[b.From.Key], f*y)
		put(row, t.Index[b.To.Key], -f*y)
	}
	// the affine value of a controlled element, moved to the left side with factor −1
	control := func(row int, a *Affine) {
		for k, q := range a.Uses {
			if q.Node >= 0 {
				put(row, q.Node, -a.A[k])
			} else {
				current(row, q.Branch, -a.A[k])
			}
		}
		nw.B[row] += a.C
	}
	for i, b := range n.Branches {
		from, to := t.Index[b.From.Key], t.Index[b.To.Key]
		// KCL: the branch current leaves FROM and enters TO
		if r := kclRow(from); r >= 0 {
			current(r, i, 1)
		}
		if r := kclRow(to); r >= 0 {
			current(r, i, -1)
		}
		e := &nw.Elem[i]
		row := nw.BranchCol[i]
		switch b.Element {
		case netlist.Source:
			put(row, to, 1)
			put(row, from, -1)
			if e.SeriesZ != 0 {
				bl.Add(row, row, e.SeriesZ)
			}
			control(row, e.Value)
		case netlist.Current:
			bl.Add(row, row, 1)
			control(row, e.Value)
		case netlist.Ratio:
			f2, t2 := t.Index[b.From2.Key], t.Index[b.To2.Key]
			cr := complex(real(e.Ratio), -imag(e.Ratio))
			// the second winding: conj(r)·I out at FROM2, in at TO2
			if r := kclRow(f2); r >= 0 {
				bl.Add(r, row, -cr)
			}
			if r := kclRow(t2); r >= 0 {
				bl.Add(r, row, cr)
			}
			put(row, from, 1)
			put(row, to, -1)
			put(row, f2, -e.Ratio)
			put(row, t2, e.Ratio)
		case netlist.Impedance:
			if !e.Coupled {
				continue
			}
			put(row, from, 1)
			put(row, to, -1)
			bl.Add(row, row, -e.Z)
			for _, m := range e.Mutual {
				bl.Add(row, nw.BranchCol[m.Branch], -m.Z)
			}
		}
	}
	nw.A = bl.Matrix()
}

// Describe names an unknown for messages: "V_A" or "I_feed".
func (nw *Network) Describe(col int) string { return nw.Unknowns[col].Name }

// EquationName names an equation for messages and the sheet: "KCL at B",
// "source grid".
func (nw *Network) EquationName(row int) string {
	eq := nw.Equations[row]
	if eq.Kind == KCL {
		return "KCL at node " + nw.Topo.Nodes[eq.Node].Name
	}
	b := nw.Net.Branches[eq.Branch]
	switch eq.Kind {
	case SourceEq:
		return "the source " + b.Name
	case CurrentEq:
		return "the current source " + b.Name
	case RatioEq:
		return "the transformer " + b.Name
	}
	return fmt.Sprintf("the coupled branch %s", b.Name)
}
