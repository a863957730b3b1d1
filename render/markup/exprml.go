package markup

import (
	"strings"
	"unicode/utf8"

	"calcdoc/expr"
)

// ExprML typesets expression trees, either as written (the formula) or with
// every name replaced by its value (the substitution).
//
// Brackets are the typesetter's own: the parentheses written in the source
// are dropped, and an operand is bracketed exactly where the precedence of
// LANGUAGE.md section 3 needs it (and where two signs would meet, as in
// a·(−b)). A fraction's line and a superscript group by themselves.
type ExprML struct {
	Subst  bool
	Trace  *expr.Trace
	Digits int
	// DisplayOf returns how a name's value is shown (its definition's
	// display bracket), or nil.
	DisplayOf func(name string) *expr.Display
	// IsFunc reports whether a name is a user function (not a matrix value).
	IsFunc func(name string) bool
	// cache holds values already typeset on this sheet (a name's value is
	// shown on every line that uses it).
	cache map[valueKey]shownValue
	// last is the node substituted asked about last, with its trace and
	// answer: typesetting an operand asks for its form, whether it leads
	// with a sign and then writes it, each asking the same.
	last struct {
		n  expr.Node
		t  *expr.Trace
		s  shownValue
		ok bool
	}
}

type valueKey struct {
	v      expr.Value
	d      *expr.Display
	digits int
}

// shownValue is a value's MathML, without brackets, and its level; bare:
// it may stand among an mrow's children without an <mrow> of its own
// (group); one: it is one element.
type shownValue struct {
	ml        string
	f         form
	bare, one bool
}

// The typesetting levels, loosest first: the operators of LANGUAGE.md
// section 3, then the forms that enclose themselves. An operand whose
// typeset form is of a lower level than its place needs is bracketed.
const (
	lvCmp     = iota // a < b (check only)
	lvAdd            // a + b, a − b
	lvPar            // a ∥ b
	lvMul            // a · b
	lvUnary          // −a
	lvAngle          // a∠b
	lvPow            // a^b
	lvPostfix        // a unit, °, the conjugate star, the transpose mark
	lvSci            // a fraction, a number in powers of ten: grouped, but not a base for a mark
	lvAtom           // a name, a plain number, a call, |x|, a matrix, a bracketed group
)

// form is the level of an operand's typeset form. signed: it is a sign or
// a negative value (see leadSign for the rest); after: the level of what
// follows that sign.
// (The levels are small numbers: int8 keeps a typeset value in the
// sheet's cache, one a value of the document, small.)
type form struct {
	lv     int8
	signed bool
	after  int8
}

// stringWriter is what typesetting writes into: a strings.Builder or the
// page's bytes.Buffer.
type StringWriter interface {
	WriteString(s string) (int, error)
}

// WriteNode typesets n straight into b. paren asks for brackets when n
// does not stand as a single operand (inside a product, a power, ...).
func (m *ExprML) WriteNode(b StringWriter, n expr.Node, paren bool) {
	if paren {
		m.operand(b, n, lvAngle, true)
		return
	}
	m.write(b, n)
}

// value typesets a value through the sheet's cache.
func (m *ExprML) value(v expr.Value, d *expr.Display) shownValue {
	k := valueKey{v, d, m.Digits}
	if m.cache != nil {
		if s, ok := m.cache[k]; ok {
			return s
		}
	}
	var s shownValue
	switch x := v.(type) {
	case *expr.Scalar:
		sh := expr.FormatScalar(x, d, m.Digits)
		s = shownValue{ml: shownML(sh), f: shownForm(sh)}
	default:
		s = shownValue{ml: ValueML(v, d, m.Digits, false), f: form{lv: lvAtom, after: lvAtom}}
	}
	s.bare, s.one = bare(s.ml), single(s.ml)
	if m.cache != nil {
		m.cache[k] = s
	}
	return s
}

// valueML is a value's MathML, bracketed when paren asks and it is not a
// single operand.
func (m *ExprML) valueML(v expr.Value, d *expr.Display, paren bool) string {
	s := m.value(v, d)
	if paren && (s.f.lv < lvPostfix || s.f.signed) {
		return "<mrow><mo>(</mo>" + s.ml + "<mo>)</mo></mrow>"
	}
	if s.bare {
		return s.ml
	}
	return "<mrow>" + s.ml + "</mrow>"
}

var OpML = map[expr.Kind]string{
	expr.ADD: "+", expr.SUB: "−", expr.MUL: "·", expr.PAR: "∥", expr.ANGLE: "∠",
	expr.LT: "&lt;", expr.LE: "≤", expr.GT: "&gt;", expr.GE: "≥", expr.EQ: "=", expr.NE: "≠",
}

// Node typesets n (see WriteNode).
func (m *ExprML) Node(n expr.Node, paren bool) string {
	var b strings.Builder
	b.Grow(256)
	m.WriteNode(&b, n, paren)
	return b.String()
}

// substituted returns the value shown in place of n on a substitution row.
func (m *ExprML) substituted(n expr.Node) (shownValue, bool) {
	if !m.Subst {
		return shownValue{}, false
	}
	if n == m.last.n && m.Trace == m.last.t {
		return m.last.s, m.last.ok
	}
	s, ok := m.substitute(n)
	m.last.n, m.last.t, m.last.s, m.last.ok = n, m.Trace, s, ok
	return s, ok
}

// substitute is substituted without its memory of the last node.
func (m *ExprML) substitute(n expr.Node) (shownValue, bool) {
	switch n := n.(type) {
	case *expr.Ident:
		if v, ok := m.Trace.Value(n); ok && !IsConstant(n.Name) {
			var d *expr.Display
			if m.DisplayOf != nil {
				d = m.DisplayOf(n.Name)
			}
			return m.value(v, d), true
		}
	case *expr.Call:
		if !expr.IsBuiltin(n.Fun.Name) && (m.IsFunc == nil || !m.IsFunc(n.Fun.Name)) {
			// an entry of a matrix value M(i, j) shows the picked value
			if v, ok := m.Trace.Value(n); ok {
				return m.value(v, nil), true
			}
		}
	}
	return shownValue{}, false
}

// form returns the level of n's typeset form.
func (m *ExprML) form(n expr.Node) form {
	n = expr.Unparen(n)
	if s, ok := m.substituted(n); ok {
		return s.f
	}
	atom := form{lv: lvAtom, after: lvAtom}
	switch n := n.(type) {
	case *expr.Number:
		if strings.ContainsAny(n.Text, "eE") {
			return form{lv: lvSci, after: lvSci}
		}
		return atom
	case *expr.WithUnit:
		if _, ok := liftedAngle(n); ok {
			return form{lv: lvAngle, after: lvAngle}
		}
		return form{lv: lvPostfix, after: lvPostfix}
	case *expr.Unary:
		after := m.form(n.X).lv
		if after < lvUnary || m.leadSign(n.X) {
			after = lvAtom // the operand is bracketed
		}
		return form{lv: lvUnary, signed: true, after: after}
	case *expr.Binary:
		lv := binLevel(n.Op)
		return form{lv: int8(lv), after: int8(lv)}
	case *expr.Call:
		if len(n.Args) == 1 && (n.Fun.Name == "conj" || n.Fun.Name == "transpose") {
			return form{lv: lvPostfix, after: lvPostfix}
		}
		return atom
	case *expr.Compare:
		return form{lv: lvCmp}
	}
	return atom
}

func binLevel(op expr.Kind) int {
	switch op {
	case expr.ADD, expr.SUB:
		return lvAdd
	case expr.PAR:
		return lvPar
	case expr.MUL:
		return lvMul
	case expr.ANGLE:
		return lvAngle
	case expr.POW:
		return lvPow
	}
	return lvSci // DIV: a fraction
}

// leadSign reports whether n's typeset form starts with a sign: a sign,
// a negative value, or an operation whose unbracketed left operand does.
// (Form leaves this out for operations, so that typesetting a long chain
// stays linear: only a place that refuses a sign asks.)
func (m *ExprML) leadSign(n expr.Node) bool {
	for {
		n = expr.Unparen(n)
		if s, ok := m.substituted(n); ok {
			return s.f.signed
		}
		switch x := n.(type) {
		case *expr.Unary:
			return true
		case *expr.WithUnit:
			a, ok := liftedAngle(x)
			if !ok {
				return false
			}
			n = a
		case *expr.Binary:
			if binLevel(x.Op) > lvAngle || int(m.form(x.X).lv) < m.leftNeed(x.Op) {
				return false // a power's base, a fraction, a bracketed left operand
			}
			n = x.X
		default:
			return false
		}
	}
}

// leftNeed is the level the left operand of op needs.
func (m *ExprML) leftNeed(op expr.Kind) int {
	switch op {
	case expr.ADD, expr.SUB:
		return lvAdd
	case expr.PAR:
		return lvPar
	case expr.MUL:
		return lvMul
	case expr.ANGLE:
		return lvAngle
	}
	return lvAtom
}

// rightNeed is the level the right operand of op needs; a sign there is
// bracketed (a · (−b)) except right of ∠, where a signed power may stand.
func rightNeed(op expr.Kind) int {
	switch op {
	case expr.ADD, expr.SUB:
		return lvPar
	case expr.PAR:
		return lvMul
	case expr.MUL:
		return lvUnary
	}
	return lvPow
}

// operand writes n where a form of level need stands among an mrow's
// children, bracketed when its own form is looser, or when it starts with
// a sign and noSign is set.
func (m *ExprML) operand(b StringWriter, n expr.Node, need int, noSign bool) {
	f := m.form(n)
	if int(f.lv) < need || noSign && m.leadSign(n) {
		b.WriteString("<mrow><mo>(</mo>")
		m.write(b, n)
		b.WriteString("<mo>)</mo></mrow>")
		return
	}
	m.write(b, n)
}

// operandOne is operand where MathML takes exactly one element (the base
// of a <msup>): what write puts as several is grouped in an <mrow>.
func (m *ExprML) operandOne(b StringWriter, n expr.Node, need int, noSign bool) {
	f := m.form(n)
	if int(f.lv) < need || noSign && m.leadSign(n) {
		m.operand(b, n, need, noSign)
		return
	}
	m.one(b, n)
}

// one writes n as exactly one element: in an <mrow> when write puts it as
// several (the slots of <mfrac> and <msup>).
func (m *ExprML) one(b StringWriter, n expr.Node) {
	if !m.several(n) {
		m.write(b, n)
		return
	}
	b.WriteString("<mrow>")
	m.write(b, n)
	b.WriteString("</mrow>")
}

// several reports whether write puts n as more than one element.
func (m *ExprML) several(n expr.Node) bool {
	n = expr.Unparen(n)
	if s, ok := m.substituted(n); ok {
		return s.bare && !s.one
	}
	switch n := n.(type) {
	case *expr.Number:
		return n.Imag || strings.ContainsAny(n.Text, "eE")
	case *expr.WithUnit:
		return n.Unit.Text != "°"
	case *expr.Binary:
		return n.Op != expr.DIV && n.Op != expr.POW
	case *expr.Compare:
		return len(n.X) > 1
	}
	return false
}

// signedOperand writes the right operand of ∠, which may carry one sign
// before a power (230 V∠−120°).
func (m *ExprML) signedOperand(b StringWriter, n expr.Node) {
	if unitAfterAngleUnit(n) {
		// a∠(3° A): without brackets the unit would be the phasor's
		m.operand(b, n, lvAtom, true)
		return
	}
	f := m.form(n)
	if f.signed && f.lv == lvUnary && f.after >= lvPow {
		m.write(b, n)
		return
	}
	m.operand(b, n, lvPow, true)
}

// liftedAngle reports whether a unit stands after a phasor "m∠a° A" as the
// parser reads it: the angle's right operand, under its signs, ends with an
// angle unit, so that the unit may be written after it without brackets.
func liftedAngle(n *expr.WithUnit) (expr.Node, bool) {
	if n.Unit.Angle {
		return nil, false
	}
	a, ok := expr.Unparen(n.X).(*expr.Binary)
	if !ok || a.Op != expr.ANGLE {
		return nil, false
	}
	y := expr.Unparen(a.Y)
	for {
		u, ok := y.(*expr.Unary)
		if !ok {
			break
		}
		y = expr.Unparen(u.X)
	}
	if w, ok := y.(*expr.WithUnit); ok && w.Unit.Angle {
		return a, true
	}
	return nil, false
}

// unitAfterAngleUnit reports whether n, under its signs, is a unit after
// an angle unit (3° A), which right of ∠ the parser would read as the
// phasor's unit.
func unitAfterAngleUnit(n expr.Node) bool {
	n = expr.Unparen(n)
	for {
		u, ok := n.(*expr.Unary)
		if !ok {
			break
		}
		n = expr.Unparen(u.X)
	}
	w, ok := n.(*expr.WithUnit)
	if !ok || w.Unit.Angle {
		return false
	}
	in, ok := expr.Unparen(w.X).(*expr.WithUnit)
	return ok && in.Unit.Angle
}

// write typesets n without brackets around it.
func (m *ExprML) write(b StringWriter, n expr.Node) {
	n = expr.Unparen(n)
	if s, ok := m.substituted(n); ok {
		if s.bare {
			b.WriteString(s.ml)
			return
		}
		b.WriteString("<mrow>")
		b.WriteString(s.ml)
		b.WriteString("</mrow>")
		return
	}
	switch n := n.(type) {
	case *expr.Number:
		if n.Imag {
			b.WriteString("<mi>j</mi>")
			writeNumLiteral(b, strings.TrimPrefix(n.Text, "j"))
			return
		}
		writeNumLiteral(b, n.Text)
	case *expr.Ident:
		if n.Name == "pi" {
			b.WriteString("<mi>π</mi>")
			return
		}
		if _, _, ok := n.Column(); ok {
			b.WriteString(ColumnML(n))
			return
		}
		b.WriteString(NameML(n.Name))
	case *expr.WithUnit:
		// a unit stands after its number with no mrow around the two
		// (a value with a unit starts and ends with no operator); the
		// degree mark, an operator, keeps it
		deg := n.Unit.Text == "°"
		if deg {
			b.WriteString("<mrow>")
		}
		if a, ok := liftedAngle(n); ok {
			m.write(b, a)
		} else {
			m.operand(b, n.X, lvPow, true)
		}
		b.WriteString(UnitML(n.Unit.Text))
		if deg {
			b.WriteString("</mrow>")
		}
	case *expr.Unary:
		if n.Op == expr.ADD {
			b.WriteString("<mrow><mo>+</mo>")
		} else {
			b.WriteString("<mrow><mo>−</mo>")
		}
		m.operand(b, n.X, lvUnary, true)
		b.WriteString("</mrow>")
	case *expr.Abs:
		b.WriteString("<mrow><mo>|</mo>")
		m.write(b, n.X)
		b.WriteString("<mo>|</mo></mrow>")
	case *expr.Binary:
		switch n.Op {
		case expr.DIV:
			b.WriteString("<mfrac>")
			m.one(b, n.X)
			m.one(b, n.Y)
			b.WriteString("</mfrac>")
			return
		case expr.POW:
			b.WriteString("<msup>")
			m.operandOne(b, n.X, lvAtom, true)
			m.one(b, n.Y)
			b.WriteString("</msup>")
			return
		}
		// an operation's operands and operator stand among the children
		// of the mrow around it (no mrow of its own: no operand starts or
		// ends with a bare operator, so the operator stays infix, and
		// none of + − · ∥ ∠ stretches)
		m.operand(b, n.X, m.leftNeed(n.Op), false)
		b.WriteString("<mo>")
		b.WriteString(OpML[n.Op])
		b.WriteString("</mo>")
		if n.Op == expr.ANGLE {
			m.signedOperand(b, n.Y)
		} else {
			m.operand(b, n.Y, rightNeed(n.Op), true)
		}
	case *expr.Call:
		m.call(b, n)
	case *expr.MatrixLit:
		b.WriteString("<mrow><mo>[</mo><mtable>")
		for _, row := range n.Rows {
			b.WriteString("<mtr>")
			for _, e := range row {
				b.WriteString("<mtd>")
				m.write(b, e)
				b.WriteString("</mtd>")
			}
			b.WriteString("</mtr>")
		}
		b.WriteString("</mtable><mo>]</mo></mrow>")
	case *expr.CaseLit:
		// {max: a, min: b}: each case's name, then its value
		b.WriteString("<mrow><mo>{</mo>")
		for i, x := range n.X {
			if i > 0 {
				b.WriteString("<mo>,</mo>")
			}
			b.WriteString("<mtext>" + Esc(n.Names[i].Name) + ":\u00a0</mtext>")
			m.write(b, x)
		}
		b.WriteString("<mo>}</mo></mrow>")
	case *expr.Compare:
		for i, x := range n.X {
			if i > 0 {
				b.WriteString("<mo>")
				b.WriteString(OpML[n.Ops[i-1]])
				b.WriteString("</mo>")
			}
			m.write(b, x)
		}
	default:
		b.WriteString("<merror><mtext>?</mtext></merror>")
	}
}

// Splits reports whether n is typeset in more than one piece by
// WritePieces: its top is a sum, a difference or a product.
func (m *ExprML) Splits(n expr.Node) bool {
	n = expr.Unparen(n)
	if _, subst := m.substituted(n); subst {
		return false
	}
	bin, ok := n.(*expr.Binary)
	return ok && (bin.Op == expr.ADD || bin.Op == expr.SUB || bin.Op == expr.MUL)
}

// A Cut is what follows a cut between two pieces of a row (WritePieces,
// Writer.StartPieces).
type Cut int

const (
	// Factor: the next factor of the term, after its ·
	Factor Cut = iota
	// Term: a term, after its + or − (or a side after its = or ≤), that
	// may break into more pieces: it gets a box of its own
	Term
	// WholeTerm: a term of one piece, which needs no box (one <math>
	// breaks as a whole)
	WholeTerm
)

// WritePieces typesets n into the row p as the pieces a long row may
// break between: its top-level terms, each after its + or −, and within
// each term its factors, each after its ·. Between two pieces it calls
// p.Cut with what follows. Joined, the pieces are n's MathML.
func (m *ExprML) WritePieces(p *Pieces, n expr.Node) {
	pc := piecer{m: m, b: p.w, row: p}
	pc.terms(n)
}

// piecer writes the pieces of one formula (WritePieces).
type piecer struct {
	m   *ExprML
	b   *Writer
	row *Pieces
}

func (p *piecer) cut(c Cut) { p.row.Cut(c) }

// terms writes n's top-level terms, each after its + or −.
func (p *piecer) terms(n expr.Node) {
	m := p.m
	bin, isBin := expr.Unparen(n).(*expr.Binary)
	_, subst := m.substituted(expr.Unparen(n))
	if !isBin || subst || bin.Op != expr.ADD && bin.Op != expr.SUB {
		p.factors(n, lvAdd, false)
		return
	}
	p.terms(bin.X)
	if m.splitsFactors(bin.Y, lvPar, true) {
		p.cut(Term)
	} else {
		p.cut(WholeTerm)
	}
	// + and − have a prefix form too, which the first child of a <math>
	// would take
	p.b.WriteString("<mo form=\"infix\">")
	p.b.WriteString(OpML[bin.Op])
	p.b.WriteString("</mo>")
	p.factors(bin.Y, lvPar, true)
}

// factors writes the factors of a term that stands unbracketed at level
// need, each after its ·.
func (p *piecer) factors(n expr.Node, need int, noSign bool) {
	m := p.m
	if !m.splitsFactors(n, need, noSign) {
		m.operand(p.b, n, need, noSign)
		return
	}
	bin := expr.Unparen(n).(*expr.Binary)
	p.factors(bin.X, lvMul, false)
	p.cut(Factor)
	// "·" is an infix operator only (MathML Core's operator dictionary):
	// first in its <math> it needs no form="infix"
	p.b.WriteString("<mo>·</mo>")
	m.operand(p.b, bin.Y, lvUnary, true)
}

// splitsFactors reports whether WritePieces writes n, a term standing at
// level need, as its factors in pieces.
func (m *ExprML) splitsFactors(n expr.Node, need int, noSign bool) bool {
	bin, isBin := expr.Unparen(n).(*expr.Binary)
	if !isBin || bin.Op != expr.MUL {
		return false
	}
	if _, subst := m.substituted(expr.Unparen(n)); subst {
		return false
	}
	return int(m.form(n).lv) >= need && !(noSign && m.leadSign(n))
}

func IsConstant(name string) bool { return name == "pi" || name == "π" || name == "j" }

// writeNumLiteral writes a number as the source writes it, 1.2e-5 as
// 1.2×10⁻⁵.
func writeNumLiteral(b StringWriter, text string) {
	b.WriteString("<mn>")
	m, e, ok := strings.Cut(text, "e")
	if !ok {
		m, e, ok = strings.Cut(text, "E")
	}
	b.WriteString(Esc(m))
	b.WriteString("</mn>")
	if !ok {
		return
	}
	e = strings.TrimPrefix(e, "+")
	b.WriteString("<mo>×</mo><msup><mn>10</mn><mn>")
	if rest, neg := strings.CutPrefix(e, "-"); neg {
		b.WriteString("−")
		e = rest
	}
	b.WriteString(Esc(e))
	b.WriteString("</mn></msup>")
}

func (m *ExprML) call(b StringWriter, n *expr.Call) {
	if len(n.Args) == 1 {
		switch n.Fun.Name {
		case "sqrt":
			b.WriteString("<msqrt>")
			m.write(b, n.Args[0])
			b.WriteString("</msqrt>")
			return
		case "conj", "transpose":
			// a postfix mark: the conjugate star, the transpose T
			b.WriteString("<msup>")
			m.operandOne(b, n.Args[0], lvAtom, true)
			if n.Fun.Name == "conj" {
				b.WriteString("<mo>*</mo></msup>")
			} else {
				b.WriteString("<mi mathvariant=\"normal\">T</mi></msup>")
			}
			return
		case "abs":
			b.WriteString("<mrow><mo>|</mo>")
			m.write(b, n.Args[0])
			b.WriteString("<mo>|</mo></mrow>")
			return
		}
	}
	b.WriteString("<mrow>")
	name := n.Fun.Name
	if _, _, ok := n.Fun.Column(); ok {
		b.WriteString(ColumnML(n.Fun))
	} else if strings.Contains(name, "_") || utf8.RuneCountInString(name) == 1 {
		b.WriteString(NameML(name))
	} else {
		b.WriteString("<mi>")
		b.WriteString(Esc(GreekOf(name)))
		b.WriteString("</mi>")
	}
	b.WriteString("<mo>(</mo>")
	for i, a := range n.Args {
		if i > 0 {
			b.WriteString("<mo>,</mo>")
		}
		m.write(b, a)
	}
	b.WriteString("<mo>)</mo></mrow>")
}

// ColumnML typesets a column of a table, cu.R_20: the table's name in
// upright letters, a dot, and the column as a name with its subscripts.
func ColumnML(n *expr.Ident) string {
	tab, col, _ := n.Column()
	return "<mrow class=\"tcol\"><mtext>" + Esc(tab) + "</mtext><mo>.</mo>" + NameML(col) + "</mrow>"
}
