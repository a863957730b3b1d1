package mna

import (
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// TestExample11kV solves the scenario of testdata/network/example-11kv.txt
// (a meshed 11 kV network of our own invention with two infeeds, a
// capacitor bank and a tap-changing Dyn11 transformer to a 400 V board).
// Besides Tellegen's theorem, the balance and the acceptance (solveText),
// it checks what an engineer checks by hand:
//   - the transformer's voltage relation as written, V_T = ratio·V_LV,
//     with the LV side leading the HV side by 30° (Dyn11: IEC 60076-1,
//     clock-hour 11);
//   - the power into the transformer's first winding equals the power the
//     400 V loads take (an ideal transformer, LANGUAGE.md section 11);
//   - the 11 kV voltages within 5 % of nominal and the 400 V board near
//     6.351 kV / (1.025 · 27.5) = 225.3 V less the drop in the
//     transformer (hand estimate: 6 % impedance at about half load, so a
//     few per cent);
//   - the capacitor bank delivers about 1.2 Mvar / 3 per phase at the
//     voltage it sees, Q = B·|V|² with B = 1.2 Mvar / (3·(6.351 kV)²)
//     (hand derivation).
func TestExample11kV(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("..", "..", "..", "..", "testdata", "network", "example-11kv.txt"))
	if err != nil {
		t.Fatal(err)
	}
	r := solveText(t, string(raw), "", nil)
	vn := 11e3 / math.Sqrt(3)
	for _, nd := range []string{"P1", "P2", "R1", "R2", "R3", "R4", "R5", "T"} {
		v := cmplx.Abs(nodeV(r, nd))
		if v < 0.95*6351 || v > 1.05*6351 {
			t.Errorf("|V_%s| = %.1f V, more than 5 %% from 6351 V", nd, v)
		}
	}
	ratio := cmplx.Rect(11e3*1.025/400, -math.Pi/6)
	vt, vlv := nodeV(r, "T"), nodeV(r, "LV")
	wantC(t, "V_T", vt, ratio*vlv, 1e-12)
	lead := (cmplx.Phase(vlv) - cmplx.Phase(vt)) * 180 / math.Pi
	if math.Abs(lead-30) > 1e-9 {
		t.Errorf("LV leads HV by %.6f°, want 30°", lead)
	}
	if v := cmplx.Abs(vlv); v < 0.95*225.3 || v > 225.3 {
		t.Errorf("|V_LV| = %.2f V", v)
	}
	_, stx := branchIS(r, "tx")
	_, sp := branchIS(r, "pumps")
	_, sl := branchIS(r, "light")
	wantC(t, "S_tx", stx, sp+sl, 1e-12)
	_, sb := branchIS(r, "bank")
	b := 1.2e6 / (3 * 6351 * 6351)
	v3 := cmplx.Abs(nodeV(r, "R3"))
	// the bank takes in −jB|V|²: it delivers B|V|² of reactive power
	wantC(t, "S_bank", sb, complex(0, -b*v3*v3), 1e-9)
	_, sn := branchIS(r, "north")
	_, se := branchIS(r, "east")
	t.Logf("V_R3 = %.1f V∠%.2f°, V_LV = %.2f V∠%.2f°, north delivers (%.3f, %.3f) MW, Mvar, east (%.3f, %.3f) (per phase), nominal %.0f V",
		cmplx.Abs(nodeV(r, "R3")), cmplx.Phase(nodeV(r, "R3"))*180/math.Pi, cmplx.Abs(vlv), cmplx.Phase(vlv)*180/math.Pi,
		real(sn)/1e6, imag(sn)/1e6, real(se)/1e6, imag(se)/1e6, vn)
}
