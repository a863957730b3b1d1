package solve

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"calcdoc/expr/linalg"
	"calcdoc/expr/linalg/sparse"
)

// sparseComplexSystem is a complex system of n unknowns whose row i has
// entries at i−1, i, i+1 and one more column drawn at random, (g + jh)
// with g, h standard normal, and 4 added on the diagonal; fixed seed.
func sparseComplexSystem(n int) ([][]complex128, []complex128) {
	rng := rand.New(rand.NewPCG(uint64(n), 7))
	cn := func() complex128 { return complex(rng.NormFloat64(), rng.NormFloat64()) }
	a := make([][]complex128, n)
	for i := range a {
		a[i] = make([]complex128, n)
		for _, k := range []int{i - 1, i, i + 1, rng.IntN(n)} {
			if k >= 0 && k < n {
				a[i][k] += cn()
			}
		}
		a[i][i] += 4
	}
	b := make([]complex128, n)
	for i := range b {
		b[i] = cn()
	}
	return a, b
}

// withBlocks gives a complexProblem its structure: a block per complex
// equation (its two rows), depending on the real and imaginary parts of
// the unknowns with a non-zero coefficient in it; a block is evaluated
// with the same arithmetic as the whole residual.
func withBlocks(p *Problem, a [][]complex128, b []complex128) *Problem {
	n := len(b)
	q := *p
	bl := &Blocks{Rows: make([][]int, n), Cols: make([][]int, n)}
	for i, row := range a {
		bl.Rows[i] = []int{2 * i, 2*i + 1}
		for k, v := range row {
			if v != 0 {
				bl.Cols[i] = append(bl.Cols[i], 2*k, 2*k+1)
			}
		}
	}
	bl.Eval = func(i int, x, r []float64) error {
		s := -b[i]
		for k, v := range a[i] {
			s += v * complex(x[2*k], x[2*k+1])
		}
		r[2*i], r[2*i+1] = real(s), imag(s)
		return nil
	}
	q.Blocks = bl
	return &q
}

// TestLinearizeBlocks: Linearize of a problem with Blocks, which evaluates
// an equation only where its own unknowns move, gives the affine model the
// dense construction gives, bit for bit (A, b and MaxDeviation), and the
// solution of both agrees with the complex system's, checked by its
// residual in math/cmplx arithmetic. The solution of the 60-unknown
// system is then made by the sparse LU (order 60, about 4 entries a row:
// numeric.UseSparse).
func TestLinearizeBlocks(t *testing.T) {
	for _, n := range []int{5, 60} {
		a, b := sparseComplexSystem(n)
		dense := complexProblem(a, b)
		lin1, ok1, err1 := Linearize(dense)
		lin2, ok2, err2 := Linearize(withBlocks(dense, a, b))
		if !ok1 || !ok2 || err1 != nil || err2 != nil {
			t.Fatalf("n=%d: Linearize: %v %v %v %v", n, ok1, err1, ok2, err2)
		}
		if lin2.A != nil || lin2.Rows == nil {
			t.Fatalf("n=%d: the model by blocks is not given by rows", n)
		}
		d := lin2.Dense()
		for i := 0; i < 2*n; i++ {
			for k := 0; k < 2*n; k++ {
				if math.Float64bits(d.At(i, k)) != math.Float64bits(lin1.A.At(i, k)) && !(d.At(i, k) == 0 && lin1.A.At(i, k) == 0) {
					t.Fatalf("n=%d: A(%d,%d) = %v by blocks, %v dense", n, i, k, d.At(i, k), lin1.A.At(i, k))
				}
			}
			if lin1.B[i] != lin2.B[i] {
				t.Fatalf("n=%d: b_%d = %v by blocks, %v dense", n, i, lin2.B[i], lin1.B[i])
			}
		}
		if lin1.MaxDeviation != lin2.MaxDeviation {
			t.Errorf("n=%d: MaxDeviation %v by blocks, %v dense", n, lin2.MaxDeviation, lin1.MaxDeviation)
		}
		sol, err := SolveLinearBy(lin2)
		if err != nil {
			t.Fatal(err)
		}
		if want := n >= SparseMinOrder; sol.Method.Sparse != want || !sol.Method.Complex || sol.Method.Order != n {
			t.Errorf("n=%d: factorisation %+v", n, sol.Method)
		}
		// the residual of the complex system at the solution, against the
		// size of its terms (componentwise backward error)
		worst := 0.0
		for i, row := range a {
			r, size := -b[i], math.Hypot(real(b[i]), imag(b[i]))
			for k, v := range row {
				z := complex(sol.X[2*k], sol.X[2*k+1])
				r += v * z
				size += math.Hypot(real(v*z), imag(v*z))
			}
			worst = math.Max(worst, math.Hypot(real(r), imag(r))/size)
		}
		if worst > 1e-14 {
			t.Errorf("n=%d: backward error %.3g of the solution", n, worst)
		}
	}
}

// TestSparseSingularTyped: a singular or ill-conditioned set that the
// sparse LU factors is reported as a value, a *SingularError whose cause is
// the typed condition (errors.As): *sparse.SingularError for a matrix with
// no non-zero pivot left (hand derivation: equation 10 is made 0 = b_10,
// a row of zeros), *linalg.IllConditioned for equation 11 made equation 10
// plus 1e-15 of equation 12 (rows nearly dependent: κ far above
// CondLimit).
func TestSparseSingularTyped(t *testing.T) {
	const n = 60
	for _, c := range []struct {
		name string
		edit func(a [][]complex128)
		zero bool
	}{
		{"row of zeros", func(a [][]complex128) {
			for k := range a[10] {
				a[10][k] = 0
			}
		}, true},
		{"nearly dependent rows", func(a [][]complex128) {
			for k := range a[11] {
				a[11][k] = a[10][k] + 1e-15*a[12][k]
			}
		}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			a, b := sparseComplexSystem(n)
			c.edit(a)
			lin, ok, err := Linearize(withBlocks(complexProblem(a, b), a, b))
			if !ok || err != nil {
				t.Fatalf("Linearize: %v %v", ok, err)
			}
			var sol *LinearSolution
			func() {
				defer func() {
					if p := recover(); p != nil {
						t.Fatalf("panic: %v", p)
					}
				}()
				sol, err = SolveLinearBy(lin)
			}()
			var se *SingularError
			if !errors.As(err, &se) || sol == nil || sol.X != nil || !sol.Method.Sparse {
				t.Fatalf("err = %v, solution %+v: want a *SingularError from the sparse LU", err, sol)
			}
			var ss *sparse.SingularError
			var ic *linalg.IllConditioned
			if c.zero && (!errors.As(err, &ss) || !se.ZeroPivot || !math.IsInf(sol.Cond, 1)) {
				t.Errorf("err = %v (zero pivot %v, cond %v): want a *sparse.SingularError, a zero pivot and cond +Inf", err, se.ZeroPivot, sol.Cond)
			}
			if !c.zero && (!errors.As(err, &ic) || !(ic.Cond > CondLimit)) {
				t.Errorf("err = %v: want a *linalg.IllConditioned above CondLimit", err)
			}
		})
	}
}
