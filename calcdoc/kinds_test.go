package calcdoc_test

import (
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/phasors"
	"calcdoc/calcdoc/kind/sweep"
	"calcdoc/expr"
)

func docOf(lines ...string) *calcdoc.Document {
	return calcdoc.Parse("kinds_test.md", []byte(strings.Join(lines, "\n")+"\n"), kinds)
}

func valueShown(d *calcdoc.Document, name string) (calcdoc.ValueJSON, bool) {
	for _, v := range d.ValuesJSON().Values {
		if v.Name == name {
			return v, true
		}
	}
	return calcdoc.ValueJSON{}, false
}

// The front matter key units: (LANGUAGE.md section 1): a computed value of
// a listed dimension and power kind is shown in that unit, prefix fixed;
// a literal keeps its own unit; the values JSON gives unit and kind by
// IEEE Std 1459-2010 (active W, reactive var, apparent VA).
func TestPreferredUnitsInDocument(t *testing.T) {
	d := docOf("---", "units: [mΩ, kA, kV, kVA, kvar]", "---", "", "```calc",
		"V = 400 V",
		"Z = 20 mΩ + j*40 mΩ",
		"I_k = V / abs(Z)",
		"S = V * conj(10 A∠-36.87°)",
		"Q = im(S)",
		"P = re(S)",
		"P_3 = sqrt(3) * V * 10 A",
		"I_n = 12 A",
		"```")
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	tests := []struct {
		name, shown, unit string
		kind              any
		ref               string
	}{
		// hand derivation: |Z| = sqrt(20² + 40²) mΩ = 44.72 mΩ, 400/0.04472 = 8944 A
		{"I_k", "8.944 kA", "A", nil, "hand derivation; preferred kA"},
		{"Z", "20.00 + j40.00 mΩ", "Ω", nil, "preferred mΩ"},
		// hand derivation: 4000·(0.8 + j0.6) = 3200 + j2400
		{"S", "3.200 + j2.400 kVA", "VA", "apparent", "IEEE 1459: S = V·I*, preferred kVA"},
		{"Q", "2.400 kvar", "var", "reactive", "IEEE 1459: Q = Im(S), preferred kvar"},
		{"P", "3.200 kW", "W", "active", "IEEE 1459: P = Re(S), no preferred W: default prefix"},
		{"P_3", "6.928 kW", "W", nil, "a product: kind not stated"},
		{"I_n", "12.00 A", "A", nil, "a literal keeps its unit"},
	}
	for _, tc := range tests {
		v, ok := valueShown(d, tc.name)
		if !ok {
			t.Fatalf("no value %s", tc.name)
		}
		if v.Shown != tc.shown || v.Unit != tc.unit || v.Kind != tc.kind {
			t.Errorf("%s: %q %v %v, want %q %v %v [%s]", tc.name, v.Shown, v.Unit, v.Kind, tc.shown, tc.unit, tc.kind, tc.ref)
		}
	}
}

// Two units: entries for one dimension and kind are an error naming the key
// and pointing at the second entry (LANGUAGE.md section 1).
func TestPreferredUnitsErrors(t *testing.T) {
	tests := []struct{ fm, msg string }{
		{"units: [kA, A]", `"units": "kA" and "A" are both given for a current`},
		{"units: [kvar, Mvar]", "reactive power"},
		{"units: kA", `"units" must be a list`},
		{"units: [kQ]", "unknown unit"},
	}
	for _, tc := range tests {
		d := docOf("---", tc.fm, "---", "", "text")
		if len(d.Errors) != 1 || !strings.Contains(d.Errors[0].Msg, tc.msg) || d.Errors[0].Pos.Line() != 2 {
			t.Errorf("%s: %v, want one error on line 2 with %q", tc.fm, d.Errors, tc.msg)
		}
	}
}

// A sweep line follows the power kinds (IEEE 1459): im of a complex power
// is reactive, its table shows var; a bracket sets the kind of a computed
// power.
func TestSweepPowerKinds(t *testing.T) {
	d := docOf("```calc", "V = 400 V", "```", "",
		"```sweep phi = 0° .. 60° 4",
		"S_x = V * conj(10 A∠-phi)",
		"Q_x = im(S_x)",
		"P_x = re(S_x)",
		"Q_y[kvar] = 4 kW * tan(phi)",
		"```")
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	var sw *sweep.Sweep
	for _, b := range d.Blocks {
		if b.Kind == "sweep" {
			sw = b.Result.(*sweep.Sweep)
		}
	}
	want := map[string]expr.PowerKind{"S_x": expr.PowerApparent, "Q_x": expr.PowerReactive, "P_x": expr.PowerActive, "Q_y": expr.PowerReactive}
	for _, l := range sw.Lines {
		if k, ok := want[l.Name]; ok && l.Kind != k {
			t.Errorf("%s: %v, want %v (IEEE 1459)", l.Name, l.Kind, k)
		}
	}
}

// A solve unknown without a bracket is shown in the preferred unit too
// (LANGUAGE.md section 4); one shown in kW is an active power (IEEE 1459).
func TestPreferredUnitsSolve(t *testing.T) {
	d := docOf("---", "units: [kA]", "---", "", "```solve x near 1 A, P_s[kW] near 1 kW",
		"x * 2 Ω = 30 kV",
		"P_s = 400 V * x / 1000",
		"```")
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	// hand derivation: x = 30 kV / 2 Ω = 15 kA; P_s = 400 V · 15 A = 6 kW
	for _, tc := range []struct {
		name, shown string
		kind        any
	}{{"x", "15.00 kA", nil}, {"P_s", "6.000 kW", "active"}} {
		v, ok := valueShown(d, tc.name)
		if !ok || v.Shown != tc.shown || v.Kind != tc.kind {
			t.Errorf("%s: %q %v, want %q %v", tc.name, v.Shown, v.Kind, tc.shown, tc.kind)
		}
	}
}

// A phasor diagram draws a group of powers in the unit of their kind (IEEE
// 1459): reactive powers alone in var, with a complex power in VA.
func TestPhasorPowerKinds(t *testing.T) {
	for _, tc := range []struct{ list, unit string }{
		{"Q_1, Q_2", "kvar"},
		{"Q_1, S", "kVA"},
		{"P_1", "kW"},
	} {
		d := docOf("```calc", "Q_1 = 30 kvar", "Q_2 = -10 kvar", "P_1 = 40 kW", "S = P_1 + j*Q_1", "```", "", "```phasors "+tc.list, "```")
		if len(d.Errors) > 0 {
			t.Fatal(d.Errors)
		}
		for _, b := range d.Blocks {
			if b.Kind != "phasors" {
				continue
			}
			for _, it := range b.Result.(*phasors.Phasors).Items {
				if it.Unit != tc.unit {
					t.Errorf("phasors %s: %s drawn in %s, want %s", tc.list, it.Text, it.Unit, tc.unit)
				}
			}
		}
	}
}
