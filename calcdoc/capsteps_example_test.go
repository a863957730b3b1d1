package calcdoc_test

import (
	"math"
	"path/filepath"
	"testing"

	"calcdoc/calcdoc"
)

// TestShippedCapacitorStepsExample holds examples/capacitor-steps-pf.md
// (a scenario of our own invention) against a hand derivation rather than
// its own check lines. With P = 455 kW, Q = 300 kvar and steps of
// 50 kvar, n steps leave Q_n = 300 − 50·n kvar; the power factor is
// PF = P/|P + jQ_n| (IEEE Std 1459-2010, PF = P/S): 455/545.0 = 0.8348
// with no step, exactly 1 at six steps, 455/465.9 = 0.9767 at eight
// (above 0.95, the sheet's point), and 455/457.7 = 0.9940 at the
// controller's five; the line current is |S|/(√3·V_LL) (common practice
// for a balanced three-phase load), least at six steps: 656.7 A.
func TestShippedCapacitorStepsExample(t *testing.T) {
	path := filepath.Join("..", "examples", "capacitor-steps-pf.md")
	d, err := calcdoc.Load(path, kinds)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Errors) > 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	const p, q, step, vLL = 455e3, 300e3, 50e3, 400.0
	pf := func(qn float64) float64 { return p / math.Hypot(p, qn) }
	if got, want := real(value(t, d, "pf_L").Z), pf(q); math.Abs(got-want) > 1e-12 {
		t.Errorf("pf_L = %.6f, want %.6f", got, want)
	}
	if got, want := real(value(t, d, "pf_set").Z), pf(q-5*step); math.Abs(got-want) > 1e-12 {
		t.Errorf("pf_set = %.6f, want %.6f", got, want)
	}
	sw := swSweep(t, d)
	if sw.N != 9 || len(sw.Lines) < 3 {
		t.Fatalf("sweep of %d points and %d lines, want 9 points and its 3 lines", sw.N, len(sw.Lines))
	}
	least := 0
	for i := 0; i < 9; i++ {
		qn := q - float64(i)*step
		for _, c := range []struct {
			line int
			want float64
		}{{0, qn}, {1, pf(qn)}, {2, math.Hypot(p, qn) / (math.Sqrt(3) * vLL)}} {
			got := sw.Lines[c.line].Z[i]
			if math.Abs(real(got)-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) || imag(got) != 0 {
				t.Errorf("n = %d: %s = %v, want %.9g", i, sw.Lines[c.line].Name, got, c.want)
			}
		}
		if real(sw.Lines[2].Z[i]) < real(sw.Lines[2].Z[least]) {
			least = i
		}
	}
	if least != 6 || math.Abs(real(sw.Lines[1].Z[6])-1) > 1e-15 || pf(q-8*step) < 0.95 {
		t.Errorf("least current at %d steps (want 6), pf there %v, pf at 8 steps %v", least, sw.Lines[1].Z[6], pf(q-8*step))
	}
}
