package network

import (
	"fmt"
	"math"
	"strings"
	"sync"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/network/mna"
	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/expr"
	"calcdoc/render/markup"
)

// InlineSystemLimit is the largest number of unknowns whose matrix A and
// vector b are drawn in place; a larger set's non-zero entries are listed
// in the appendix at the end of the sheet (as for a solve block).
const InlineSystemLimit = 12

// drawNetwork draws a network block in the order a hand calculation is
// checked: the branches as written with their values, Kirchhoff's current
// law at every node, the equations of the sources, transformers and
// coupled branches, the matrix form, how it was solved, the node
// voltages, every branch's current and complex power, and the power
// balance.
func drawNetwork(w *markup.Writer, b *calcdoc.Block) {
	res, _ := b.Result.(*Result)
	if res == nil {
		res = &Result{Result: &mna.Result{}}
	}
	w.Printf("<div class=\"block network\" id=\"B%d\">\n", b.Pos.Line())
	w.WriteString("<div class=\"bhead\">network</div>\n")
	line := b.InfoPos.Line()
	w.Printf("<div class=\"row unk\" id=\"L%d\"><div class=\"ln\">%d</div><div><div class=\"f\"><span class=\"kindtag\">network</span>", line, line)
	if b.Arg != "" {
		w.WriteString(" <code>" + markup.Esc(b.Arg) + "</code>")
	}
	w.WriteString("</div></div><div class=\"desc\">")
	w.WriteString(markup.Esc(countText(res)))
	w.WriteString("</div></div>\n")

	// the errors of a line stand under its row of the branch table; the
	// others (of the block as a whole, or when no table is drawn) after it
	shown := map[*expr.Error]bool{}
	if res.Net != nil {
		byLine := map[int][]*expr.Error{}
		for _, e := range b.Errors {
			byLine[e.Pos.Line()] = append(byLine[e.Pos.Line()], e)
		}
		branchTable(w, res, byLine, shown)
	}
	var rest []*expr.Error
	for _, e := range b.Errors {
		if !shown[e] {
			rest = append(rest, e)
		}
	}
	if len(rest) > 0 || res.Unavailable != nil {
		partOpen(w)
		for _, e := range rest {
			w.ErrorRow(e)
		}
		if res.Unavailable != nil {
			w.UnavailableRow(res.Unavailable)
		}
		partClose(w)
	}
	if nw := res.Network; nw != nil && nw.A != nil {
		kclRows(w, nw)
		branchEquations(w, nw)
	}
	if res.Solution == nil {
		if defs := append(res.Defs(), unreadNodes(res.Result)...); len(defs) > 0 {
			partOpen(w)
			w.Printf("<p>Not solved: the %d names this block defines (%s) have no value below it.</p>", len(defs), defsText(defs))
			partClose(w)
		}
		w.WriteString("</div>\n")
		return
	}
	matrixPart(w, b, res.Network, res.Solution)
	methodPart(w, res.Network, res.Solution)
	solutionRow(w, b, res)
	branchResults(w, res)
	balancePart(w, res)
	w.WriteString("</div>\n")
}

// partOpen starts a part of the block that has no source line of its own:
// the full width of the block (as in a solve block).
func partOpen(w *markup.Writer) {
	w.WriteString("<div class=\"part\" style=\"padding: 2pt 0 2pt 11mm; border-bottom: var(--thin);\">")
}

func partClose(w *markup.Writer) { w.WriteString("</div>\n") }

// countText is the size of the set: nodes, branches, unknowns.
func countText(res *Result) string {
	if res.Net == nil {
		return ""
	}
	s := fmt.Sprintf("%d branch%s", len(res.Net.Branches), esPlural(len(res.Net.Branches)))
	if res.Topo != nil {
		s = fmt.Sprintf("%d node%s (%d ground%s), ", len(res.Topo.Nodes), markup.Plural(len(res.Topo.Nodes)), len(res.Net.Grounds), markup.Plural(len(res.Net.Grounds))) + s
	}
	if res.Network != nil && res.Network.A != nil {
		n := len(res.Network.Unknowns)
		s += fmt.Sprintf("; %d equation%s in %d complex unknown%s", n, markup.Plural(n), n, markup.Plural(n))
	}
	return s
}

func esPlural(n int) string {
	if n == 1 {
		return ""
	}
	return "es"
}

// defsText lists the defined names, the first few and a count of the rest.
func defsText(defs []mna.Def) string {
	var s []string
	for i, d := range defs {
		if i == 6 {
			s = append(s, fmt.Sprintf("and %d more", len(defs)-i))
			break
		}
		s = append(s, markup.NameHTML(d.Name))
	}
	return strings.Join(s, ", ")
}

// symbol is the name a branch's element goes by in the equations: Z_feed,
// Y_bank, E_grid (a source's voltage), J_drive (a current source's
// current), r_tx (a transformer's ratio).
func symbol(b *netlist.Branch) string {
	p := [...]string{"Z", "Y", "E", "J", "r"}[b.Element]
	return p + "_" + b.Name
}

// controlledValue reports whether a source's or current's value uses the
// network's own quantities.
func controlledValue(e mna.Element) bool { return e.Value != nil && len(e.Value.Uses) > 0 }

// branchTable lists every line of the block: the branches with from, to,
// the element, its value as written and as evaluated; the couplings and
// grounds; the notes.
func branchTable(w *markup.Writer, res *Result, errs map[int][]*expr.Error, shown map[*expr.Error]bool) {
	n, nw := res.Net, res.Network
	f := w.ExprMLFor(false, nil)
	digits := w.Digits()
	idx := map[*netlist.Branch]int{}
	for i, br := range n.Branches {
		idx[br] = i
	}
	val := func(z complex128, d expr.Dim) string {
		return markup.Math(markup.ValueML(&expr.Scalar{Z: z, Dim: d}, nil, digits, false))
	}
	partOpen(w)
	w.WriteString("<p>The branches, each current taken from FROM to TO (LANGUAGE.md section 11); the element's symbol (Z, Y; E for a source's voltage, J for a current source's current, r for a transformer's ratio) is how it is written in the equations below.</p>\n")
	w.WriteString("<div class=\"grid\"><table class=\"data branches\" style=\"white-space: nowrap;\">\n<tr><th>branch</th><th>from</th><th>to</th><th>element</th><th>as written</th><th>value</th></tr>\n")
	for _, item := range n.Lines {
		switch x := item.(type) {
		case *netlist.Note:
			w.Printf("<tr id=\"L%d\"><td colspan=\"6\">%s</td></tr>\n", x.Pos.Line(), markup.Esc(x.Text))
		case *netlist.Ground:
			w.Printf("<tr id=\"L%d\"><td></td><td colspan=\"2\">%s</td><td>ground</td><td></td><td>%s</td></tr>\n",
				x.Pos.Line(), markup.Esc(x.Node.Name), markup.Math(markup.NameML("V_"+x.Node.Name+n.Suffix())+"<mo>=</mo>"+markup.ValueML(&expr.Scalar{Dim: expr.DimVoltage}, nil, digits, false)))
		case *netlist.Couple:
			value := ""
			if nw != nil {
				if a := n.Branch(x.A); a != nil {
					for _, m := range nw.Elem[idx[a]].Mutual {
						if n.Branches[m.Branch].Key == x.BKey {
							value = val(m.Z, expr.DimImpedance)
						}
					}
				}
			}
			w.Printf("<tr id=\"L%d\"><td>%s, %s</td><td></td><td></td><td>couple %s</td><td>%s</td><td>%s</td></tr>\n",
				x.Pos.Line(), markup.Esc(x.A), markup.Esc(x.B), markup.Math(markup.NameML("Z_"+x.A+"_"+x.B)), markup.Math(f.Node(x.Value, false))+substitution(w, x.Value), value)
		case *netlist.Branch:
			i := idx[x]
			written := markup.Math(f.Node(x.Value, false))
			if nw == nil || !controlledValue(nw.Elem[i]) {
				written += substitution(w, x.Value)
			}
			value := ""
			if nw != nil {
				e := nw.Elem[i]
				switch x.Element {
				case netlist.Impedance:
					value = val(e.Z, expr.DimImpedance)
				case netlist.Admittance:
					value = val(e.Y, expr.DimAdmittance)
				case netlist.Source:
					if controlledValue(e) {
						value = "controlled"
					} else {
						value = val(e.Value.C, expr.DimVoltage)
					}
				case netlist.Current:
					if controlledValue(e) {
						value = "controlled"
					} else {
						value = val(e.Value.C, expr.DimCurrent)
					}
				case netlist.Ratio:
					value = val(e.Ratio, expr.Dim{})
				}
				if x.Element == netlist.Source && x.SeriesZ != nil {
					value += "<br>" + markup.Math(markup.NameML("Z_"+x.Name)+"<mo>=</mo>"+markup.ValueML(&expr.Scalar{Z: e.SeriesZ, Dim: expr.DimImpedance}, nil, digits, false))
				}
			}
			elemML := markup.Esc(x.Element.Word()) + " " + markup.Math(markup.NameML(symbol(x)))
			if x.Element == netlist.Source && x.SeriesZ != nil {
				written += ", Z " + markup.Math(f.Node(x.SeriesZ, false)) + substitution(w, x.SeriesZ)
				elemML += ", Z " + markup.Math(markup.NameML("Z_"+x.Name))
			}
			if x.Element == netlist.Ratio {
				written += " to " + markup.Esc(x.From2.Name) + " → " + markup.Esc(x.To2.Name)
			}
			if x.Element == netlist.Impedance && nw != nil && nw.Elem[i].Coupled {
				elemML += ", coupled"
			}
			w.Printf("<tr id=\"L%d\" title=\"%s\"><td>%s</td><td>%s</td><td>%s</td><td>%s</td><td>%s</td><td>%s</td></tr>\n",
				x.Pos.Line(), markup.Esc(x.Element.Noun()), markup.Esc(x.Name), markup.Esc(x.From.Name), markup.Esc(x.To.Name), elemML, written, value)
		}
		line := 0
		switch x := item.(type) {
		case *netlist.Note:
			line = x.Pos.Line()
		case *netlist.Ground:
			line = x.Pos.Line()
		case *netlist.Couple:
			line = x.Pos.Line()
		case *netlist.Branch:
			line = x.Pos.Line()
		}
		for _, e := range errs[line] {
			w.WriteString("<tr><td colspan=\"6\" style=\"white-space: normal; text-align: left;\">")
			w.ErrorRow(e)
			w.WriteString("</td></tr>\n")
			shown[e] = true
		}
		delete(errs, line)
	}
	w.WriteString("</table></div>\n")
	partClose(w)
}

// sci writes a small positive figure such as a backward error: "3.2e-14".
func sci(x float64) string {
	switch {
	case x == 0:
		return "0"
	case math.IsInf(x, 1):
		return "∞"
	case math.IsNaN(x):
		return "—"
	}
	return sciExponent().Replace(fmt.Sprintf("%.3g", x))
}

// sciExponent shortens the exponent of a figure: "e-05" to "e-5",
// "e+10" to "e10". Made once, on first use (a replacer of several strings
// builds tables: made on each call it cost more than the figure).
var sciExponent = sync.OnceValue(func() *strings.Replacer {
	return strings.NewReplacer("e-0", "e-", "e+0", "e", "e+", "e")
})

// substitution is an element's expression with every name replaced by its
// value, as a calc row's substitution is written, after "= " on a line of
// its own; "" when the expression is a bare name or uses none (the value
// column then says all), or cannot be evaluated.
func substitution(w *markup.Writer, x expr.Node) string {
	if x == nil {
		return ""
	}
	if _, bare := expr.Unparen(x).(*expr.Ident); bare {
		return ""
	}
	names := false
	expr.Walk(x, func(n expr.Node) bool {
		if id, ok := n.(*expr.Ident); ok && !markup.IsConstant(id.Name) {
			names = true
		}
		return !names
	})
	if !names {
		return ""
	}
	tr := &expr.Trace{}
	if _, err := w.Doc.Env.Eval(x, tr); err != nil {
		return ""
	}
	return "<br>= " + markup.Math(w.ExprMLFor(true, tr).Node(x, false))
}
