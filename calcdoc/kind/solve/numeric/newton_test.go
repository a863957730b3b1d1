package solve

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// twoBus returns the real form of a two-bus load flow of our own invention
// (per-unit): sending voltage V1 = 1, series impedance Z = 0.02 + j0.08, load
// S = 0.8 + j0.3 at the receiving bus, unknown V2 (real unknowns 0, 1):
//
//	V1 − V2 − Z·conj(S/V2) = 0,
//
// non-analytic in V2 because of the conjugate.
func twoBus() (p *Problem, want []float64) {
	const v1 = 1.0
	z := complex(0.02, 0.08)
	s := complex(0.8, 0.3)
	p = &Problem{
		N: 2, M: 2, Complex: []int{0, 1}, X0: []float64{1, 0},
		Residual: func(x, r []float64) error {
			v2 := complex(x[0], x[1])
			if v2 == 0 {
				return errors.New("division by zero")
			}
			d := complex(v1, 0) - v2 - z*cmplx.Conj(s/v2)
			r[0], r[1] = real(d), imag(d)
			return nil
		},
	}
	// Closed form (derived here): with I = conj(S/V2), V1·conj(V2) =
	// |V2|² + Z·conj(S). Taking |·|² with a = Re(Z conj S) = RP + XQ,
	// c = Im(Z conj S) = XP − RQ gives |V2|⁴ + (2a − V1²)|V2|² + a² + c² = 0,
	// whose larger root is the normal operating point; then
	// V2 = conj(|V2|² + Z·conj(S)) / V1 for real V1.
	zs := z * cmplx.Conj(s)
	a, c := real(zs), imag(zs)
	beta := v1*v1 - 2*a
	v2sq := (beta + math.Sqrt(beta*beta-4*(a*a+c*c))) / 2
	v2 := cmplx.Conj(complex(v2sq, 0)+zs) / complex(v1, 0)
	return p, []float64{real(v2), imag(v2)}
}

// TestNewtonClosedForms checks Newton against roots known in closed form or
// as published constants.
func TestNewtonClosedForms(t *testing.T) {
	theta := math.Pi / 6
	twoBusP, twoBusX := twoBus()
	cases := []struct {
		name    string
		p       *Problem
		opt     Options
		want    [][]float64 // any of these roots
		tol     float64     // relative, see each case
		maxIter int         // 0: no bound checked beyond MaxIterations
		damped  bool        // some step must use t < 1
		lm      bool        // some step must be a Levenberg–Marquardt step
		by      Criterion   // if set, the criterion that must end the iteration
	}{
		{
			// x² = 2: x = √2 (math.Sqrt2). The tolerance 1e-10 follows
			// from ResidualTol and |r'(x)| = 2√2 > 1.
			name: "x^2 = 2",
			p: &Problem{N: 1, M: 1, X0: []float64{1}, Residual: func(x, r []float64) error {
				r[0] = x[0]*x[0] - 2
				return nil
			}},
			want: [][]float64{{math.Sqrt2}}, tol: 1e-10,
		},
		{
			// Same with central differences.
			name: "x^2 = 2, central differences",
			p: &Problem{N: 1, M: 1, X0: []float64{1}, Residual: func(x, r []float64) error {
				r[0] = x[0]*x[0] - 2
				return nil
			}},
			opt:  Options{Central: true},
			want: [][]float64{{math.Sqrt2}}, tol: 1e-10,
		},
		{
			// x² + y² = 25, x − y = 1: x = y + 1 gives 2y² + 2y − 24 = 0,
			// y = 3 or −4, so (4, 3) or (−3, −4).
			name: "circle and line",
			p: &Problem{N: 2, M: 2, X0: []float64{3, 2}, XScale: []float64{5, 5}, RScale: []float64{25, 5},
				Residual: func(x, r []float64) error {
					r[0] = x[0]*x[0] + x[1]*x[1] - 25
					r[1] = x[0] - x[1] - 1
					return nil
				}},
			want: [][]float64{{4, 3}}, tol: 1e-10,
		},
		{
			name: "circle and line, other root",
			p: &Problem{N: 2, M: 2, X0: []float64{-2, -5}, XScale: []float64{5, 5}, RScale: []float64{25, 5},
				Residual: func(x, r []float64) error {
					r[0] = x[0]*x[0] + x[1]*x[1] - 25
					r[1] = x[0] - x[1] - 1
					return nil
				}},
			want: [][]float64{{-3, -4}}, tol: 1e-10,
		},
		{
			// z·conj(z) = 25 with arg z = π/6 (imposed as
			// Im(z)·cos θ − Re(z)·sin θ = 0): z = 5∠30° = (5√3/2, 5/2), or
			// −z, which the start near the first excludes.
			name: "z*conj(z) = 25 with arg fixed",
			p: &Problem{N: 2, M: 2, Complex: []int{0, 1}, X0: []float64{4, 1}, XScale: []float64{5, 5}, RScale: []float64{25, 5},
				Residual: func(x, r []float64) error {
					z := complex(x[0], x[1])
					r[0] = real(z * cmplx.Conj(z))
					r[0] -= 25
					r[1] = x[1]*math.Cos(theta) - x[0]*math.Sin(theta)
					return nil
				}},
			want: [][]float64{{5 * math.Cos(theta), 5 * math.Sin(theta)}}, tol: 1e-10,
		},
		{
			// z² = 2j: principal root cmplx.Sqrt(2i) = 1 + j (math/cmplx).
			name: "z^2 = 2j",
			p: &Problem{N: 2, M: 2, Complex: []int{0, 1}, X0: []float64{0.5, 0.5},
				Residual: func(x, r []float64) error {
					z := complex(x[0], x[1])
					d := z*z - 2i
					r[0], r[1] = real(d), imag(d)
					return nil
				}},
			want: [][]float64{{real(cmplx.Sqrt(2i)), imag(cmplx.Sqrt(2i))}}, tol: 1e-10,
		},
		{
			// x = cos x: the Dottie number 0.739085133215160641…
			// (OEIS A003957).
			name: "x = cos x",
			p: &Problem{N: 1, M: 1, Residual: func(x, r []float64) error {
				r[0] = x[0] - math.Cos(x[0])
				return nil
			}},
			want: [][]float64{{0.7390851332151607}}, tol: 1e-10,
		},
		{
			// w·e^w = 1: the omega constant W(1) = 0.567143290409783872…
			// (OEIS A030178).
			name: "w*exp(w) = 1",
			p: &Problem{N: 1, M: 1, Residual: func(x, r []float64) error {
				r[0] = x[0]*math.Exp(x[0]) - 1
				return nil
			}},
			want: [][]float64{{0.5671432904097838}}, tol: 1e-10,
		},
		{
			// atan(x) = 0 from x0 = 3: the undamped Newton iteration
			// diverges for |x0| above about 1.39 (common practice), so the
			// line search must shorten a step. Root x = 0 (absolute
			// tolerance, as the root is zero).
			name: "atan(x) = 0 needs damping",
			p: &Problem{N: 1, M: 1, X0: []float64{3}, Residual: func(x, r []float64) error {
				r[0] = math.Atan(x[0])
				return nil
			}},
			want: [][]float64{{0}}, tol: 1e-10, damped: true,
		},
		{
			// ln x = 1 from x0 = 10: the full Newton step lands at x < 0,
			// where ln cannot be evaluated; the line search backs off.
			// Root x = e (math.E).
			name: "ln x = 1 across the domain boundary",
			p: &Problem{N: 1, M: 1, X0: []float64{10}, XScale: []float64{3}, Residual: func(x, r []float64) error {
				if x[0] <= 0 {
					return errors.New("logarithm of a non-positive number")
				}
				r[0] = math.Log(x[0]) - 1
				return nil
			}},
			want: [][]float64{{math.E}}, tol: 1e-10, damped: true,
		},
		{
			// x·y = 2, x + 2y = 5: x = 5 − 2y, 2y² − 5y + 2 = 0, so (1, 2)
			// or (4, 0.5). At X0 = (0, 0) the forward-difference Jacobian
			// [[y, x], [1, 2]] is exactly [[0, 0], [1, 2]], singular, while
			// the gradient Jᵀr = (−5, −10) is not zero: a
			// Levenberg–Marquardt step must recover.
			name: "singular Jacobian at the start",
			p: &Problem{N: 2, M: 2, Residual: func(x, r []float64) error {
				r[0] = x[0]*x[1] - 2
				r[1] = x[0] + 2*x[1] - 5
				return nil
			}},
			want: [][]float64{{1, 2}, {4, 0.5}}, tol: 1e-10, lm: true,
		},
		{
			// 10¹²·(x² − 2) = 0 with no residual scale: near √2 rounding in
			// x² leaves residuals of order 10¹²·ε ≈ 1e-4 > ResidualTol, so
			// only the step test can end the iteration. x = √2, with the
			// accuracy StepTol promises.
			name: "rounding floor above ResidualTol",
			p: &Problem{N: 1, M: 1, X0: []float64{1}, Residual: func(x, r []float64) error {
				r[0] = 1e12 * (x[0]*x[0] - 2)
				return nil
			}},
			want: [][]float64{{math.Sqrt2}}, tol: 1e-12, by: ByStep,
		},
		{
			// The two-bus load flow: closed form in twoBus.
			name: "two-bus load flow with conj",
			p:    twoBusP,
			want: [][]float64{twoBusX}, tol: 1e-10,
		},
		{
			// A linear set: the finite-difference Jacobian is exact up to
			// rounding, so one step reaches the solution (1, 2, 3) of
			// A x = (3, 0, 9); at most two iterations.
			name: "linear set",
			p:    realProblem([][]float64{{4, -2, 1}, {-2, 4, -2}, {1, -2, 4}}, []float64{3, 0, 9}),
			want: [][]float64{{1, 2, 3}}, tol: 1e-10, maxIter: 2,
		},
		{
			// The linear real form of a complex set, V = Z·I with
			// Z = 3 + 4j, V = 10 − 5j: I = V/Z (math/cmplx).
			name: "linear complex set",
			p:    complexProblem([][]complex128{{3 + 4i}}, []complex128{10 - 5i}),
			want: [][]float64{{real((10 - 5i) / (3 + 4i)), imag((10 - 5i) / (3 + 4i))}},
			tol:  1e-10, maxIter: 2,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res, err := Newton(c.p, c.opt)
			if err != nil {
				t.Fatalf("Newton: %v", err)
			}
			if res.Method != MethodNewton {
				t.Errorf("Method = %q", res.Method)
			}
			best := math.Inf(1)
			for _, w := range c.want {
				best = math.Min(best, relErr(res.X, w, 1))
			}
			if !(best <= c.tol) {
				t.Errorf("x = %v, want one of %v (relative error %.3g)", res.X, c.want, best)
			}
			if res.Criterion == ByResidual && !(res.ResidualNorm <= ResidualTol) {
				t.Errorf("converged by residual with norm %v", res.ResidualNorm)
			}
			if c.maxIter > 0 && res.Iterations > c.maxIter {
				t.Errorf("%d iterations, want at most %d", res.Iterations, c.maxIter)
			}
			if len(res.History) != res.Iterations {
				t.Errorf("%d history entries for %d iterations", len(res.History), res.Iterations)
			}
			damped, lm := false, false
			for _, s := range res.History {
				damped = damped || (s.Levenberg == 0 && s.Damping < 1)
				lm = lm || s.Levenberg > 0
			}
			if c.by != "" && res.Criterion != c.by {
				t.Errorf("Criterion = %q, want %q", res.Criterion, c.by)
			}
			if c.damped && !damped {
				t.Errorf("no damped step in %+v", res.History)
			}
			if c.lm && !lm {
				t.Errorf("no Levenberg–Marquardt step in %+v", res.History)
			}
		})
	}
}

// TestNewtonNoConvergence checks that sets with no real root, and a too
// small iteration limit, give a *NoConvergenceError and no result.
func TestNewtonNoConvergence(t *testing.T) {
	cases := []struct {
		name   string
		p      *Problem
		opt    Options
		reason Reason // 0: NoDescent or IterationLimit (not checked)
	}{
		{
			// x² + 1 > 0 for every real x.
			name: "x^2 + 1 = 0",
			p: &Problem{N: 1, M: 1, X0: []float64{1}, Residual: func(x, r []float64) error {
				r[0] = x[0]*x[0] + 1
				return nil
			}},
			reason: NoDescent,
		},
		{
			// The unit circle and the line x + y = 3, at distance 3/√2 > 1
			// from the origin, do not meet.
			name: "circle and line that do not meet",
			p: &Problem{N: 2, M: 2, Residual: func(x, r []float64) error {
				r[0] = x[0]*x[0] + x[1]*x[1] - 1
				r[1] = x[0] + x[1] - 3
				return nil
			}},
		},
		{
			// |z| = −1 has no solution; written as sqrt(x² + y²) + 1 = 0
			// with Im z = 0.
			name: "negative modulus",
			p: &Problem{N: 2, M: 2, X0: []float64{2, 1}, Residual: func(x, r []float64) error {
				r[0] = math.Hypot(x[0], x[1]) + 1
				r[1] = x[1]
				return nil
			}},
		},
		{
			// x = cos x does converge, but not within one iteration from 0.
			name: "iteration limit",
			p: &Problem{N: 1, M: 1, Residual: func(x, r []float64) error {
				r[0] = x[0] - math.Cos(x[0])
				return nil
			}},
			opt:    Options{MaxIter: 1},
			reason: IterationLimit,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res, err := Newton(c.p, c.opt)
			var nc *NoConvergenceError
			if !errors.As(err, &nc) {
				t.Fatalf("Newton = %+v, %v; want *NoConvergenceError", res, err)
			}
			if res != nil {
				t.Errorf("result %+v returned with an error", res)
			}
			if !(nc.ResidualNorm > ResidualTol) {
				t.Errorf("ResidualNorm = %v: a converged point reported as failure", nc.ResidualNorm)
			}
			if nc.Iterations < 1 || len(nc.History) > nc.Iterations {
				t.Errorf("Iterations = %d, %d history entries", nc.Iterations, len(nc.History))
			}
			if c.reason != 0 && nc.Reason != c.reason {
				t.Errorf("Reason = %v, want %v", nc.Reason, c.reason)
			}
			if nc.Reason == IterationLimit && (nc.Limit != c.opt.MaxIter || !strings.Contains(err.Error(), fmt.Sprintf("iteration limit %d reached", c.opt.MaxIter))) {
				t.Errorf("Limit = %d, message %q; want the limit %d", nc.Limit, err.Error(), c.opt.MaxIter)
			}
		})
	}
}

// TestBadOptions checks Options validation.
func TestBadOptions(t *testing.T) {
	p := realProblem([][]float64{{1}}, []float64{1})
	cases := []struct {
		name string
		opt  Options
	}{
		{name: "negative MaxIter", opt: Options{MaxIter: -1}},
		{name: "negative ResidualTol", opt: Options{ResidualTol: -1e-3}},
		{name: "NaN StepTol", opt: Options{StepTol: math.NaN()}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if _, err := Newton(p, c.opt); !errors.Is(err, ErrBadProblem) {
				t.Errorf("Newton: err = %v, want ErrBadProblem", err)
			}
			if _, err := Solve(p, c.opt); !errors.Is(err, ErrBadProblem) {
				t.Errorf("Solve: err = %v, want ErrBadProblem", err)
			}
		})
	}
}

// TestSolve checks the classify-then-solve path.
func TestSolve(t *testing.T) {
	const c = 1e-10
	cases := []struct {
		name   string
		p      *Problem
		method Method
		want   []float64
		tol    float64
	}{
		{
			// A·(1, 2, 3) = (3, 0, 9).
			name:   "linear",
			p:      realProblem([][]float64{{4, -2, 1}, {-2, 4, -2}, {1, -2, 4}}, []float64{3, 0, 9}),
			method: MethodLinear, want: []float64{1, 2, 3}, tol: 1e-14,
		},
		{
			// x² = 2: √2.
			name: "non-linear",
			p: &Problem{N: 1, M: 1, X0: []float64{1}, Residual: func(x, r []float64) error {
				r[0] = x[0]*x[0] - 2
				return nil
			}},
			method: MethodNewton, want: []float64{math.Sqrt2}, tol: 1e-10,
		},
		{
			// x + c·x² = 3 with c = 1e-10: the departure from linearity over
			// the probes is below LinearTol, so the set is classified
			// linear, but the secant solution leaves a residual of about
			// 6c > ResidualTol; Newton refines it to the root of the
			// quadratic, x = 6/(1 + √(1 + 12c)) (the cancellation-free form
			// of the quadratic formula).
			name: "weakly non-linear, refined",
			p: &Problem{N: 1, M: 1, Residual: func(x, r []float64) error {
				r[0] = x[0] + c*x[0]*x[0] - 3
				return nil
			}},
			method: MethodNewton, want: []float64{6 / (1 + math.Sqrt(1+12*c))}, tol: 1e-13,
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			res, err := Solve(tc.p, Options{})
			if err != nil {
				t.Fatalf("Solve: %v", err)
			}
			if res.Method != tc.method {
				t.Errorf("Method = %q, want %q", res.Method, tc.method)
			}
			checkClose(t, res.X, tc.want, tc.tol)
			if !(res.ResidualNorm <= ResidualTol) && res.Criterion != ByStep {
				t.Errorf("ResidualNorm = %v", res.ResidualNorm)
			}
		})
	}

	t.Run("singular", func(t *testing.T) {
		// Row 2 = 2·row 0 (as in TestSingular).
		_, err := Solve(realProblem([][]float64{{1, 2, 3}, {2, -1, 1}, {2, 4, 6}}, []float64{1, 2, 2}), Options{})
		var se *SingularError
		if !errors.As(err, &se) {
			t.Fatalf("err = %v, want *SingularError", err)
		}
	})
}
