package network

import (
	"strings"

	"calcdoc/calcdoc/kind/network/mna"
	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/render/markup"
)

// eqs typesets the equations of a network in the symbols of the branch
// table: node voltages V_NODE (a ground's is 0 and is left out), branch
// currents I_NAME, elements Z_NAME, Y_NAME, E_NAME, J_NAME, r_NAME.
type eqs struct {
	nw *mna.Network
	w  *markup.Writer
}

// v is a node's voltage, "" for a ground.
func (q eqs) v(nd netlist.Node) string {
	i := q.nw.Topo.Index[nd.Key]
	if q.nw.Topo.Ground[i] {
		return ""
	}
	return markup.NameML(q.nw.Net.VoltageName(nd.Name))
}

// diff is V_A − V_B written without brackets, a ground's term left out:
// "V_A − V_B", "V_A", "−V_B", or "0"; single reports a lone name.
func (q eqs) diff(a, b netlist.Node) (ml string, single bool) {
	va, vb := q.v(a), q.v(b)
	switch {
	case va != "" && vb != "":
		return va + "<mo>−</mo>" + vb, false
	case va != "":
		return va, true
	case vb != "":
		return "<mo>−</mo>" + vb, false
	}
	return "<mn>0</mn>", true
}

// group brackets a difference that is not a single name.
func group(ml string, single bool) string {
	if single {
		return ml
	}
	return "<mrow><mo>(</mo>" + ml + "<mo>)</mo></mrow>"
}

func (q eqs) i(bi int) string {
	return markup.NameML(q.nw.Net.CurrentName(q.nw.Net.Branches[bi].Name))
}

func sym(b *netlist.Branch) string { return markup.NameML(symbol(b)) }

// term typesets one current leaving node nd (a KCL term), with its sign:
// it returns the sign ("+" or "−") and the term without it.
func (q eqs) term(nd netlist.Node, t mna.Term) (neg bool, ml string) {
	b := q.nw.Net.Branches[t.Branch]
	other := b.To
	if t.Sign < 0 {
		other = b.From
	}
	switch t.Form {
	case mna.ByImpedance:
		d, _ := q.diff(nd, other)
		return false, "<mfrac><mrow>" + d + "</mrow><mrow>" + sym(b) + "</mrow></mfrac>"
	case mna.ByAdmittance:
		return false, sym(b) + "<mo>·</mo>" + group(q.diff(nd, other))
	case mna.ByUnknown:
		return t.Sign < 0, q.i(t.Branch)
	}
	// the second winding: conj(r)·I_NAME out at FROM2 (Sign −1), in at TO2
	return t.Sign < 0, "<msup>" + sym(b) + "<mo>*</mo></msup><mo>·</mo>" + q.i(t.Branch)
}

// sum joins signed terms: the first without a plus.
func sum(terms []string, negs []bool) string {
	var sb strings.Builder
	for k, t := range terms {
		switch {
		case negs[k]:
			sb.WriteString("<mo>−</mo>")
		case k > 0:
			sb.WriteString("<mo>+</mo>")
		}
		sb.WriteString(t)
	}
	return sb.String()
}

// eqRow writes one equation row: its line, its MathML and what it is.
func eqRow(w *markup.Writer, line int, ml, desc string) {
	w.Printf("<div class=\"row eq\"><div class=\"ln\">%d</div><div><div class=\"f\">", line)
	w.WriteString(markup.Math(ml))
	w.WriteString("</div></div><div class=\"desc\">")
	w.WriteString(markup.Esc(desc))
	w.WriteString("</div></div>\n")
}

// kclRows writes Kirchhoff's current law at every node but the grounds,
// one row per node in the order the nodes first appear: the currents
// leaving the node sum to zero. A Z branch's current is written
// (V_NODE − V_OTHER)/Z_NAME, a Y branch's Y_NAME·(V_NODE − V_OTHER), and
// the current of a source, current source, transformer or coupled branch
// as its unknown I_NAME, with the sign of its direction.
func kclRows(w *markup.Writer, nw *mna.Network) {
	q := eqs{nw: nw, w: w}
	partOpen(w)
	w.WriteString("<p>Kirchhoff's current law at every node but the grounds: the currents leaving the node sum to zero. A branch written Z or Y carries (V<sub>FROM</sub> − V<sub>TO</sub>)/Z or Y·(V<sub>FROM</sub> − V<sub>TO</sub>); the currents of sources, transformers and coupled branches are unknowns; a transformer's second winding gives r*·I out at its FROM terminal.</p>\n")
	partClose(w)
	for _, eq := range nw.Equations {
		if eq.Kind != mna.KCL {
			continue
		}
		nd := nw.Topo.Nodes[eq.Node]
		ts := nw.KCLTerms(eq.Node)
		terms, negs := make([]string, len(ts)), make([]bool, len(ts))
		for k, t := range ts {
			negs[k], terms[k] = q.term(nd, t)
		}
		eqRow(w, nd.Pos.Line(), sum(terms, negs)+"<mo>=</mo><mn>0</mn>", "KCL at node "+nd.Name)
	}
}

// branchEquations writes the equation of each source, current source,
// transformer and coupled branch, as LANGUAGE.md section 11 states it.
func branchEquations(w *markup.Writer, nw *mna.Network) {
	q := eqs{nw: nw, w: w}
	f := w.ExprMLFor(false, nil)
	for _, eq := range nw.Equations {
		if eq.Kind == mna.KCL {
			continue
		}
		b := nw.Net.Branches[eq.Branch]
		e := nw.Elem[eq.Branch]
		value := sym(b)
		if controlledValue(e) {
			value = "<mrow>" + f.Node(b.Value, false) + "</mrow>"
		}
		var ml, desc string
		switch eq.Kind {
		case mna.SourceEq:
			lhs, _ := q.diff(b.To, b.From)
			ml = lhs + "<mo>=</mo>" + value
			desc = "the source " + b.Name + ": raises " + b.To.Name + " above " + b.From.Name
			if e.SeriesZ != 0 {
				ml += "<mo>−</mo>" + markup.NameML("Z_"+b.Name) + "<mo>·</mo>" + q.i(eq.Branch)
				desc += ", less the drop in its series impedance"
			}
		case mna.CurrentEq:
			ml = q.i(eq.Branch) + "<mo>=</mo>" + value
			desc = "the current source " + b.Name
		case mna.RatioEq:
			lhs, _ := q.diff(b.From, b.To)
			ml = lhs + "<mo>=</mo>" + sym(b) + "<mo>·</mo>" + group(q.diff(b.From2, b.To2))
			desc = "the transformer " + b.Name + ": the voltage ratio of its windings"
		case mna.CoupledEq:
			lhs, _ := q.diff(b.From, b.To)
			ml = lhs + "<mo>=</mo>" + sym(b) + "<mo>·</mo>" + q.i(eq.Branch)
			for _, m := range e.Mutual {
				o := nw.Net.Branches[m.Branch]
				ml += "<mo>+</mo>" + markup.NameML(mutualSymbol(nw.Net, b, o)) + "<mo>·</mo>" + q.i(m.Branch)
			}
			desc = "the coupled branch " + b.Name
		}
		eqRow(w, b.Pos.Line(), ml, desc)
	}
}

// mutualSymbol is the symbol of the mutual impedance of two coupled
// branches, in the order of their couple line: Z_A_B.
func mutualSymbol(n *netlist.Netlist, a, b *netlist.Branch) string {
	for _, c := range n.Couples {
		if c.AKey == b.Key && c.BKey == a.Key {
			return "Z_" + c.A + "_" + c.B
		}
	}
	return "Z_" + a.Name + "_" + b.Name
}
