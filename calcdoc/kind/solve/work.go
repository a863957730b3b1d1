package solve

import (
	"errors"

	numeric "calcdoc/calcdoc/kind/solve/numeric"
)

// The dense linear algebra of a solve block is charged to the document's
// work budget (expr.Budget) here, apart from its residual evaluations,
// which the evaluator charges: an LU factorisation of the n×n matrix of
// the set, about n³/3 multiply-adds, before a direct solution and for each
// Newton iteration. A multiply-add of the dense library is about
// denseSpeed times faster than a work unit (BenchmarkWorkBudget and the
// solve timings of docs/robustness.md). The iterations are charged when
// they are done (their number is not known before), so a budget can be
// exceeded by at most one solve block's dense work, which MaxSolveUnknowns
// bounds. The singular value decomposition that diagnoses a singular set
// is not charged: it runs once a block, and MaxSolveUnknowns bounds it
// (docs/robustness.md).

// denseWork charges units (in multiples of n³/3 for a set of n real
// unknowns). It records the budget's error among the set's errors and
// returns false when the budget cannot hold them.
func (r *solveRun) denseWork(thirds int64) bool {
	n := int64(r.n)
	err := r.env.Budget.Charge(thirds*n*n*n/3/denseSpeed, r.setPos())
	if err == nil {
		return true
	}
	r.set.SetErrs = append(r.set.SetErrs, err)
	r.b.Errors = append(r.b.Errors, err)
	return false
}

// newtonWork charges the LU factorisations of iterations Newton iterations.
func (r *solveRun) newtonWork(iterations int) bool {
	return r.denseWork(int64(iterations))
}

// denseSpeed is how many multiply-adds of the dense library make one work
// unit.
const denseSpeed = 32

// newtonIterations is the number of iterations a Newton run did, from its
// result or its error.
func newtonIterations(res *numeric.Result, err error) int {
	if res != nil {
		return res.Iterations
	}
	var ne *numeric.NoConvergenceError
	if errors.As(err, &ne) {
		return ne.Iterations
	}
	return 0
}

// sparseWork charges the sparse factorisation of a linear set after it is
// done (its cost is known only then): its factors' entries times the
// matrix's order over denseSpeed, a bound on the multiply-adds of a
// Markowitz elimination whose pivot rows have at most that many entries,
// and one unit an entry for the condition estimate and the refinement.
func (r *solveRun) sparseWork(f numeric.Factorization) bool {
	units := int64(f.Fill)*int64(f.Order)/denseSpeed + int64(f.NNZ+f.Fill)
	err := r.env.Budget.Charge(units, r.setPos())
	if err == nil {
		return true
	}
	r.set.SetErrs = append(r.set.SetErrs, err)
	r.b.Errors = append(r.b.Errors, err)
	return false
}
