package solve

import (
	"math"
	"slices"
	"testing"
)

// complexProblem returns the real form of the complex system A z = b: unknown
// 2k is Re z_k and 2k+1 is Im z_k; residual 2i is Re(Σ_k A_ik z_k − b_i) and
// 2i+1 its imaginary part (named as pairs in Complex and ComplexRows). The
// residual is computed in complex128 arithmetic, as the document layer does.
func complexProblem(a [][]complex128, b []complex128) *Problem {
	n := len(b)
	pairs := make([]int, 0, 2*n)
	for k := 0; k < n; k++ {
		pairs = append(pairs, 2*k, 2*k+1)
	}
	z := make([]complex128, n)
	return &Problem{
		N: 2 * n, M: 2 * n,
		Complex: pairs, ComplexRows: pairs,
		Residual: func(x, r []float64) error {
			for k := range z {
				z[k] = complex(x[2*k], x[2*k+1])
			}
			for i, row := range a {
				s := -b[i]
				for k, v := range row {
					s += v * z[k]
				}
				r[2*i], r[2*i+1] = real(s), imag(s)
			}
			return nil
		},
	}
}

// realProblem returns the problem r(x) = A x − b.
func realProblem(a [][]float64, b []float64) *Problem {
	n := len(b)
	return &Problem{
		N: n, M: n,
		Residual: func(x, r []float64) error {
			for i, row := range a {
				s := -b[i]
				for k, v := range row {
					s += v * x[k]
				}
				r[i] = s
			}
			return nil
		},
	}
}

// relErr returns max_k |got_k − want_k| / max(max_k |want_k|, floor).
func relErr(got, want []float64, floor float64) float64 {
	den, num := floor, 0.0
	for k := range want {
		den = math.Max(den, math.Abs(want[k]))
		num = math.Max(num, math.Abs(got[k]-want[k]))
	}
	return num / den
}

func checkClose(t *testing.T, got, want []float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("got %d values, want %d", len(got), len(want))
	}
	if e := relErr(got, want, 1); !(e <= tol) {
		t.Errorf("x = %v, want %v (relative error %.3g > %.3g)", got, want, e, tol)
	}
}

func sameInts(a, b []int) bool { return slices.Equal(a, b) }
