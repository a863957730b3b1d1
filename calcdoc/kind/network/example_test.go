package network

import (
	"math"
	"math/cmplx"
	"path/filepath"
	"testing"

	"calcdoc/calcdoc"
)

// TestShippedRingExample holds examples/network-11kv-ring.md (a scenario
// of our own invention) against the circuit laws, by hand derivation,
// rather than against its own check lines:
//   - the Northgate source impedance Z_N = V_n²/S_kN·(1 + j10)/√101
//     = 0.484 Ω·(1 + j10)/√101 (X/R = 10, |Z_N| = V_n²/S_kN);
//   - Ohm's law on every cable: I = (V_from − V_to)/(z_c·length);
//   - Kirchhoff's current law at the ring main units R1 to R5 (a branch's
//     current flows from its first node to its second);
//   - each load and the bank: I = Y·V and S = V·conj(I) (IEEE Std
//     1459-2010, S = V·I*), so the bank takes S = conj(Y_bank)·|V_R3|²,
//     which is −j·Q_bank/3 scaled by (|V_R3|/V_ph)²;
//   - the ideal transformer: V_T = r_tap·V_LV, and the power into its
//     winding is the power the 400 V loads take (S_tx = S_pumps +
//     S_light; LANGUAGE.md section 11).
func TestShippedRingExample(t *testing.T) {
	path := filepath.Join("..", "..", "..", "examples", "network-11kv-ring.md")
	d, err := calcdoc.Load(path, testKinds)
	if err != nil {
		t.Fatal(err)
	}
	noErrors(t, d)
	z := func(name string) complex128 { return value(t, d, name).Z }

	zN := complex(11e3*11e3/250e6, 0) * complex(1, 10) / complex(math.Sqrt(101), 0)
	wantC(t, "Z_N", z("Z_N"), zN, 1e-12)

	zc := complex(0.206e-3, 0.10e-3) // Ω/m
	for _, c := range []struct {
		name, from, to string
		km             float64
	}{
		{"c1", "P1", "R1", 1.8}, {"c2", "R1", "R2", 1.2}, {"c3", "R2", "R3", 0.9}, {"c4", "R3", "R4", 1.4},
		{"c5", "R4", "P2", 2.1}, {"c6", "R2", "R5", 0.7}, {"c7", "R5", "R4", 1.1},
	} {
		want := (z("V_"+c.from) - z("V_"+c.to)) / (zc * complex(c.km*1e3, 0))
		wantC(t, "I_"+c.name+" (Ohm's law)", z("I_"+c.name), want, 1e-9)
	}

	for _, n := range []struct {
		node    string
		in, out []string
	}{
		{"R1", []string{"c1"}, []string{"c2", "ld1"}},
		{"R2", []string{"c2"}, []string{"c3", "c6", "ld2"}},
		{"R3", []string{"c3"}, []string{"c4", "bank", "tz"}},
		{"R4", []string{"c4", "c7"}, []string{"c5", "ld4"}},
		{"R5", []string{"c6"}, []string{"c7", "ld5"}},
	} {
		var sum, scale complex128
		for _, b := range n.in {
			sum += z("I_" + b)
			scale += complex(cmplx.Abs(z("I_"+b)), 0)
		}
		for _, b := range n.out {
			sum -= z("I_" + b)
		}
		if cmplx.Abs(sum) > 1e-9*real(scale) {
			t.Errorf("KCL at %s: currents in less currents out = %v A", n.node, sum)
		}
	}

	for _, ld := range []struct{ name, node string }{{"ld1", "R1"}, {"ld2", "R2"}, {"ld4", "R4"}, {"ld5", "R5"}, {"bank", "R3"}} {
		v := z("V_" + ld.node)
		i := z("Y_"+ld.name) * v
		wantC(t, "I_"+ld.name+" (I = Y·V)", z("I_"+ld.name), i, 1e-9)
		wantC(t, "S_"+ld.name+" (S = V·I*)", z("S_"+ld.name), v*cmplx.Conj(i), 1e-9)
	}
	r := cmplx.Abs(z("V_R3")) / (11e3 / math.Sqrt(3))
	wantC(t, "S_bank", z("S_bank"), complex(0, -1.2e6/3*r*r), 1e-9)

	ratio := cmplx.Rect(11e3*1.025/400, -math.Pi/6)
	wantC(t, "V_T (ideal transformer)", z("V_T"), ratio*z("V_LV"), 1e-12)
	wantC(t, "S_tx (ideal transformer)", z("S_tx"), z("S_pumps")+z("S_light"), 1e-9)
}
