package phasors

import (
	"math"
	"math/cmplx"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// MaxPhasorScales is the largest number of dimensions (and so of scales)
// one phasor diagram draws: render/svg tells scales apart by six line
// styles.
const MaxPhasorScales = 6

// phasorMaxMag and phasorMinMag bound the magnitude of an arrow in its
// scale's unit: render/svg draws magnitudes from 1e-280 to 1e280 (and zero).
const (
	phasorMaxMag = 1e280
	phasorMinMag = 1e-280
)

// Phasors is what a `phasors` block holds once evaluated: the values to
// draw, each with the scale it is drawn on, and the caption.
type Phasors struct {
	Items   []*PhasorItem
	Caption string // the block's non-blank lines, trimmed and joined by spaces
	// Case names the case of a diagram whose entries read a value with
	// cases (LANGUAGE.md section 10), else ""; CaseDiagrams are the
	// diagrams of the other cases, in the document's order (cases.go).
	Case         string
	CaseDiagrams []*Phasors
}

// PhasorItem is one entry of the list after the word phasors.
type PhasorItem struct {
	Text string    // the entry as written (trimmed), also its label on the diagram
	Pos  expr.Pos  // where the entry starts
	Node expr.Node // the parsed expression; nil when it could not be parsed
	// Value is the evaluated value, nil when the entry failed.
	Value *expr.Scalar
	// Display is the display bracket of the name's definition when the
	// entry is a bare defined name (for showing its value), else nil.
	Display *expr.Display
	// Unit is the unit of the entry's scale, e.g. "V", "kV", "A", "kVA"
	// ("" for a plain number): every entry of one dimension shares it.
	// Factor is its size in coherent SI units (1000 for kV), and Re, Im
	// are the value in Unit: Value.Z = (Re + j·Im)·Factor.
	Unit   string
	Factor float64
	Re, Im float64
	// From is the earlier entry at whose tip this arrow starts (an entry
	// "EXPR from NAME"), nil for an arrow from the origin; FromName and
	// FromPos are NAME as written and where. X0, Y0 are the arrow's tail
	// in Unit (zero from the origin): the tip of From's arrow.
	From     *PhasorItem
	FromName string
	FromPos  expr.Pos
	X0, Y0   float64
	// tip is the arrow's tip in coherent SI units (tail plus value).
	tip complex128
	// Err is the entry's error; Unavailable is set instead when it uses a
	// name whose definition failed (not a new error).
	Err         *expr.Error
	Unavailable *expr.UnavailableError
}

// OK reports whether the entry has a value to draw.
func (it *PhasorItem) OK() bool { return it.Value != nil && it.Err == nil && it.Unavailable == nil }

// evalPhasors evaluates a phasors block.
//
// The argument is a list of entries separated by commas outside
// parentheses and brackets; each entry is an expression (usually a defined
// name) evaluated in the names defined above the block. Each must be a
// single finite value. Entries are grouped by dimension, a group per scale,
// at most MaxPhasorScales groups. A group's unit is the unit the sheet
// shows its largest magnitude M in when no unit is asked for (the default
// unit of the dimension with the SI prefix that puts M in [1, 1000), VA for
// a power group holding a complex value, W for an all-real one), so that
// ring values read as "rings: 50 V" or "rings: 100 kVA".
func evalPhasorsOnce(b *calcdoc.Block) *Phasors {
	res := &Phasors{}
	b.Result = res
	var caption []string
	for _, l := range b.Lines {
		if t := strings.TrimSpace(l); t != "" {
			caption = append(caption, t)
		}
	}
	res.Caption = strings.Join(caption, " ")
	if strings.TrimSpace(b.Arg) == "" {
		b.Errorf(b.InfoPos, "a phasors block lists the values to draw after the word phasors, separated by commas, e.g. phasors V_a, I_a")
		return res
	}
	parts, offs := calcdoc.SplitTopLevel(b.Arg)
	for k, part := range parts {
		lead := len(part) - len(strings.TrimLeft(part, " \t"))
		text := strings.TrimSpace(part)
		it := &PhasorItem{Text: text, Pos: b.ArgAt(offs[k] + lead)}
		res.Items = append(res.Items, it)
		if x, name, nameOff, ok := splitFrom(text); ok {
			it.Text, it.FromName = x, name
			it.FromPos = b.ArgAt(offs[k] + lead + nameOff)
			text = x
			if !resolveFrom(b, res, it) {
				continue
			}
		}
		if text == "" {
			it.Err = expr.Errorf(it.Pos, "empty entry in the list of phasors: write a name or an expression between the commas")
			b.Errors = append(b.Errors, it.Err)
			continue
		}
		var errs expr.ErrorList
		x, disp := expr.ParseExpr(expr.NewSource(text, it.Pos), &errs)
		if len(errs) > 0 {
			it.Err = errs[0]
			b.Errors = append(b.Errors, errs...)
			continue
		}
		it.Node = x
		if disp != nil {
			it.Err = expr.Errorf(disp.Pos(), "a phasors entry takes no unit bracket: each dimension is drawn on its own scale in the unit the sheet chooses")
			b.Errors = append(b.Errors, it.Err)
			continue
		}
		v, err := b.Env().Eval(x, nil)
		if err != nil {
			switch e := err.(type) {
			case *expr.UnavailableError:
				it.Unavailable = e
			case *expr.Error:
				it.Err = e
				b.Errors = append(b.Errors, e)
			}
			continue
		}
		s, ok := v.(*expr.Scalar)
		if !ok {
			it.Err = expr.Errorf(it.Pos, "%s is %s: a phasor diagram draws single values (pick an entry, e.g. %s(1))", text, expr.Describe(v), text)
			b.Errors = append(b.Errors, it.Err)
			continue
		}
		if !s.IsFinite() {
			it.Err = expr.Errorf(it.Pos, "%s is not finite (%v): it cannot be drawn", text, s.Z)
			b.Errors = append(b.Errors, it.Err)
			continue
		}
		if it.From != nil && s.Dim != it.From.Value.Dim {
			it.Err = expr.Errorf(it.Pos, "%s is %s and %s is %s: an arrow starts at the tip of an arrow of its own dimension (draw %s from an entry of that dimension, or from the origin)",
				text, expr.DimWord(s.Dim), it.FromName, expr.DimWord(it.From.Value.Dim), text)
			b.Errors = append(b.Errors, it.Err)
			continue
		}
		it.Value = s
		it.tip = s.Z
		if it.From != nil {
			it.tip += it.From.tip
		}
		if id, isName := x.(*expr.Ident); isName {
			if bd := b.Env().Lookup(id.Name); bd != nil {
				it.Display = bd.Display
			}
		}
	}
	assignPhasorScales(b, res)
	return res
}

// assignPhasorScales groups the entries with values by dimension and sets
// each entry's Unit, Factor, Re and Im.
func assignPhasorScales(b *calcdoc.Block, res *Phasors) {
	type group struct {
		dim     expr.Dim
		max     float64
		complex bool
		kind    expr.PowerKind // of a group of powers (IEEE 1459)
		items   []*PhasorItem
	}
	var groups []*group
	for _, it := range res.Items {
		if !it.OK() {
			continue
		}
		var g *group
		for _, x := range groups {
			if x.dim == it.Value.Dim {
				g = x
			}
		}
		if g == nil {
			if len(groups) == MaxPhasorScales {
				it.Err = expr.Errorf(it.Pos, "%s is %s, a further scale: one diagram draws at most %d dimensions, each on its own scale; split it into two diagrams", it.Text, expr.DimWord(it.Value.Dim), MaxPhasorScales)
				b.Errors = append(b.Errors, it.Err)
				it.Value = nil
				continue
			}
			g = &group{dim: it.Value.Dim}
			groups = append(groups, g)
		}
		g.items = append(g.items, it)
		g.max = math.Max(g.max, math.Max(cmplx.Abs(it.Value.Z), cmplx.Abs(it.tip)))
		g.complex = g.complex || !it.Value.IsReal()
		if len(g.items) == 1 {
			g.kind = it.Value.Kind
		} else if g.kind != it.Value.Kind {
			g.kind = expr.PowerApparent // powers of several kinds on one scale: VA
		}
	}
	for _, g := range groups {
		unit, factor := phasorUnit(g.dim, g.kind, g.max, g.complex)
		for _, it := range g.items {
			it.Unit, it.Factor = unit, factor
			z := it.Value.Z / complex(factor, 0)
			it.Re, it.Im = real(z), imag(z)
			if it.From != nil {
				it.X0, it.Y0 = it.From.X0+it.From.Re, it.From.Y0+it.From.Im
			}
			if t := cmplx.Abs(it.tip / complex(factor, 0)); it.From != nil && t > phasorMaxMag {
				it.Err = expr.Errorf(it.Pos, "%s drawn from %s ends at magnitude %g %s, beyond what a diagram can draw (%g)", it.Text, it.FromName, t, unit, phasorMaxMag)
				b.Errors = append(b.Errors, it.Err)
			} else if m := cmplx.Abs(z); m > phasorMaxMag || (m != 0 && m < phasorMinMag) {
				it.Err = expr.Errorf(it.Pos, "%s has magnitude %g %s, beyond what a diagram can draw (%g to %g)", it.Text, m, unit, phasorMinMag, phasorMaxMag)
				b.Errors = append(b.Errors, it.Err)
			}
		}
	}
}

// phasorUnit is the unit, and its size in coherent SI units, in which the
// sheet shows a magnitude m of dimension d and power kind k (complex
// selects VA for a power): the engine's one choice of display unit
// (expr.DisplayUnit).
func phasorUnit(d expr.Dim, k expr.PowerKind, m float64, complexValue bool) (string, float64) {
	z := complex(m, 0)
	if complexValue {
		z = cmplx.Rect(m, math.Pi/4)
	}
	return expr.DisplayUnit(&expr.Scalar{Z: z, Dim: d, Kind: k}, &expr.Display{Form: expr.FormPolar}, calcdoc.DefaultDigits)
}
