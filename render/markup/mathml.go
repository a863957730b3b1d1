package markup

import (
	"html"
	"strings"
	"sync"
	"sync/atomic"

	"calcdoc/expr"
)

// GreekOf returns the letter of a spelled Greek name ("phi": "φ"), or s
// itself: the engine's table (expr.GreekLetter), by which names are also
// compared, so the sheet and the comparison cannot disagree.
func GreekOf(s string) string {
	if g, ok := expr.GreekLetter(s); ok {
		return g
	}
	return s
}

func Esc(s string) string { return html.EscapeString(s) }

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
	if hasSub && sub == "" {
		// a name ending in "_" is another name than the one without it
		return "<mi>" + Esc(GreekOf(base)) + "_</mi>"
	}
	if !hasSub {
		return "<mi>" + Esc(GreekOf(base)) + "</mi>"
	}
	// written into one string: the subscript's parts, each a Greek
	// letter where spelled, joined by commas (Esc leaves "," as it is)
	var b strings.Builder
	b.Grow(len(name) + 32)
	b.WriteString("<msub><mi>")
	b.WriteString(Esc(GreekOf(base)))
	b.WriteString("</mi><mi>")
	for i := 0; ; i++ {
		p, rest, more := strings.Cut(sub, "_")
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString(Esc(GreekOf(p)))
		if !more {
			break
		}
		sub = rest
	}
	b.WriteString("</mi></msub>")
	return b.String()
}

// NameHTML writes a name as HTML text with a <sub> subscript.
func NameHTML(name string) string {
	base, sub, hasSub := strings.Cut(name, "_")
	b := Esc(GreekOf(base))
	if hasSub && sub == "" {
		return "<var>" + b + "_</var>"
	}
	if !hasSub {
		return "<var>" + b + "</var>"
	}
	parts := strings.Split(sub, "_")
	for i, p := range parts {
		parts[i] = GreekOf(p)
	}
	return "<var>" + b + "<sub>" + Esc(strings.Join(parts, ",")) + "</sub></var>"
}

// writeNum typesets into b a number written by the formatter: "-" becomes
// a minus sign and "1.2e-5" becomes 1.2×10⁻⁵.
func writeNum(b *strings.Builder, s string) {
	b.WriteString("<mn>")
	if strings.HasPrefix(s, "-") {
		// the sign belongs to the number: no operator spacing
		b.WriteString("−")
		s = s[1:]
	}
	m, e, sci := strings.Cut(s, "e")
	b.WriteString(Esc(m))
	b.WriteString("</mn>")
	if !sci {
		return
	}
	b.WriteString("<mo>×</mo><msup><mn>10</mn><mn>")
	if strings.HasPrefix(e, "-") {
		b.WriteString("−")
		e = e[1:]
	}
	b.WriteString(Esc(e))
	b.WriteString("</mn></msup>")
}

// unitText writes a unit for display: "mm^2" becomes "mm²", "*" becomes "·".
var unitReplacer = strings.NewReplacer("^2", "²", "^3", "³", "^-1", "⁻¹", "^-2", "⁻²", "^-3", "⁻³", "*", "·")

func UnitText(u string) string {
	u = unitReplacer.Replace(u)
	// an ASCII "u" prefix reads as µ
	if len(u) > 1 && u[0] == 'u' && u != "unit" {
		u = "µ" + u[1:]
	}
	return u
}

func UnitML(u string) string {
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
	// class "u": upright, after a quarter em (style.go), as an <mspace>
	// and mathvariant="normal" would write it, in a fifth of the bytes
	return "<mi class=\"u\">" + Esc(UnitText(u)) + "</mi>"
}

// ShownML typesets a shown value. paren wraps a value that is not a
// single operand (a sum, a polar value, a negative number) in parentheses,
// for a place inside a larger formula.
func ShownML(s expr.Shown, paren bool) string {
	out := shownML(s)
	if f := shownForm(s); paren && (f.lv < lvPostfix || f.signed) {
		return "<mrow><mo>(</mo>" + out + "<mo>)</mo></mrow>"
	}
	return group(out)
}

// group returns the MathML ml of a value to stand among the children of
// an mrow-like element (<math>, <mrow>, <mtd>, <msqrt>): bare when
// grouping it changes nothing in MathML Core layout, else in an <mrow>.
// An operator's form (prefix, infix, postfix: its spacing) follows from
// its place in its mrow, and a stretchy one (a bracket) stretches over its
// mrow's other children; so a value that starts or ends with an operator
// (a sign, a bracket, a degree mark) keeps its <mrow>, and one whose
// operators all stand between other children (+ in 3 + j4, ∠, ×) does not
// need it.
func group(ml string) string {
	if bare(ml) {
		return ml
	}
	return "<mrow>" + ml + "</mrow>"
}

// bare reports whether ml may stand without an <mrow> of its own among
// other children (see group): it neither starts nor ends with an <mo>.
func bare(ml string) bool {
	return !strings.HasPrefix(ml, "<mo") && !strings.HasSuffix(ml, "</mo>")
}

// single reports whether ml is one element (a bare value that is one
// element may stand where MathML takes exactly one, as in <mfrac>): the
// first element closes at the end of ml.
func single(ml string) bool {
	if !strings.HasPrefix(ml, "<") {
		return false
	}
	depth := 0
	for i := 0; i < len(ml); {
		if ml[i] != '<' {
			if depth == 0 {
				return false // text outside the element
			}
			i++
			continue
		}
		k := strings.IndexByte(ml[i:], '>')
		if k < 0 {
			return false
		}
		tag := ml[i : i+k+1]
		i += k + 1
		switch {
		case strings.HasPrefix(tag, "</"):
			depth--
		case !strings.HasSuffix(tag, "/>"):
			depth++
		}
		if depth == 0 {
			return i == len(ml)
		}
	}
	return false
}

// shownML is the bare MathML of a shown value, without brackets around it,
// built in one string.
func shownML(s expr.Shown) string {
	var b strings.Builder
	b.Grow(96 + 2*(len(s.A)+len(s.B)+len(s.Unit)))
	switch s.Kind {
	case expr.ShownReal:
		writeNum(&b, s.A)
	case expr.ShownPolar:
		writeNum(&b, s.A)
		b.WriteString("<mo>∠</mo>")
		writeNum(&b, s.B)
		b.WriteString("<mo>°</mo>")
	case expr.ShownRect:
		im := s.B
		op := "+"
		if strings.HasPrefix(im, "-") {
			op, im = "−", im[1:]
		}
		if s.A == "" {
			if op == "−" {
				b.WriteString("<mo>−</mo>")
			}
			b.WriteString("<mi>j</mi>")
			writeNum(&b, im)
			break
		}
		paren := s.Unit != ""
		if paren {
			b.WriteString("<mo>(</mo>")
		}
		writeNum(&b, s.A)
		b.WriteString("<mo>")
		b.WriteString(op)
		b.WriteString("</mo><mi>j</mi>")
		writeNum(&b, im)
		if paren {
			b.WriteString("<mo>)</mo>")
		}
	}
	b.WriteString(UnitML(s.Unit))
	return b.String()
}

// shownForm is the typesetting level of a shown value (see form).
func shownForm(s expr.Shown) form {
	sci := func(t string) bool { return strings.ContainsAny(t, "eE") && !strings.Contains(t, "NaN") }
	unitLv := func(bare int) int {
		if s.Unit != "" {
			return lvPostfix
		}
		return bare
	}
	atom := func(t string) int {
		if sci(t) {
			return unitLv(lvSci)
		}
		return unitLv(lvAtom)
	}
	switch s.Kind {
	case expr.ShownPolar:
		if strings.HasPrefix(s.A, "-") {
			return form{lv: lvUnary, signed: true, after: lvAngle}
		}
		return form{lv: lvAngle, after: lvAngle}
	case expr.ShownRect:
		if s.A == "" {
			if strings.HasPrefix(s.B, "-") {
				return form{lv: lvUnary, signed: true, after: int8(atom(s.B))}
			}
			a := atom(s.B)
			return form{lv: int8(a), after: int8(a)}
		}
		if s.Unit != "" {
			return form{lv: lvPostfix, after: lvPostfix}
		}
		return form{lv: lvAdd, signed: strings.HasPrefix(s.A, "-"), after: lvAdd}
	}
	if strings.HasPrefix(s.A, "-") {
		return form{lv: lvUnary, signed: true, after: int8(atom(s.A[1:]))}
	}
	a := atom(s.A)
	return form{lv: int8(a), after: int8(a)}
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
				b.WriteString("<mtd>" + ShownML(expr.FormatScalar(&e, d, digits), false) + SenseML(&e) + "</mtd>")
			}
			b.WriteString("</mtr>")
		}
		b.WriteString("</mtable><mo>]</mo></mrow>")
		return b.String()
	}
	return ""
}

// Math wraps MathML content in a <math> element. Inline display is the
// default, and <math> lays out its children as an <mrow> does.
func Math(content string) string {
	return "<math>" + content + "</math>"
}
