package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"testing"
)

// The two cable sheets of examples/plant take the board's impedance Z_k
// through use and add their cable's. Hand derivation (IEC 60909-0,
// equivalent voltage source, as in TestPlantExampleFaultLevel): Z_k =
// (R_Q + R_T) + j(X_Q + X_T) = 1.2705 + j8.5178 mΩ; LB-2: Z_c = (1.47 +
// j0.083) mΩ/m · 85 m, I_k_min = 0.95·400 V/(√3·|Z_k + Z_c|) = 1.725 kA;
// P1: Z_c = (0.247 + j0.072) mΩ/m · 140 m, I_k3_end = 1.05·400 V/(√3·|Z_k
// + Z_c|) = 6.004 kA and I_k_min = 5.432 kA with 0.95. The 16 mm² cable's
// 1.47 mΩ/m is IEC 60228's 1.15 Ω/km at 20 °C raised to 90 °C with
// α = 0.00393 K⁻¹ (1.466 mΩ/m; both from memory, as examples/data says).
func TestPlantExampleCableFaults(t *testing.T) {
	zq := 1.05 * 400 * 400 / 180e6
	xq, zt, rt := 0.995*zq, 0.06*400*400/1.25e6, 11.5e3*400*400/(1.25e6*1.25e6)
	xt := math.Sqrt(zt*zt - rt*rt)
	zk := complex(0.1*xq+rt, xq+xt)
	if math.Abs(1.15e-3*(1+0.00393*70)-1.47e-3) > 0.005e-3 {
		t.Fatalf("the 16 mm² cable's resistance at 90 °C is not 1.47 mΩ/m by IEC 60228 and α")
	}
	ifault := func(c float64, z complex128) float64 { return c * 400 / (math.Sqrt(3) * math.Hypot(real(z), imag(z))) }
	lb2 := zk + complex(1.47e-3, 0.083e-3)*85
	p1 := zk + complex(0.247e-3, 0.072e-3)*140
	for _, c := range []struct {
		file string
		want map[string]float64
	}{
		{"feeder-lighting.md", map[string]float64{"I_k_min": ifault(0.95, lb2)}},
		{"feeder-pump-p1.md", map[string]float64{"I_k3_end": ifault(1.05, p1), "I_k_min": ifault(0.95, p1)}},
	} {
		st, out, errs := runCLI("values", filepath.Join("..", "..", "examples", "plant", "cables", c.file))
		if st != exitOK {
			t.Fatalf("values %s: %d %s", c.file, st, errs)
		}
		var v struct {
			Values []struct {
				Name string
				Re   float64
			}
		}
		if err := json.Unmarshal([]byte(out), &v); err != nil {
			t.Fatal(err)
		}
		found := 0
		for _, x := range v.Values {
			if want, ok := c.want[x.Name]; ok {
				found++
				if math.Abs(x.Re-want) > 1e-9*want {
					t.Errorf("%s: %s = %g A, want %g A", c.file, x.Name, x.Re, want)
				}
			}
		}
		if found != len(c.want) {
			t.Errorf("%s: %d of the values %v found", c.file, found, c.want)
		}
	}
}
