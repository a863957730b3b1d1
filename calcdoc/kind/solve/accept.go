package solve

import (
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	numeric "calcdoc/calcdoc/kind/solve/numeric"
	"calcdoc/expr"

	"gonum.org/v1/gonum/mat"
)

// The acceptance of a solution (LANGUAGE.md section 5): a solution is
// accepted only when every equation holds as written, in complex
// arithmetic, at the solution. The solver core works on the real form of
// the set (the real part of a real-valued equation, both parts of a complex
// one); the acceptance evaluates both sides of every equation again through
// the expression engine at the solution and tests the whole complex
// difference lhs − rhs, so that the imaginary part of an equation counted
// as real (sqrt or ln of a negative trial value) is not lost.

const (
	// MaxPolish is the largest number of further Newton runs (with central
	// differences) by which an iterate that misses SolveAcceptTol is
	// polished, each with the residuals scaled by the size of their terms
	// at the previous iterate.
	// Polishing stops early when a run does not at least halve the
	// backward error. Newton converges only linearly to a multiple root
	// (such as (d − 1)² = 0, whose Jacobian is singular at the root), and
	// each run reduces the backward error by a bounded factor there.
	MaxPolish = 8

	// TrialImagTol bounds the imaginary part of an equation counted as
	// real at a trial point of the iteration: where
	//
	//	|Im(lhs − rhs)| > 1e-8 · max(|lhs|, |rhs|, q),
	//
	// q the equation's residual scale, the point is outside the equation's
	// real domain and is treated as a point where the equation cannot be
	// evaluated, so that the iteration steps back (a shorter step, or a
	// larger Levenberg–Marquardt damping) instead of following the real
	// part alone. Rounding leaves an imaginary part of order 1e-16 of the
	// terms, far below the bound.
	TrialImagTol = 1e-8
)

// trialReal returns an error when equation i, counted as real, has a
// complex difference d = lhs − rhs at the current trial point; size is
// max(|lhs|, |rhs|).
func (r *solveRun) trialReal(i int, size float64, d complex128) error {
	eq := r.eqs[i]
	if !eq.RealValued {
		return nil
	}
	bound := TrialImagTol * math.Max(size, r.rscale[r.row[i]])
	if math.Abs(imag(d)) <= bound {
		return nil
	}
	return expr.Errorf(eq.Eq.Pos(), "%s is counted as a real equation, but here its sides are complex (lhs − rhs = %s): a function of a real unknown has left its real domain, such as sqrt or ln of a negative value",
		eq.Name, expr.Describe(&expr.Scalar{Z: d, Dim: eq.Dim}))
}

// solveSet classifies and solves the prepared set, checks the solution and
// fills in the results. It returns false when there is no solution.
func (r *solveRun) solveSet() bool {
	set := r.set
	p := r.problem(r.x0, r.rscale)
	lin, linear, err := numeric.Linearize(p)
	if err != nil {
		return r.coreFailed(err)
	}
	var x []float64
	if linear {
		set.Linear, set.lin, set.MaxDeviation = true, lin, lin.MaxDeviation
		plan := lin.Plan()
		set.ComplexLU = plan.Complex
		if !plan.Sparse && !r.denseWork(1) { // the work budget (work.go)
			return false
		}
		sol, err := numeric.SolveLinearBy(lin)
		if sol != nil {
			set.Cond, set.Factorization = sol.Cond, sol.Method
		}
		if plan.Sparse && !r.sparseWork(set.Factorization) { // the work budget (work.go)
			return false
		}
		if err != nil {
			return r.coreFailed(err)
		}
		x = sol.X
	} else {
		nr, err := numeric.Newton(p, numeric.Options{})
		if !r.newtonWork(newtonIterations(nr, err)) { // the work budget (solvework.go)
			return false
		}
		if err != nil {
			return r.coreFailed(err)
		}
		set.InitialResidualNorm = nr.InitialResidualNorm
		r.takeNewton(nr)
		x = nr.X
	}

	// the componentwise backward error. A direct solution that misses it
	// is refined by Newton iterations, an iterative one is iterated again,
	// each with the residuals scaled by the size of their terms at the
	// last iterate (the scales of the start can be far from the sizes at
	// the solution), until it is met or a run no longer halves it.
	omega, d, err := r.backward(x)
	if err != nil {
		return r.coreFailed(&numeric.EvalError{X: x, Equation: -1, Err: err})
	}
	for round := 0; round < MaxPolish && maxOf(omega) > SolveAcceptTol; round++ {
		q := make([]float64, r.m)
		for i := range q {
			q[i] = d[i]
			if !(q[i] > 0) || math.IsInf(q[i], 0) {
				q[i] = r.rscale[i]
			}
		}
		// central differences: near a multiple root the forward
		// difference step is as large as the distance to the root, and
		// the derivative it gives stalls the iteration
		nr, err := numeric.Newton(r.problem(x, q), numeric.Options{Central: true})
		if !r.newtonWork(newtonIterations(nr, err)) { // the work budget (solvework.go)
			return false
		}
		if err != nil {
			if round == 0 {
				return r.coreFailed(err)
			}
			break // no further progress: the acceptance below decides
		}
		if linear {
			if !set.Refined {
				set.InitialResidualNorm = nr.InitialResidualNorm
			}
			set.Refined = true
		} else {
			set.Polished = true
		}
		its, hist := set.Iterations, set.History
		r.takeNewton(nr)
		set.Iterations += its
		set.History = append(hist, set.History...)
		before := maxOf(omega)
		x = nr.X
		if omega, d, err = r.backward(x); err != nil {
			return r.coreFailed(&numeric.EvalError{X: x, Equation: -1, Err: err})
		}
		if maxOf(omega) > before/2 {
			break
		}
	}

	// acceptance: every equation through the expression engine, in full
	// complex arithmetic
	if !r.accept(x, d, false) {
		// a root on the edge of a real domain (sqrt(z) + z = 0 at z = 0)
		// is often approached from just outside it: try the point with
		// such tiny real unknowns set to zero before giving up
		xs, ok := r.snapZero(x)
		if ok {
			var ds []float64
			if _, ds, err = r.backward(xs); err == nil {
				ok = r.accept(xs, ds, false)
			} else {
				ok = false
			}
		}
		if !ok {
			r.accept(x, d, true)
			return false
		}
		x = xs
	}

	for k, u := range r.unk {
		c := r.col[k]
		v := &expr.Scalar{Dim: u.Dim, Angle: u.Angle, AbsTemp: u.AbsTemp}
		if u.Real {
			v.Z = complex(x[c], 0)
		} else {
			v.Z = complex(x[c], x[c+1])
		}
		u.Value = v
	}
	set.Backward = 0
	for _, eq := range r.eqs {
		set.Backward = math.Max(set.Backward, eq.Backward)
	}
	return true
}

// accept evaluates both sides of every equation at x through the
// expression engine (recording them on the equation) and tests the
// complex difference lhs − rhs. A part v of it (real or imaginary) is
// small when v ≤ 1e-9·D_i, D_i the denominator of the componentwise
// backward error of its real residual i (see SolveAcceptTol), or
// v ≤ 1e-9·T, T the sum of the moduli of the top-level terms of both
// sides at x (the backward error with respect to the terms as written:
// x solves exactly the equation whose terms are changed by at most 1e-9
// of their size; this is what accepts a multiple root written expanded,
// d² − 2d + 1 = 0, where the linear model is degenerate). Then
//
//   - a complex equation holds when both parts are small;
//   - an equation counted as real holds when its real part is small and
//     its imaginary part is small or at most RealTol·max(|lhs|, |rhs|);
//
// and both sides must be finite. Each equation's Backward is the largest of
// its ratios. When an equation fails, accept returns false, and with
// report the set error names the equation that fails worst and its
// difference in the equation's unit.
func (r *solveRun) accept(x, d []float64, report bool) bool {
	if r.verified != nil && sameBits(r.verified, x) {
		// the backward error of a linear set evaluated every equation at
		// x already: each equation is evaluated once at the solution
		r.setX(x)
	} else if err := r.verify(x, nil); err != nil {
		return r.coreFailed(&numeric.EvalError{X: x, Equation: -1, Err: err})
	}
	worst, worstW, imagFail, nonFinite := -1, 0.0, false, false
	for i, eq := range r.eqs {
		row := r.row[i]
		diff := eq.Diff.Z
		ratio := func(v, den float64) float64 {
			switch {
			case v == 0:
				return 0
			case den > 0 && !math.IsInf(den, 0):
				return math.Abs(v) / den
			}
			return math.Inf(1)
		}
		t := r.termSize(i)
		both := func(v, den float64) float64 { return math.Min(ratio(v, den), ratio(v, t)) }
		w := both(real(diff), d[row])
		im := false
		if eq.RealValued {
			wi := both(imag(diff), d[row])
			if math.Abs(imag(diff)) <= RealTol*math.Max(cmplx.Abs(eq.LHS.Z), cmplx.Abs(eq.RHS.Z)) {
				wi = 0
			}
			if wi > w {
				w = wi
				im = wi > SolveAcceptTol
			}
		} else {
			w = math.Max(w, both(imag(diff), d[row+1]))
		}
		finite := eq.LHS.IsFinite() && eq.RHS.IsFinite()
		if !finite {
			w = math.Inf(1)
		}
		eq.Backward = w
		if w > SolveAcceptTol && (worst < 0 || w > worstW || (!finite && !nonFinite)) {
			worst, worstW, imagFail, nonFinite = i, w, im, !finite
		}
	}
	if worst < 0 {
		return true
	}
	if !report {
		return false
	}
	eq := r.eqs[worst]
	var msg strings.Builder
	msg.WriteString("no solution found: ")
	method := "the iteration ends"
	if r.set.Linear && !r.set.Refined {
		method = "the direct solution is"
	}
	diff := expr.Describe(eq.Diff)
	switch {
	case nonFinite:
		msg.WriteString(method + " at " + r.pointWords(x) + ", where " + eq.Name + " cannot be evaluated to a finite value (left side " + expr.Describe(eq.LHS) + ", right side " + expr.Describe(eq.RHS) + ")")
	case imagFail:
		msg.WriteString(method + " at " + r.pointWords(x) + ", where " + eq.Name + " does not hold: lhs − rhs = " + diff +
			", whose imaginary part should be zero, as the equation is counted as real (a function of a real unknown has left its real domain there, such as sqrt or ln of a negative value)")
	default:
		msg.WriteString(method + " at " + r.pointWords(x) + ", where " + eq.Name + " does not hold: lhs − rhs = " + diff)
		msg.WriteString(", which is large against the size of its terms (componentwise backward error ")
		msg.WriteString(sci3(worstW) + ", above the tolerance " + sci0(SolveAcceptTol) + "): the equations balance only in absolute terms, not relative to the size of their terms; the set may have no solution, its sides approaching each other only as an unknown runs away to zero or without bound")
	}
	if names := r.realUnknownNames(); len(names) > 0 && imagFail {
		msg.WriteString("; " + joinAnd(names) + " " + isAre(len(names)) + " marked real: there may be no solution with " + joinAnd(names) + " real, or a start on the other side (near) may find one")
	}
	msg.WriteString("; the unknowns get no value")
	for _, e := range r.eqs {
		e.LHS, e.RHS, e.Diff = nil, nil, nil
	}
	r.setErr(r.setPos(), "%s", msg.String())
	return false
}

// realUnknownNames lists the unknowns marked real.
func (r *solveRun) realUnknownNames() []string {
	var names []string
	for _, u := range r.unk {
		if u.Real {
			names = append(names, u.Name)
		}
	}
	return names
}

func (r *solveRun) takeNewton(nr *numeric.Result) {
	set := r.set
	set.Iterations, set.Criterion, set.ResidualNorm = nr.Iterations, nr.Criterion, nr.ResidualNorm
	set.History = nr.History
	if !set.Linear {
		set.Cond = nr.Cond
	}
}

func maxOf(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}

// eqOfRow returns the equation of a real residual row.
func (r *solveRun) eqOfRow(row int) int {
	for i := len(r.row) - 1; i >= 0; i-- {
		if r.row[i] <= row {
			return i
		}
	}
	return 0
}

// mag is m_k(x) for real unknown c: |x_c|, or the modulus of its complex
// unknown.
func (r *solveRun) mag(x []float64, c int) float64 {
	k := r.owner[c]
	if r.unk[k].Real {
		return math.Abs(x[c])
	}
	return math.Hypot(x[r.col[k]], x[r.col[k]+1])
}

// backward returns the componentwise backward error ω_i of every real
// residual at x and its denominator d_i (see SolveAcceptTol). The Jacobian
// is the matrix of a linear set, else forward differences with the steps of
// package solve, h_k = 2⁻²⁶·max(m_k, s_k) (a backward difference where the
// forward point cannot be evaluated).
func (r *solveRun) backward(x []float64) (omega, d []float64, err error) {
	r.lenient = true
	defer func() { r.lenient = false }()
	res := make([]float64, r.m)
	if r.set.lin != nil {
		// the verification's evaluation gives the residual too
		err = r.verify(x, res)
	} else {
		// through the residual function, which remembers the point as the
		// base of the Jacobian below
		err = r.residual(x, res)
	}
	if err != nil {
		return nil, nil, err
	}
	mags := make([]float64, r.n)
	for c := range mags {
		mags[c] = r.mag(x, c)
	}
	omega = make([]float64, r.m)
	d = make([]float64, r.m)
	if lin := r.set.lin; lin != nil {
		// the rows of the linear model: a cost in proportion to its
		// non-zero entries
		for i := 0; i < r.m; i++ {
			s, l := 0.0, 0.0
			for _, t := range lin.RowEntries(i) {
				s += math.Abs(t.V) * mags[t.Col]
				l += t.V * x[t.Col]
			}
			d[i], omega[i] = backwardRow(res[i], s, l)
		}
		return omega, d, nil
	}
	var jac *mat.Dense
	{
		jac = mat.NewDense(r.m, r.n, nil)
		xp := append([]float64(nil), x...)
		rp := make([]float64, r.m)
		for c := 0; c < r.n; c++ {
			h := 0x1p-26 * math.Max(mags[c], r.xscale[c])
			xp[c] = x[c] + h
			h = xp[c] - x[c]
			if err := r.residual(xp, rp); err != nil {
				xp[c] = x[c] - h
				if err := r.residual(xp, rp); err != nil {
					return nil, nil, err
				}
				h = -h
			}
			xp[c] = x[c]
			for i := 0; i < r.m; i++ {
				jac.Set(i, c, (rp[i]-res[i])/h)
			}
		}
	}
	for i := 0; i < r.m; i++ {
		row := jac.RawRowView(i)
		s, lin := 0.0, 0.0
		for c, v := range row {
			s += math.Abs(v) * mags[c]
			lin += v * x[c]
		}
		d[i], omega[i] = backwardRow(res[i], s, lin)
	}
	return omega, d, nil
}

// backwardRow is the denominator d = s + |res − lin| of a real residual
// res, with s = Σ_k |J_ik|·m_k and lin = Σ_k J_ik·x_k, and its backward
// error ω = |res|/d (0 for a zero residual, +Inf for a zero d).
func backwardRow(res, s, lin float64) (d, omega float64) {
	d = s + math.Abs(res-lin)
	switch {
	case res == 0:
		omega = 0
	case d > 0:
		omega = math.Abs(res) / d
	default:
		omega = math.Inf(1)
	}
	return d, omega
}

// sci3 and sci0 write a ratio in scientific notation with 3 and 1
// significant digits.
func sci3(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }
func sci0(v float64) string { return strconv.FormatFloat(v, 'e', 0, 64) }

// contradiction words a singular linear set whose equations contradict
// each other (solve.SingularError.Contradiction): the equations of the
// combination, and how far its two sides stay apart whatever the unknowns,
// in the unit of the leading equation.
func (r *solveRun) contradiction(se *numeric.SingularError) {
	var names []string
	seen := map[int]bool{}
	pos := r.setPos()
	big := 0.0
	for row, c := range se.Contradiction {
		big = math.Max(big, math.Abs(c*r.rscale[row]))
	}
	for row, c := range se.Contradiction {
		if !(math.Abs(c*r.rscale[row]) > numeric.NullTol*big) {
			continue
		}
		i := r.eqOfRow(row)
		if !seen[i] {
			seen[i] = true
			names = append(names, r.eqs[i].Name)
			if len(names) == 1 {
				pos = r.eqs[i].Eq.Pos()
			}
		}
	}
	lead := r.eqOfRow(se.Lead)
	eq := r.eqs[lead]
	amount := expr.Describe(&expr.Scalar{Z: complex(math.Abs(se.Mismatch), 0), Dim: eq.Dim})
	part := ""
	if !eq.RealValued {
		if se.Lead == r.row[lead] {
			part = " in the real part"
		} else {
			part = " in the imaginary part"
		}
	}
	var msg strings.Builder
	msg.WriteString("the equations contradict each other: ")
	if len(names) == 2 {
		msg.WriteString(names[0] + " and " + names[1] + " cannot both hold, whatever the unknowns")
	} else {
		msg.WriteString(joinAnd(names) + " cannot all hold, whatever the unknowns")
	}
	msg.WriteString("; combined so that the unknowns cancel (scaled to " + eq.Name + "), their sides still differ by " + amount + part)
	msg.WriteString("; correct the value or the equation that is wrong; the unknowns get no value")
	r.setErr(pos, "%s", msg.String())
}

// termSize returns T for equation i at the current trial values: the sum
// of the moduli of the top-level terms of both sides (0 when a term cannot
// be evaluated, which leaves the Jacobian measure alone to decide).
func (r *solveRun) termSize(i int) float64 {
	eq := r.eqs[i].Eq
	t := 0.0
	for _, n := range terms(eq.RHS, terms(eq.LHS, nil)) {
		v, err := r.env.EvalKeyed(n, r.loc, nil)
		s, isS := v.(*expr.Scalar)
		if err != nil || !isS || !s.IsFinite() {
			return 0
		}
		t += cmplx.Abs(s.Z)
	}
	return t
}

// snapZero returns x with every real unknown of modulus at most
// 2⁻²⁶·s_k (its scale) set to exactly zero, and whether there was one.
func (r *solveRun) snapZero(x []float64) ([]float64, bool) {
	xs := append([]float64(nil), x...)
	any := false
	for k, u := range r.unk {
		c := r.col[k]
		if u.Real && x[c] != 0 && math.Abs(x[c]) <= 0x1p-26*r.xscale[c] {
			xs[c], any = 0, true
		}
	}
	return xs, any
}

// sameSide returns the trial value x0_c + d of real unknown c for the
// generic point and the probes of the classification, moved away from zero
// instead (x0_c − d) when x0_c + d would reach or cross zero from a
// non-zero start of a real unknown. A real unknown is probed on the side of
// its starting value: sqrt(x) or ln(D/r) of a real unknown started at a
// positive value is real wherever the set is meant to be solved, and a
// probe at a negative value would count its equation as complex.
func (r *solveRun) sameSide(c int, d float64) float64 {
	x0 := r.x0[c]
	x := x0 + d
	if r.unk[r.owner[c]].Real && x0 != 0 && (x == 0 || math.Signbit(x) != math.Signbit(x0)) {
		return x0 - d
	}
	return x
}
