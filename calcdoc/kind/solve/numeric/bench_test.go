package solve

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// randomComplexSystem returns a dense complex system of n unknowns with
// entries (g + j h)/√2 and 2√n added on the diagonal (the construction of
// testdata/refgen/gen_solve.py), from a fixed seed.
func randomComplexSystem(n int) ([][]complex128, []complex128) {
	rng := rand.New(rand.NewPCG(uint64(n), 42))
	cn := func() complex128 { return complex(rng.NormFloat64(), rng.NormFloat64()) / math.Sqrt2 }
	a := make([][]complex128, n)
	for i := range a {
		a[i] = make([]complex128, n)
		for k := range a[i] {
			a[i][k] = cn()
		}
		a[i][i] += complex(2*math.Sqrt(float64(n)), 0)
	}
	b := make([]complex128, n)
	for i := range b {
		b[i] = cn()
	}
	return a, b
}

// BenchmarkLinearizeSolveLinear times classification and direct solution of
// the real form of dense complex systems; the sub-benchmark name gives the
// number of real unknowns (twice the complex ones).
func BenchmarkLinearizeSolveLinear(b *testing.B) {
	for _, nreal := range []int{60, 300, 600} {
		a, rhs := randomComplexSystem(nreal / 2)
		p := complexProblem(a, rhs)
		b.Run(fmt.Sprintf("real=%d", nreal), func(b *testing.B) {
			for b.Loop() {
				lin, ok, err := Linearize(p)
				if err != nil || !ok {
					b.Fatalf("Linearize: ok=%v err=%v", ok, err)
				}
				if _, _, err := SolveLinear(lin); err != nil {
					b.Fatalf("SolveLinear: %v", err)
				}
			}
		})
	}
}

// BenchmarkSolveComplex times Solve (classification, direct solution,
// residual check) and SolveLinear alone on dense complex systems of 200
// and 500 complex unknowns (400 and 1000 real unknowns): SolveLinear by the
// complex LU (linear/) and, with the row pairs removed, by the LU of the
// real form (linear-realform/).
func BenchmarkSolveComplex(b *testing.B) {
	for _, n := range []int{200, 500} {
		a, rhs := randomComplexSystem(n)
		p := complexProblem(a, rhs)
		b.Run(fmt.Sprintf("solve/complex=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := Solve(p, Options{}); err != nil {
					b.Fatalf("Solve: %v", err)
				}
			}
		})
		lin, ok, err := Linearize(p)
		if err != nil || !ok {
			b.Fatalf("Linearize: ok=%v err=%v", ok, err)
		}
		b.Run(fmt.Sprintf("linear/complex=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, _, err := SolveLinear(lin); err != nil {
					b.Fatalf("SolveLinear: %v", err)
				}
			}
		})
		// the same set without its row pairs: the real 2n×2n form
		real := *lin
		real.ComplexRows = nil
		b.Run(fmt.Sprintf("linear-realform/complex=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, _, err := SolveLinear(&real); err != nil {
					b.Fatalf("SolveLinear: %v", err)
				}
			}
		})
	}
}
