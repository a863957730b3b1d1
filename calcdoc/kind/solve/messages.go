package solve

import (
	"errors"
	"fmt"
	"math"
	"strings"

	numeric "calcdoc/calcdoc/kind/solve/numeric"
	"calcdoc/expr"
)

func unknownList(unk []*Unknown) string {
	var s []string
	for _, u := range unk {
		s = append(s, u.Name)
	}
	return strings.Join(s, ", ")
}

func startWords(unk []*Unknown) string {
	var s []string
	for _, u := range unk {
		if u.Near != nil {
			s = append(s, u.Name+" = "+expr.Describe(u.Near))
		} else {
			s = append(s, u.Name+" = 0")
		}
	}
	return strings.Join(s, ", ")
}

func nearExample(u *Unknown) string {
	unit := "1"
	if u.HasUnit() {
		unit = "1 " + u.Display.Unit.Text
	}
	head := u.Name
	if u.Display != nil {
		head += "[" + u.Display.Text + "]"
	}
	if u.Real {
		head += " real"
	}
	return head + " near " + unit
}

// unitHint suggests a unit for the unknowns of an equation that have none.
func (r *solveRun) unitHint(eq *SolveEquation) string {
	var bare []string
	for _, k := range eq.Unknowns {
		if u := r.unk[k]; !u.HasUnit() && u.Near == nil {
			bare = append(bare, u.Name)
		}
	}
	if len(bare) == 0 {
		return ""
	}
	if len(bare) == 1 {
		return fmt.Sprintf("%s has no unit and is taken as a plain number: give it one in the block's first line, e.g. solve %s[A]", bare[0], bare[0])
	}
	return fmt.Sprintf("%s have no unit and are taken as plain numbers: give each a unit in the block's first line, e.g. solve %s[A]", strings.Join(bare, ", "), bare[0])
}

// evalFailed records an evaluation error of an equation. It returns true
// for an error of the equation (recorded in place), false when the
// equation uses an unavailable name (recorded on the set, no new error).
func (r *solveRun) evalFailed(eq *SolveEquation, err error, prefix, suffix string) bool {
	var ue *expr.UnavailableError
	if errors.As(err, &ue) {
		if r.set.Unavailable == nil {
			r.set.Unavailable = ue
		}
		return false
	}
	e := asExprError(err, eq.Eq.Pos())
	if prefix != "" || suffix != "" {
		e = expr.Errorf(e.Pos, "%s%s%s", prefix, e.Msg, suffix)
	}
	r.eqErr(eq, e)
	return true
}

func asExprError(err error, pos expr.Pos) *expr.Error {
	var e *expr.Error
	if errors.As(err, &e) {
		if !e.Pos.IsValid() {
			return expr.Errorf(pos, "%s", e.Msg)
		}
		return e
	}
	return expr.Errorf(pos, "%s", err.Error())
}

// countMessage says which side is short, and by how many.
func (r *solveRun) countMessage() string {
	var cu, ru, ce, re int
	for _, u := range r.unk {
		if u.Real {
			ru++
		} else {
			cu++
		}
	}
	for _, e := range r.eqs {
		if e.RealValued {
			re++
		} else {
			ce++
		}
	}
	eqs := fmt.Sprintf("%d real equation%s", r.m, plural(r.m))
	if ce > 0 || re > 0 {
		var parts []string
		if ce > 0 {
			parts = append(parts, fmt.Sprintf("%d complex equation%s", ce, plural(ce)))
		}
		if re > 0 {
			parts = append(parts, fmt.Sprintf("%d real-valued equation%s", re, plural(re)))
		}
		eqs += " (" + strings.Join(parts, " and ") + ")"
	}
	var up []string
	if cu > 0 {
		up = append(up, fmt.Sprintf("%d complex", cu))
	}
	if ru > 0 {
		up = append(up, fmt.Sprintf("%d real", ru))
	}
	unks := fmt.Sprintf("%d real unknown%s (%s)", r.n, plural(r.n), strings.Join(up, " and "))
	msg := eqs + " for " + unks + ": "
	if r.m < r.n {
		d := r.n - r.m
		msg += fmt.Sprintf("the equations are %d short: %s needed", d, countWords(d, "more real equation", "more real equations"))
		var hints []string
		if d%2 == 0 {
			hints = append(hints, fmt.Sprintf("%d more complex equation%s would do", d/2, plural(d/2)))
		}
		if cu > 0 && d <= cu {
			mark := "or mark one complex unknown real (write real after its name) if it is a real quantity"
			if d > 1 {
				mark = fmt.Sprintf("or mark %d complex unknowns real (write real after their names) if they are real quantities", d)
			}
			hints = append(hints, mark)
		}
		if len(hints) > 0 {
			msg += " (" + strings.Join(hints, ", ") + ")"
		}
		return msg + ". A complex equation counts as two real equations; one whose two sides are real whatever the unknowns (one that compares magnitudes, say) counts as one."
	}
	d := r.m - r.n
	msg += fmt.Sprintf("the unknowns are %d short: there %s %s too many, or %s missing", d, isAre(d), countWords(d, "real equation", "real equations"), countWords(d, "a real unknown is", "real unknowns are"))
	var hints []string
	if ru > 0 && d <= ru {
		hints = append(hints, "remove real from an unknown that is in fact complex")
	}
	if ce > 0 && d == 1 {
		hints = append(hints, "an equation between magnitudes, or between real parts, counts as one")
	}
	if len(hints) > 0 {
		msg += " (" + strings.Join(hints, "; ") + ")"
	}
	return msg + ". A complex unknown counts as two real unknowns, a real one as one."
}

func countWords(n int, one, many string) string {
	if n == 1 {
		return "one " + strings.TrimPrefix(one, "a ")
	}
	return fmt.Sprintf("%d %s", n, many)
}

func isAre(n int) string {
	if n == 1 {
		return "is"
	}
	return "are"
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// coreFailed turns an error of the solver core into a positioned error in
// plain words. It returns false.
func (r *solveRun) coreFailed(err error) bool {
	var (
		se *numeric.SingularError
		ne *numeric.NoConvergenceError
		ee *numeric.EvalError
		de *numeric.DimensionError
	)
	switch {
	case errors.As(err, &se):
		r.singular(se)
	case errors.As(err, &ne):
		r.noConvergence(ne)
	case errors.As(err, &ee):
		var ue *expr.UnavailableError
		if errors.As(ee.Err, &ue) {
			if r.set.Unavailable == nil {
				r.set.Unavailable = ue
			}
			return false
		}
		var xe *expr.Error
		if errors.As(ee.Err, &xe) && r.env.Budget.Owns(xe) { // the work budget is spent: said as it is
			r.set.SetErrs = append(r.set.SetErrs, xe)
			r.b.Errors = append(r.b.Errors, xe)
		} else if errors.As(ee.Err, &xe) {
			r.setErr(xe.Pos, "the equations cannot be evaluated at %s: %s; give the unknowns starting values with near", r.pointWords(ee.X), xe.Msg)
		} else {
			r.setErr(r.setPos(), "the equations cannot be evaluated at %s: %v", r.pointWords(ee.X), ee.Err)
		}
	case errors.As(err, &de):
		r.setErr(r.setPos(), "%d real equations for %d real unknowns", de.M, de.N)
	default:
		r.setErr(r.setPos(), "the set cannot be solved: %v", err)
	}
	return false
}

// pointWords writes a point of the real form as the unknowns' values.
func (r *solveRun) pointWords(x []float64) string {
	if len(x) != r.n {
		return "a trial point"
	}
	var s []string
	for k, u := range r.unk {
		c := r.col[k]
		v := &expr.Scalar{Dim: u.Dim, Angle: u.Angle, AbsTemp: u.AbsTemp, Z: complex(x[c], 0)}
		if !u.Real {
			v.Z = complex(x[c], x[c+1])
		}
		s = append(s, u.Name+" = "+expr.Describe(v))
	}
	return strings.Join(s, ", ")
}

// singular words a SingularError: the equations that depend on each other
// and the unknowns no equation determines.
func (r *solveRun) singular(se *numeric.SingularError) {
	if se.Contradiction != nil {
		r.contradiction(se)
		return
	}
	var msg strings.Builder
	if se.ZeroPivot || math.IsInf(se.Cond, 1) {
		msg.WriteString("the equations do not determine the unknowns: the matrix of the set is singular")
	} else {
		fmt.Fprintf(&msg, "the equations nearly depend on each other: the condition number of the set's matrix, %.3g, exceeds %.0e, so a solution would not be reliable", se.Cond, float64(numeric.CondLimit))
	}
	pos := r.setPos()
	// equations named by their rows
	var eqNames []string
	seenEq := map[int]bool{}
	for _, row := range se.Equations {
		i := r.eqOfRow(row)
		if !seenEq[i] {
			seenEq[i] = true
			eqNames = append(eqNames, r.eqs[i].Name)
			if len(eqNames) == 1 {
				pos = r.eqs[i].Eq.Pos()
			}
		}
	}
	switch len(eqNames) {
	case 0:
	case 1:
		fmt.Fprintf(&msg, "; equation %s adds nothing to the others", eqNames[0])
	default:
		fmt.Fprintf(&msg, "; equations %s depend on each other (one is a combination of the others, so an independent equation is missing)", joinAnd(eqNames))
	}
	// unknowns: a whole complex unknown when both parts are named
	named := map[int]bool{}
	for _, c := range se.Unknowns {
		named[c] = true
	}
	var unkNames []string
	for k, u := range r.unk {
		c := r.col[k]
		switch {
		case u.Real && named[c], !u.Real && named[c] && named[c+1]:
			unkNames = append(unkNames, u.Name)
		case !u.Real && named[c]:
			unkNames = append(unkNames, "the real part of "+u.Name)
		case !u.Real && named[c+1]:
			unkNames = append(unkNames, "the imaginary part of "+u.Name)
		}
	}
	switch len(unkNames) {
	case 0:
	case 1:
		fmt.Fprintf(&msg, "; %s is not determined by the equations", unkNames[0])
	default:
		fmt.Fprintf(&msg, "; %s are not determined by the equations", joinAnd(unkNames))
	}
	msg.WriteString("; the unknowns get no value")
	r.setErr(pos, "%s", msg.String())
}

func joinAnd(s []string) string {
	switch len(s) {
	case 0:
		return ""
	case 1:
		return s[0]
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

// noConvergence words a NoConvergenceError with its last residual and the
// equation furthest from balance there.
func (r *solveRun) noConvergence(ne *numeric.NoConvergenceError) {
	var reason string
	switch ne.Reason {
	case numeric.IterationLimit:
		reason = fmt.Sprintf("the iteration limit of %d iterations was reached", ne.Limit)
	case numeric.NoDescent:
		reason = "no step brings the equations closer to balance: the iteration is stuck at a point that is not a solution, so the set may have no solution, or the starting point is too far from one"
	case numeric.JacobianFailed:
		reason = "the equations could not be evaluated near the last iterate"
		var xe *expr.Error
		if errors.As(ne.Err, &xe) {
			reason += " (" + xe.Msg + ")"
		}
	default:
		reason = ne.Reason.String()
	}
	msg := fmt.Sprintf("no solution found: %s; after %d iteration%s the scaled residual is %.3g (the tolerance is %.0e)", reason, ne.Iterations, plural(ne.Iterations), ne.ResidualNorm, numeric.ResidualTol)
	if len(ne.X) == r.n {
		res := make([]float64, r.m)
		r.lenient = true
		err := r.residual(ne.X, res)
		r.lenient = false
		if err == nil {
			worst, wi := -1.0, 0
			for i, v := range res {
				if s := math.Abs(v / r.rscale[i]); s > worst {
					worst, wi = s, i
				}
			}
			eq := r.eqs[r.eqOfRow(wi)]
			msg += fmt.Sprintf("; the equation furthest from balance is %s", eq.Name)
			if l, rr, err := r.sides(r.eqOfRow(wi)); err == nil {
				msg += ", with lhs − rhs = " + expr.Describe(&expr.Scalar{Z: l.Z - rr.Z, Dim: eq.Dim})
			}
			msg += fmt.Sprintf(" at the last iterate %s (not a solution)", r.pointWords(ne.X))
		}
	}
	var realNames []string
	for _, u := range r.unk {
		if u.Real {
			realNames = append(realNames, u.Name)
		}
	}
	if len(realNames) > 0 {
		msg += fmt.Sprintf("; %s %s marked real: there may be no solution with %s real", joinAnd(realNames), isAre(len(realNames)), joinAnd(realNames))
	}
	msg += "; the unknowns get no value"
	r.setErr(r.setPos(), "%s", msg)
}
