package solve

// Solve classifies p with Linearize and solves it.
//
// A linear set is solved by SolveLinear; the residual is then evaluated at
// the solution, and if ‖r(x)‖_q exceeds Options.ResidualTol (a non-linearity
// below LinearTol, or rounding in a badly scaled set) Newton continues from
// that x, and the Result reports MethodNewton with that x as its starting
// point. A singular linear set gives the *SingularError of SolveLinear.
// A non-linear set is solved by Newton from X0. Errors are those of
// Linearize, SolveLinear and Newton.
func Solve(p *Problem, opt Options) (*Result, error) {
	opt, err := opt.resolve()
	if err != nil {
		return nil, err
	}
	e, err := newEvaluator(p)
	if err != nil {
		return nil, err
	}
	lin, ok, err := e.linearize()
	if err != nil {
		return nil, err
	}
	if !ok {
		return e.newton(e.x0, opt)
	}
	x, cond, err := SolveLinear(lin)
	if err != nil {
		return nil, err
	}
	r := make([]float64, p.M)
	if err := e.eval(x, r); err != nil {
		return nil, err
	}
	if f := e.norm(r); f <= opt.ResidualTol {
		r0 := make([]float64, p.M)
		if err := e.eval(e.x0, r0); err != nil {
			return nil, err
		}
		return &Result{
			X: x, Method: MethodLinear, Criterion: ByResidual,
			ResidualNorm: f, InitialResidualNorm: e.norm(r0), Cond: cond,
			Evaluations: e.evals,
		}, nil
	}
	return e.newton(x, opt)
}
