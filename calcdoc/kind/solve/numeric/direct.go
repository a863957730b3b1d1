package solve

import (
	"math"

	"calcdoc/expr/linalg"
	"calcdoc/expr/linalg/sparse"
)

// The choice between the dense and the sparse factorisation of a linear
// set (UseSparse). A set is factored by the sparse LU of expr/linalg/sparse
// when the matrix factored (the complex matrix of a complex-linear set,
// else the real form) has at least SparseMinOrder rows and at most
// SparseMaxDensity of its entries are non-zero; otherwise by the dense LU
// of expr/linalg. The equations of a network written node by node (KCL at
// each node of a ladder or a meshed feeder) have a few entries a row, and
// a Markowitz order keeps their factors nearly as sparse, so their cost
// grows about as the number of entries; dense elimination costs n³/3
// multiply-adds whatever the zeros. Below SparseMinOrder both take well
// under a millisecond and the dense LU, which the sheet can show in full,
// is kept.
const (
	SparseMinOrder   = 50
	SparseMaxDensity = 0.1
)

// UseSparse reports whether a matrix of order n with nnz non-zero entries
// is factored by the sparse LU: n ≥ SparseMinOrder and
// nnz ≤ SparseMaxDensity·n².
func UseSparse(n, nnz int) bool {
	return n >= SparseMinOrder && float64(nnz) <= SparseMaxDensity*float64(n)*float64(n)
}

// Factorization says how SolveLinear factored a set.
type Factorization struct {
	// Sparse is true for the sparse LU (Markowitz order under threshold
	// partial pivoting, expr/linalg/sparse), false for the dense LU with
	// partial pivoting (expr/linalg).
	Sparse bool
	// Complex is true when the complex matrix of a complex-linear set was
	// factored, false for the real form.
	Complex bool
	// Order is the order of the matrix factored, NNZ its non-zero entries
	// and Fill the entries of its sparse LU factors (0 for the dense LU).
	Order, NNZ, Fill int
}

// LinearSolution is the outcome of SolveLinearBy.
type LinearSolution struct {
	X      []float64 // the solution (nil when the set is singular)
	Cond   float64   // the 1-norm condition number estimate of the matrix factored
	Method Factorization
}

// SolveLinear solves the square system A x = b.
//
// It factors the equilibrated matrix Â = diag(1/q) A diag(s) (the scales
// s = XScale and q = RScale given), estimates its 1-norm condition number
// κ₁(Â) = ‖Â‖₁‖Â⁻¹‖₁ (Hager–Higham: a lower bound, usually exact, in
// practice within a factor 3, from solves with the LU factors and their
// conjugate transpose, which cost far less than the factorisation), solves
// Â y = b̂ with b̂_i = b_i/q_i and returns x_k = s_k y_k with cond = κ₁.
//
// When the set is complex-linear (Linear.ComplexLinear) the same is done
// on the complex matrix C of half the order, C_ik = Â of the 2×2 block
// [[Re c, −Im c], [Im c, Re c]] of complex equation i and complex unknown
// k, and cond is κ₁ of the equilibrated C. Otherwise (real unknowns, or
// equations that use conj, re or im of an unknown) the real form Â is
// factored.
//
// The matrix so chosen is factored by the dense LU with partial pivoting
// of expr/linalg (cond is κ₁(Â)), or, when UseSparse says so, by the
// sparse LU of expr/linalg/sparse, which scales Â again by powers of two
// (exact) and refines the solution against Â (cond is κ₁ of that scaled
// matrix).
//
// When a pivot is zero or negligible (linalg.PivotTol; the sparse LU: no
// non-zero pivot left) or cond exceeds CondLimit, x is nil and err is a
// *SingularError, its diagnosis made on the dense real form; cond is still
// returned (+Inf when the sparse LU found no pivot). A non-square A gives
// a *DimensionError, other bad input an error wrapping ErrBadProblem.
func SolveLinear(lin *Linear) (x []float64, cond float64, err error) {
	sol, err := SolveLinearBy(lin)
	if sol != nil {
		x, cond = sol.X, sol.Cond
	}
	return x, cond, err
}

// SolveLinearBy is SolveLinear, saying which factorisation was used.
func SolveLinearBy(lin *Linear) (*LinearSolution, error) {
	return solveLinear(lin, nil)
}

// SolveLinearForced is SolveLinearBy with the factorisation chosen by the
// caller, the sparse LU or the dense one, whatever UseSparse says: for
// comparing the two on the same set.
func SolveLinearForced(lin *Linear, sparse bool) (*LinearSolution, error) {
	return solveLinear(lin, &sparse)
}

func solveLinear(lin *Linear, force *bool) (*LinearSolution, error) {
	s, q, err := checkLinear(lin)
	if err != nil {
		return nil, err
	}
	n := len(s)
	sol := &LinearSolution{Method: lin.Plan()}
	if force != nil {
		sol.Method.Sparse = *force
	}
	cf := lin.complexForm()
	if sol.Method.Sparse {
		return sol, solveSparse(lin, cf, s, q, sol)
	}
	a := denseReal(lin)
	if cf != nil {
		f, ferr := linalg.Factorize(cf.n, cf.dense(), &linalg.Options{RowScale: cf.q, ColScale: cf.s})
		if ferr != nil && f == nil {
			return nil, badProblem("%v", ferr)
		}
		sol.Cond = f.Cond()
		if ferr = f.CheckCond(CondLimit); ferr == nil {
			z, serr := f.Solve(cf.b)
			if serr == nil {
				sol.X = cf.unpack(z, n)
				return sol, nil
			}
		}
		return sol, singularOf(n, a, s, q, lin.B, sol.Cond, ferr)
	}
	f, ferr := linalg.Factorize(n, a, &linalg.Options{RowScale: q, ColScale: s})
	if ferr != nil && f == nil {
		return nil, badProblem("%v", ferr)
	}
	sol.Cond = f.Cond()
	if ferr = f.CheckCond(CondLimit); ferr == nil {
		y, serr := f.Solve(lin.B)
		if serr == nil {
			sol.X = y
			return sol, nil
		}
	}
	return sol, singularOf(n, a, s, q, lin.B, sol.Cond, ferr)
}

// solveSparse factors the equilibrated matrix (complex form when cf is not
// nil, else the real form) by the sparse LU and solves, filling in sol.
func solveSparse(lin *Linear, cf *complexSystem, s, q []float64, sol *LinearSolution) error {
	n := len(s)
	var a *sparse.Matrix
	var bs []complex128
	if cf != nil {
		a = &sparse.Matrix{N: cf.n, Rows: make([][]sparse.Entry, cf.n)}
		bs = make([]complex128, cf.n)
		for i, r := range cf.rows {
			row := make([]sparse.Entry, len(r))
			for t, e := range r {
				row[t] = sparse.Entry{Col: e.col, V: e.v * complex(cf.s[e.col]/cf.q[i], 0)}
			}
			a.Rows[i] = row
			bs[i] = cf.b[i] / complex(cf.q[i], 0)
		}
	} else {
		a = &sparse.Matrix{N: n, Rows: make([][]sparse.Entry, n)}
		bs = make([]complex128, n)
		for i := 0; i < n; i++ {
			r := lin.RowEntries(i)
			row := make([]sparse.Entry, len(r))
			for t, e := range r {
				row[t] = sparse.Entry{Col: e.Col, V: complex(e.V*s[e.Col]/q[i], 0)}
			}
			a.Rows[i] = row
			bs[i] = complex(lin.B[i]/q[i], 0)
		}
	}
	f, ferr := sparse.Factor(a)
	if ferr != nil {
		// no non-zero pivot left: exactly singular
		sol.Cond = math.Inf(1)
		se := singularOf(n, denseReal(lin), s, q, lin.B, sol.Cond, ferr)
		se.ZeroPivot, se.Cond = true, sol.Cond
		return se
	}
	sol.Method.Fill = f.Fill()
	// κ₁ of the matrix given, Â, as the dense LU states it, not of the
	// sparse LU's own power-of-two scaling of it
	sol.Cond = f.Cond1Given()
	if ferr = sparse.CheckCond(sol.Cond, CondLimit); ferr != nil {
		return singularOf(n, denseReal(lin), s, q, lin.B, sol.Cond, ferr)
	}
	y, _ := f.SolveRefined(bs)
	x := make([]float64, n)
	if cf != nil {
		for k, v := range y {
			v *= complex(cf.s[k], 0)
			x[cf.cols[2*k]], x[cf.cols[2*k+1]] = real(v), imag(v)
		}
	} else {
		for k, v := range y {
			x[k] = real(v) * s[k]
		}
	}
	for k, v := range x {
		if !finite(v) {
			return singularOf(n, denseReal(lin), s, q, lin.B, sol.Cond, &linalg.NotFinite{Row: k, Col: 0})
		}
	}
	sol.X = x
	return nil
}

// Plan says how SolveLinear factors the set: the complex matrix of a
// complex-linear set, else the real form, by the sparse LU when UseSparse
// says so (Fill is left 0: it is known after the factorisation).
func (lin *Linear) Plan() Factorization {
	if cf := lin.complexForm(); cf != nil {
		return Factorization{Complex: true, Order: cf.n, NNZ: cf.nnz(), Sparse: UseSparse(cf.n, cf.nnz())}
	}
	m, _ := lin.Dims()
	nnz := lin.NNZ()
	return Factorization{Order: m, NNZ: nnz, Sparse: UseSparse(m, nnz)}
}

// checkLinear validates lin and returns the scales s and q (ones where not
// given).
func checkLinear(lin *Linear) (s, q []float64, err error) {
	if lin == nil || (lin.A == nil && lin.Rows == nil) {
		return nil, nil, badProblem("nil Linear or nil matrix")
	}
	if lin.A != nil && lin.A.IsEmpty() {
		return nil, nil, badProblem("empty matrix")
	}
	m, n := lin.Dims()
	if lin.A != nil && ((lin.N != 0 && lin.N != n) || (lin.M != 0 && lin.M != m)) {
		return nil, nil, badProblem("Linear says %d×%d but A is %d×%d", lin.M, lin.N, m, n)
	}
	if lin.A == nil && len(lin.Rows) != m {
		return nil, nil, badProblem("Linear says %d rows but has %d", m, len(lin.Rows))
	}
	if m != n {
		return nil, nil, &DimensionError{N: n, M: m}
	}
	if len(lin.B) != m {
		return nil, nil, badProblem("b has %d entries for %d equations", len(lin.B), m)
	}
	s, err = scales(lin.XScale, n, "XScale")
	if err != nil {
		return nil, nil, err
	}
	q, err = scales(lin.RScale, m, "RScale")
	if err != nil {
		return nil, nil, err
	}
	for i := 0; i < m; i++ {
		if !finite(lin.B[i]) {
			return nil, nil, badProblem("b[%d] = %v is not finite", i, lin.B[i])
		}
		for _, t := range lin.RowEntries(i) {
			k, v := t.Col, t.V
			if k < 0 || k >= n {
				return nil, nil, badProblem("A[%d] has an entry in column %d of %d", i, k, n)
			}
			if !finite(v) {
				return nil, nil, badProblem("A[%d][%d] = %v is not finite", i, k, v)
			}
			if !finite(v * s[k] / q[i]) {
				return nil, nil, badProblem("A[%d][%d]·s_%d/q_%d overflows", i, k, k, i)
			}
		}
	}
	return s, q, nil
}

// denseReal returns A row by row as a dense slice.
func denseReal(lin *Linear) []float64 {
	m, n := lin.Dims()
	a := make([]float64, m*n)
	if lin.A != nil {
		for i := 0; i < m; i++ {
			copy(a[i*n:(i+1)*n], lin.A.RawRowView(i))
		}
		return a
	}
	for i, row := range lin.Rows {
		for _, t := range row {
			a[i*n+t.Col] = t.V
		}
	}
	return a
}
