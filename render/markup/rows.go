package markup

import (
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// exprML returns a typesetter for a formula (subst false) or its
// substitution (subst true) in the document's names.
func (w *Writer) ExprMLFor(subst bool, trace *expr.Trace) *ExprML {
	if w.typesetters[0] == nil {
		env := w.Doc.Env
		displayOf := func(name string) *expr.Display {
			if b := env.Lookup(name); b != nil {
				return b.Display
			}
			return nil
		}
		isFunc := func(name string) bool { return env.LookupFunc(name) != nil }
		for i := range w.typesetters {
			w.typesetters[i] = &ExprML{Subst: i == 1, Digits: w.Digits(), DisplayOf: displayOf, IsFunc: isFunc, cache: w.values}
		}
	}
	// one typesetter of each kind per sheet, pointed at this trace
	m := w.typesetters[0]
	if subst {
		m = w.typesetters[1]
	}
	m.Trace = trace
	return m
}

// mathDiv writes <div class="CLASS" ATTRS><math>…</math></div> around what
// body writes, straight into the page.
func (w *Writer) MathDiv(class, attrs string, body func()) {
	w.WriteString("<div class=\"")
	w.WriteString(class)
	w.WriteString("\"")
	w.WriteString(attrs)
	w.WriteString("><math>")
	body()
	w.WriteString("</math></div>")
}

// mathRow writes a formula or substitution row: prefix (the "name =")
// and x. A row whose x has top-level terms or factors is written as one
// <math> per piece, factors grouped by term, in wrapping containers (class
// "brk"): a row too long for the column breaks before a top-level + or −,
// a term too long for a line before its ·, and the continuation is
// indented (style.go). Browsers do not break MathML by themselves.
func (w *Writer) MathRow(class, prefix string, m *ExprML, x expr.Node) {
	w.MathRowTail(class, prefix, m, x, "")
}

// mathRowTail is mathRow with HTML written after the formula (a tag).
func (w *Writer) MathRowTail(class, prefix string, m *ExprML, x expr.Node, tail string) {
	w.mathRow(class, m, x, tail, func() { w.WriteString(prefix) })
}

// mathRow is MathRowTail with the prefix written by prefix.
func (w *Writer) mathRow(class string, m *ExprML, x expr.Node, tail string, prefix func()) {
	if !m.Splits(x) {
		w.WriteString("<div class=\"")
		w.WriteString(class)
		w.WriteString("\"><math>")
		prefix()
		m.WriteNode(w, x, false)
		w.WriteString("</math>")
		w.WriteString(tail)
		w.WriteString("</div>")
		return
	}
	p := w.StartPieces(class, "")
	prefix()
	m.WritePieces(p, x)
	p.End(tail)
}

// checkRow writes a check's formula: the chain's sides, each in its
// pieces, a side after its comparison.
func (w *Writer) CheckRow(m *ExprML, c *expr.Compare) {
	p := w.StartPieces("f", "<span class=\"kindtag\">check</span> ")
	for i, x := range c.X {
		if i > 0 {
			p.Cut(Term)
			w.WriteString("<mo>")
			w.WriteString(OpML[c.Ops[i-1]])
			w.WriteString("</mo>")
		}
		m.WritePieces(p, x)
	}
	p.End("")
}

// StartPieces opens a row written in pieces: one <math> per piece in the
// wrapping container (class "brk"), the first term's factors in the row
// itself and each later term of several pieces in a box of its own, so
// that a line breaks before a + or − and, inside a term, before a · only
// when the term is longer than a line (style.go); a term of one piece is
// one <math>, which breaks as a whole without a box. Pieces.Cut ends a
// piece and starts the next, Pieces.End ends the row. A writer has one
// row in pieces at a time: StartPieces reuses it.
func (w *Writer) StartPieces(class, head string) *Pieces {
	w.WriteString("<div class=\"")
	w.WriteString(class)
	w.WriteString(" brk\">")
	w.WriteString(head)
	w.WriteString("<math>")
	w.pieces = Pieces{w: w}
	return &w.pieces
}

// Pieces is a row being written in pieces (Writer.StartPieces).
type Pieces struct {
	w      *Writer
	inTerm bool
}

// Cut ends a piece and starts the next, with what follows it.
func (p *Pieces) Cut(c Cut) {
	w := p.w
	w.WriteString("</math>")
	if c != Factor {
		if p.inTerm {
			w.WriteString("</span>")
		}
		p.inTerm = c == Term
		if p.inTerm {
			w.WriteString("<span class=\"t\">")
		}
	}
	w.WriteString("<math>")
}

// End ends the last piece and the row, with HTML after the formula.
func (p *Pieces) End(tail string) {
	w := p.w
	w.WriteString("</math>")
	if p.inTerm {
		w.WriteString("</span>")
	}
	w.WriteString(tail)
	w.WriteString("</div>")
}

// resultAttrs are the attributes of a statement's result line: its name.
// Its source line is the statement row's data-line, which the line's
// <div class="r"> leaves out (render/verify reads it from the row).
func resultAttrs(name string) string {
	return " data-value=\"" + Esc(name) + "\""
}

// resultOpen opens a statement's result line: <div data-value=NAME>
// (the stylesheet styles it as class "r", the result lines of other
// kinds).
func (w *Writer) resultOpen(name string) {
	w.WriteString("<div data-value=\"")
	w.WriteString(Esc(name))
	w.WriteString("\">")
}

// RowOpen opens the row of source line line: <div class="CLASS"
// id="LLINE" data-line="LINE">. The gutter's line number is the row's
// ::before (style.go: content: attr(data-line)), not an element.
func (w *Writer) RowOpen(class string, line int) {
	w.WriteString("<div class=\"")
	w.WriteString(class)
	w.WriteString("\" id=\"L")
	w.WriteInt(line)
	w.WriteString("\" data-line=\"")
	w.WriteInt(line)
	w.WriteString("\">")
}

// RowClose closes a row's <div class="math"> and the row, with the
// description in its cell when there is one. An empty cell is left out
// (the grid leaves its column empty), except in a wide row (wide true),
// where the cell is a grid row of its own below the working, whose 1pt
// of padding counts.
func (w *Writer) RowClose(desc string, wide bool) {
	w.WriteString("</div>")
	if desc != "" || wide {
		w.WriteString("<div class=\"desc\">")
		w.WriteString(Esc(desc))
		w.WriteString("</div>")
	}
	w.WriteString("</div>\n")
}

// writeResult writes the value of a result line, after its "=" (and
// its name), straight into the page: as writeValue, but a value that
// group would put in an <mrow> only because it opens with a bracket
// stands bare. The bracket is then no longer its mrow's first child, but
// MathML Core's operator dictionary holds "(" in the prefix form alone,
// so its spacing is the same in any place; and the line's other children
// (the "=", the name, the power factor's sense) are no taller than the
// value's, so the bracket stretches to the same size.
func (w *Writer) writeResult(m *ExprML, v expr.Value, d *expr.Display) {
	sv := m.value(v, d)
	if sv.bare || strings.HasPrefix(sv.ml, "<mo>(</mo>") && !strings.HasSuffix(sv.ml, "</mo>") {
		w.WriteString(sv.ml)
		return
	}
	w.WriteString("<mrow>")
	w.WriteString(sv.ml)
	w.WriteString("</mrow>")
}

// writeValue writes m.valueML(v, d, false) straight into the page.
func (w *Writer) writeValue(m *ExprML, v expr.Value, d *expr.Display) {
	sv := m.value(v, d)
	if sv.bare {
		w.WriteString(sv.ml)
		return
	}
	w.WriteString("<mrow>")
	w.WriteString(sv.ml)
	w.WriteString("</mrow>")
}

// hasNames reports whether an expression uses any name other than a
// constant, so that its substitution says something new.
func hasNames(n expr.Node) bool {
	found := false
	expr.Walk(n, func(n expr.Node) bool {
		switch n := n.(type) {
		case *expr.Ident:
			if !IsConstant(n.Name) {
				found = true
			}
		case *expr.Call:
			found = true
		}
		return !found
	})
	return found
}

// Stmt writes one statement row: the gutter with its source line, the
// formula, the substitution and the result, and the description.
func (w *Writer) Stmt(st *calcdoc.Stmt) {
	line := st.Stmt.Pos().Line()
	if n, ok := st.Stmt.(*expr.Note); ok {
		w.RowOpen("row note", line)
		w.Printf("<div class=\"txt\">%s</div></div>\n", Esc(n.Text))
		return
	}
	res := st.Res
	class := "row"
	wide := wideRow(res)
	if wide {
		class = "row wide" // matrices: the description goes below the working
	}
	w.RowOpen(class, line)
	w.WriteString("<div>")
	ok := len(st.Errs) == 0 && st.Unavailable == nil
	f := w.ExprMLFor(false, nil)
	s := w.ExprMLFor(true, res.Trace)
	switch x := st.Stmt.(type) {
	case *expr.Assign:
		w.mathRow("f", f, x.X, "", func() {
			for i, id := range x.Names {
				if i > 0 {
					w.WriteString("<mo>,</mo>")
				}
				w.WriteString(NameML(id.Name))
			}
			w.WriteString("<mo>=</mo>")
		})
		if ok && res.Value != nil {
			if hasNames(x.X) {
				w.MathRow("s", "<mo>=</mo>", s, x.X)
			}
			if len(x.Names) > 1 {
				w.Printf("<div data-value=\"%s\">%s</div>", Esc(joinNames(x.Names)), Math("<mo>=</mo>"+ValueML(res.Value, x.Display, w.Digits(), false)))
				if m, isM := res.Value.(*expr.Matrix); isM {
					for i, id := range x.Names {
						e := m.E[i]
						w.Printf("<div data-value=\"%s\">%s</div>", Esc(id.Name), Math(NameML(id.Name)+"<mo>=</mo>"+ValueML(&e, x.Display, w.Digits(), false)+SenseML(&e)))
					}
				}
			} else {
				disp := x.Display
				if bd := w.Doc.Env.Lookup(x.Names[0].Name); bd != nil && bd.Value == res.Value {
					disp = bd.Display
				}
				if res.Cases != nil {
					w.caseResults(x.Names[0].Name, res.Cases, disp)
				} else {
					w.resultOpen(x.Names[0].Name)
					w.WriteString("<math><mo>=</mo>")
					w.writeResult(s, res.Value, disp)
					w.WriteString(SenseML(res.Value))
					w.WriteString("</math></div>")
				}
				w.governingNote(res.Trace)
				w.KindNote(res.Value)
			}
		}
	case *expr.FuncDef:
		var ps []string
		for _, p := range x.Params {
			ps = append(ps, NameML(p.Name))
		}
		head := "<mi>" + Esc(GreekOf(x.Name.Name)) + "</mi>"
		if len([]rune(x.Name.Name)) == 1 || strings.Contains(x.Name.Name, "_") {
			head = NameML(x.Name.Name)
		}
		w.MathRowTail("f", head+"<mo>(</mo>"+strings.Join(ps, "<mo>,</mo>")+"<mo>)</mo><mo>=</mo>", f, x.Body, "<span class=\"kindtag\">function</span>")
	case *expr.Check:
		w.CheckRow(f, x.Cmp)
		if res.CaseChecks != nil && len(st.Errs) == 0 {
			w.caseChecks(res, x.Cmp, line)
		} else if ok && res.Check != nil {
			c := res.Check
			disp := checkDisplay(w, x.Cmp)
			dg := CheckRowDigits(c.Values, x.Cmp.Ops, disp, w.Digits())
			w.WriteString("<div class=\"s\" data-check=\"")
			w.WriteInt(line)
			w.WriteString("\"><math>")
			for i, v := range c.Values {
				if i > 0 {
					w.WriteString("<mo>")
					w.WriteString(OpML[x.Cmp.Ops[i-1]])
					w.WriteString("</mo>")
				}
				if dg != w.Digits() {
					w.WriteString(ValueML(v, disp, dg, false))
				} else {
					w.writeValue(s, v, disp)
				}
				w.WriteString(SenseML(v)) // as WithSense
			}
			w.WriteString("</math>")
			if c.Pass {
				w.WriteString("<span class=\"verdict pass\">satisfied</span>")
			} else {
				w.WriteString("<span class=\"verdict fail\">NOT SATISFIED</span>")
			}
			if c.HasUtil {
				w.WriteString("<span class=\"util\">utilisation ")
				w.writePercent(c.Utilisation)
				w.WriteString(" of the limit</span>")
			}
			for _, op := range x.Cmp.Ops {
				if op == expr.EQ || op == expr.NE {
					w.WriteString(" <span class=\"tol\">(equal within a relative tolerance of 1e-9)</span>")
					break
				}
			}
			w.WriteString("</div>")
		}
	case *expr.ExprStmt:
		w.MathRow("f", "", f, x.X)
		if ok && res.Value != nil {
			if hasNames(x.X) {
				w.MathRow("s", "<mo>=</mo>", s, x.X)
			}
			if res.Cases != nil {
				w.caseResults("", res.Cases, res.Display)
			} else {
				w.resultOpen("")
				w.WriteString("<math><mo>=</mo>")
				w.WriteString(ValueML(res.Value, res.Display, w.Digits(), false))
				w.WriteString(SenseML(res.Value))
				w.WriteString("</math></div>")
			}
			w.governingNote(res.Trace)
			w.KindNote(res.Value)
		}
	case *expr.BadStmt:
		w.Printf("<div class=\"f\"><code>%s</code></div>", Esc(st.Text))
	case *expr.Use:
		w.useRows(st)
	}
	if ok && res != nil {
		w.LookupRows(res.Trace)
	}
	for _, e := range st.Errs {
		w.ErrorRow(e)
	}
	if st.Unavailable != nil {
		w.UnavailableRow(st.Unavailable)
	}
	w.RowClose(st.Stmt.Desc(), wide)
}

func joinNames(ids []*expr.Ident) string {
	var s []string
	for _, id := range ids {
		s = append(s, id.Name)
	}
	return strings.Join(s, ",")
}

// percent writes a utilisation as "87.0 %" ("below 0.1 %" for less).
func percent(u float64) string {
	if u < 0.001 {
		return "below 0.1 %"
	}
	sh := expr.FormatScalar(expr.Real(u*100), nil, 3)
	return sh.A + " %"
}

// writePercent writes Esc(percent(u)) with no string made for it.
func (w *Writer) writePercent(u float64) {
	if u < 0.001 {
		w.WriteString("below 0.1 %")
		return
	}
	w.WriteString(Esc(expr.FormatScalar(expr.Real(u*100), nil, 3).A))
	w.WriteString(" %")
}

// wideRow reports whether a statement's working holds a matrix, which
// needs the full width of the page.
func wideRow(res *expr.Result) bool {
	if res == nil {
		return false
	}
	if _, ok := res.Value.(*expr.Matrix); ok {
		return true
	}
	for _, v := range res.Trace.Values() {
		if m, ok := v.(*expr.Matrix); ok && len(m.E) > 1 {
			return true
		}
	}
	return false
}

// checkDisplay is the unit both sides of a check are shown in: that of the
// first side written as a literal with a unit ("3 %", "6 kA"), else that of
// the first bare name with a display of its own; nil for the defaults.
//
// The display of a unit is made once a sheet, so that the sheet's cache of
// typeset values (keyed by the display) serves every check in that unit.
func checkDisplay(w *Writer, c *expr.Compare) *expr.Display {
	for _, x := range c.X {
		if u := expr.LiteralUnit(x); u != nil {
			return w.unitDisplay(u)
		}
	}
	for _, x := range c.X {
		if id, ok := x.(*expr.Ident); ok {
			if b := w.Doc.Env.Lookup(id.Name); b != nil && b.Display != nil && b.Display.Unit != nil {
				return w.unitDisplay(b.Display.Unit)
			}
		}
	}
	return nil
}

// unitDisplay is the display in unit u, one for each unit a sheet.
func (w *Writer) unitDisplay(u *expr.Unit) *expr.Display {
	if d, ok := w.displays[u]; ok {
		return d
	}
	d := &expr.Display{Text: u.Text, Unit: u}
	if w.displays == nil {
		w.displays = map[*expr.Unit]*expr.Display{}
	}
	w.displays[u] = d
	return d
}

// kindNote writes the words "kind not stated" under the result of a real
// power of no kind (IEEE 1459 kinds, LANGUAGE.md section 4): it is shown
// in W until its line names W, var or VA.
func (w *Writer) KindNote(v expr.Value) {
	if sc, ok := v.(*expr.Scalar); ok && sc != nil && sc.KindNotStated() {
		w.WriteString("<div class=\"s kn\"><em>kind not stated</em> (shown in W; name W, var or VA in the line)</div>")
	}
}

// LookupTexter is a table that says in a line what one of its look-ups
// took (the table kind's tables are).
type LookupTexter interface {
	LookupText(l expr.Lookup, digits int) string
}

// LookupRows writes, under a statement's working, a small line for each
// table look-up its evaluation made: the table, the key and the row (or
// the two rows of an interpolation) it took.
func (w *Writer) LookupRows(tr *expr.Trace) {
	for _, l := range tr.Lookups() {
		t, ok := w.Doc.Env.LookupTable(l.Table).(LookupTexter)
		if !ok {
			continue
		}
		w.WriteString("<div class=\"s lk\">")
		w.WriteString(Esc(t.LookupText(l, w.Digits())))
		w.WriteString("</div>")
	}
}
