package calcdoc_test

import (
	"math"
	"math/cmplx"
	"path/filepath"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// TestShippedCasesExample holds examples/msb-fault-cases.md (a scenario of
// our own invention) against IEC 60909-0 worked by hand with Go's
// math/cmplx, not against its own check lines:
//   - c_max = 1.10, c_min = 0.95: IEC 60909-0:2016 Table 1, low voltage,
//     tolerance +10 %;
//   - Z_Q = c·U_n²/S_kQ with R_Q = 0.1·X_Q, X_Q = 0.995·Z_Q (IEC 60909-0, 6.2);
//   - Z_T from u_kr = 6 %, u_Rr = 1 % (Z_T = u_kr·U²/S_rT, R_T = u_Rr·U²/S_rT);
//   - I_k3 = c·U_n/(√3·|Z_k|) (IEC 60909-0, equation 29);
//   - the far-end earth fault I_k1 = c·U_0/|2·Z_k + 2·r·L·k_θ| with
//     k_θ = 1 + 0.00393·50 at 70 °C (handbook coefficient of copper).
func TestShippedCasesExample(t *testing.T) {
	d, err := calcdoc.Load(filepath.Join("..", "examples", "msb-fault-cases.md"), kinds)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	const U, U0 = 400.0, 230.0
	c := []float64{1.10, 0.95}
	skq := []float64{250e6, 120e6}
	kth := []float64{1, 1 + 0.00393*50}
	zt := complex(0.01*U*U/1e6, math.Sqrt(math.Pow(0.06*U*U/1e6, 2)-math.Pow(0.01*U*U/1e6, 2)))
	for k, name := range []string{"max", "min"} {
		zq := complex(c[k]*U*U/skq[k], 0) * complex(0.0995, 0.995)
		zk := zq + zt + 1.2e-3
		ik3 := c[k] * U / (math.Sqrt(3) * cmplx.Abs(zk))
		zl := 2*zk + complex(2*7.41e-3*28*kth[k], 0)
		ik1 := c[k] * U0 / cmplx.Abs(zl)
		for v, want := range map[string]float64{"I_k3": ik3, "I_k1": ik1} {
			got := real(d.Env.Lookup(v).Cases[k].(*expr.Scalar).Z)
			if math.Abs(got-want) > 1e-9*want {
				t.Errorf("%s in case %s = %g, want %g", v, name, got, want)
			}
		}
	}
	// breaking capacity applies at max only, disconnection at min only
	if ch := d.Checks[0]; ch.Cases[0] == nil || ch.Cases[1] != nil || !ch.Result.Pass {
		t.Errorf("breaking capacity check: %+v", ch)
	}
	if ch := d.Checks[1]; ch.Cases[0] != nil || ch.Cases[1] == nil || !ch.Result.Pass {
		t.Errorf("disconnection check: %+v", ch)
	}
	// casemax names the max case in its inline value
	if in := d.Inline[0]; in.Cases != nil || in.Err != nil {
		t.Errorf("casemax(I_k3) is one value: %+v", in)
	}
}
