package solve

import (
	"fmt"
	"math"

	"calcdoc/expr/linalg"

	"gonum.org/v1/gonum/mat"
)

func ones(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 1
	}
	return v
}

// Options tunes Newton. The zero value selects the defaults.
type Options struct {
	MaxIter     int     // iteration limit; 0 means MaxIterations
	ResidualTol float64 // tolerance on ‖r‖_q; 0 means ResidualTol
	StepTol     float64 // tolerance on the scaled step; 0 means StepTol

	// Central selects central differences for the Jacobian (2N evaluations
	// per iteration, step h_k = ε^(1/3)·max(m_k(x), s_k)) instead of forward
	// differences (N evaluations, h_k = √ε·max(m_k(x), s_k)), ε = 2⁻⁵².
	Central bool
}

func (o Options) resolve() (Options, error) {
	if o.MaxIter < 0 {
		return o, badProblem("MaxIter = %d is negative", o.MaxIter)
	}
	if o.ResidualTol < 0 || !finite(o.ResidualTol) {
		return o, badProblem("ResidualTol = %v: must be finite and ≥ 0", o.ResidualTol)
	}
	if o.StepTol < 0 || !finite(o.StepTol) {
		return o, badProblem("StepTol = %v: must be finite and ≥ 0", o.StepTol)
	}
	if o.MaxIter == 0 {
		o.MaxIter = MaxIterations
	}
	if o.ResidualTol == 0 {
		o.ResidualTol = ResidualTol
	}
	if o.StepTol == 0 {
		o.StepTol = StepTol
	}
	return o, nil
}

// Method says how a Result was obtained.
type Method string

const (
	MethodLinear Method = "linear" // classified linear, solved directly by SolveLinear
	MethodNewton Method = "newton" // solved iteratively by Newton
)

// Criterion says which test ended a successful iteration.
type Criterion string

const (
	ByResidual Criterion = "residual" // ‖r‖_q ≤ ResidualTol
	ByStep     Criterion = "step"     // full Newton step of scaled size ≤ StepTol
)

// Step records one Newton iteration, for showing the working.
type Step struct {
	Iteration    int
	ResidualNorm float64 // ‖r‖_q after the step
	StepSize     float64 // scaled size of the step taken (see StepTol)
	Damping      float64 // line-search factor t of a Newton step (1: full step); 1 for a Levenberg–Marquardt step
	Levenberg    float64 // λ of a Levenberg–Marquardt step, 0 for a Newton step
	Cond         float64 // 1-norm condition estimate of the scaled Jacobian (+Inf for a zero pivot)
}

// Result is a converged solution.
type Result struct {
	X                   []float64
	Method              Method
	Criterion           Criterion // which test was met
	Iterations          int       // Newton iterations (0 for MethodLinear)
	ResidualNorm        float64   // ‖r(X)‖_q
	InitialResidualNorm float64   // ‖r‖_q where the method started: at X0, or for Solve's Newton refinement at the linear solution
	Cond                float64   // κ₁ of the equilibrated matrix (linear) or of the last scaled Jacobian (Newton)
	Evaluations         int       // calls of Residual (by Solve: including those of the classification)
	History             []Step    // one entry per Newton iteration
}

// Reason says why Newton stopped without converging.
type Reason int

// The reasons of a NoConvergenceError.
const (
	// IterationLimit: Options.MaxIter iterations were made
	// (NoConvergenceError.Limit) without meeting a convergence test.
	IterationLimit Reason = iota + 1
	// NoDescent: no Newton or Levenberg–Marquardt step reduces the scaled
	// residual norm: the iterate is at a local minimum of ‖r‖_q that is
	// not a root (the set may have no real solution, or the starting point
	// is too far from one).
	NoDescent
	// JacobianFailed: the residual could not be evaluated at the points
	// of the finite-difference Jacobian (NoConvergenceError.Err says why).
	JacobianFailed
)

func (r Reason) String() string {
	switch r {
	case IterationLimit:
		return "iteration limit"
	case NoDescent:
		return "no descent"
	case JacobianFailed:
		return "Jacobian not evaluated"
	}
	return fmt.Sprintf("Reason(%d)", int(r))
}

// NoConvergenceError reports that Newton stopped without meeting either
// convergence test. X is the last iterate, for diagnosis only: it is not a
// solution.
type NoConvergenceError struct {
	Iterations   int
	ResidualNorm float64 // ‖r(X)‖_q
	X            []float64
	Reason       Reason
	Limit        int // the iteration limit in force (Options.MaxIter resolved)
	History      []Step
	Err          error // underlying cause (an *EvalError), if any
}

// describe words the reason for Error.
func (e *NoConvergenceError) describe() string {
	switch e.Reason {
	case IterationLimit:
		return fmt.Sprintf("iteration limit %d reached", e.Limit)
	case NoDescent:
		return "no step reduces the scaled residual norm: the iterate is at a local minimum of ‖r‖ that is not a root (the set may have no real solution, or the starting point is too far from one)"
	case JacobianFailed:
		return "the Jacobian could not be evaluated"
	}
	return e.Reason.String()
}

func (e *NoConvergenceError) Error() string {
	s := fmt.Sprintf("solve: no convergence after %d iteration(s), scaled residual norm %.3g: %s", e.Iterations, e.ResidualNorm, e.describe())
	if e.Err != nil {
		s += ": " + e.Err.Error()
	}
	return s
}

func (e *NoConvergenceError) Unwrap() error { return e.Err }

// Levenberg–Marquardt damping factors λ tried in turn: 10⁻⁸, 10⁻⁷, …, 10¹⁶.
const (
	lmFirst  = 1e-8
	lmLast   = 1e16
	lmFactor = 10
)

// Newton solves the square non-linear system r(x) = 0 by damped
// Newton–Raphson.
//
// It works in the scaled unknowns y_k = x_k/s_k and residuals r_i/q_i.
// Each iteration
//
//  1. stops with success if ‖r(x)‖_q ≤ ResidualTol;
//  2. builds the scaled Jacobian Ĵ_ik = (s_k/q_i) ∂r_i/∂x_k by forward
//     differences, h_k = √ε·max(m_k(x), s_k) rounded so that x_k + h_k is
//     exact (a backward difference where x + h_k e_k cannot be evaluated;
//     central differences with Options.Central);
//  3. if Ĵ has no zero pivot and κ₁(Ĵ) ≤ CondLimit, takes the Newton
//     direction Ĵ Δy = −r̂. If its scaled size is at most StepTol the full
//     step is taken and the iteration stops with success (criterion
//     ByStep). Otherwise a backtracking line search looks for the largest
//     t ≤ 1 with ‖r(x+tΔx)‖_q ≤ (1 − ArmijoC·t)‖r(x)‖_q, shrinking t by a
//     safeguarded quadratic fit within [0.1t, 0.5t] (by half where r cannot
//     be evaluated) down to MinDamping;
//  4. otherwise, or when the line search fails, tries Levenberg–Marquardt
//     steps (ĴᵀĴ + μI) Δy = −Ĵᵀr̂ with μ = λ·max_k (ĴᵀĴ)_kk for λ = 10⁻⁸,
//     10⁻⁷, …, 10¹⁶, accepting the first whose actual decrease of ‖r̂‖²
//     is at least ArmijoC times the decrease predicted by the linear model.
//
// If no step is accepted (x is at a local minimum of ‖r‖_q that is not a
// root, as for a set with no real solution, or the Jacobian cannot be
// evaluated), or after Options.MaxIter iterations, the error is a
// *NoConvergenceError; an unconverged x is never returned as a Result. An
// invalid problem gives an error wrapping ErrBadProblem or a
// *DimensionError, and a starting point at which r cannot be evaluated an
// *EvalError.
func Newton(p *Problem, opt Options) (res *Result, err error) {
	opt, err = opt.resolve()
	if err != nil {
		return nil, err
	}
	e, err := newEvaluator(p)
	if err != nil {
		return nil, err
	}
	return e.newton(e.x0, opt)
}

// newton runs the iteration of Newton from x0.
func (e *evaluator) newton(x0 []float64, opt Options) (*Result, error) {
	n := e.n
	x := append([]float64(nil), x0...)
	r := make([]float64, n)
	if err := e.eval(x, r); err != nil {
		return nil, err
	}
	f := e.norm(r)
	res := &Result{Method: MethodNewton, InitialResidualNorm: f}
	fail := func(reason Reason, cause error) error {
		return &NoConvergenceError{
			Iterations: res.Iterations, ResidualNorm: f, X: x,
			Reason: reason, Limit: opt.MaxIter, History: res.History, Err: cause,
		}
	}
	done := func(c Criterion) (*Result, error) {
		res.X, res.ResidualNorm, res.Criterion, res.Evaluations = x, f, c, e.evals
		return res, nil
	}

	jac := mat.NewDense(n, n, nil)
	rhat := make([]float64, n)
	dx := make([]float64, n)
	xt := make([]float64, n)
	rt := make([]float64, n)
	neg := make([]float64, n)
	unitScales := &linalg.Options{RowScale: ones(n), ColScale: ones(n)}
	for {
		if f <= opt.ResidualTol {
			return done(ByResidual)
		}
		if res.Iterations >= opt.MaxIter {
			return nil, fail(IterationLimit, nil)
		}
		if err := e.jacobian(x, r, jac, opt.Central); err != nil {
			return nil, fail(JacobianFailed, err)
		}
		for i := range rhat {
			rhat[i] = r[i] / e.rscale[i]
		}
		res.Iterations++
		step := Step{Iteration: res.Iterations}

		// Ĵ is already scaled: factor it as it is (unit scales)
		cond := math.Inf(1)
		lu, ferr := linalg.Factorize(n, jac.RawMatrix().Data, unitScales)
		if lu != nil {
			cond = lu.Cond()
		}
		step.Cond, res.Cond = cond, cond
		accepted := false
		if ferr == nil && lu.CheckCond(CondLimit) == nil {
			for i := range rhat {
				neg[i] = -rhat[i]
			}
			if dy, err := lu.Solve(neg); err == nil {
				for k := range dx {
					dx[k] = e.scale[k] * dy[k]
				}
				size := e.stepSize(x, dx)
				if size <= opt.StepTol {
					for k := range xt {
						xt[k] = x[k] + dx[k]
					}
					if e.eval(xt, rt) == nil {
						copy(x, xt)
						copy(r, rt)
						f = e.norm(r)
						step.ResidualNorm, step.StepSize, step.Damping = f, size, 1
						res.History = append(res.History, step)
						return done(ByStep)
					}
				}
				if t, ft, ok := e.lineSearch(x, dx, f, xt, rt); ok {
					copy(x, xt)
					copy(r, rt)
					f = ft
					for k := range dx {
						dx[k] *= t
					}
					step.ResidualNorm, step.StepSize, step.Damping = f, e.stepSize(x, dx), t
					accepted = true
				}
			}
		}
		if !accepted {
			lambda, ft, ok := e.levenberg(x, jac, rhat, f, dx, xt, rt)
			if !ok {
				return nil, fail(NoDescent, nil)
			}
			copy(x, xt)
			copy(r, rt)
			f = ft
			step.ResidualNorm, step.StepSize, step.Damping, step.Levenberg = f, e.stepSize(x, dx), 1, lambda
		}
		res.History = append(res.History, step)
	}
}

// jacobian fills jac with the scaled Jacobian Ĵ at x, where r = r(x).
func (e *evaluator) jacobian(x, r []float64, jac *mat.Dense, central bool) error {
	n := e.n
	xp := append([]float64(nil), x...)
	rp := make([]float64, n)
	rm := make([]float64, n)
	factor := math.Sqrt(0x1p-52)
	if central {
		factor = math.Cbrt(0x1p-52)
	}
	for k := 0; k < n; k++ {
		h := factor * math.Max(e.mag(x, k), e.scale[k])
		xp[k] = x[k] + h
		hp := xp[k] - x[k]
		errp := e.eval(xp, rp)
		xp[k] = x[k] - h
		hm := x[k] - xp[k]
		var errm error
		if central || errp != nil {
			errm = e.eval(xp, rm)
		}
		xp[k] = x[k]
		var lo, hi []float64
		var span float64
		switch {
		case central && errp == nil && errm == nil:
			lo, hi, span = rm, rp, hp+hm
		case errp == nil:
			lo, hi, span = r, rp, hp
		case errm == nil:
			lo, hi, span = rm, r, hm
		default:
			return errp
		}
		if !(span > 0) {
			return badProblem("the finite-difference step for unknown %d underflows (scale %g)", k, e.scale[k])
		}
		for i := 0; i < n; i++ {
			jac.Set(i, k, (hi[i]-lo[i])/span*e.scale[k]/e.rscale[i])
		}
	}
	return nil
}

// lineSearch backtracks along dx from x (with ‖r(x)‖_q = f). On success xt
// and rt hold the accepted point and its residual.
func (e *evaluator) lineSearch(x, dx []float64, f float64, xt, rt []float64) (t, ft float64, ok bool) {
	t = 1
	for t >= MinDamping {
		for k := range xt {
			xt[k] = x[k] + t*dx[k]
		}
		ft = math.Inf(1)
		if e.eval(xt, rt) == nil {
			ft = e.norm(rt)
		}
		if ft <= (1-ArmijoC*t)*f {
			return t, ft, true
		}
		next := 0.5 * t
		if finite(ft) {
			// Quadratic φ(s) through φ(0) = f², φ'(0) = −2f² (the Newton
			// direction) and φ(t) = ft²; its minimiser, kept in [0.1t, 0.5t].
			den := ft*ft - f*f + 2*t*f*f
			if den > 0 {
				next = math.Min(math.Max(f*f*t*t/den, 0.1*t), 0.5*t)
			}
		}
		t = next
	}
	return 0, 0, false
}

// levenberg tries Levenberg–Marquardt steps from x. On success xt and rt
// hold the accepted point and its residual and dx the step taken.
func (e *evaluator) levenberg(x []float64, jac *mat.Dense, rhat []float64, f float64, dx, xt, rt []float64) (lambda, ft float64, ok bool) {
	n := e.n
	var jtj mat.SymDense
	jtj.SymOuterK(1, jac.T())
	g := mat.NewVecDense(n, nil)
	g.MulVec(jac.T(), mat.NewVecDense(n, rhat))
	if mat.Norm(g, math.Inf(1)) == 0 {
		return 0, 0, false
	}
	dmax := 0.0
	for k := 0; k < n; k++ {
		dmax = math.Max(dmax, jtj.At(k, k))
	}
	negg := mat.NewVecDense(n, nil)
	negg.ScaleVec(-1, g)
	a := mat.NewSymDense(n, nil)
	var chol mat.Cholesky
	var dy, jd mat.VecDense
	pred := make([]float64, n)
	for lambda = lmFirst; lambda <= lmLast; lambda *= lmFactor {
		mu := lambda * dmax
		a.CopySym(&jtj)
		for k := 0; k < n; k++ {
			a.SetSym(k, k, a.At(k, k)+mu)
		}
		if !chol.Factorize(a) {
			continue
		}
		if err := chol.SolveVecTo(&dy, negg); err != nil {
			continue
		}
		for k := range dx {
			dx[k] = e.scale[k] * dy.AtVec(k)
		}
		if e.stepSize(x, dx) <= 0x1p-52 {
			// The step no longer changes x in floating point, and larger λ
			// only shortens it: no progress is possible.
			return 0, 0, false
		}
		jd.MulVec(jac, &dy)
		for i := range pred {
			pred[i] = rhat[i] + jd.AtVec(i)
		}
		pn := scaledNorm(pred, nil)
		predicted := (f - pn) * (f + pn)
		if !(predicted > 0) {
			continue
		}
		for k := range xt {
			xt[k] = x[k] + dx[k]
		}
		if e.eval(xt, rt) != nil {
			continue
		}
		ft = e.norm(rt)
		if (f-ft)*(f+ft) >= ArmijoC*predicted {
			return lambda, ft, true
		}
	}
	return 0, 0, false
}
