package expr

import (
	"math"
	"strings"
	"testing"
)

// shownLast runs text and returns how its last statement's value is shown
// (in the display the line or its literal chose).
func shownLast(t *testing.T, text string) string {
	t.Helper()
	b := runBlock(text)
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatalf("%q: unexpected error: %v", text, errs[0])
	}
	r := b.results[len(b.results)-1]
	return FormatValue(r.Value, r.Display, 4)
}

// The resistance of a copper conductor at 70 °C from its resistance at
// 20 °C, R = R_20 (1 + alpha_20 (theta - 20 °C)), the linear law of the
// handbooks (and of IEC 60287-1-1, 2.1.1). Inputs: R_20 = 0.193 Ω/km, the
// maximum DC resistance at 20 °C of a 95 mm² class 2 plain copper
// conductor (IEC 60228:2004, Table 2; written from memory, used here only
// as an input); alpha_20 = 0.00393 K^-1 for copper (IEC 60287-1-1:2006,
// Table 1, 3.93e-3; written from memory, and the commonly cited handbook
// value).
//
// Hand derivation: theta - 20 °C = 70 - 20 = 50 K;
// alpha_20 * 50 K = 0.00393 * 50 = 0.1965; 1 + 0.1965 = 1.1965;
// R_70 = 0.193 * 1.1965 = 0.2309245 Ω/km, in coherent units
// 2.309245e-4 Ω/m.
func TestCopperResistanceAt70C(t *testing.T) {
	src := `R_20 = 0.193 Ω/km
alpha_20 = 0.00393 K^-1
theta = 70 °C
R_70 = R_20 * (1 + alpha_20 * (theta - 20 °C))`
	b := runBlock(src)
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs[0])
	}
	r := b.results[3].Value.(*Scalar)
	if want := 0.2309245e-3; math.Abs(real(r.Z)-want) > 1e-12*want || r.Dim != DimImpedance.Div(DimLength) {
		t.Errorf("R_70 = %v %s, want %v Ω/m (hand derivation)", r.Z, r.Dim, want)
	}
	if r.AbsTemp {
		t.Error("a resistance is not an absolute temperature")
	}
	th := b.results[2]
	if got := FormatValue(th.Value, th.Display, 4); got != "70.00 °C" {
		t.Errorf("theta shown %q, want 70.00 °C", got)
	}
	// theta stands in a difference inside the formula: its substitution
	// stays in °C
	for _, v := range b.results[3].Trace.Values() {
		if s := v.(*Scalar); s.Dim == DimTemperature && !s.AbsTemp {
			t.Errorf("theta in theta - 20 °C was substituted as a difference: %v", s.Z)
		}
	}
}

func TestTemperatureArithmetic(t *testing.T) {
	for _, c := range []struct {
		src    string
		kelvin float64 // the value in K (hand derivation: T/K = t/°C + 273.15)
		abs    bool
		shown  string
	}{
		{"70 °C", 343.15, true, "70.00 °C"},
		{"70 degC", 343.15, true, "70.00 °C"},
		{"-20 °C", 253.15, true, "-20.00 °C"},
		{"(-20) °C", 253.15, true, "-20.00 °C"},
		{"0 °C", 273.15, true, "0.000 °C"},
		// a difference: 70 °C - 20 °C = 50 K
		{"theta = 70 °C\ntheta - 20 °C", 50, false, "50.00 K"},
		// absolute + difference: 70 °C + 15 K = 85 °C = 358.15 K
		{"theta = 70 °C\ntheta + 15 K", 358.15, true, "85.00 °C"},
		{"theta = 70 °C\n15 K + theta", 358.15, true, "85.00 °C"},
		{"theta = 70 °C\ntheta - 15 K", 328.15, true, "55.00 °C"},
		// a K literal is a difference, shown in K
		{"50 K", 50, false, "50.00 K"},
		// an absolute temperature in a bracket of K
		{"theta[K] = 70 °C", 343.15, true, "343.1 K"},
		// round, max keep it absolute: 71.3 °C to 5 K steps is 70 °C
		{"theta = 71.3 °C\nround(theta, 5 K)", 343.15, true, "70.00 °C"},
		{"max(40 °C, 70 °C)", 343.15, true, "70.00 °C"},
		// in a product it counts in K and the result has no mark
		{"theta = 70 °C\n2 * theta", 686.3, false, "686.3 K"},
		// vectors: entry by entry
		{"v = ([20; 70]) °C\nv(2)", 343.15, true, "70.00 °C"},
		{"v = [20 °C; 70 °C]\nw = v - [20 °C; 20 °C]\nw(2)", 50, false, "50.00 K"},
	} {
		b := runBlock(c.src)
		if errs := b.allErrors(); len(errs) > 0 {
			t.Errorf("%q: %v", c.src, errs[0])
			continue
		}
		r := b.results[len(b.results)-1]
		s := r.Value.(*Scalar)
		if math.Abs(real(s.Z)-c.kelvin) > 1e-9 || s.AbsTemp != c.abs || s.Dim != DimTemperature {
			t.Errorf("%q = %v %s (absolute %v), want %v K (absolute %v)", c.src, s.Z, s.Dim, s.AbsTemp, c.kelvin, c.abs)
		}
		if got := FormatValue(r.Value, r.Display, 4); got != c.shown {
			t.Errorf("%q shown %q, want %q", c.src, got, c.shown)
		}
	}
}

// Where an absolute temperature enters a product, its substitution shows
// it in K (LANGUAGE.md section 4): the trace holds it without the mark.
func TestTemperatureSubstitutedInKelvin(t *testing.T) {
	b := runBlock("alpha_0 = 0.00427 K^-1\ntheta = 70 °C\nx = alpha_0 * theta")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs[0])
	}
	vals := b.results[2].Trace.Values()
	if len(vals) != 2 {
		t.Fatalf("trace holds %d values, want 2", len(vals))
	}
	th := vals[1].(*Scalar)
	if th.AbsTemp {
		t.Error("theta in a product is substituted as an absolute temperature (°C)")
	}
	if got := FormatValue(th, nil, 5); got != "343.15 K" {
		t.Errorf("theta substituted as %q, want 343.15 K", got)
	}
	// the name itself keeps its mark
	if !b.env.Lookup("theta").Value.(*Scalar).AbsTemp {
		t.Error("theta lost its mark in the Env")
	}
}

func TestTemperatureErrors(t *testing.T) {
	for _, c := range []struct{ src, want string }{
		{"70 °C + 20 °C", "cannot add two absolute temperatures"},
		{"50 K - 20 °C", "cannot subtract the absolute temperature"},
		{"theta = 70 °C\n-theta", "cannot negate the absolute temperature"},
		{"dT[°C] = 50 K", "temperature difference and cannot be shown in °C (a point on the scale): show it in K"},
		{"alpha = 0.004 °C^-1", "cannot be part of a compound unit"},
		{"(3 V) °C", "is a temperature scale: it follows a real plain number"},
		{"-300 °C", "below absolute zero"},
		{"max(40 °C, 300 K)", "cannot compare the absolute temperature and the temperature difference"},
	} {
		err := firstError(c.src)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want one containing %q", c.src, err, c.want)
		}
	}
	// the coulomb is no longer suggested for °C
	if err := firstError("theta = 70 °C"); err != nil {
		t.Errorf("70 °C: %v", err)
	}
}

// Checks on temperatures: two absolute temperatures, or two differences;
// no share of the limit for absolute temperatures.
func TestTemperatureChecks(t *testing.T) {
	b := runBlock("theta = 70 °C\ncheck theta <= 90 °C\ncheck theta - 20 °C <= 60 K")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs[0])
	}
	c1, c2 := b.results[1].Check, b.results[2].Check
	if !c1.Pass || c1.HasUtil {
		t.Errorf("theta <= 90 °C: pass %v, utilisation shown %v", c1.Pass, c1.HasUtil)
	}
	// hand derivation: 50 K of 60 K is 0.8333
	if !c2.Pass || !c2.HasUtil || math.Abs(c2.Utilisation-50.0/60) > 1e-12 {
		t.Errorf("theta - 20 °C <= 60 K: %+v", c2)
	}
	err := firstError("theta = 70 °C\ncheck theta <= 363 K")
	if err == nil || !strings.Contains(err.Error(), "cannot compare the absolute temperature 70 °C with the temperature difference 363 K") {
		t.Errorf("error %v", err)
	}
}
