package render

import (
	"html"
	"strings"
	"sync"
	"sync/atomic"
	"unicode/utf8"

	"calcdoc/expr"
)

// greek maps spelled Greek names to their letters.
var greek = map[string]string{
	"alpha": "α", "beta": "β", "gamma": "γ", "delta": "δ", "epsilon": "ε", "zeta": "ζ",
	"eta": "η", "theta": "θ", "iota": "ι", "kappa": "κ", "lambda": "λ", "mu": "μ",
	"nu": "ν", "xi": "ξ", "pi": "π", "rho": "ρ", "sigma": "σ", "tau": "τ",
	"upsilon": "υ", "phi": "φ", "chi": "χ", "psi": "ψ", "omega": "ω",
	"Gamma": "Γ", "Delta": "Δ", "Theta": "Θ", "Lambda": "Λ", "Xi": "Ξ", "Pi": "Π",
	"Sigma": "Σ", "Phi": "Φ", "Psi": "Ψ", "Omega": "Ω",
}

func greekOf(s string) string {
	if g, ok := greek[s]; ok {
		return g
	}
	return s
}

func esc(s string) string { return html.EscapeString(s) }

// NameML typesets a name: the first "_" starts a subscript, spelled Greek
// names become letters.
func NameML(name string) string {
	if v, ok := nameCache.Load(name); ok {
		return v.(string)
	}
	out := nameML(name)
	if cacheSize.Add(1) < maxCached {
		nameCache.Store(name, out)
	}
	return out
}

// Typeset names and units are kept: a sheet writes the same few many
// times. The caches are bounded, for a long-running preview.
var (
	nameCache, unitCache sync.Map
	cacheSize            atomic.Int64
)

const maxCached = 50000

func nameML(name string) string {
	base, sub, hasSub := strings.Cut(name, "_")
	b := "<mi>" + esc(greekOf(base)) + "</mi>"
	if !hasSub || sub == "" {
		return b
	}
	parts := strings.Split(sub, "_")
	for i, p := range parts {
		parts[i] = greekOf(p)
	}
	return "<msub>" + b + "<mi>" + esc(strings.Join(parts, ",")) + "</mi></msub>"
}

// NameHTML writes a name as HTML text with a <sub> subscript.
func NameHTML(name string) string {
	base, sub, hasSub := strings.Cut(name, "_")
	b := esc(greekOf(base))
	if !hasSub || sub == "" {
		return "<var>" + b + "</var>"
	}
	parts := strings.Split(sub, "_")
	for i, p := range parts {
		parts[i] = greekOf(p)
	}
	return "<var>" + b + "<sub>" + esc(strings.Join(parts, ",")) + "</sub></var>"
}

// numML typesets a number written by the formatter: "-" becomes a minus
// sign and "1.2e-5" becomes 1.2×10⁻⁵.
func numML(s string) string {
	neg := strings.HasPrefix(s, "-")
	if neg {
		s = s[1:]
	}
	var out string
	if m, e, ok := strings.Cut(s, "e"); ok {
		e = strings.Replace(e, "-", "−", 1)
		out = "<mn>" + esc(m) + "</mn><mo>×</mo><msup><mn>10</mn><mn>" + esc(e) + "</mn></msup>"
	} else {
		out = "<mn>" + esc(s) + "</mn>"
	}
	if neg {
		// the sign belongs to the number: no operator spacing
		return strings.Replace(out, "<mn>", "<mn>−", 1)
	}
	return out
}

// unitText writes a unit for display: "mm^2" becomes "mm²", "*" becomes "·".
var unitReplacer = strings.NewReplacer("^2", "²", "^3", "³", "^-1", "⁻¹", "^-2", "⁻²", "^-3", "⁻³", "*", "·")

func unitText(u string) string {
	u = unitReplacer.Replace(u)
	// an ASCII "u" prefix reads as µ
	if len(u) > 1 && u[0] == 'u' && u != "unit" {
		u = "µ" + u[1:]
	}
	return u
}

func unitML(u string) string {
	if v, ok := unitCache.Load(u); ok {
		return v.(string)
	}
	out := unitML1(u)
	if cacheSize.Add(1) < maxCached {
		unitCache.Store(u, out)
	}
	return out
}

func unitML1(u string) string {
	if u == "" {
		return ""
	}
	if u == "°" {
		return "<mo>°</mo>"
	}
	return "<mspace width=\"0.25em\"/><mi mathvariant=\"normal\">" + esc(unitText(u)) + "</mi>"
}

// ShownML typesets a shown value. paren wraps a rectangular value with a
// unit, or a polar one, in parentheses (inside a larger formula).
func ShownML(s expr.Shown, paren bool) string {
	var num string
	switch s.Kind {
	case expr.ShownReal:
		num = numML(s.A)
	case expr.ShownPolar:
		num = numML(s.A) + "<mo>∠</mo>" + numML(s.B) + "<mo>°</mo>"
	case expr.ShownRect:
		im := s.B
		op := "+"
		if strings.HasPrefix(im, "-") {
			op, im = "−", im[1:]
		}
		if s.A == "" {
			if op == "−" {
				num = "<mo>−</mo>"
			}
			num += "<mi>j</mi>" + numML(im)
		} else {
			num = numML(s.A) + "<mo>" + op + "</mo><mi>j</mi>" + numML(im)
		}
		if s.Unit != "" && s.A != "" {
			num = "<mo>(</mo>" + num + "<mo>)</mo>"
		}
	}
	out := num + unitML(s.Unit)
	if paren && (s.Kind == expr.ShownPolar || s.Kind == expr.ShownRect && (s.A != "" && s.Unit == "" || s.A == "") || s.Kind == expr.ShownReal && strings.HasPrefix(s.A, "-")) {
		out = "<mo>(</mo>" + out + "<mo>)</mo>"
	}
	return "<mrow>" + out + "</mrow>"
}

// ValueML typesets any value: a scalar, or a matrix as a bracketed grid.
func ValueML(v expr.Value, d *expr.Display, digits int, paren bool) string {
	switch x := v.(type) {
	case *expr.Scalar:
		return ShownML(expr.FormatScalar(x, d, digits), paren)
	case *expr.Matrix:
		x = expr.DisplayMatrix(x)
		var b strings.Builder
		b.WriteString("<mrow><mo>[</mo><mtable>")
		for i := 0; i < x.Rows; i++ {
			b.WriteString("<mtr>")
			for j := 0; j < x.Cols; j++ {
				e := x.At(i, j)
				b.WriteString("<mtd>" + ShownML(expr.FormatScalar(&e, d, digits), false) + senseML(&e) + "</mtd>")
			}
			b.WriteString("</mtr>")
		}
		b.WriteString("</mtable><mo>]</mo></mrow>")
		return b.String()
	}
	return ""
}

// Math wraps MathML content in a <math> element.
func Math(content string) string {
	return "<math display=\"inline\"><mrow>" + content + "</mrow></math>"
}

// ExprML typesets expression trees, either as written (the formula) or with
// every name replaced by its value (the substitution).
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
	cache map[valueKey]string
}

type valueKey struct {
	v      expr.Value
	d      *expr.Display
	digits int
	paren  bool
}

// stringWriter is what typesetting writes into: a strings.Builder or the
// page's bytes.Buffer.
type stringWriter interface {
	WriteString(s string) (int, error)
}

// WriteNode typesets n straight into b.
func (m *ExprML) WriteNode(b stringWriter, n expr.Node, paren bool) { m.write(b, n, paren) }

// valueML is ValueML through the sheet's cache.
func (m *ExprML) valueML(v expr.Value, d *expr.Display, paren bool) string {
	if m.cache == nil {
		return ValueML(v, d, m.Digits, paren)
	}
	k := valueKey{v, d, m.Digits, paren}
	if s, ok := m.cache[k]; ok {
		return s
	}
	s := ValueML(v, d, m.Digits, paren)
	m.cache[k] = s
	return s
}

var opML = map[expr.Kind]string{
	expr.ADD: "+", expr.SUB: "−", expr.MUL: "·", expr.PAR: "∥", expr.ANGLE: "∠",
	expr.LT: "&lt;", expr.LE: "≤", expr.GT: "&gt;", expr.GE: "≥", expr.EQ: "=", expr.NE: "≠",
}

// Node typesets n. paren asks a substituted value to wrap itself when it
// is complex or negative (it stands inside a product, a power, ...).
func (m *ExprML) Node(n expr.Node, paren bool) string {
	var b strings.Builder
	b.Grow(256)
	m.write(&b, n, paren)
	return b.String()
}

func (m *ExprML) write(b stringWriter, n expr.Node, paren bool) {
	switch n := n.(type) {
	case *expr.Number:
		if n.Imag {
			b.WriteString("<mi>j</mi><mn>")
			b.WriteString(esc(strings.TrimPrefix(n.Text, "j")))
			b.WriteString("</mn>")
			return
		}
		b.WriteString(numLiteral(n.Text))
	case *expr.Ident:
		if m.Subst {
			if v, ok := m.Trace.Value(n); ok && !isConstant(n.Name) {
				var d *expr.Display
				if m.DisplayOf != nil {
					d = m.DisplayOf(n.Name)
				}
				b.WriteString(m.valueML(v, d, paren))
				return
			}
		}
		if n.Name == "pi" {
			b.WriteString("<mi>π</mi>")
			return
		}
		b.WriteString(NameML(n.Name))
	case *expr.WithUnit:
		b.WriteString("<mrow>")
		m.write(b, n.X, true)
		b.WriteString(unitML(n.Unit.Text))
		b.WriteString("</mrow>")
	case *expr.Unary:
		if n.Op == expr.ADD {
			b.WriteString("<mrow><mo>+</mo>")
		} else {
			b.WriteString("<mrow><mo>−</mo>")
		}
		m.write(b, n.X, true)
		b.WriteString("</mrow>")
	case *expr.Paren:
		b.WriteString("<mrow><mo>(</mo>")
		m.write(b, n.X, false)
		b.WriteString("<mo>)</mo></mrow>")
	case *expr.Abs:
		b.WriteString("<mrow><mo>|</mo>")
		m.write(b, n.X, false)
		b.WriteString("<mo>|</mo></mrow>")
	case *expr.Binary:
		switch n.Op {
		case expr.DIV:
			b.WriteString("<mfrac>")
			m.write(b, unparen(n.X), false)
			m.write(b, unparen(n.Y), false)
			b.WriteString("</mfrac>")
			return
		case expr.POW:
			b.WriteString("<msup>")
			m.write(b, n.X, true)
			m.write(b, unparen(n.Y), false)
			b.WriteString("</msup>")
			return
		}
		b.WriteString("<mrow>")
		m.write(b, n.X, n.Op != expr.ADD && n.Op != expr.SUB)
		b.WriteString("<mo>")
		b.WriteString(opML[n.Op])
		b.WriteString("</mo>")
		m.write(b, n.Y, true)
		b.WriteString("</mrow>")
	case *expr.Call:
		m.call(b, n, paren)
	case *expr.MatrixLit:
		b.WriteString("<mrow><mo>[</mo><mtable>")
		for _, row := range n.Rows {
			b.WriteString("<mtr>")
			for _, e := range row {
				b.WriteString("<mtd>")
				m.write(b, e, false)
				b.WriteString("</mtd>")
			}
			b.WriteString("</mtr>")
		}
		b.WriteString("</mtable><mo>]</mo></mrow>")
	case *expr.Compare:
		b.WriteString("<mrow>")
		for i, x := range n.X {
			if i > 0 {
				b.WriteString("<mo>")
				b.WriteString(opML[n.Ops[i-1]])
				b.WriteString("</mo>")
			}
			m.write(b, x, false)
		}
		b.WriteString("</mrow>")
	default:
		b.WriteString("<merror><mtext>?</mtext></merror>")
	}
}

func isConstant(name string) bool { return name == "pi" || name == "π" || name == "j" }

func unparen(n expr.Node) expr.Node {
	if p, ok := n.(*expr.Paren); ok {
		return p.X
	}
	return n
}

func numLiteral(text string) string {
	if m, e, ok := strings.Cut(strings.ToLower(text), "e"); ok {
		e = strings.TrimPrefix(e, "+")
		e = strings.Replace(e, "-", "−", 1)
		return "<mrow><mn>" + esc(m) + "</mn><mo>×</mo><msup><mn>10</mn><mn>" + esc(e) + "</mn></msup></mrow>"
	}
	return "<mn>" + esc(text) + "</mn>"
}

func (m *ExprML) call(b stringWriter, n *expr.Call, paren bool) {
	switch n.Fun.Name {
	case "sqrt":
		if len(n.Args) == 1 {
			b.WriteString("<msqrt>")
			m.write(b, n.Args[0], false)
			b.WriteString("</msqrt>")
			return
		}
	case "conj":
		if len(n.Args) == 1 {
			b.WriteString("<msup>")
			m.write(b, n.Args[0], true)
			b.WriteString("<mo>*</mo></msup>")
			return
		}
	case "abs":
		if len(n.Args) == 1 {
			b.WriteString("<mrow><mo>|</mo>")
			m.write(b, n.Args[0], false)
			b.WriteString("<mo>|</mo></mrow>")
			return
		}
	}
	if m.Subst && !expr.IsBuiltin(n.Fun.Name) && (m.IsFunc == nil || !m.IsFunc(n.Fun.Name)) {
		// an entry of a matrix value M(i, j) shows the picked value
		if v, ok := m.Trace.Value(n); ok {
			b.WriteString(m.valueML(v, nil, paren))
			return
		}
	}
	b.WriteString("<mrow>")
	name := n.Fun.Name
	if strings.Contains(name, "_") || utf8.RuneCountInString(name) == 1 {
		b.WriteString(NameML(name))
	} else {
		b.WriteString("<mi>")
		b.WriteString(esc(name))
		b.WriteString("</mi>")
	}
	b.WriteString("<mo>(</mo>")
	for i, a := range n.Args {
		if i > 0 {
			b.WriteString("<mo>,</mo>")
		}
		m.write(b, a, false)
	}
	b.WriteString("<mo>)</mo></mrow>")
}
