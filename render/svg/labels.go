package svg

import (
	"math"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Run is a piece of a label: text on the baseline, lowered as a
// subscript or raised as a superscript (both in a smaller font).
type Run struct {
	Text  string
	Shift int // ShiftBase, ShiftSub or ShiftSup
}

// The shifts of a Run.
const (
	ShiftBase = 0
	ShiftSub  = -1
	ShiftSup  = 1
)

// Text metrics used to estimate a label's box: no font is loaded, so the
// width is estimated from the characters at advances a little above those
// of the common sans-serif faces (runeAdvance), subscripts and
// superscripts at 0.75 of the size.
const (
	advance    = 0.62 // average advance of a character, in em (angle labels)
	smallScale = 0.75 // size of a subscript or superscript, in em
	subDrop    = 0.3  // how far a subscript is lowered, in em
	supRise    = 0.4  // how far a superscript is raised, in em
	ascent     = 0.8  // height of the font above the baseline, in em
	descent    = 0.25 // depth below the baseline, in em
)

// underscoreRuns splits a plain label by the rule of Arrow.Label: the
// first '_' starts a subscript, the run of letters, digits and '_' after
// it; any text after that run returns to the baseline.
func underscoreRuns(label string) []Run {
	i := strings.IndexByte(label, '_')
	if i < 0 || i == len(label)-1 {
		return []Run{{Text: label}}
	}
	base, rest := label[:i], label[i+1:]
	j := 0
	for j < len(rest) {
		r, size := utf8.DecodeRuneInString(rest[j:])
		if r != '_' && !unicode.IsLetter(r) && !unicode.IsDigit(r) {
			break
		}
		j += size
	}
	if j == 0 {
		return []Run{{Text: label}}
	}
	runs := []Run{{Text: base}, {Text: rest[:j], Shift: ShiftSub}}
	if rest[j:] != "" {
		runs = append(runs, Run{Text: rest[j:]})
	}
	return runs
}

// runsOf is the label of an arrow as runs: Runs when given, else Label
// split by underscoreRuns.
func runsOf(a Arrow) []Run {
	if len(a.Runs) > 0 {
		return a.Runs
	}
	return underscoreRuns(a.Label)
}

// plainText is the runs' text run together (for the diagram's title).
func plainText(runs []Run) string {
	var b strings.Builder
	for _, r := range runs {
		b.WriteString(r.Text)
	}
	return b.String()
}

// labelSize estimates the box of a label at font size fs: its width,
// height, and the distance from its top to the baseline.
func labelSize(runs []Run, fs float64) (w, h, base float64) {
	sub, sup := false, false
	for _, r := range runs {
		n := 0.0
		for _, c := range r.Text {
			n += runeAdvance(c)
		}
		if r.Shift == ShiftBase {
			w += n * fs
			continue
		}
		w += n * smallScale * fs
		sub = sub || r.Shift == ShiftSub
		sup = sup || r.Shift == ShiftSup
	}
	top := ascent * fs
	if sup {
		top = math.Max(top, (supRise+ascent*smallScale)*fs)
	}
	bottom := descent * fs
	if sub {
		bottom = math.Max(bottom, (subDrop+descent*smallScale)*fs)
	}
	return w, top + bottom, top
}

// shiftOffset is how far below the baseline a run of the shift is drawn.
func shiftOffset(shift int, fs float64) float64 {
	switch shift {
	case ShiftSub:
		return subDrop * fs
	case ShiftSup:
		return -supRise * fs
	}
	return 0
}

// writeRuns appends a label's runs as the content of a <text> element:
// baseline runs as text, shifted runs in a <tspan> with a smaller
// font-size moved by dy, and the return to the baseline as a <tspan> with
// the opposite dy.
func writeRuns(w *writer, runs []Run, fs float64) {
	cur := ShiftBase
	for _, r := range runs {
		if r.Text == "" {
			continue
		}
		dy := shiftOffset(r.Shift, fs) - shiftOffset(cur, fs)
		switch {
		case r.Shift != ShiftBase:
			w.raw(`<tspan`)
			w.attr("font-size", fs*smallScale)
			w.attr("dy", dy)
			w.raw(`>`)
			w.text(r.Text)
			w.raw(`</tspan>`)
		case cur != ShiftBase:
			w.raw(`<tspan`)
			w.attr("dy", dy)
			w.raw(`>`)
			w.text(r.Text)
			w.raw(`</tspan>`)
		default:
			w.text(r.Text)
		}
		cur = r.Shift
	}
}

// runeAdvance is the advance of a character in em, rounded up from the
// common sans-serif faces: narrow letters and punctuation, wide letters
// (m, w, M, W), other capitals, and everything else (lower case, digits,
// Greek, operators).
func runeAdvance(c rune) float64 {
	switch {
	case strings.ContainsRune("iljftI.,:;|!'()[] ", c):
		return 0.4
	case strings.ContainsRune("mwMW", c):
		return 1.0
	case unicode.IsUpper(c):
		return 0.78
	}
	return 0.66
}
