package table_test

import (
	"math"
	"path/filepath"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// The key numbers of examples/feeder-cable-sizing.md, by hand
// derivation:
//
//	I_b = P / (√3 · V_LL · pf) = 30 kW / (√3 · 400 V · 0.85) = 50.943 A
//	L = ceil(78 m · 1.05, 5 m) = ceil(81.9 m, 5 m) = 85 m
//	k_T = 1 + 0.00393 K⁻¹ · (70 °C − 20 °C) = 1.1965 (alpha of IEC 60287-1-1, Table 1)
//	√3 · I_b · pf = P / V_LL = 75 A, so
//	S_est = 75 A · 85 m · (1/58) Ω·mm²/m · 1.1965 / 16 V = 8.2194 mm²
//	S = up(cu, 8.22 mm²) = 10 mm²; R_20 = 1.83 Ω/km (IEC 60228, Table 2)
//	R_op = 1.83 · 1.1965 = 2.18960 Ω/km
//	sinφ = √(1 − 0.85²) = 0.52678
//	dV = √3 · 50.943 A · 0.085 km · (2.1896 · 0.85 + 0.08 · 0.52678) Ω/km = 14.275 V
//	u = 14.275 / 400 = 3.569 %
//	I_n = up(mcb, 50.94 A) = 63 A (IEC 60898-1, 5.3.2)
func TestFeederExample(t *testing.T) {
	path := filepath.Join("..", "..", "..", "examples", "feeder-cable-sizing.md")
	doc, err := calcdoc.LoadWith(path, kind.Standard(), calcdoc.Inputs{Root: filepath.Dir(path)})
	if err != nil {
		t.Fatal(err)
	}
	if len(doc.Errors) > 0 || doc.FailedChecks() > 0 {
		t.Fatalf("errors %v, failed checks %d", doc.Errors, doc.FailedChecks())
	}
	ib := 30e3 / (math.Sqrt(3) * 400 * 0.85)
	kT := 1 + 0.00393*50
	rop := 1.83e-3 * kT // Ω/m
	sin := math.Sqrt(1 - 0.85*0.85)
	dV := math.Sqrt(3) * ib * 85 * (rop*0.85 + 0.08e-3*sin)
	for _, c := range []struct {
		name string
		want float64 // coherent SI
		tol  float64
	}{
		{"I_b", 50.943, 1e-4},
		{"I_b", ib, 1e-12},
		{"L", 85, 1e-12},
		{"k_T", 1.1965, 1e-12},
		{"S_est", 8.2194e-6, 1e-4},
		{"S", 10e-6, 1e-12},
		{"R_20", 1.83e-3, 1e-12},
		{"R_op", 2.18960e-3, 1e-5},
		{"dV", 14.275, 1e-4},
		{"dV", dV, 1e-9},
		{"u_drop", 0.03569, 1e-3},
		{"I_n", 63, 1e-12},
	} {
		got := real(value(t, doc, c.name).Z)
		if math.Abs(got-c.want) > c.tol*math.Abs(c.want) {
			t.Errorf("%s = %.6g, want %.6g (hand derivation)", c.name, got, c.want)
		}
	}
	if len(doc.DataFiles) != 3 {
		t.Errorf("the example read %d files, want its three tables", len(doc.DataFiles))
	}
}

// Resistance at 70 °C from R_20 with the temperature arithmetic of
// LANGUAGE.md section 4, and rounding with steps, in a document. Hand
// derivation: 0.727 Ω/km · (1 + 0.00393 K⁻¹ · (70 °C − 20 °C)) =
// 0.727 · 1.1965 = 0.8698555 Ω/km; ceil(1.1 · 100 A, 10 A) = 110 A (the
// contract's own example: 110.00000000000001 counts as 110);
// floor(37 A, 5 A) = 35 A; round(2.5) = 3 (half away from zero).
func TestTemperatureAndRoundingInADocument(t *testing.T) {
	doc := parse(t, "```calc\nR_20 = 0.727 Ω/km\nalpha = 0.00393 / (1 K)\ntheta = 70 °C\nR_70 = R_20 * (1 + alpha * (theta - 20 °C))\nI_c = ceil(1.1 * 100 A, 10 A)\nI_f = floor(37 A, 5 A)\nn = round(2.5)\n```\n")
	if len(doc.Errors) > 0 {
		t.Fatalf("errors: %v", doc.Errors)
	}
	for _, c := range []struct {
		name string
		want float64
	}{{"R_70", 0.8698555e-3}, {"I_c", 110}, {"I_f", 35}, {"n", 3}} {
		if got := real(value(t, doc, c.name).Z); !near(got, c.want) {
			t.Errorf("%s = %.10g, want %.10g", c.name, got, c.want)
		}
	}
	// adding two absolute temperatures is an error (LANGUAGE.md section 4)
	doc = parse(t, "```calc\nt = 20 °C + 30 °C\n```\n")
	if len(doc.Errors) != 1 || doc.Errors[0].Pos.Line() != 2 {
		t.Errorf("20 °C + 30 °C: errors %v, want one at line 2", doc.Errors)
	}
}
