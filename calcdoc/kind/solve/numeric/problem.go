package solve

import (
	"errors"
	"fmt"
	"math"
)

// Problem is a system of M real equations r(x) = 0 in N real unknowns x.
type Problem struct {
	// N is the number of real unknowns and M the number of real equations.
	// Every function of this package requires N = M ≥ 1.
	N, M int

	// Residual fills r (len M) at x (len N). An error means the point could
	// not be evaluated (outside the domain of a function, say). Residual must
	// set every r_i to a finite value; an entry left unset or not finite is
	// reported as an evaluation failure. It must not keep x or r.
	Residual func(x, r []float64) error

	// X0 is the starting point (len N); zeros if nil.
	X0 []float64

	// XScale is the typical magnitude of each unknown (len N, each finite and
	// > 0), used for finite-difference steps, probe points and step
	// tolerances; ones if nil.
	XScale []float64

	// RScale is the typical magnitude of each residual (len M, each finite
	// and > 0); residuals are divided by it for convergence tests and for
	// equilibrating matrices; ones if nil.
	RScale []float64

	// Complex optionally names the unknowns that are the real and imaginary
	// parts of one complex unknown, as a flat list of index pairs
	// [re₀, im₀, re₁, im₁, …]. Each index may appear at most once. Both
	// parts of a pair then share the scale max(XScale_re, XScale_im), and
	// the magnitude used for finite-difference steps and step tolerances is
	// the modulus of the complex unknown. The hint is not required.
	Complex []int

	// ComplexRows optionally names the residuals that are the real and
	// imaginary parts of one complex equation, as a flat list of index
	// pairs [re₀, im₀, re₁, im₁, …], each index at most once. When every
	// unknown is in a Complex pair, every residual in a ComplexRows pair
	// and the linear model has the structure of a complex matrix (see
	// Linear.ComplexLinear), SolveLinear factors the complex matrix, of
	// half the order, instead of the real form. The hint is not required.
	ComplexRows []int

	// Blocks optionally gives the structure of the residual: which
	// residuals depend on which unknowns, and a function that evaluates
	// one block of residuals. With it, Linearize evaluates each block only
	// at the points where one of its unknowns moved, and builds A by rows
	// of non-zero entries (Linear.Rows), at a cost proportional to the
	// size of the equations instead of N·M. Residual is still required
	// (Newton uses it).
	Blocks *Blocks
}

// Blocks splits the M residuals of a Problem into blocks (the real and
// imaginary parts of one equation, say).
type Blocks struct {
	// Rows[b] are the residuals block b sets; every residual is in exactly
	// one block.
	Rows [][]int
	// Cols[b] are the unknowns block b depends on: changing any other
	// unknown leaves its residuals exactly as they were.
	Cols [][]int
	// Eval sets r_i for every i in Rows[b] at x (len N; other entries of
	// r are left alone). An error means the block could not be evaluated
	// at x. It must not keep x or r.
	Eval func(b int, x, r []float64) error
}

// ErrBadProblem is wrapped by the errors that report an invalid Problem,
// Linear or Options value (other than a size mismatch, see DimensionError).
var ErrBadProblem = errors.New("solve: invalid problem")

// DimensionError reports a system that is not square: M real equations for N
// real unknowns.
type DimensionError struct {
	N, M int
}

func (e *DimensionError) Error() string {
	switch {
	case e.M < e.N:
		return fmt.Sprintf("solve: %d real equations for %d real unknowns: %d equation(s) short", e.M, e.N, e.N-e.M)
	default:
		return fmt.Sprintf("solve: %d real equations for %d real unknowns: %d unknown(s) short", e.M, e.N, e.M-e.N)
	}
}

// EvalError reports a point at which the residual could not be evaluated:
// either Residual returned an error (Equation = −1), or it left residual
// Equation unset or not finite (Err is then ErrNotFinite).
type EvalError struct {
	X        []float64 // the point, a copy
	Equation int
	Err      error
}

// ErrNotFinite is the cause in an EvalError for a residual entry that is
// NaN or infinite, or that Residual did not set.
var ErrNotFinite = errors.New("residual not set or not finite")

func (e *EvalError) Error() string {
	if e.Equation >= 0 {
		return fmt.Sprintf("solve: residual %d could not be evaluated: %v", e.Equation, e.Err)
	}
	return fmt.Sprintf("solve: residual could not be evaluated: %v", e.Err)
}

func (e *EvalError) Unwrap() error { return e.Err }

// evaluator holds a validated problem with its defaults filled in.
type evaluator struct {
	p       *Problem
	n       int
	x0      []float64
	scale   []float64 // s_k, shared within a complex pair
	rscale  []float64 // q_i
	partner []int     // partner[k] is the other part of k's complex pair, or −1
	xbuf    []float64 // copy of x handed to Residual
	evals   int
}

func badProblem(format string, args ...any) error {
	return fmt.Errorf("%w: %s", ErrBadProblem, fmt.Sprintf(format, args...))
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// newEvaluator validates p and fills in the defaults.
func newEvaluator(p *Problem) (*evaluator, error) {
	if p == nil {
		return nil, badProblem("nil Problem")
	}
	if p.N < 1 {
		return nil, badProblem("N = %d unknowns: there must be at least one", p.N)
	}
	if p.M != p.N {
		return nil, &DimensionError{N: p.N, M: p.M}
	}
	if p.Residual == nil {
		return nil, badProblem("nil Residual function")
	}
	n := p.N
	e := &evaluator{p: p, n: n, xbuf: make([]float64, n)}

	e.x0 = make([]float64, n)
	if p.X0 != nil {
		if len(p.X0) != n {
			return nil, badProblem("X0 has %d entries for %d unknowns", len(p.X0), n)
		}
		for k, v := range p.X0 {
			if !finite(v) {
				return nil, badProblem("X0[%d] = %v is not finite", k, v)
			}
		}
		copy(e.x0, p.X0)
	}

	e.scale = make([]float64, n)
	if p.XScale == nil {
		for k := range e.scale {
			e.scale[k] = 1
		}
	} else {
		if len(p.XScale) != n {
			return nil, badProblem("XScale has %d entries for %d unknowns", len(p.XScale), n)
		}
		for k, v := range p.XScale {
			if !finite(v) || !(v > 0) {
				return nil, badProblem("XScale[%d] = %v: must be finite and > 0", k, v)
			}
		}
		copy(e.scale, p.XScale)
	}

	e.rscale = make([]float64, p.M)
	if p.RScale == nil {
		for i := range e.rscale {
			e.rscale[i] = 1
		}
	} else {
		if len(p.RScale) != p.M {
			return nil, badProblem("RScale has %d entries for %d equations", len(p.RScale), p.M)
		}
		for i, v := range p.RScale {
			if !finite(v) || !(v > 0) {
				return nil, badProblem("RScale[%d] = %v: must be finite and > 0", i, v)
			}
		}
		copy(e.rscale, p.RScale)
	}

	e.partner = make([]int, n)
	for k := range e.partner {
		e.partner[k] = -1
	}
	if len(p.Complex)%2 != 0 {
		return nil, badProblem("Complex has %d entries: it must list pairs", len(p.Complex))
	}
	seen := make([]bool, n)
	for j, k := range p.Complex {
		if k < 0 || k >= n {
			return nil, badProblem("Complex[%d] = %d is not an unknown index (0..%d)", j, k, n-1)
		}
		if seen[k] {
			return nil, badProblem("Complex names unknown %d more than once", k)
		}
		seen[k] = true
	}
	if len(p.ComplexRows)%2 != 0 {
		return nil, badProblem("ComplexRows has %d entries: it must list pairs", len(p.ComplexRows))
	}
	seenRow := make([]bool, p.M)
	for j, i := range p.ComplexRows {
		if i < 0 || i >= p.M {
			return nil, badProblem("ComplexRows[%d] = %d is not a residual index (0..%d)", j, i, p.M-1)
		}
		if seenRow[i] {
			return nil, badProblem("ComplexRows names residual %d more than once", i)
		}
		seenRow[i] = true
	}
	if p.Blocks != nil {
		if err := checkBlocks(p.Blocks, n, p.M); err != nil {
			return nil, err
		}
	}
	for j := 0; j < len(p.Complex); j += 2 {
		re, im := p.Complex[j], p.Complex[j+1]
		e.partner[re], e.partner[im] = im, re
		s := math.Max(e.scale[re], e.scale[im])
		e.scale[re], e.scale[im] = s, s
	}
	return e, nil
}

// eval evaluates the residual at x into r. r is filled with NaN first so
// that an entry the callback does not set is detected.
func (e *evaluator) eval(x, r []float64) error {
	copy(e.xbuf, x)
	for i := range r {
		r[i] = math.NaN()
	}
	e.evals++
	if err := e.p.Residual(e.xbuf, r); err != nil {
		return &EvalError{X: append([]float64(nil), x...), Equation: -1, Err: err}
	}
	for i, v := range r {
		if !finite(v) {
			return &EvalError{X: append([]float64(nil), x...), Equation: i, Err: ErrNotFinite}
		}
	}
	return nil
}

// mag returns m_k(x): |x_k|, or the modulus of k's complex unknown.
func (e *evaluator) mag(x []float64, k int) float64 {
	if j := e.partner[k]; j >= 0 {
		return math.Hypot(x[k], x[j])
	}
	return math.Abs(x[k])
}

// norm returns ‖r‖_q = sqrt(Σ (r_i/q_i)²), computed without overflow.
func (e *evaluator) norm(r []float64) float64 {
	return scaledNorm(r, e.rscale)
}

// scaledNorm returns sqrt(Σ (v_i/w_i)²) (w nil: weights one), scaling by the
// largest term so that no intermediate overflows or underflows.
func scaledNorm(v, w []float64) float64 {
	big := 0.0
	for i, vi := range v {
		if w != nil {
			vi /= w[i]
		}
		big = math.Max(big, math.Abs(vi))
	}
	if big == 0 || math.IsInf(big, 0) || math.IsNaN(big) {
		return big
	}
	sum := 0.0
	for i, vi := range v {
		if w != nil {
			vi /= w[i]
		}
		t := vi / big
		sum += t * t
	}
	return big * math.Sqrt(sum)
}

// stepSize returns the scaled size max_k |dx_k| / max(m_k(x), s_k).
func (e *evaluator) stepSize(x, dx []float64) float64 {
	s := 0.0
	for k, d := range dx {
		s = math.Max(s, math.Abs(d)/math.Max(e.mag(x, k), e.scale[k]))
	}
	return s
}

// checkBlocks validates the structure of a Problem with Blocks.
func checkBlocks(bl *Blocks, n, m int) error {
	if bl.Eval == nil {
		return badProblem("Blocks without an Eval function")
	}
	if len(bl.Rows) != len(bl.Cols) {
		return badProblem("Blocks has %d row lists and %d column lists", len(bl.Rows), len(bl.Cols))
	}
	owner := make([]bool, m)
	seen := make([]int, n)
	for b, rows := range bl.Rows {
		for _, i := range rows {
			if i < 0 || i >= m {
				return badProblem("block %d sets residual %d, not a residual index (0..%d)", b, i, m-1)
			}
			if owner[i] {
				return badProblem("residual %d is in more than one block", i)
			}
			owner[i] = true
		}
		for _, k := range bl.Cols[b] {
			if k < 0 || k >= n {
				return badProblem("block %d depends on unknown %d, not an unknown index (0..%d)", b, k, n-1)
			}
			if seen[k] == b+1 {
				return badProblem("block %d names unknown %d twice", b, k)
			}
			seen[k] = b + 1
		}
	}
	for i, ok := range owner {
		if !ok {
			return badProblem("residual %d is in no block", i)
		}
	}
	return nil
}

// evalBlock evaluates block b at x into r, as eval does for the whole
// residual: its entries are filled with NaN first so that an entry Eval
// does not set is detected.
func (e *evaluator) evalBlock(b int, x, r []float64) error {
	bl := e.p.Blocks
	for _, i := range bl.Rows[b] {
		r[i] = math.NaN()
	}
	e.evals++
	if err := bl.Eval(b, x, r); err != nil {
		return &EvalError{X: append([]float64(nil), x...), Equation: -1, Err: err}
	}
	for _, i := range bl.Rows[b] {
		if !finite(r[i]) {
			return &EvalError{X: append([]float64(nil), x...), Equation: i, Err: ErrNotFinite}
		}
	}
	return nil
}

// evalBlocks evaluates every block at x into r, in order, as eval does
// the whole residual: the first block whose Eval fails gives the error,
// else the first residual that is not finite.
func (e *evaluator) evalBlocks(x, r []float64) error {
	for i := range r {
		r[i] = math.NaN()
	}
	e.evals++
	for b := range e.p.Blocks.Rows {
		if err := e.p.Blocks.Eval(b, x, r); err != nil {
			return &EvalError{X: append([]float64(nil), x...), Equation: -1, Err: err}
		}
	}
	for i, v := range r {
		if !finite(v) {
			return &EvalError{X: append([]float64(nil), x...), Equation: i, Err: ErrNotFinite}
		}
	}
	return nil
}
