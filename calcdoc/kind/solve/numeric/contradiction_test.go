package solve

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestContradiction: a singular system whose right-hand side lies outside
// the range of its matrix is reported as contradictory, with the
// combination of rows in which the unknowns cancel and what it leaves; a
// consistent singular system is not. Each expected combination and
// mismatch is a hand derivation in the comment: for the combination c,
// Σ c_i A_i = 0 and Mismatch = −Σ c_i b_i (the value of Σ c_i r_i(x) for
// every x, with r = A x − b).
func TestContradiction(t *testing.T) {
	cases := []struct {
		name     string
		a        [][]float64
		b        []float64
		rscale   []float64
		comb     []float64 // nil: consistent
		lead     int
		mismatch float64
	}{
		{
			// x + y = 1, x + y = 2: c = (1, −1) up to the choice of the
			// leading row; b projected on the left null space (1, −1)/√2 is
			// (−1/2, 1/2), equal in size, so the first largest, row 0, leads:
			// c = (1, −1), Mismatch = −(1 − 2) = 1.
			name: "x + y = 1 and 2", a: [][]float64{{1, 1}, {1, 1}}, b: []float64{1, 2},
			comb: []float64{1, -1}, lead: 0, mismatch: 1,
		},
		{
			// 3s − t = 4, −6s + 2t = 5: the left null space is spanned by
			// u = (2, 1)/√5 (3·2 − 6·1 = 0, −2 + 2 = 0); b's part in it is
			// (u·b)u = (13/5)(2, 1), largest at row 0, so c = (1, 1/2) and
			// Mismatch = −(4 + 5/2) = −6.5.
			name: "3s - t = 4, -6s + 2t = 5", a: [][]float64{{3, -1}, {-6, 2}}, b: []float64{4, 5},
			comb: []float64{1, 0.5}, lead: 0, mismatch: -6.5,
		},
		{
			// the same set with row 1 multiplied by 1000 and its residual
			// scale q_1 = 1000 (the row in mA, say): equilibrated, it is the
			// set above, so row 0 leads again; in the unscaled rows
			// c_0·(3, −1) + c_1·(−6000, 2000) = 0 gives c = (1, 1/2000),
			// and Mismatch = −(4 + 5000/2000) = −6.5 in the unit of row 0.
			name: "scaled row", a: [][]float64{{3, -1}, {-6000, 2000}}, b: []float64{4, 5000}, rscale: []float64{1, 1000},
			comb: []float64{1, 0.0005}, lead: 0, mismatch: -6.5,
		},
		{
			// x + y = 1, 2x + 2y = 2: b = (1, 2) is A·(1, 0): consistent.
			name: "dependent, consistent", a: [][]float64{{1, 1}, {2, 2}}, b: []float64{1, 2},
		},
		{
			// row 2 = row 0 + row 1 with b_2 = 4 ≠ 1 + 2: c = (1, 1, −1)
			// scaled to the leading row; the part of b in the null space is
			// (1 + 2 − 4)(1, 1, −1)/3, all equal in size, so row 0 leads:
			// c = (1, 1, −1), Mismatch = −(1 + 2 − 4) = 1.
			name: "sum of two rows", a: [][]float64{{1, 1, 0}, {0, 1, 1}, {1, 2, 1}}, b: []float64{1, 2, 4},
			comb: []float64{1, 1, -1}, lead: 0, mismatch: 1,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			n := len(c.b)
			a := mat.NewDense(n, n, nil)
			for i, row := range c.a {
				for k, v := range row {
					a.Set(i, k, v)
				}
			}
			_, _, err := SolveLinear(&Linear{N: n, M: n, A: a, B: c.b, RScale: c.rscale})
			var se *SingularError
			if !errors.As(err, &se) {
				t.Fatalf("want a SingularError, got %v", err)
			}
			if c.comb == nil {
				if se.Contradiction != nil {
					t.Errorf("a consistent set reported as contradictory: %v", se.Contradiction)
				}
				return
			}
			if se.Contradiction == nil {
				t.Fatal("no contradiction reported")
			}
			if se.Lead != c.lead {
				t.Errorf("lead row %d, want %d", se.Lead, c.lead)
			}
			for i, w := range c.comb {
				if math.Abs(se.Contradiction[i]-w) > 1e-9*math.Abs(w)+1e-12 {
					t.Errorf("c = %v, want %v", se.Contradiction, c.comb)
					break
				}
			}
			if math.Abs(se.Mismatch-c.mismatch) > 1e-9*math.Abs(c.mismatch) {
				t.Errorf("mismatch %v, want %v", se.Mismatch, c.mismatch)
			}
		})
	}
}
