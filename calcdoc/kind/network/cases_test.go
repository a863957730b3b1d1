package network

import (
	"math"
	"strings"
	"testing"

	"calcdoc/expr"
)

// A network whose source reads a value with cases is solved per case.
// Hand derivation, a voltage divider: V_B = U·70/(30 + 70), so 70 V at
// U = 100 V and 63 V at U = 90 V; I = U/100 Ω.
func TestNetworkPerCase(t *testing.T) {
	d := parse(t, "---", "cases: [hi, lo]", "---", "```calc", "U = {hi: 100 V, lo: 90 V}", "```", "",
		"```network", "ground 0", "src: 0 -> A source U", "r1: A -> B Z 30 Ω", "r2: B -> 0 Z 70 Ω", "```", "",
		"```calc", "x = V_B * 2", "```")
	noErrors(t, d)
	for name, want := range map[string][2]float64{"V_B": {70, 63}, "I_r1": {1, 0.9}, "x": {140, 126}} {
		c := d.Env.Lookup(name).Cases
		if len(c) != 2 {
			t.Errorf("%s has no cases", name)
			continue
		}
		for k := range want {
			if got := real(c[k].(*expr.Scalar).Z); math.Abs(got-want[k]) > 1e-9 {
				t.Errorf("%s case %d = %g, want %g", name, k, got, want[k])
			}
		}
	}
	// the sheet shows V_B in each case: 70.00 V and 63.00 V
	if page := sheet(t, d); !strings.Contains(page, "<mtext>lo:\u00a0</mtext><mn>63.00</mn>") {
		t.Error("the network's results show each case's value")
	}
}
