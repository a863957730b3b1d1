package expr

import (
	"math"
	"strings"
	"testing"
)

// Rounding to a step, LANGUAGE.md section 3. The expected values are hand
// derivations: the multiples of the step around x, and the rule that picks
// one (ceil the multiple at or above, floor at or below, round the nearer,
// a half away from zero).
func TestRoundingSteps(t *testing.T) {
	for _, c := range []struct {
		src  string
		want float64 // coherent SI units
		unit string  // the unit it is shown in
	}{
		// hand derivation: 1.1 * 100 = 110.00000000000001 in binary; it is
		// within 1e-9 relative of 11 * 10 A, so it counts as 110 A and
		// ceil does not step up to 120 A (the contract's example)
		{"ceil(1.1 * 100 A, 10 A)", 110, "A"},
		{"floor(1.1 * 100 A, 10 A)", 110, "A"},
		// hand derivation: 0.1 + 0.2 = 0.30000000000000004, one multiple of 0.1
		{"floor((0.1 + 0.2) * 10, 1)", 3, ""},
		// hand derivation: 47.2 A lies between 45 A and 50 A
		{"ceil(47.2 A, 5 A)", 50, "A"},
		{"floor(47.2 A, 5 A)", 45, "A"},
		{"round(47.2 A, 5 A)", 45, "A"},
		// halves go away from zero: 47.5/5 = 9.5 -> 10, -47.5/5 = -9.5 -> -10
		{"round(47.5 A, 5 A)", 50, "A"},
		{"round(-47.5 A, 5 A)", -50, "A"},
		{"round(2.5)", 3, ""},
		{"round(-2.5)", -3, ""},
		{"ceil(-2.5)", -2, ""},
		{"floor(-2.5)", -3, ""},
		// the step in another unit of the same dimension: 1234 W to 0.5 kW
		{"ceil(1234 W, 0.5 kW)", 1500, "W"},
		// a number of capacitor steps: 137 kvar / 25 kvar = 5.48 -> 6
		{"ceil(137 kvar / (25 kvar))", 6, ""},
		// hand derivation: 110 * (1 - 1e-10) is 1.1e-8 below 110, within
		// 1e-9 * 110 = 1.1e-7, so it counts as 110 and floor gives 110 ...
		{"floor(110 * (1 - 1e-10) A, 10 A)", 110, "A"},
		// ... while 110 * (1 - 1e-8) is 1.1e-6 below, outside it: floor gives 100
		{"floor(110 * (1 - 1e-8) A, 10 A)", 100, "A"},
	} {
		s := evalScalar(t, c.src)
		if math.Abs(real(s.Z)-c.want) > 1e-12*math.Max(1, math.Abs(c.want)) || imag(s.Z) != 0 {
			t.Errorf("%s = %v, want %v", c.src, s.Z, c.want)
		}
		if u, _ := DisplayUnit(s, nil, 4); !strings.HasSuffix(u, c.unit) {
			t.Errorf("%s shown in %q, want %q", c.src, u, c.unit)
		}
	}
}

// Rounding keeps the marks of x: a real power its kind (IEEE 1459, as
// scaling by a plain number does, kinds.go), an angle its angle mark.
func TestRoundingKeepsMarks(t *testing.T) {
	q := evalScalar(t, "ceil(137 kvar, 25 kvar)")
	if q.Kind != PowerReactive || real(q.Z) != 150e3 {
		t.Errorf("ceil(137 kvar, 25 kvar) = %v of kind %v, want 150 kvar, reactive", q.Z, q.Kind)
	}
	if got := FormatValue(q, nil, 4); got != "150.0 kvar" {
		t.Errorf("shown %q, want 150.0 kvar", got)
	}
	// hand derivation: 33.7° lies between 30° and 35°; the nearer is 35°
	a := evalScalar(t, "round(33.7°, 5°)")
	if !a.Angle || math.Abs(real(a.Z)-35*math.Pi/180) > 1e-15 {
		t.Errorf("round(33.7°, 5°) = %v (angle %v), want 35° as an angle", a.Z, a.Angle)
	}
	if got := FormatValue(a, nil, 4); got != "35.00°" {
		t.Errorf("shown %q, want 35.00°", got)
	}
}

func TestRoundingErrors(t *testing.T) {
	for _, c := range []struct{ src, want string }{
		{"ceil(47.2 A, 5 V)", "the step 5 V is a voltage, but 47.2 A is a current"},
		{"ceil(47.2 A, 0 A)", "the step must be a positive real value"},
		{"ceil(47.2 A, -5 A)", "the step must be a positive real value"},
		{"ceil(47.2 A, (5 + j1) A)", "the step must be a positive real value"},
		{"round((3 + j4) A, 1 A)", "cannot round the complex value"},
		{"round(47.2 A)", "give the step in its unit, e.g. 1 A"},
		{"round(33.7°)", "give the step in its unit, e.g. 1°"},
		{"round([1; 2], 1)", "rounds a single value"},
		{"round(1, 2, 3)", "round takes 1 to 2 arguments, not 3"},
		{"ceil(137 kvar, 25 kW)", "the step 25 kW is an active power, but 137 kvar is a reactive power: give the step in var"},
		{"round(71.3 °C, 5 °C)", "the step 5 °C is an absolute temperature: give the step as a difference in K"},
	} {
		err := firstError(c.src)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.src, err, c.want)
		}
	}
}
