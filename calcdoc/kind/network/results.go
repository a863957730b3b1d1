package network

import (
	"fmt"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/network/mna"
	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/expr"
	"calcdoc/expr/linalg/sparse"
	"calcdoc/render/markup"
)

// rowDim is the dimension of an equation of the set: KCL and a current
// source's equation are in A, the others in V.
func rowDim(k mna.EquationKind) expr.Dim {
	if k == mna.KCL || k == mna.CurrentEq {
		return expr.DimCurrent
	}
	return expr.DimVoltage
}

func colDim(u mna.Unknown) expr.Dim {
	if u.Kind == mna.NodeVoltage {
		return expr.DimVoltage
	}
	return expr.DimCurrent
}

// matrixPart writes the set as A·x = b: in place up to
// InlineSystemLimit unknowns, else its non-zero entries in the appendix.
func matrixPart(w *markup.Writer, b *calcdoc.Block, nw *mna.Network, s *mna.Solution) {
	n := len(nw.Unknowns)
	line := b.InfoPos.Line()
	anchor := fmt.Sprintf("N%d", line)
	digits := w.Digits()
	intro := fmt.Sprintf("As a linear system A·x = b (complex form; A is %d×%d with %d non-zero entries; a row per equation above, in their order, a column per unknown; the entries carry their units):", n, n, s.NNZ)
	partOpen(w)
	defer partClose(w)
	if n > InlineSystemLimit {
		fmt.Fprintf(w, "<p>%s its non-zero entries and b are listed in the appendix, <a href=\"#%s\">network at line %d</a>.</p>", markup.Esc(intro), anchor, line)
		fmt.Fprintf(&w.Appendix, "<section class=\"solveapp\" id=\"%s\">\n<h3>Network at line %d: the non-zero entries of A and b</h3>\n<p>%s</p>\n", anchor, line, markup.Esc(intro))
		entryList(&w.Appendix, nw, digits)
		w.Appendix.WriteString("</section>\n")
		return
	}
	fmt.Fprintf(w, "<p>%s</p>", markup.Esc(intro))
	var sb strings.Builder
	sb.WriteString("<div class=\"grid\"><table class=\"data system\" style=\"white-space: nowrap;\">\n<tr><th>equation</th>")
	for _, u := range nw.Unknowns {
		sb.WriteString("<th>" + markup.Math(markup.NameML(u.Name)) + "</th>")
	}
	sb.WriteString("<th>b</th></tr>\n")
	cell := func(z complex128, d expr.Dim) string {
		if z == 0 {
			return "0"
		}
		return markup.Math(markup.ValueML(&expr.Scalar{Z: z, Dim: d}, nil, digits, false))
	}
	for i, eq := range nw.Equations {
		rd := rowDim(eq.Kind)
		sb.WriteString("<tr><td>" + markup.Esc(nw.EquationName(i)) + "</td>")
		for k, u := range nw.Unknowns {
			sb.WriteString("<td>" + cell(nw.A.At(i, k), rd.Div(colDim(u))) + "</td>")
		}
		sb.WriteString("<td>" + cell(nw.B[i], rd) + "</td></tr>\n")
	}
	sb.WriteString("</table></div>\n")
	w.WriteString(sb.String())
}

// entryList writes the non-zero entries of A row by row, and b's, as
// plain text (a large table).
func entryList(out markup.StringWriter, nw *mna.Network, digits int) {
	var sb strings.Builder
	sb.WriteString("<div class=\"grid\"><table class=\"data system\" style=\"white-space: nowrap;\">\n<tr><th>row</th><th>equation</th><th>column</th><th>unknown</th><th>entry of A</th></tr>\n")
	txt := func(z complex128, d expr.Dim) string {
		return markup.Esc(expr.FormatScalar(&expr.Scalar{Z: z, Dim: d}, nil, digits).String())
	}
	for i, r := range nw.A.Rows {
		rd := rowDim(nw.Equations[i].Kind)
		name := markup.Esc(nw.EquationName(i))
		for _, e := range r {
			if e.V == 0 {
				continue
			}
			u := nw.Unknowns[e.Col]
			fmt.Fprintf(&sb, "<tr><td>%d</td><td>%s</td><td>%d</td><td>%s</td><td>%s</td></tr>\n", i+1, name, e.Col+1, markup.NameHTML(u.Name), txt(e.V, rd.Div(colDim(u))))
		}
	}
	sb.WriteString("</table></div>\n<div class=\"grid\"><table class=\"data system\" style=\"white-space: nowrap;\">\n<tr><th>row</th><th>equation</th><th>b</th></tr>\n")
	for i, v := range nw.B {
		if v == 0 {
			continue
		}
		fmt.Fprintf(&sb, "<tr><td>%d</td><td>%s</td><td>%s</td></tr>\n", i+1, markup.Esc(nw.EquationName(i)), txt(v, rowDim(nw.Equations[i].Kind)))
	}
	sb.WriteString("</table></div>\n<p>Every entry of b not listed is 0.</p>\n")
	out.WriteString(sb.String())
}

// methodPart says how the set was solved and why the solution is accepted.
func methodPart(w *markup.Writer, nw *mna.Network, s *mna.Solution) {
	partOpen(w)
	n := len(nw.Unknowns)
	worst := ""
	if s.WorstEquation >= 0 {
		worst = ", at " + nw.EquationName(s.WorstEquation)
	}
	fmt.Fprintf(w, "<p class=\"method\"><strong>Linear, solved directly.</strong> The equations of a network are linear in the unknowns by construction (a controlled source is linear in what it uses). The %d×%d complex matrix, scaled by powers of two, is factorised by sparse LU: pivots in Markowitz order (fewest new entries) under threshold partial pivoting (a pivot at least %s of the largest entry of its column); A has %d non-zero entries, its factors L and U %d (fill %s). The solution is refined against the matrix as written while that lowers its backward error. Condition number estimate of the scaled matrix κ₁ = %s (accepted up to %s). Largest componentwise backward error of the equations as written at the solution: %s%s (accepted up to %s).</p>",
		n, n, sci(sparse.Threshold), s.NNZ, s.Fill, fillRatio(s), sci(s.Cond), sci(mna.CondLimit), sci(s.Backward), markup.Esc(worst), sci(mna.AcceptTol))
	partClose(w)
}

func fillRatio(s *mna.Solution) string {
	if s.NNZ == 0 {
		return "—"
	}
	return fmt.Sprintf("%.2f times the entries of A", float64(s.Fill)/float64(s.NNZ))
}

// defLines gives each defined name the line of its definition.
func defLines(res *Result) map[string]int {
	m := map[string]int{}
	for _, d := range res.Defs() {
		m[d.Name] = d.Pos.Line()
	}
	return m
}

// valueML is a defined value as the sheet shows it: in its display.
//
// A network solved per case (LANGUAGE.md section 10) shows the value in
// each case, each after its case's name; v is the first case's.
func valueML(w *markup.Writer, name string, v *expr.Scalar) string {
	var d *expr.Display
	bd := w.Doc.Env.Lookup(name)
	if bd != nil {
		d = bd.Display
	}
	if bd == nil || bd.Cases == nil {
		return markup.ValueML(v, d, w.Digits(), false)
	}
	var out string
	for k, c := range w.Doc.Front.Cases {
		if k >= len(bd.Cases) {
			break
		}
		if k > 0 {
			out += "<mtext>;\u00a0</mtext>"
		}
		out += "<mtext>" + markup.Esc(c) + ":\u00a0</mtext>"
		if bd.Cases[k] == nil {
			out += "<mtext>not solved</mtext>"
			continue
		}
		out += markup.ValueML(bd.Cases[k], d, w.Digits(), false)
	}
	return out
}

// solutionRow writes the node voltages, each a result the verifier
// compares (data-value, data-line).
func solutionRow(w *markup.Writer, b *calcdoc.Block, res *Result) {
	lines := defLines(res)
	s, t, n := res.Solution, res.Topo, res.Net
	w.Printf("<div class=\"row sol\"><div class=\"ln\">%d</div><div>", b.InfoPos.Line())
	for i, nd := range t.Nodes {
		if t.Ground[i] {
			continue
		}
		name := n.VoltageName(nd.Name)
		v := &expr.Scalar{Z: s.V[i], Dim: expr.DimVoltage}
		w.WriteString("<div class=\"r\"")
		valueCell(w, name, lines[name], v)
		w.WriteString("</div>")
	}
	w.WriteString("</div><div class=\"desc\">solution: the node voltages</div></div>\n")
}

// valueCell writes the rest of the start tag of a result (data-value,
// data-line) and its value, NAME = VALUE, straight into the page.
func valueCell(w *markup.Writer, name string, line int, v *expr.Scalar) {
	w.WriteString(" data-value=\"")
	w.WriteString(markup.Esc(name))
	w.WriteString("\" data-line=\"")
	w.WriteInt(line)
	w.WriteString("\"><math>")
	w.WriteString(markup.NameML(name))
	w.WriteString("<mo>=</mo>")
	w.WriteString(valueML(w, name, v))
	w.WriteString("</math>")
}

// branchResults writes every branch's current and complex power.
func branchResults(w *markup.Writer, res *Result) {
	lines := defLines(res)
	s, n := res.Solution, res.Net
	partOpen(w)
	w.WriteString("<p>Every branch's current I (from FROM to TO) and complex power S (apparent power, S = P + jQ): the power a Z, Y or current branch or a transformer's first winding takes in, (V<sub>FROM</sub> − V<sub>TO</sub>)·I*, and the power a source delivers at its terminals, (V<sub>TO</sub> − V<sub>FROM</sub>)·I*.</p>\n")
	w.WriteString("<div class=\"grid\"><table class=\"data currents\" style=\"white-space: nowrap;\">\n<tr><th>branch</th><th>from</th><th>to</th><th>element</th><th>current</th><th>complex power</th></tr>\n")
	seen := map[string]bool{}
	for i, br := range n.Branches {
		if seen[br.Key] {
			continue
		}
		seen[br.Key] = true
		w.WriteString("<tr>")
		in, sn := n.CurrentName(br.Name), n.PowerName(br.Name)
		iv := &expr.Scalar{Z: s.I[i], Dim: expr.DimCurrent}
		sv := &expr.Scalar{Z: s.S[i], Dim: expr.DimPower, Kind: expr.PowerApparent}
		// each cell straight into the page
		for _, t := range [...]string{br.Name, br.From.Name, br.To.Name, br.Element.Word()} {
			w.WriteString("<td>")
			w.WriteString(markup.Esc(t))
			w.WriteString("</td>")
		}
		w.WriteString("<td")
		valueCell(w, in, lines[in], iv)
		w.WriteString("</td><td")
		valueCell(w, sn, lines[sn], sv)
		w.WriteString("</td></tr>\n")
	}
	w.WriteString("</table></div>\n")
	partClose(w)
}

// balancePart writes the power balance: what the sources deliver, what
// the Z, Y and current branches take in (by element), the transformers
// listed but not summed, and the mismatch.
func balancePart(w *markup.Writer, res *Result) {
	s, n := res.Solution, res.Net
	digits := w.Digits()
	pw := func(z complex128) string {
		return markup.Math(markup.ValueML(&expr.Scalar{Z: z, Dim: expr.DimPower, Kind: expr.PowerApparent}, nil, digits, false))
	}
	partOpen(w)
	defer partClose(w)
	w.WriteString("<p>Power balance: the complex power the sources deliver equals the power the Z, Y and current branches take in (by Tellegen's theorem, at a solution that satisfies Kirchhoff's laws); transformers pass power on and are listed, not summed.</p>\n")
	w.WriteString("<div class=\"grid\"><table class=\"data balance\" style=\"white-space: nowrap;\">\n<tr><th>part</th><th>branches</th><th>complex power</th></tr>\n")
	var byElem [5]complex128
	var count [5]int
	var txs []int
	for i, br := range n.Branches {
		switch br.Element {
		case netlist.Source:
			w.Printf("<tr><td>delivered by the source %s</td><td>1</td><td>%s</td></tr>\n", markup.Esc(br.Name), pw(s.S[i]))
		case netlist.Ratio:
			txs = append(txs, i)
		default:
			byElem[br.Element] += s.S[i]
			count[br.Element]++
		}
	}
	w.Printf("<tr><th>delivered by the sources</th><td></td><td>%s</td></tr>\n", pw(s.Delivered))
	for _, el := range []netlist.Element{netlist.Impedance, netlist.Admittance, netlist.Current} {
		if count[el] == 0 {
			continue
		}
		w.Printf("<tr><td>taken by the %s branches (%s)</td><td>%d</td><td>%s</td></tr>\n", markup.Esc(el.Word()), markup.Esc(el.Noun()), count[el], pw(byElem[el]))
	}
	w.Printf("<tr><th>taken by the Z, Y and current branches</th><td></td><td>%s</td></tr>\n", pw(s.Taken))
	w.Printf("<tr><th>mismatch, delivered − taken</th><td></td><td>%s</td></tr>\n", pw(s.Mismatch))
	for _, i := range txs {
		w.Printf("<tr><td>passed on by the transformer %s (not summed)</td><td>1</td><td>%s</td></tr>\n", markup.Esc(n.Branches[i].Name), pw(s.S[i]))
	}
	w.WriteString("</table></div>\n")
	fmt.Fprintf(w, "<p>The mismatch is %s of the sum of the branches' powers in modulus (accepted up to %s).</p>", sci(s.BalanceError), sci(mna.AcceptTol))
}
