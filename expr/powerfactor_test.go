package expr

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// The power factor and its sense, against the definitions of IEEE Std
// 1459-2010 (from memory of the standard: for sinusoidal single-phase
// quantities the apparent power is S = V·I = √(P² + Q²) and the power
// factor is PF = P/S, the ratio of active to apparent power, taken here
// as |P|/|S| so that it lies in [0, 1] whichever way the power flows) and
// the four-quadrant convention LANGUAGE.md section 3 states: lagging when
// P·Q > 0, leading when P·Q < 0, no word when Q = 0, "export" when P < 0.
//
// Hand derivation of the quadrants, with S = V·conj(I) for the power
// taken in at the terminals (load convention) and V = |V|∠0:
//   - quadrant I, P > 0, Q > 0: an inductive load, Z = R + jX with X > 0,
//     takes S = |I|²·Z, and I = V/Z lags V: "lagging";
//   - quadrant IV, P > 0, Q < 0: a capacitive load, X < 0, I leads V:
//     "leading";
//   - quadrant III, P < 0, Q < 0: a machine sending out both active and
//     reactive power, the over-excited generator that the trade says runs
//     at a lagging power factor: "lagging, export";
//   - quadrant II, P < 0, Q > 0: a generator sending out active power and
//     taking in reactive power (under-excited), "leading, export".
//
// With P = 3, Q = 4 (any unit) |S| = 5 and PF = 3/5 = 0.6 exactly; with
// P = 400 kW, Q = 300 kvar, |S| = 500 kVA and PF = 0.8.
func TestPowerFactorQuadrants(t *testing.T) {
	cases := []struct {
		name   string
		s      complex128 // P + jQ in W and var
		pf     float64
		word   string
		export bool
		shown  string // the sense as the sheet writes it
	}{
		{"I: inductive load", complex(400e3, 300e3), 0.8, "lagging", false, "lagging"},
		{"IV: capacitive load", complex(400e3, -300e3), 0.8, "leading", false, "leading"},
		{"III: over-excited generator", complex(-400e3, -300e3), 0.8, "lagging", true, "lagging, export"},
		{"II: under-excited generator", complex(-400e3, 300e3), 0.8, "leading", true, "leading, export"},
		{"I: 3-4-5", complex(3, 4), 0.6, "lagging", false, "lagging"},
		{"IV: 3-4-5", complex(3, -4), 0.6, "leading", false, "leading"},
		{"Q = 0, taken in", complex(250e3, 0), 1, "", false, ""},
		{"Q = 0, sent out", complex(-250e3, 0), 1, "", true, "export"},
		// Q within 1e-12 of |S| is rounding residue: the value is shown as
		// real, and the power factor as in phase (section 4's rule)
		{"Q rounding residue", complex(250e3, 1e-9), 1, "", false, ""},
		// P = 0: PF = 0/|S| = 0; read as consumed (a reactor "at zero power
		// factor lagging", common practice)
		{"P = 0, inductive", complex(0, 100e3), 0, "lagging", false, "lagging"},
		{"P = 0, capacitive", complex(0, -100e3), 0, "leading", false, "leading"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			pf, sense := PowerFactor(c.s)
			if math.Abs(pf-c.pf) > 1e-15 {
				t.Errorf("PowerFactor(%v) = %.17g, want %.17g", c.s, pf, c.pf)
			}
			if sense.Word() != c.word || sense.Export() != c.export || sense.String() != c.shown {
				t.Errorf("sense of %v: word %q export %v shown %q, want %q %v %q", c.s, sense.Word(), sense.Export(), sense.String(), c.word, c.export, c.shown)
			}
			// the same through the language: a literal P + jQ in kVA
			src := "S_x = " + zlit(c.s/1000) + " kVA\npf_x = powerfactor(S_x)"
			v := evalScalar(t, src)
			if v.Dim != (Dim{}) || imag(v.Z) != 0 || math.Abs(real(v.Z)-c.pf) > 1e-15 {
				t.Errorf("%s: got %v of %s, want the plain number %g", src, v.Z, DimWord(v.Dim), c.pf)
			}
			if v.Sense.String() != c.shown {
				t.Errorf("%s: sense %q, want %q", src, v.Sense.String(), c.shown)
			}
		})
	}
}

// TestPowerFactorOfALoad checks the number against the handbook formula
// for a load of impedance Z = R + jX fed at V: PF = cos φ = R/|Z| (φ the
// angle of Z), computed here with Go's math/cmplx, for loads of our own.
func TestPowerFactorOfALoad(t *testing.T) {
	for _, z := range []complex128{complex(3.3, 2.1), complex(0.47, -1.9), complex(120, 0.5), complex(8, -8)} {
		v := complex(230, 0)
		i := v / z
		s := v * cmplx.Conj(i)
		want := real(z) / cmplx.Abs(z)
		pf, sense := PowerFactor(s)
		if math.Abs(pf-want) > 1e-14 {
			t.Errorf("Z = %v: PF %.17g, want R/|Z| = %.17g", z, pf, want)
		}
		wantWord := "lagging"
		if imag(z) < 0 {
			wantWord = "leading"
		}
		if sense.String() != wantWord {
			t.Errorf("Z = %v: sense %q, want %q", z, sense, wantWord)
		}
	}
}

// TestPowerFactorShown checks where the sense shows: the value's text,
// through a name, and that arithmetic on the number gives a plain number
// without a sense (the number itself is an ordinary real).
func TestPowerFactorShown(t *testing.T) {
	src := "S_b = (400 + j300) kVA\npf_b = powerfactor(S_b)\n"
	cases := []struct {
		text, shown string
	}{
		{src + "pf_b", "0.8000 lagging"},
		{src + "x = pf_b", "0.8000 lagging"},
		{src + "powerfactor(-S_b)", "0.8000 lagging, export"},
		{src + "powerfactor(conj(S_b))", "0.8000 leading"},
		{src + "powerfactor(-re(S_b))", "1.000 export"},
		{src + "2 * pf_b", "1.600"},
		{src + "pf_b - 0.8", "0.000"},
		{src + "acos(pf_b)", "36.87°"},
		{src + "[pf_b; powerfactor(conj(S_b))]", "[0.8000 lagging; 0.8000 leading]"},
	}
	for _, c := range cases {
		v := evalLast(t, c.text)
		if got := FormatValue(v, nil, 4); got != c.shown {
			t.Errorf("%q: shown %q, want %q", c.text, got, c.shown)
		}
	}
	// a check compares the number: 0.8 < 0.95 (hand comparison)
	b := runBlock(src + "check powerfactor(S_b) >= 0.95\ncheck pf_b >= 0.75")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs[0])
	}
	if r := b.results[2].Check; r == nil || r.Pass || r.Values[0].Sense.String() != "lagging" {
		t.Errorf("check powerfactor(S_b) >= 0.95: want not satisfied with the side lagging, got %+v", r)
	}
	if r := b.results[3].Check; r == nil || !r.Pass {
		t.Errorf("check pf_b >= 0.75: want satisfied, got %+v", r)
	}
}

// TestPowerFactorErrors: powerfactor of a non-power or of zero power.
func TestPowerFactorErrors(t *testing.T) {
	cases := []struct{ text, want string }{
		{"powerfactor(230 V)", "needs a power"},
		{"powerfactor(0.8)", "needs a power"},
		{"powerfactor(0 kVA)", "zero power"},
		{"S = 0 W\npowerfactor(S)", "zero power"},
		{"powerfactor([1 kW; 2 kW])", "single value"},
		{"powerfactor(1 kW, 2 kW)", "argument"},
	}
	for _, c := range cases {
		err := firstError(c.text)
		if err == nil {
			t.Errorf("%q: no error", c.text)
			continue
		}
		if !strings.Contains(errMsg(err), c.want) {
			t.Errorf("%q: error %q, want it to say %q", c.text, errMsg(err), c.want)
		}
		if p := errPos(err).Position(); p.Line == 0 || p.Col == 0 {
			t.Errorf("%q: error without a position: %v", c.text, err)
		}
	}
}
