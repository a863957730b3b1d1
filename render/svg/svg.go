// Package svg draws the pictures of a calculation sheet as self-contained
// inline SVG: phasor diagrams (the `phasors` block) and line plots (the
// `sweep` block), see LANGUAGE.md section 6.
//
// Every drawing is plain SVG markup written directly by this package: no
// script, no style sheet, no external resource and no loaded font (text uses
// the generic family "sans-serif"). Drawings are black on white with grey
// grids; scales and series are told apart by line style (solid, dashed,
// dotted, dash-dot, ...) and by labels, never by colour alone, so they stay
// legible in black-and-white print.
//
// Output is deterministic: the same input gives the same bytes. Every
// coordinate and length is written with exactly two decimals
// (strconv.FormatFloat with format 'f' and precision 2, "-0.00" written as
// "0.00"), and all text is escaped with encoding/xml.EscapeText.
package svg

import (
	"encoding/xml"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// maxMagnitude bounds the absolute values this package draws. Beyond it,
// differences and ratios of values, and the powers of ten that scales and
// ticks are built from, may overflow; such input is rejected with an error
// instead of producing a meaningless picture.
const maxMagnitude = 1e280

// minPositive is the smallest non-zero magnitude drawn, for the same reason
// (tick steps and scales must stay normal, non-zero float64 numbers).
const minPositive = 1e-280

// style is one line style used to tell scales or series apart in
// black-and-white print.
type style struct {
	name  string  // human-readable name, used in doc comments and tests
	dash  string  // stroke-dasharray value; "" for a solid line
	width float64 // stroke-width in user units
}

// lineStyles are the distinct line styles, in the order they are assigned.
var lineStyles = []style{
	{"solid", "", 1.4},
	{"dashed", "6 3", 1.4},
	{"dotted", "1.5 2", 1.4},
	{"dash-dot", "7 2.5 1.5 2.5", 1.4},
	{"long dash", "12 4", 1.4},
	{"dash-dot-dot", "7 2.5 1.5 2.5 1.5 2.5", 1.4},
}

// writer accumulates SVG markup.
type writer struct {
	b []byte
}

// raw appends markup verbatim.
func (w *writer) raw(s string) { w.b = append(w.b, s...) }

// num appends v with exactly two decimals; a value that rounds to zero is
// written "0.00" (never "-0.00").
func (w *writer) num(v float64) {
	start := len(w.b)
	w.b = strconv.AppendFloat(w.b, v, 'f', 2, 64)
	if string(w.b[start:]) == "-0.00" {
		w.b = append(w.b[:start], "0.00"...)
	}
}

// attr appends ` name="v"` with v written by num.
func (w *writer) attr(name string, v float64) {
	w.b = append(w.b, ' ')
	w.b = append(w.b, name...)
	w.b = append(w.b, '=', '"')
	w.num(v)
	w.b = append(w.b, '"')
}

// text appends s escaped for XML character data.
func (w *writer) text(s string) {
	var sb strings.Builder
	// xml.EscapeText writes to a strings.Builder, which never fails.
	_ = xml.EscapeText(&sb, []byte(s))
	w.b = append(w.b, sb.String()...)
}

func (w *writer) String() string { return string(w.b) }

// fmt2 formats v like writer.num.
func fmt2(v float64) string {
	var w writer
	w.num(v)
	return w.String()
}

// val125 returns d·10^e computed so that the result is the double nearest to
// the exact decimal value (for |e| ≤ 22 both 10^|e| and d are exact doubles,
// and one correctly rounded multiplication or division follows).
func val125(d, e int) float64 {
	if e < 0 {
		return float64(d) / math.Pow10(-e)
	}
	return float64(d) * math.Pow10(e)
}

var digits125 = [3]int{1, 2, 5}

// niceCeil returns the smallest number of the form d·10^e, d ∈ {1, 2, 5},
// that is ≥ x, as (d, e). x must be positive and finite.
func niceCeil(x float64) (int, int) {
	e := int(math.Floor(math.Log10(x)))
	for ee := e - 1; ee <= e+1; ee++ {
		for _, d := range digits125 {
			if val125(d, ee) >= x {
				return d, ee
			}
		}
	}
	return 1, e + 2
}

// niceFloor returns the largest number of the form d·10^e, d ∈ {1, 2, 5},
// that is ≤ x, as (d, e). x must be positive and finite.
func niceFloor(x float64) (int, int) {
	e := int(math.Floor(math.Log10(x)))
	for ee := e + 1; ee >= e-1; ee-- {
		for i := len(digits125) - 1; i >= 0; i-- {
			if val125(digits125[i], ee) <= x {
				return digits125[i], ee
			}
		}
	}
	return 5, e - 2
}

// next125 returns the 1-2-5 number following d·10^e.
func next125(d, e int) (int, int) {
	switch d {
	case 1:
		return 2, e
	case 2:
		return 5, e
	}
	return 1, e + 1
}

// prev125 returns the 1-2-5 number preceding d·10^e.
func prev125(d, e int) (int, int) {
	switch d {
	case 5:
		return 2, e
	case 2:
		return 1, e
	}
	return 5, e - 1
}

// plainNumber writes d·10^e as a plain decimal numeral ("50", "0.002",
// "5000") when −6 ≤ e ≤ 6, and in E notation ("2e9", "5e-7") otherwise.
func plainNumber(d, e int) string {
	if e < -6 || e > 6 {
		return strconv.Itoa(d) + "e" + strconv.Itoa(e)
	}
	if e >= 0 {
		return strconv.Itoa(d) + strings.Repeat("0", e)
	}
	return "0." + strings.Repeat("0", -e-1) + strconv.Itoa(d)
}

// finite reports whether v is neither NaN nor ±Inf.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// wrapWords splits s into lines of at most width runes, breaking at spaces;
// a single word longer than width gets a line of its own.
func wrapWords(s string, width int) []string {
	var lines []string
	var cur strings.Builder
	n := 0
	for _, word := range strings.Fields(s) {
		wl := utf8.RuneCountInString(word)
		if n > 0 && n+1+wl > width {
			lines = append(lines, cur.String())
			cur.Reset()
			n = 0
		}
		if n > 0 {
			cur.WriteByte(' ')
			n++
		}
		cur.WriteString(word)
		n += wl
	}
	if n > 0 {
		lines = append(lines, cur.String())
	}
	return lines
}

// svgOpen writes the opening <svg> tag and its <title>.
func svgOpen(w *writer, width, height float64, title string) {
	w.raw(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 `)
	w.num(width)
	w.raw(" ")
	w.num(height)
	w.raw(`"`)
	w.attr("width", width)
	w.attr("height", height)
	w.raw(` role="img" font-family="sans-serif"><title>`)
	w.text(title)
	w.raw("</title>\n")
}
