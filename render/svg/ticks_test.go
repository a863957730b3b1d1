package svg

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestTicksExact checks chosen ticks against hand-derived lists. Sources:
// decade ticks on log axes and 1-2-5 steps on linear axes are common
// practice for engineering charts; the step rule (smallest 1-2-5 step
// giving at most 8 intervals) is the one Ticks documents.
func TestTicksExact(t *testing.T) {
	cases := []struct {
		name     string
		min, max float64
		log      bool
		want     []float64
	}{
		// Common practice: a log axis is ticked at the decades it spans.
		{"log decades 10 to 1e5", 10, 1e5, true, []float64{10, 100, 1000, 1e4, 1e5}},
		{"log one decade", 1, 10, true, []float64{1, 10}},
		{"log decades inside an uneven range", 3, 7e4, true, []float64{10, 100, 1000, 1e4}},
		{"log below one", 1e-3, 1, true, []float64{1e-3, 1e-2, 0.1, 1}},
		// More than ten decades: every 5th (every 2nd would still give 13).
		{"log 24 decades", 1e-12, 1e12, true, []float64{1e-10, 1e-5, 1, 1e5, 1e10}},
		// Fewer than two decades: the 1-2-5 marks in the range.
		{"log narrow range", 20, 800, true, []float64{20, 50, 100, 200, 500}},
		// Fewer than two 1-2-5 marks: linear steps, here (48−21)/8 = 3.375 → 5.
		{"log very narrow range", 21, 48, true, []float64{25, 30, 35, 40, 45}},
		// Linear: step = smallest 1-2-5 number ≥ range/8.
		{"linear 0 to 7.3", 0, 7.3, false, []float64{0, 1, 2, 3, 4, 5, 6, 7}},
		{"linear 0 to 1", 0, 1, false, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}},
		{"linear symmetric", -3, 3, false, []float64{-3, -2, -1, 0, 1, 2, 3}},
		{"linear decimals", 0.3, 0.7, false, []float64{0.3, 0.35, 0.4, 0.45, 0.5, 0.55, 0.6, 0.65, 0.7}},
		{"linear nano", 1e-9, 9e-9, false, []float64{1e-9, 2e-9, 3e-9, 4e-9, 5e-9, 6e-9, 7e-9, 8e-9, 9e-9}},
		{"linear across zero", -250, 1250, false, []float64{-200, 0, 200, 400, 600, 800, 1000, 1200}},
		{"single value", 4.2, 4.2, false, []float64{4.2}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got := Ticks(tc.min, tc.max, tc.log)
			if len(got) != len(tc.want) {
				t.Fatalf("Ticks(%g, %g, %v) = %v, want %v", tc.min, tc.max, tc.log, got, tc.want)
			}
			for i := range got {
				// The decimal literals in want are the doubles nearest to
				// the round values; the ticks must be exactly those.
				if got[i] != tc.want[i] {
					t.Fatalf("Ticks(%g, %g, %v) = %v, want %v", tc.min, tc.max, tc.log, got, tc.want)
				}
			}
		})
	}
}

// checkTickProperties checks what Ticks promises for any valid range.
func checkTickProperties(t *testing.T, min, max float64, log bool) {
	t.Helper()
	ticks := Ticks(min, max, log)
	if len(ticks) == 0 {
		t.Fatalf("Ticks(%g, %g, %v): none", min, max, log)
	}
	for i, v := range ticks {
		if v < min || v > max {
			t.Errorf("Ticks(%g, %g, %v): %g outside the range", min, max, log, v)
		}
		if i > 0 && v <= ticks[i-1] {
			t.Errorf("Ticks(%g, %g, %v): not increasing at %d: %v", min, max, log, i, ticks)
		}
	}
	if log {
		return
	}
	if len(ticks) < 3 || len(ticks) > 9 {
		t.Errorf("Ticks(%g, %g): %d ticks, want 3 to 9", min, max, len(ticks))
	}
	step := ticks[1] - ticks[0]
	if !is125(step) {
		t.Errorf("Ticks(%g, %g): step %g is not a 1-2-5 number", min, max, step)
	}
	for i := 1; i < len(ticks); i++ {
		if d := ticks[i] - ticks[i-1]; math.Abs(d-step) > 1e-9*math.Max(step, math.Abs(ticks[i])) {
			t.Errorf("Ticks(%g, %g): uneven steps %v", min, max, ticks)
		}
		// Each tick is a multiple of the step.
		if k := ticks[i] / step; math.Abs(k-math.Round(k)) > 1e-6 {
			t.Errorf("Ticks(%g, %g): %g is not a multiple of %g", min, max, ticks[i], step)
		}
	}
}

// TestTicksProperties checks the promises of Ticks (within range,
// increasing, even 1-2-5 steps on linear axes) over many ranges.
func TestTicksProperties(t *testing.T) {
	cases := []struct {
		name     string
		min, max float64
		log      bool
	}{
		{"linear power factor", 0.8, 1, false},
		{"linear negative", -7.3, -0.2, false},
		{"linear large", 1.2e6, 9.7e6, false},
		{"linear small", 3e-12, 4.1e-12, false},
		{"log sweep", 10, 1e5, true},
		{"log fractional", 0.037, 420, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) { checkTickProperties(t, tc.min, tc.max, tc.log) })
	}
	t.Run("pseudo-random ranges", func(t *testing.T) {
		r := rand.New(rand.NewPCG(1, 2))
		for i := 0; i < 2000; i++ {
			a := (r.Float64()*2 - 1) * math.Pow(10, float64(r.IntN(25)-12))
			b := a + r.Float64()*math.Pow(10, float64(r.IntN(25)-12))
			if b <= a || b-a < 1e-4*math.Abs(a) {
				continue // ranges far below the precision of their ends are widened by Render
			}
			checkTickProperties(t, a, b, false)
			if a > 0 {
				checkTickProperties(t, a, b, true)
			}
		}
	})
}

// TestTicksInvalid checks that ranges that cannot be ticked give nil.
func TestTicksInvalid(t *testing.T) {
	cases := []struct {
		name     string
		min, max float64
		log      bool
	}{
		{"NaN", math.NaN(), 1, false},
		{"infinite max", 0, math.Inf(1), false},
		{"reversed", 2, 1, false},
		{"log from zero", 0, 10, true},
		{"log negative", -1, 10, true},
		{"beyond 1e280", 0, 1e281, false},
		{"log below 1e-280", 1e-281, 1, true},
		{"narrower than float64 resolution", 1, 1 + 1e-13, false},
		{"narrower than 1e-280", 0, 1e-281, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := Ticks(tc.min, tc.max, tc.log); got != nil {
				t.Errorf("Ticks(%g, %g, %v) = %v, want nil", tc.min, tc.max, tc.log, got)
			}
		})
	}
}
