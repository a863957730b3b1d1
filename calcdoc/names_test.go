package calcdoc_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// TestSweepVariableHoldsAnAngle: a sweep variable whose range is in degrees
// holds an angle and may stand right of ∠, under either spelling of its
// name (LANGUAGE.md section 3); one whose range is plain numbers may not.
// Reference: math/cmplx.Rect with the angle in radians.
func TestSweepVariableHoldsAnAngle(t *testing.T) {
	d := calcdoc.Parse("sweep_angle.md", []byte("```sweep phi = 0° .. 90° 3\nV = 10 V∠φ\n```\n"), kinds)
	if len(d.Errors) != 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	sw := swSweep(t, d)
	for i, deg := range []float64{0, 45, 90} {
		want := cmplx.Rect(10, deg*math.Pi/180)
		if got := sw.Lines[0].Z[i]; cmplx.Abs(got-want) > 1e-12 {
			t.Errorf("point %d: V = %v, want %v", i, got, want)
		}
	}
	d = calcdoc.Parse("sweep_plain.md", []byte("```sweep x = 0 .. 1.5 3\nV = 10 V∠x\n```\n"), kinds)
	if len(d.Errors) == 0 || !strings.Contains(d.Errors[0].Error(), "2:10: the angle after ∠, x, is the plain number") {
		t.Errorf("errors %v, want the plain-number angle error at 2:10", d.Errors)
	}
}

// TestSweepNamesOneSpelling: a line of a sweep block may not define a name
// under the other spelling of the sweep variable or of a line above.
func TestSweepNamesOneSpelling(t *testing.T) {
	d := calcdoc.Parse("sweep_names.md", []byte("```sweep omega = 1 Hz .. 2 Hz 2\nω = 2\nX_phi = 1\nX_φ = 2\n```\n"), kinds)
	var got []string
	for _, e := range d.Errors {
		got = append(got, e.Error())
	}
	all := strings.Join(got, "\n")
	for _, want := range []string{`2:1: "ω" is the sweep variable`, `4:1: "X_φ" is already defined in this block at line 3`} {
		if !strings.Contains(all, want) {
			t.Errorf("errors\n%s\nwant one containing %q", all, want)
		}
	}
}

// TestSolveUnknownOneSpelling: an unknown listed as phi is the φ of the
// equations. Hand derivation: 2·φ = 1 gives φ = 0.5.
func TestSolveUnknownOneSpelling(t *testing.T) {
	d := calcdoc.Parse("solve_names.md", []byte("```solve phi real\n2 * φ = 1\n```\n"), kinds)
	if len(d.Errors) != 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	b := d.Env.Lookup("φ")
	if b == nil || b.Unavailable || b.Name != "phi" {
		t.Fatalf("binding %+v, want phi", b)
	}
	if s, ok := b.Value.(*expr.Scalar); !ok || math.Abs(real(s.Z)-0.5) > 1e-12 || imag(s.Z) != 0 {
		t.Errorf("phi = %v, want 0.5", b.Value)
	}
}

// TestSweepVariableLetters: the sweep variable, read from the block header
// rather than by the scanner, follows the same letter rule (U+3164 HANGUL
// FILLER and U+0399 GREEK CAPITAL LETTER IOTA, Unicode code charts).
func TestSweepVariableLetters(t *testing.T) {
	tests := []struct{ name, header, msg string }{
		{"Hangul filler", "I\u3164 = 1 .. 2 2", `the name "I" holds an invisible character, U+3164 (HANGUL FILLER)`},
		{"Greek capital Iota", "\u0399_k = 1 A .. 2 A 2", `holds the Greek letter "Ι" (U+0399), which looks like the Latin I: write I_k`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := calcdoc.Parse("sweep_letters.md", []byte("```sweep "+tc.header+"\ny = 2\n```\n"), kinds)
			if len(d.Errors) == 0 || !strings.Contains(d.Errors[0].Error(), tc.msg) {
				t.Errorf("errors %v, want one containing %q", d.Errors, tc.msg)
			}
		})
	}
}

// TestSweepLineNamesRenewed: a line that uses the other spelling of a
// name defined by a line above depends on that line, and the values of
// the lines are cleared by key from point to point. Hand derivation:
// η = 2/(2 − x) at x = 1, 2, 3 is 2, a division by zero (a gap), −2; so
// z = 2·eta is 4, a gap that follows from the gap of η (not an error of
// its own, and not 2·2 from the point before), −4.
func TestSweepLineNamesRenewed(t *testing.T) {
	d := calcdoc.Parse("sweep_eta.md", []byte("```sweep x = 1 .. 3 3\nη = 2 / (2 - x)\nz = 2 * eta\n```\n"), kinds)
	sw := swSweep(t, d)
	z := sw.Lines[1].Z
	if real(z[0]) != 4 || !math.IsNaN(real(z[1])) || real(z[2]) != -4 {
		t.Errorf("z = %v, want [4, gap, -4]", z)
	}
	if l := sw.Lines[1]; l.GapErr != nil || len(l.Errs) != 0 {
		t.Errorf("z: gap error %v, errors %v; want none (the eta it uses is η)", l.GapErr, l.Errs)
	}
}
