package sparse

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// refSystems is testdata/sparse/systems.json, written by
// testdata/refgen/gen_sparse.py with numpy.linalg.solve (LAPACK zgesv).
type refSystems struct {
	NumPy   string `json:"numpy"`
	Systems []struct {
		N       int          `json:"n"`
		Entries [][4]float64 `json:"entries"`
		B       [][2]float64 `json:"b"`
		X       [][2]float64 `json:"x"`
		Cond    float64      `json:"cond"`
	} `json:"systems"`
}

func loadRef(t *testing.T) refSystems {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "sparse", "systems.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r refSystems
	if err := json.Unmarshal(raw, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

func cvec(p [][2]float64) []complex128 {
	v := make([]complex128, len(p))
	for i, z := range p {
		v[i] = complex(z[0], z[1])
	}
	return v
}

// close reports whether x agrees with the reference y entry by entry in
// the scaled sense: |x_j − y_j| ≤ tol·(|y_j| + cs_j·‖C⁻¹y‖∞), cs the column
// scales of the equilibration (the solution of the equilibrated system is
// C⁻¹x; its error is bounded normwise by its condition number).
func closeTo(x, y []complex128, cs []float64, tol float64) (int, bool) {
	big := 0.0
	for j := range y {
		big = math.Max(big, cmplx.Abs(y[j])/cs[j])
	}
	for j := range y {
		if cmplx.Abs(x[j]-y[j]) > tol*(cmplx.Abs(y[j])+cs[j]*big) {
			return j, false
		}
	}
	return 0, true
}

// TestNumPy solves the reference systems and compares with NumPy's
// dense solution (reference: testdata/sparse/systems.json, NumPy).
func TestNumPy(t *testing.T) {
	ref := loadRef(t)
	if len(ref.Systems) == 0 {
		t.Fatal("no systems")
	}
	for _, s := range ref.Systems {
		bl := NewBuilder(s.N)
		for _, e := range s.Entries {
			bl.Add(int(e[0]), int(e[1]), complex(e[2], e[3]))
		}
		a := bl.Matrix()
		f, err := Factor(a)
		if err != nil {
			t.Fatalf("n=%d: %v", s.N, err)
		}
		b, want := cvec(s.B), cvec(s.X)
		x, omega := f.SolveRefined(b)
		if omega > 1e-14 {
			t.Errorf("n=%d: backward error %g", s.N, omega)
		}
		// the equilibrated condition number is below 1e8 by construction
		if j, ok := closeTo(x, want, f.cs, 1e-7); !ok {
			t.Errorf("n=%d: x[%d] = %v, NumPy %v", s.N, j, x[j], want[j])
		}
		if c := f.Cond1(); !(c >= 1) || c > 1e9 {
			t.Errorf("n=%d: condition estimate %g", s.N, c)
		}
	}
}

// realForm is the 2n×2n real form [Re A, −Im A; Im A, Re A] of A.
func realForm(a *Matrix) *mat.Dense {
	n := a.N
	d := mat.NewDense(2*n, 2*n, nil)
	for i, r := range a.Rows {
		for _, e := range r {
			d.Set(i, e.Col, real(e.V))
			d.Set(i, n+e.Col, -imag(e.V))
			d.Set(n+i, e.Col, imag(e.V))
			d.Set(n+i, n+e.Col, real(e.V))
		}
	}
	return d
}

// randomNetworkLike builds a random sparse matrix shaped like a nodal
// admittance matrix with a few constraint rows and columns (zero diagonal
// entries), as modified nodal analysis gives.
func randomNetworkLike(rng *rand.Rand, n, m int) *Matrix {
	b := NewBuilder(n + m)
	cz := func(s float64) complex128 { return complex(s*(0.1+rng.Float64()), s*(rng.Float64()-0.3)) }
	for k := 0; k < 3*n; k++ {
		i, j := rng.IntN(n), rng.IntN(n)
		if i == j {
			continue
		}
		y := cz(math.Pow(10, 4*rng.Float64()-2))
		b.Add(i, i, y)
		b.Add(j, j, y)
		b.Add(i, j, -y)
		b.Add(j, i, -y)
	}
	for i := 0; i < n; i++ {
		b.Add(i, i, cz(0.01))
	}
	for c := 0; c < m; c++ {
		i, j := rng.IntN(n), rng.IntN(n)
		for i == j {
			j = rng.IntN(n)
		}
		b.Add(i, n+c, 1)
		b.Add(j, n+c, -1)
		b.Add(n+c, i, 1)
		b.Add(n+c, j, -1)
	}
	return b.Matrix()
}

// TestGonumRealForm compares the sparse complex solution with gonum's
// dense LU solution of the real 2n×2n form on matrices shaped like those
// of modified nodal analysis (reference: gonum mat.Dense.Solve).
func TestGonumRealForm(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, sz := range [][2]int{{3, 1}, {10, 2}, {40, 5}, {120, 10}, {250, 20}} {
		a := randomNetworkLike(rng, sz[0], sz[1])
		n := a.N
		b := make([]complex128, n)
		for i := range b {
			b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		f, err := Factor(a)
		if err != nil {
			t.Fatalf("%v: %v", sz, err)
		}
		x, omega := f.SolveRefined(b)
		if omega > 1e-14 {
			t.Errorf("%v: backward error %g", sz, omega)
		}
		rb := mat.NewVecDense(2*n, nil)
		for i, v := range b {
			rb.SetVec(i, real(v))
			rb.SetVec(n+i, imag(v))
		}
		var rx mat.VecDense
		if err := rx.SolveVec(realForm(a), rb); err != nil {
			t.Fatalf("gonum: %v", err)
		}
		want := make([]complex128, n)
		for i := range want {
			want[i] = complex(rx.AtVec(i), rx.AtVec(n+i))
		}
		cond := f.Cond1()
		if j, ok := closeTo(x, want, f.cs, 1e-15*cond+1e-12); !ok {
			t.Errorf("%v: x[%d] = %v, gonum %v (cond %g)", sz, j, x[j], want[j], cond)
		}
		// the conjugate-transpose solve against gonum on the transposed real form
		xh := f.SolveH(b)
		var ah mat.Dense
		ah.CloneFrom(realForm(a).T())
		// (Aᴴ) real form is the transpose of A's real form
		var rxh mat.VecDense
		if err := rxh.SolveVec(&ah, rb); err != nil {
			t.Fatal(err)
		}
		for i := range xh {
			w := complex(rxh.AtVec(i), rxh.AtVec(n+i))
			if cmplx.Abs(xh[i]-w) > 1e-9*(1+cmplx.Abs(w))*cond*1e-3 {
				t.Errorf("%v: Aᴴ solve x[%d] = %v, gonum %v", sz, i, xh[i], w)
				break
			}
		}
	}
}

// TestCondEstimate compares the 1-norm condition estimate with the exact
// 1-norm condition number of the equilibrated matrix, computed densely
// with gonum (inverse, then the largest column sum): Higham's estimator
// never exceeds the true value and is within a factor 3 on these
// (reference: N. J. Higham, ACM TOMS 14 (1988), the estimate is a lower
// bound; gonum mat.Dense.Inverse).
func TestCondEstimate(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for _, sz := range [][2]int{{4, 1}, {20, 3}, {60, 6}} {
		a := randomNetworkLike(rng, sz[0], sz[1])
		f, err := Factor(a)
		if err != nil {
			t.Fatal(err)
		}
		n := a.N
		eq := NewBuilder(n)
		for i, r := range a.Rows {
			for _, e := range r {
				eq.Add(i, e.Col, e.V*complex(f.rs[i]*f.cs[e.Col], 0))
			}
		}
		em := eq.Matrix()
		var inv mat.Dense
		if err := inv.Inverse(realForm(em)); err != nil {
			t.Fatal(err)
		}
		// the complex 1-norm of the inverse from its real form's blocks
		ninv := 0.0
		for j := 0; j < n; j++ {
			s := 0.0
			for i := 0; i < n; i++ {
				s += math.Hypot(inv.At(i, j), inv.At(n+i, j))
			}
			ninv = math.Max(ninv, s)
		}
		exact := em.Norm1() * ninv
		est := f.Cond1()
		if est > exact*(1+1e-9) || est < exact/3 {
			t.Errorf("%v: estimate %g, exact %g", sz, est, exact)
		}
	}
}

// TestCondGivenEstimate compares Cond1Given, the estimate for the matrix
// as given (before the factorisation's own scaling), with its exact 1-norm
// condition number computed densely with gonum (inverse of the real form,
// then the largest column sum of moduli): a lower bound within a factor 3
// (Higham, ACM TOMS 14 (1988); gonum mat.Dense.Inverse). The matrices are
// scaled badly on purpose, rows and columns by up to 10^±3, so that the
// estimate for the given matrix and the one for the equilibrated matrix
// (Cond1) differ.
func TestCondGivenEstimate(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 4))
	for _, sz := range [][2]int{{4, 1}, {20, 3}, {60, 6}} {
		a0 := randomNetworkLike(rng, sz[0], sz[1])
		n := a0.N
		rs, cs := make([]float64, n), make([]float64, n)
		for i := range rs {
			rs[i], cs[i] = math.Pow(10, 6*rng.Float64()-3), math.Pow(10, 6*rng.Float64()-3)
		}
		bl := NewBuilder(n)
		for i, r := range a0.Rows {
			for _, e := range r {
				bl.Add(i, e.Col, e.V*complex(rs[i]*cs[e.Col], 0))
			}
		}
		a := bl.Matrix()
		f, err := Factor(a)
		if err != nil {
			t.Fatal(err)
		}
		var inv mat.Dense
		if err := inv.Inverse(realForm(a)); err != nil {
			t.Fatal(err)
		}
		ninv := 0.0
		for j := 0; j < n; j++ {
			s := 0.0
			for i := 0; i < n; i++ {
				s += math.Hypot(inv.At(i, j), inv.At(n+i, j))
			}
			ninv = math.Max(ninv, s)
		}
		exact := a.Norm1() * ninv
		est := f.Cond1Given()
		if est > exact*(1+1e-9) || est < exact/3 {
			t.Errorf("%v: estimate %g, exact %g", sz, est, exact)
		}
	}
}

// TestSingular: a matrix with an empty column, and one that becomes zero
// in elimination (two equal rows), are reported singular; the hand
// derivation for the second: rows (1, 2) and (2, 4), the second minus two
// times the first is zero.
func TestSingular(t *testing.T) {
	b := NewBuilder(2)
	b.Add(0, 0, 1)
	b.Add(1, 0, 2)
	_, err := Factor(b.Matrix())
	se, ok := err.(*SingularError)
	if !ok || len(se.Cols) != 1 || se.Cols[0] != 1 {
		t.Fatalf("empty column: %v", err)
	}
	b = NewBuilder(2)
	b.Add(0, 0, 1)
	b.Add(0, 1, 2)
	b.Add(1, 0, 2)
	b.Add(1, 1, 4)
	if _, err := Factor(b.Matrix()); err == nil {
		t.Fatal("dependent rows: no error")
	}
}

// TestHandSolve: a 2×2 complex system whose solution is worked by hand
// (hand derivation): [j, 1; 1, 0]·x = [1+j; 2] gives x_0 = 2 from the
// second row, then j·2 + x_1 = 1 + j, so x_1 = 1 − j. The zero at (1, 1)
// forces a pivot off the diagonal.
func TestHandSolve(t *testing.T) {
	b := NewBuilder(2)
	b.Add(0, 0, 1i)
	b.Add(0, 1, 1)
	b.Add(1, 0, 1)
	f, err := Factor(b.Matrix())
	if err != nil {
		t.Fatal(err)
	}
	x, _ := f.SolveRefined([]complex128{1 + 1i, 2})
	if cmplx.Abs(x[0]-2) > 1e-15 || cmplx.Abs(x[1]-(1-1i)) > 1e-15 {
		t.Fatalf("x = %v, want [2 1-1i]", x)
	}
}

// BenchmarkFactorSolve500 factorises and solves a matrix shaped like the
// modified nodal analysis of a 500-node network with 40 constraints.
func BenchmarkFactorSolve500(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	a := randomNetworkLike(rng, 500, 40)
	rhs := make([]complex128, a.N)
	for i := range rhs {
		rhs[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	b.ResetTimer()
	for it := 0; it < b.N; it++ {
		f, err := Factor(a)
		if err != nil {
			b.Fatal(err)
		}
		f.SolveRefined(rhs)
		f.Cond1()
	}
}

// BenchmarkFactorCond500 times, on the matrix of BenchmarkFactorSolve500,
// the factorisation alone and each condition estimate from its factors
// alone (at most 11 solves with L and U): the estimates must cost less
// than the factorisation.
func BenchmarkFactorCond500(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	a := randomNetworkLike(rng, 500, 40)
	b.Run("factor", func(b *testing.B) {
		for b.Loop() {
			if _, err := Factor(a); err != nil {
				b.Fatal(err)
			}
		}
	})
	f, err := Factor(a)
	if err != nil {
		b.Fatal(err)
	}
	b.Run("cond1", func(b *testing.B) {
		for b.Loop() {
			g := *f
			g.cond = 0
			g.Cond1()
		}
	})
	b.Run("cond1given", func(b *testing.B) {
		for b.Loop() {
			g := *f
			g.condGiven = 0
			g.Cond1Given()
		}
	})
}
