package mna

import (
	"math/cmplx"

	"calcdoc/calcdoc/kind/network/netlist"
)

// TermForm says how a current in a node's KCL equation is written on the
// sheet.
type TermForm int

// The forms of a KCL term.
const (
	ByImpedance     TermForm = iota // (V_FROM − V_TO) / Z, a Z branch not coupled
	ByAdmittance                    // Y·(V_FROM − V_TO)
	ByUnknown                       // I_NAME, an unknown (source, current, transformer, coupled Z)
	BySecondWinding                 // conj(ratio)·I_NAME, a transformer's second winding
)

// Term is one current in the KCL equation of a node: Sign·(the current of
// Branch in Form) leaves the node. For a branch, Sign is +1 at FROM and −1
// at TO; for a transformer's second winding, whose current conj(ratio)·I
// comes out at FROM2, −1 at FROM2 and +1 at TO2, Factor holding
// conj(ratio).
type Term struct {
	Branch int
	Sign   int
	Form   TermForm
	Factor complex128
}

// KCLTerms lists the terms of Kirchhoff's current law at a node (a
// Topology index), in the order of the branch lines: the currents leaving
// the node, which sum to zero. A ground has no equation (nil).
func (nw *Network) KCLTerms(node int) []Term {
	if nw.Topo.Ground[node] {
		return nil
	}
	key := nw.Topo.Nodes[node].Key
	var out []Term
	for i, b := range nw.Net.Branches {
		form := ByUnknown
		switch {
		case nw.BranchCol[i] >= 0:
		case b.Element == netlist.Impedance:
			form = ByImpedance
		case b.Element == netlist.Admittance:
			form = ByAdmittance
		}
		if b.From.Key == key {
			out = append(out, Term{Branch: i, Sign: 1, Form: form, Factor: 1})
		}
		if b.To.Key == key {
			out = append(out, Term{Branch: i, Sign: -1, Form: form, Factor: 1})
		}
		if b.Element == netlist.Ratio {
			cr := cmplx.Conj(nw.Elem[i].Ratio)
			if b.From2.Key == key {
				out = append(out, Term{Branch: i, Sign: -1, Form: BySecondWinding, Factor: cr})
			}
			if b.To2.Key == key {
				out = append(out, Term{Branch: i, Sign: 1, Form: BySecondWinding, Factor: cr})
			}
		}
	}
	return out
}
