package phasors_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/calcdoc/kind/phasors"
	"calcdoc/expr"
)

// phDoc parses a document made of the given lines.
func phDoc(lines ...string) *calcdoc.Document {
	return calcdoc.Parse("phasors_test.md", []byte(strings.Join(lines, "\n")+"\n"), kind.Standard())
}

// phBlock returns the first block of a kind.
func phBlock(t *testing.T, d *calcdoc.Document, kind string) *calcdoc.Block {
	t.Helper()
	for _, b := range d.Blocks {
		if b.Kind == kind {
			return b
		}
	}
	t.Fatalf("no %s block", kind)
	return nil
}

// phCalc is a calc block that the phasor tests draw from (lines 1-9).
var phCalc = []string{
	"```calc",
	"V_a = 11 kV",           // line 2
	"I_a = 1.5 kA∠-25°",     // line 3
	"S_a = V_a * conj(I_a)", // line 4
	"M = [1; 2]",            // line 5
	"Z_1 = (3 + j4) Ω",      // line 6
	"f_1 = 50 Hz",           // line 7
	"bad = 1 V + 1 A",       // line 8: fails, so bad is unavailable
	"```",
	"",
}

func TestPhasorsValuesAndScales(t *testing.T) {
	d := phDoc(append(append([]string{}, phCalc...),
		"```phasors V_a, I_a, S_a, I_a * 2", // line 11
		"Feeder at full load,",
		"",
		"  phase a.",
		"```")...)
	if len(d.Errors) != 1 || d.Errors[0].Pos.Line() != 8 {
		t.Fatalf("want only the error of line 8, got %v", d.Errors)
	}
	b := phBlock(t, d, "phasors")
	res := b.Result.(*phasors.Phasors)
	if res.Caption != "Feeder at full load, phase a." {
		t.Errorf("caption %q", res.Caption)
	}
	// Expected values: polar to rectangular by Go's math/cmplx.Rect; the
	// complex power S = V·conj(I) (IEEE 1459 convention, lagging current
	// gives positive Q). Units: the sheet's default unit with the SI prefix
	// that puts the group's largest magnitude in [1, 1000) (LANGUAGE.md
	// section 4): 11 kV, 3 kA (of I_a*2), 16.5 MVA.
	deg := math.Pi / 180
	i := cmplx.Rect(1.5, -25*deg)
	cases := []struct {
		text   string
		col    int
		unit   string
		factor float64
		want   complex128 // in unit
	}{
		{"V_a", 12, "kV", 1e3, 11},
		{"I_a", 17, "kA", 1e3, i},
		{"S_a", 22, "MVA", 1e6, 11 * cmplx.Conj(i)},
		{"I_a * 2", 27, "kA", 1e3, 2 * i},
	}
	if len(res.Items) != len(cases) {
		t.Fatalf("%d items, want %d", len(res.Items), len(cases))
	}
	for k, c := range cases {
		it := res.Items[k]
		t.Run(c.text, func(t *testing.T) {
			if !it.OK() {
				t.Fatalf("item not drawn: err %v", it.Err)
			}
			if it.Text != c.text || it.Pos.Position().InFile() != (expr.Position{Line: 11, Col: c.col}) {
				t.Errorf("text %q at %v, want %q at 11:%d", it.Text, it.Pos, c.text, c.col)
			}
			if it.Unit != c.unit || it.Factor != c.factor {
				t.Errorf("unit %q factor %g, want %q %g", it.Unit, it.Factor, c.unit, c.factor)
			}
			got := complex(it.Re, it.Im)
			if cmplx.Abs(got-c.want) > 1e-12*cmplx.Abs(c.want) {
				t.Errorf("value %v %s, want %v", got, it.Unit, c.want)
			}
		})
	}
}

func TestPhasorsErrors(t *testing.T) {
	seven := "```phasors V_a, I_a, Z_1, 1/Z_1, f_1, 1 F, 1 H" // the seventh dimension (1 H) starts at col 44
	cases := []struct {
		name string
		line string
		col  int
		msg  string
	}{
		{"undefined name", "```phasors V_a, X_b", 17, `unknown name "X_b"`},
		{"not a scalar", "```phasors M", 12, "a vector of 2 entries"},
		// |V_a|·1e308 exceeds the largest binary64 number (IEEE 754-2019
		// section 7.4, overflow): the error is at the * (column 16)
		{"not finite", "```phasors V_a * 1e308", 16, "this product overflows"},
		{"empty entry", "```phasors V_a,, I_a", 16, "empty entry"},
		{"unit bracket", "```phasors I_a[kA]", 15, "no unit bracket"},
		{"no list", "```phasors", 4, "lists the values to draw"},
		{"parse error", "```phasors V_a +", 17, "missing"},
		{"seven dimensions", seven, 44, "at most 6 dimensions"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := phDoc(append(append([]string{}, phCalc...), c.line, "```")...)
			b := phBlock(t, d, "phasors")
			if len(b.Errors) != 1 {
				t.Fatalf("want one error, got %v", b.Errors)
			}
			e := b.Errors[0]
			if e.Pos.Position().InFile() != (expr.Position{Line: 11, Col: c.col}) || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("error %v, want at 11:%d containing %q", e, c.col, c.msg)
			}
			found := false
			for _, de := range d.Errors {
				found = found || de == e
			}
			if !found {
				t.Errorf("block error not among the document's errors")
			}
		})
	}
}

func TestPhasorsUnavailableName(t *testing.T) {
	// bad's definition failed (line 8): using it is not a new error.
	d := phDoc(append(append([]string{}, phCalc...), "```phasors bad, V_a", "```")...)
	b := phBlock(t, d, "phasors")
	if len(b.Errors) != 0 {
		t.Fatalf("unexpected errors %v", b.Errors)
	}
	res := b.Result.(*phasors.Phasors)
	if u := res.Items[0].Unavailable; u == nil || u.Name != "bad" || u.Def.Line() != 8 {
		t.Errorf("item 0 unavailable = %+v, want bad defined at line 8", u)
	}
	if !res.Items[1].OK() {
		t.Errorf("V_a should still be drawn")
	}
}

func TestPhasorsZeroAndPlain(t *testing.T) {
	// A zero value and a plain number each get a scale; a group of zeros
	// has the base unit (nothing to choose a prefix from).
	d := phDoc("```calc", "I_0 = 0 A", "k = 0.5 + j0.5", "```", "", "```phasors I_0, k", "```")
	res := phBlock(t, d, "phasors").Result.(*phasors.Phasors)
	if len(d.Errors) != 0 {
		t.Fatalf("errors %v", d.Errors)
	}
	if it := res.Items[0]; it.Unit != "A" || it.Re != 0 || it.Im != 0 {
		t.Errorf("I_0: unit %q value %g%+gj, want A and 0", it.Unit, it.Re, it.Im)
	}
	if it := res.Items[1]; it.Unit != "" || it.Factor != 1 || it.Re != 0.5 || it.Im != 0.5 {
		t.Errorf("k: unit %q factor %g value %g%+gj, want plain 0.5+0.5j", it.Unit, it.Factor, it.Re, it.Im)
	}
}
