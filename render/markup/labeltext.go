package markup

import (
	"strings"
	"unicode/utf8"

	"calcdoc/expr"
	"calcdoc/render/svg"
)

// LabelRuns is an expression as plain text in the sheet's typesetting
// (for a picture's label, where MathML cannot go): names with their
// subscripts and spelled Greek letters as letters (as NameML), pi as π,
// · for *, − for a minus, ∥ and ∠ as written, a power, the conjugate's *
// and a unit's exponent raised, a number's exponent as ×10 with a raised
// power, and the parentheses of the source. The runs are split by shift
// (baseline, subscript, superscript) for the SVG writer.
func LabelRuns(n expr.Node) []svg.Run {
	var l labelText
	l.node(n)
	return l.runs
}

type labelText struct{ runs []svg.Run }

// add appends text at a shift, joining it to the last run of that shift.
func (l *labelText) add(s string, shift int) {
	if s == "" {
		return
	}
	if k := len(l.runs); k > 0 && l.runs[k-1].Shift == shift {
		l.runs[k-1].Text += s
		return
	}
	l.runs = append(l.runs, svg.Run{Text: s, Shift: shift})
}

func (l *labelText) base(s string) { l.add(s, svg.ShiftBase) }

// raised appends n as a superscript (its text flattened to one level).
func (l *labelText) raised(n expr.Node) {
	var inner labelText
	inner.node(n)
	for _, r := range inner.runs {
		l.add(r.Text, svg.ShiftSup)
	}
}

func (l *labelText) name(name string) {
	if name == "pi" {
		l.base("π")
		return
	}
	b, sub, hasSub := strings.Cut(name, "_")
	l.base(GreekOf(b))
	if !hasSub || sub == "" {
		return
	}
	parts := strings.Split(sub, "_")
	for i, p := range parts {
		parts[i] = GreekOf(p)
	}
	l.add(strings.Join(parts, ","), svg.ShiftSub)
}

// unit appends a unit: its text as the sheet writes it, an exponent
// ("m^2") raised.
func (l *labelText) unit(u string) {
	t := UnitText(u)
	for t != "" {
		i := strings.IndexByte(t, '^')
		if i < 0 {
			l.base(t)
			return
		}
		l.base(t[:i])
		t = t[i+1:]
		j := 0
		for j < len(t) && (t[j] == '-' || t[j] >= '0' && t[j] <= '9' || t[j] == '.') {
			j++
		}
		l.add(strings.Replace(t[:j], "-", "−", 1), svg.ShiftSup)
		t = t[j:]
	}
}

func (l *labelText) node(n expr.Node) {
	switch n := n.(type) {
	case *expr.Number:
		text := n.Text
		if n.Imag {
			l.base("j")
			text = strings.TrimPrefix(text, "j")
		}
		if m, e, ok := strings.Cut(strings.ToLower(text), "e"); ok {
			l.base(m + "×10")
			l.add(strings.Replace(strings.TrimPrefix(e, "+"), "-", "−", 1), svg.ShiftSup)
			return
		}
		l.base(text)
	case *expr.Ident:
		l.name(n.Name)
	case *expr.WithUnit:
		l.node(n.X)
		u := n.Unit.Text
		if u == "°" || u == "deg" {
			l.base("°")
			return
		}
		l.base(" ")
		l.unit(u)
	case *expr.Unary:
		if n.Op == expr.SUB {
			l.base("−")
		} else {
			l.base("+")
		}
		l.node(n.X)
	case *expr.Paren:
		l.base("(")
		l.node(n.X)
		l.base(")")
	case *expr.Abs:
		l.base("|")
		l.node(n.X)
		l.base("|")
	case *expr.Binary:
		l.node(n.X)
		switch n.Op {
		case expr.POW:
			l.raised(n.Y)
			return
		case expr.DIV:
			l.base("/")
		case expr.MUL:
			l.base("·")
		default:
			op := map[expr.Kind]string{expr.ADD: " + ", expr.SUB: " − ", expr.PAR: " ∥ ", expr.ANGLE: "∠"}[n.Op]
			if op == "" {
				op = " ? "
			}
			l.base(op)
		}
		l.node(n.Y)
	case *expr.Call:
		l.call(n)
	case *expr.CaseLit:
		l.base("{")
		for i, x := range n.X {
			if i > 0 {
				l.base(", ")
			}
			l.base(n.Names[i].Name + ": ")
			l.node(x)
		}
		l.base("}")
	case *expr.MatrixLit:
		l.base("[")
		for i, row := range n.Rows {
			if i > 0 {
				l.base("; ")
			}
			for j, e := range row {
				if j > 0 {
					l.base(", ")
				}
				l.node(e)
			}
		}
		l.base("]")
	default:
		l.base("?")
	}
}

// compound reports whether n needs parentheses before a postfix mark.
func compound(n expr.Node) bool {
	switch n.(type) {
	case *expr.Ident, *expr.Paren, *expr.Abs, *expr.Call:
		return false
	case *expr.Number:
		return strings.ContainsAny(n.(*expr.Number).Text, "eE")
	}
	return true
}

func (l *labelText) call(n *expr.Call) {
	if len(n.Args) == 1 {
		a := n.Args[0]
		switch n.Fun.Name {
		case "conj":
			if compound(a) {
				l.base("(")
				l.node(a)
				l.base(")")
			} else {
				l.node(a)
			}
			l.add("*", svg.ShiftSup)
			return
		case "abs":
			l.base("|")
			l.node(a)
			l.base("|")
			return
		case "sqrt":
			l.base("√(")
			l.node(a)
			l.base(")")
			return
		}
	}
	name := n.Fun.Name
	if strings.Contains(name, "_") || utf8.RuneCountInString(name) == 1 {
		l.name(name)
	} else {
		l.base(name)
	}
	l.base("(")
	for i, a := range n.Args {
		if i > 0 {
			l.base(", ")
		}
		l.node(a)
	}
	l.base(")")
}
