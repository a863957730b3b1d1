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
	b := "<mi>" + Esc(GreekOf(base)) + "</mi>"
	if !hasSub {
		return b
	}
	parts := strings.Split(sub, "_")
	for i, p := range parts {
		parts[i] = GreekOf(p)
	}
	return "<msub>" + b + "<mi>" + Esc(strings.Join(parts, ",")) + "</mi></msub>"
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
		out = "<mn>" + Esc(m) + "</mn><mo>×</mo><msup><mn>10</mn><mn>" + Esc(e) + "</mn></msup>"
	} else {
		out = "<mn>" + Esc(s) + "</mn>"
	}
	if neg {
		// the sign belongs to the number: no operator spacing
		return strings.Replace(out, "<mn>", "<mn>−", 1)
	}
	return out
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
	return "<mspace width=\"0.25em\"/><mi mathvariant=\"normal\">" + Esc(UnitText(u)) + "</mi>"
}

// ShownML typesets a shown value. paren wraps a value that is not a
// single operand (a sum, a polar value, a negative number) in parentheses,
// for a place inside a larger formula.
func ShownML(s expr.Shown, paren bool) string {
	out := shownML(s)
	if f := shownForm(s); paren && (f.lv < lvPostfix || f.signed) {
		out = "<mo>(</mo>" + out + "<mo>)</mo>"
	}
	return "<mrow>" + out + "</mrow>"
}

// shownML is the bare MathML of a shown value, without brackets around it.
func shownML(s expr.Shown) string {
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
	return num + UnitML(s.Unit)
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
				return form{lv: lvUnary, signed: true, after: atom(s.B)}
			}
			a := atom(s.B)
			return form{lv: a, after: a}
		}
		if s.Unit != "" {
			return form{lv: lvPostfix, after: lvPostfix}
		}
		return form{lv: lvAdd, signed: strings.HasPrefix(s.A, "-"), after: lvAdd}
	}
	if strings.HasPrefix(s.A, "-") {
		return form{lv: lvUnary, signed: true, after: atom(s.A[1:])}
	}
	a := atom(s.A)
	return form{lv: a, after: a}
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

// Math wraps MathML content in a <math> element.
func Math(content string) string {
	return "<math display=\"inline\"><mrow>" + content + "</mrow></math>"
}
