package expr

import (
	"strings"
	"testing"
)

// shownAs runs src and returns the last statement's value as the sheet
// shows it: in the display its line chose (ChooseDisplay).
func shownAs(t *testing.T, src string, prefs []string, digits int) (*Scalar, string) {
	t.Helper()
	b := &block{env: NewEnv()}
	if prefs != nil {
		p, _, err := NewPreferred(prefs)
		if err != nil {
			t.Fatal(err)
		}
		b.env.Preferred = p
	}
	b.stmts = ParseBlock(NewSource(src, Pos{}), CalcMode, &b.parse)
	for _, s := range b.stmts {
		b.results = append(b.results, b.env.Exec(s))
	}
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatalf("%q: %v", src, errs[0])
	}
	r := b.results[len(b.results)-1]
	if a, ok := r.Stmt.(*Assign); ok && b.env.Lookup(a.Names[0].Name).Display != r.Display {
		t.Fatalf("%q: the row and the name are shown in different displays", src)
	}
	sc, _ := r.Value.(*Scalar)
	return sc, FormatValue(r.Value, r.Display, digits)
}

// The power kinds of IEEE Std 1459-2010 (section 3.1, definitions):
// active power P in W, reactive power Q in var, apparent power S in VA,
// complex power S = P + jQ with P = Re(S), Q = Im(S) and apparent power
// |S| = sqrt(P² + Q²). The propagation rules are LANGUAGE.md section 4.
func TestPowerKinds(t *testing.T) {
	const S = "S = 4 kW + j*3 kvar\n" // IEEE 1459: S = P + jQ
	tests := []struct {
		name, src string
		kind      PowerKind
		want      string
		ref       string
	}{
		{"literal W", "P = 40 kW", PowerActive, "40.00 kW", "IEEE 1459: P in W"},
		{"literal var", "Q = 50 kvar", PowerReactive, "50.00 kvar", "IEEE 1459: Q in var"},
		{"literal VA", "S_n = 630 kVA", PowerApparent, "630.0 kVA", "IEEE 1459: S in VA"},
		{"complex power", S + "S", PowerApparent, "4.000 + j3.000 kVA", "IEEE 1459: S = P + jQ"},
		{"V times conj(I)", "400 V * conj(10 A∠-36.87°)", PowerApparent, "3.200 + j2.400 kVA",
			"IEEE 1459: S = V·I*; hand derivation: 4000·(cos 36.87° + j sin 36.87°) = 3200 + j2400"},
		{"re of S", S + "re(S)", PowerActive, "4.000 kW", "IEEE 1459: P = Re(S)"},
		{"im of S", S + "im(S)", PowerReactive, "3.000 kvar", "IEEE 1459: Q = Im(S)"},
		{"abs of S", S + "abs(S)", PowerApparent, "5.000 kVA", "IEEE 1459: S = |S|; hand derivation: sqrt(4² + 3²) = 5"},
		{"bars of S", S + "|S|", PowerApparent, "5.000 kVA", "IEEE 1459: S = |S|"},
		{"scaled by a number", "3 * 50 kvar", PowerReactive, "150.0 kvar", "LANGUAGE.md §4: scaling keeps the kind"},
		{"divided by a number", "50 kvar / 2", PowerReactive, "25.00 kvar", "LANGUAGE.md §4: scaling keeps the kind"},
		{"negation", "-(50 kvar)", PowerReactive, "-50.00 kvar", "LANGUAGE.md §4: negation keeps the kind"},
		{"abs of real", "abs(-50 kvar)", PowerReactive, "50.00 kvar", "LANGUAGE.md §4: abs of a real power keeps the kind"},
		{"re of real", "re(630 kVA)", PowerApparent, "630.0 kVA", "LANGUAGE.md §4: re of a real power keeps the kind"},
		{"sum of one kind", "40 kW - 10 kW", PowerActive, "30.00 kW", "IEEE 1459: active powers add"},
		{"P + jQ", "40 kW + j*30 kvar", PowerApparent, "40.00 + j30.00 kVA", "IEEE 1459: S = P + jQ"},
		{"P(1 + j tan phi)", "40 kW * (1 + j*tan(acos(0.8)))", PowerApparent, "40.00 + j30.00 kVA",
			"IEEE 1459; hand derivation: tan(acos 0.8) = 0.6/0.8 = 0.75, 40·0.75 = 30"},
		{"product of no kind", "sqrt(3) * 400 V * 10 A", PowerNone, "6.928 kW", "LANGUAGE.md §4: a product has no kind"},
		{"product of powers", "50 kvar * 2 kW / 1 kW", PowerNone, "100.0 kW", "LANGUAGE.md §4: any other operation"},
		{"sum with no kind", "40 kW + sqrt(3) * 400 V * 10 A", PowerNone, "46.93 kW", "LANGUAGE.md §4: no common kind"},
		{"max", "max(10 kW, 20 kW)", PowerNone, "20.00 kW", "LANGUAGE.md §4: any other operation"},
		{"bracket sets the kind", "Q_1[kvar] = 40 kW * tan(acos(0.8))", PowerReactive, "30.00 kvar",
			"LANGUAGE.md §4: a bracket on a computed power sets its kind"},
		{"kind carried by the name", "Q_1[kvar] = 40 kW * tan(acos(0.8))\nQ_2 = 2 * Q_1", PowerReactive, "60.00 kvar",
			"LANGUAGE.md §4: reactive from there on"},
		{"bracket names W", "P_3[kW] = sqrt(3) * 400 V * 10 A", PowerActive, "6.928 kW", "LANGUAGE.md §4: kind not stated until the line names W"},
		{"complex in VA", S + "S_2[kVA] = S", PowerApparent, "4.000 + j3.000 kVA", "IEEE 1459: complex power in VA"},
		{"not a power", "2 * 50 kvar / 400 V", PowerNone, "250.0 A", "a current has no power kind"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, got := shownAs(t, tc.src, nil, 4)
			if s.Kind != tc.kind || got != tc.want {
				t.Errorf("%q = %s (%v), want %s (%v) [%s]", tc.src, got, s.Kind, tc.want, tc.kind, tc.ref)
			}
			if s.KindNotStated() != (tc.kind == PowerNone && s.Dim == DimPower) {
				t.Errorf("%q: KindNotStated = %v", tc.src, s.KindNotStated())
			}
		})
	}
}

// Sums of different kinds, relabelling brackets and complex powers in W or
// var are errors (LANGUAGE.md section 4; IEEE 1459: P and Q combine as
// S = P + jQ, never as a sum).
func TestPowerKindErrors(t *testing.T) {
	tests := []struct{ name, src, pos, msg string }{
		{"W plus var", "x = 40 kW + 30 kvar", "1:11", "write P + j*Q"},
		{"var minus VA", "x = 30 kvar - 10 kVA", "1:13", "different kinds"},
		{"names of two kinds", "P = 40 kW\nQ = 30 kvar\nx = P + Q", "3:7", "write P + j*Q"},
		{"vectors of two kinds", "x = [40 kW; 1 kW] + [30 kvar; 1 kvar]", "1:19", "write P + j*Q"},
		{"relabel a name", "P_a = 40 kW\nP_k[kvar] = P_a", "2:4", "cannot be relabelled"},
		{"relabel a literal", "Q[kW] = 30 kvar", "1:2", "cannot be relabelled"},
		{"complex in W", "S = 4 kW + j*3 kvar\nS_w[kW] = S", "2:4", "show it in VA"},
		{"complex in var", "S = 4 kW + j*3 kvar\nS_q[kvar] = S", "2:4", "show it in VA"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b := runBlock(tc.src)
			errs := b.allErrors()
			if len(errs) == 0 {
				t.Fatalf("%q: no error", tc.src)
			}
			if p := errPos(errs[0]).String(); p != tc.pos || !strings.Contains(errs[0].Error(), tc.msg) {
				t.Errorf("%q: %v at %s, want %q at %s", tc.src, errs[0], p, tc.msg, tc.pos)
			}
		})
	}
}

// The order in which a display unit is chosen (LANGUAGE.md section 4):
// the line's unit, the literal's unit (% and pu included), the document's
// preferred unit for the dimension and kind, the default unit with an SI
// prefix putting the number in [1, 1000) (common practice, engineering
// notation).
func TestDisplayUnitOrder(t *testing.T) {
	prefs := []string{"mΩ", "kA", "kV", "kVA", "kvar"}
	tests := []struct {
		name, src string
		prefs     []string
		want      string
	}{
		{"line's unit first", "I[A] = 2 * 6 kA", prefs, "1.200e4 A"},
		{"literal's unit", "I = 12 A", prefs, "12.00 A"},
		{"literal in %", "u_k = 6 %", nil, "6.000 %"},
		{"literal in pu", "x = 0.25 pu", nil, "0.2500 pu"},
		{"negative literal in %", "d = -2.5 %", nil, "-2.500 %"},
		{"preferred current", "I = 2 * 6 A", prefs, "0.01200 kA"},
		{"preferred impedance", "Z = 2 * 0.5 Ω", prefs, "1000 mΩ"},
		{"preferred reactive", "Q = 3 * 50 var", prefs, "0.1500 kvar"},
		{"preferred apparent", "S = 2 * (3 + j4) VA", prefs, "0.006000 + j0.008000 kVA"},
		{"no preferred active", "P = 2 * 20 kW", prefs, "40.00 kW"},
		{"default with prefix", "Z = 2 * 0.5 Ω", nil, "1.000 Ω"},
		{"bare expression, preferred", "2 * 6 A", prefs, "0.01200 kA"},
		{"bare literal in %", "7 %", nil, "7.000 %"},
		{"bare expression, line's unit", "(2 * 6 A)[A]", prefs, "12.00 A"},
		{"default with prefix small", "Z = 2 * 0.5 mΩ", nil, "1.000 mΩ"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, got := shownAs(t, tc.src, tc.prefs, 4); got != tc.want {
				t.Errorf("%q with units %v: %s, want %s", tc.src, tc.prefs, got, tc.want)
			}
		})
	}
}

// Two preferred units for one dimension and kind are an error naming them
// (LANGUAGE.md section 1); kW, kvar and kVA are three kinds of one dimension.
func TestPreferredUnits(t *testing.T) {
	tests := []struct {
		list []string
		bad  int
		msg  string
	}{
		{[]string{"kW", "kvar", "kVA", "kA", "mΩ"}, -1, ""},
		{[]string{"kA", "A"}, 1, "both given for a current"},
		{[]string{"kvar", "Mvar"}, 1, "reactive power"},
		{[]string{"mΩ", "ohm"}, 1, "an impedance"},
		{[]string{"%"}, 0, "needs a dimension"},
		{[]string{"kX"}, 0, "unknown unit"},
	}
	for _, tc := range tests {
		_, bad, err := NewPreferred(tc.list)
		if tc.bad < 0 {
			if err != nil {
				t.Errorf("%v: %v", tc.list, err)
			}
			continue
		}
		if err == nil || bad != tc.bad || !strings.Contains(err.Error(), tc.msg) {
			t.Errorf("%v: entry %d %v, want entry %d %q", tc.list, bad, err, tc.bad, tc.msg)
		}
	}
}

// Display rules for big numbers and angles (README, "How values are
// shown"): a number whose whole part needs more digits than the sheet
// shows is written in exponent form, complex plain numbers included; an
// angle is given in (-180°, 180°].
func TestDisplayRules(t *testing.T) {
	tests := []struct {
		name, src string
		digits    int
		want, ref string
	}{
		{"unprefixed V", "y[V] = 74364 V", 4, "7.436e4 V", "common practice: no more figures than the sheet's digits"},
		{"unprefixed V at 6 digits", "y[V] = 74364 V", 6, "74364.0 V", "fits in 6 digits"},
		{"four figures fit", "y[V] = 1234 V", 4, "1234 V", "fits in 4 digits"},
		{"percent", "u = 12000.4 %", 4, "1.200e4 %", "common practice"},
		{"milliamps", "I[mA] = 479.024 A", 4, "4.790e5 mA", "issue 12: 479024 mA"},
		{"complex plain number", "100000000 + j200000000", 4, "1.000e8 + j2.000e8", "exponent rule as for a real number"},
		{"complex plain small", "12 + j5", 4, "12.00 + j5.00", "unchanged: common decimals"},
		{"arg at -180", "arg(-1 - j*1e-9)", 4, "180.0°",
			"hand derivation: atan2(-1e-9, -1) = -π + 1e-9 rad = -179.99999994°, shown -180.0 at 4 digits, so 180.0"},
		{"arg at 180", "arg(-1)", 4, "180.0°", "principal value, math/cmplx.Phase(-1) = π"},
		{"arg at -180 in [°]", "a[°] = arg(-1 - j*1e-9)", 4, "180.0°", "the same hand derivation, in the line's unit"},
		{"arg below", "arg(-1 - j*0.1)", 4, "-174.3°", "hand derivation: atan(0.1) = 5.711°, -180 + 5.711"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, got := shownAs(t, tc.src, nil, tc.digits); got != tc.want {
				t.Errorf("%q at %d digits: %s, want %s [%s]", tc.src, tc.digits, got, tc.want, tc.ref)
			}
		})
	}
}

// A display unit of another kind never shows a power (IEEE 1459 units: W
// for P, var for Q, VA for S): the unit of a check's literal side is not
// forced on a side of another kind.
func TestDisplayKeepsKind(t *testing.T) {
	kva, _ := ParseUnit("kVA")
	kvar, _ := ParseUnit("kvar")
	tests := []struct {
		s    *Scalar
		d    *Display
		want string
	}{
		{&Scalar{Z: 4000, Dim: DimPower, Kind: PowerActive}, &Display{Unit: kva}, "4.000 kW"},
		{&Scalar{Z: 4000, Dim: DimPower, Kind: PowerReactive}, &Display{Unit: kvar}, "4.000 kvar"},
		{&Scalar{Z: 4000, Dim: DimPower}, &Display{Unit: kvar}, "4.000 kvar"},
		{&Scalar{Z: 4000 + 3000i, Dim: DimPower, Kind: PowerApparent}, &Display{Unit: kvar}, "4.000 + j3.000 kVA"},
	}
	for _, tc := range tests {
		if got := FormatScalar(tc.s, tc.d, 4).String(); got != tc.want {
			t.Errorf("%v in %s: %s, want %s", tc.s, tc.d.Unit.Text, got, tc.want)
		}
	}
}
