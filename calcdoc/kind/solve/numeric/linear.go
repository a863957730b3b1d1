package solve

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"

	"calcdoc/expr/linalg"

	"gonum.org/v1/gonum/mat"
)

// Seeds of the PCG generator (math/rand/v2) that draws Linearize's probe
// points. Fixed, so that classification is deterministic.
const (
	probeSeed1 = 0x63616c63646f6331 // "calcdoc1"
	probeSeed2 = 0x736f6c7665707262 // "solveprb"
)

// Linear is the affine model r(x) = A x − b of a problem, as built by
// Linearize.
type Linear struct {
	N, M int // unknowns (columns of A) and equations (rows of A)
	// A is the M×N matrix, A_ik = ∂r_i/∂x_k, as a dense matrix. Linearize
	// of a Problem with Blocks leaves it nil and gives Rows instead; Dense
	// builds it from them.
	A *mat.Dense
	// Rows are the non-zero entries of A row by row, each row sorted by
	// column (set by Linearize of a Problem with Blocks; nil otherwise,
	// when A holds the model).
	Rows [][]Entry
	B    []float64 // len M: b = A x0 − r(x0)

	// XScale (s_k, len N) and RScale (q_i, len M) are the scales with which
	// SolveLinear equilibrates the matrix; ones if nil. Linearize copies them
	// from the Problem (with complex pairs sharing their larger scale).
	XScale, RScale []float64

	// Complex and ComplexRows are the Problem's pairs of unknowns and of
	// residuals (see Problem); Linearize copies them.
	Complex, ComplexRows []int

	// the complex form, once made (see complexForm)
	cf     *complexSystem
	cfDone bool

	// MaxDeviation is the largest relative departure from the affine model
	// seen at the probe points, in the units of LinearTol (the left side of
	// the test divided by the parenthesised magnitude); at most LinearTol.
	MaxDeviation float64
}

// Linearize reports whether r is affine in x, r(x) = A x − b, and if so
// returns A and b.
//
// It evaluates r at X0 and at X0 + h_k e_k for each unknown k, with
// h_k = max(s_k, 2⁻²⁶|x0_k|) rounded so that x0_k + h_k is exact, and takes
// column k of A as (r(x0 + h_k e_k) − r(x0))/h_k and b = A x0 − r(x0). It then
// confirms the model at LinearProbes pseudo-random points p = x0 + d (fixed
// seed), where |d_k| = u·s_k with u uniform in [0.5, 1.5); in the first
// point every d_k is negative (opposite to the column steps, which catches a
// kink such as |x| at x0), in the others each sign is random. Every residual
// must pass the test stated at LinearTol at every point.
//
// With Problem.Blocks the same points are used, but a column step
// evaluates only the blocks that depend on the unknown stepped (the others
// keep their value at X0 exactly, so their entries of the column are 0),
// and A is built as rows of non-zero entries (Linear.Rows, A nil): the
// model, b and MaxDeviation are the numbers the dense construction gives,
// at a cost of about Σ_b (1 + |Cols[b]| + LinearProbes) block evaluations
// and O(non-zeros) arithmetic.
//
// ok is false, with lin nil and err nil, when the test fails, or when r
// cannot be evaluated at one of the points other than X0 (an affine map is
// defined everywhere). err is non-nil for an invalid problem (M ≠ N gives a
// *DimensionError) or when r cannot be evaluated at X0 (an *EvalError).
func Linearize(p *Problem) (lin *Linear, ok bool, err error) {
	e, err := newEvaluator(p)
	if err != nil {
		return nil, false, err
	}
	return e.linearize()
}

// linearize is Linearize on a validated problem.
func (e *evaluator) linearize() (lin *Linear, ok bool, err error) {
	if e.p.Blocks != nil {
		return e.linearizeBlocks()
	}
	n, m := e.n, e.p.M
	x0 := e.x0
	r0 := make([]float64, m)
	if err := e.eval(x0, r0); err != nil {
		return nil, false, err
	}

	a := mat.NewDense(m, n, nil)
	x := append([]float64(nil), x0...)
	r := make([]float64, m)
	for k := 0; k < n; k++ {
		h := math.Max(e.scale[k], math.Abs(x0[k])*0x1p-26)
		x[k] = x0[k] + h
		h = x[k] - x0[k]
		if err := e.eval(x, r); err != nil {
			return nil, false, nil
		}
		x[k] = x0[k]
		for i := 0; i < m; i++ {
			a.Set(i, k, (r[i]-r0[i])/h)
		}
	}

	b := make([]float64, m)
	for i := 0; i < m; i++ {
		row := a.RawRowView(i)
		s := 0.0
		for k, v := range row {
			s += v * x0[k]
		}
		b[i] = s - r0[i]
	}

	rng := rand.New(rand.NewPCG(probeSeed1, probeSeed2))
	d := make([]float64, n)
	maxDev := 0.0
	for j := 0; j < LinearProbes; j++ {
		probePoint(rng, j == 0, x0, e.scale, x, d)
		if err := e.eval(x, r); err != nil {
			return nil, false, nil
		}
		for i := 0; i < m; i++ {
			row := a.RawRowView(i)
			pred, size := r0[i], e.rscale[i]+math.Abs(r0[i])
			for k, v := range row {
				t := v * d[k]
				pred += t
				size += math.Abs(t)
			}
			dev := math.Abs(r[i]-pred) / size
			if !(dev <= LinearTol) {
				return nil, false, nil
			}
			maxDev = math.Max(maxDev, dev)
		}
	}

	return &Linear{
		N: n, M: m, A: a, B: b,
		XScale:       append([]float64(nil), e.scale...),
		RScale:       append([]float64(nil), e.rscale...),
		Complex:      append([]int(nil), e.p.Complex...),
		ComplexRows:  append([]int(nil), e.p.ComplexRows...),
		MaxDeviation: maxDev,
	}, true, nil
}

// SingularError reports a linear system (or matrix) that is singular or whose
// condition number exceeds CondLimit. Indices refer to the unknowns
// (columns) and equations (rows) of the system, from 0.
//
// The null spaces come from the SVD of the equilibrated matrix
// Â = diag(1/q) A diag(s) with singular values σ₁ ≥ … ≥ σ_N. The numerical
// rank is the number of σ_j > σ₁/CondLimit, but at most N−1, so that at
// least the direction of σ_N is named. The columns of V and U belonging to
// the remaining singular values span the right null space (directions in
// which the unknowns can move without changing any residual) and the left
// null space (combinations of the equations that cancel); see NullTol for
// which indices are named.
type SingularError struct {
	Cond           float64   // 1-norm condition number estimate of Â (+Inf for a zero pivot)
	ZeroPivot      bool      // LU met an exactly zero pivot
	Rank           int       // numerical rank, as above
	SingularValues []float64 // σ₁ ≥ … ≥ σ_N of Â
	Unknowns       []int     // unknowns not determined by the equations
	Equations      []int     // equations that depend on each other

	// Contradiction is set when the right-hand side b is not in the range
	// of A: the equations contradict each other rather than merely
	// repeating one another. Let g = U₀ U₀ᵀ b̂ be the part of b̂ in the
	// left null space. When ‖g‖₂ > ContradictTol·max(‖b̂‖₂, 1), the
	// combination with coefficients c_i = g_i/q_i of the rows of
	// A x − b has no x left in it (Σ c_i A_ik = 0 up to the numerical rank)
	// and equals the constant −Σ c_i b_i whatever x. Contradiction holds
	// c scaled so that its largest |c_i q_i| is 1 at row Lead (c_Lead = 1
	// exactly when q is uniform), and Mismatch = −Σ c_i b_i, in the unit
	// of row Lead; nil when the set is consistent (or the SVD failed).
	Contradiction []float64
	Lead          int
	Mismatch      float64

	// Cause is the condition expr/linalg reported: a *linalg.Singular, a
	// *linalg.IllConditioned, or a *linalg.NotFinite for a solution that
	// overflows. Unwrap returns it, so errors.As finds it.
	Cause error
}

func (e *SingularError) Unwrap() error { return e.Cause }

// ContradictTol is the relative size above which the part of the
// equilibrated right-hand side outside the range of a singular matrix makes
// the equations contradictory (see SingularError.Contradiction). For a
// consistent dependent set that part is rounding, of order 1e-16 of b̂.
const ContradictTol = 1e-9

func (e *SingularError) Error() string {
	var sb strings.Builder
	sb.WriteString("solve: the linear system is singular")
	if e.ZeroPivot {
		sb.WriteString(" (zero pivot)")
	} else {
		fmt.Fprintf(&sb, " or too badly conditioned to solve (condition number %.3g exceeds %.3g)", e.Cond, float64(CondLimit))
	}
	switch len(e.Unknowns) {
	case 0:
	case 1:
		fmt.Fprintf(&sb, "; unknown %d is not determined", e.Unknowns[0])
	default:
		fmt.Fprintf(&sb, "; unknowns %s are not determined", joinInts(e.Unknowns))
	}
	if e.Contradiction != nil {
		fmt.Fprintf(&sb, "; the equations contradict each other: a combination of them leaves no unknown, and its lhs − rhs is %.6g whatever the unknowns (in the unit of equation %d)", e.Mismatch, e.Lead)
	}
	switch len(e.Equations) {
	case 0:
	case 1:
		fmt.Fprintf(&sb, "; equation %d has no effect on the unknowns (all its coefficients are zero or negligible)", e.Equations[0])
	default:
		fmt.Fprintf(&sb, "; equations %s are linearly dependent", joinInts(e.Equations))
	}
	return sb.String()
}

func joinInts(v []int) string {
	s := make([]string, len(v))
	for i, k := range v {
		s[i] = strconv.Itoa(k)
	}
	return strings.Join(s, ", ")
}

// singularOf builds the SingularError of the real form from the condition
// that linalg reported (*linalg.Singular, *linalg.IllConditioned, or a
// solution that overflows).
func singularOf(n int, a, s, q, b []float64, cond float64, cause error) *SingularError {
	var ls *linalg.Singular
	zeroPivot := errors.As(cause, &ls) && ls.Exact()
	as, err := linalg.Scale(n, a, &linalg.Options{RowScale: q, ColScale: s})
	if err != nil {
		return &SingularError{Cond: cond, ZeroPivot: zeroPivot, Rank: -1, Cause: cause}
	}
	bs := make([]float64, n)
	for i := range bs {
		bs[i] = b[i] / q[i]
	}
	se := singular(mat.NewDense(n, n, as), bs, q, b, cond, zeroPivot)
	se.Cause = cause
	return se
}

func scales(v []float64, n int, name string) ([]float64, error) {
	out := make([]float64, n)
	if v == nil {
		for i := range out {
			out[i] = 1
		}
		return out, nil
	}
	if len(v) != n {
		return nil, badProblem("%s has %d entries, want %d", name, len(v), n)
	}
	for i, x := range v {
		if !finite(x) || !(x > 0) {
			return nil, badProblem("%s[%d] = %v: must be finite and > 0", name, i, x)
		}
		out[i] = x
	}
	return out, nil
}

// singular builds the SingularError of the square equilibrated matrix as,
// with the equilibrated right-hand side bs, the row scales q and the
// unscaled right-hand side b.
func singular(as *mat.Dense, bs, q, b []float64, cond float64, zeroPivot bool) *SingularError {
	n, _ := as.Dims()
	se := &SingularError{Cond: cond, ZeroPivot: zeroPivot}
	if zeroPivot {
		se.Cond = math.Inf(1)
	}
	var svd mat.SVD
	if !svd.Factorize(as, mat.SVDFull) {
		// The SVD did not converge: name nothing rather than guess.
		se.Rank = -1
		return se
	}
	sv := svd.Values(nil)
	se.SingularValues = sv
	rank := 0
	for _, v := range sv {
		if v > sv[0]/CondLimit {
			rank++
		}
	}
	if rank > n-1 {
		rank = n - 1
	}
	se.Rank = rank
	var u, v mat.Dense
	svd.UTo(&u)
	svd.VTo(&v)
	se.Unknowns = nullIndices(&v, rank)
	se.Equations = nullIndices(&u, rank)
	contradiction(se, &u, rank, bs, q, b)
	return se
}

// contradiction fills in SingularError.Contradiction from the left null
// space (columns rank.. of u).
func contradiction(se *SingularError, u *mat.Dense, rank int, bs, q, b []float64) {
	m, cols := u.Dims()
	g := make([]float64, m)
	for j := rank; j < cols; j++ {
		dot := 0.0
		for i := 0; i < m; i++ {
			dot += u.At(i, j) * bs[i]
		}
		for i := 0; i < m; i++ {
			g[i] += dot * u.At(i, j)
		}
	}
	if !(scaledNorm(g, nil) > ContradictTol*math.Max(scaledNorm(bs, nil), 1)) {
		return
	}
	lead := 0
	for i := range g {
		if math.Abs(g[i]) > math.Abs(g[lead]) {
			lead = i
		}
	}
	c := make([]float64, m)
	mis := 0.0
	for i := range g {
		// c_i = (g_i/g_lead)·(q_lead/q_i): the equilibrated combination in
		// the unscaled rows, with c_lead = 1
		c[i] = g[i] / g[lead] * q[lead] / q[i]
		mis -= c[i] * b[i]
	}
	se.Contradiction, se.Lead, se.Mismatch = c, lead, mis
}

// nullIndices returns the rows k of the orthogonal matrix q whose part in
// columns rank.. has Euclidean norm above NullTol.
func nullIndices(q *mat.Dense, rank int) []int {
	rows, cols := q.Dims()
	var out []int
	for k := 0; k < rows; k++ {
		row := q.RawRowView(k)
		if scaledNorm(row[rank:cols], nil) > NullTol {
			out = append(out, k)
		}
	}
	return out
}

// probePoint sets x to the next probe point about x0 and d to x − x0:
// x[k] = x0[k] + u·scale[k] with |u| drawn uniformly from [0.5, 1.5) and
// its sign negative on the first probe and with probability ½ after it.
// The dense and the sparse construction call it in the same order, so
// that both probe the same points.
func probePoint(rng *rand.Rand, first bool, x0, scale, x, d []float64) {
	for k := range x0 {
		u := 0.5 + rng.Float64()
		if first || rng.IntN(2) == 0 {
			u = -u
		}
		x[k] = x0[k] + u*scale[k]
		d[k] = x[k] - x0[k]
	}
}
