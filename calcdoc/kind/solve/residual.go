package solve

import (
	"math"
	"math/cmplx"

	numeric "calcdoc/calcdoc/kind/solve/numeric"
	"calcdoc/expr"
)

// setX sets the trial value of every unknown from the real vector x.
func (r *solveRun) setX(x []float64) {
	for k, u := range r.unk {
		c := r.col[k]
		if u.Real {
			r.vals[k].Z = complex(x[c], 0)
		} else {
			r.vals[k].Z = complex(x[c], x[c+1])
		}
	}
}

// sides evaluates both sides of equation i at the trial values.
func (r *solveRun) sides(i int) (l, rr expr.Scalar, err error) {
	eq := r.eqs[i].Eq
	side := func(n expr.Node, what string) (expr.Scalar, error) {
		v, err := r.env.EvalKeyed(n, r.loc, nil)
		if err != nil {
			return expr.Scalar{}, err
		}
		s, ok := v.(*expr.Scalar)
		if !ok {
			return expr.Scalar{}, expr.Errorf(n.Pos(), "the %s side of an equation must be a single value, not %s: write one equation a line", what, expr.Describe(v))
		}
		return *s, nil
	}
	if l, err = side(eq.LHS, "left"); err != nil {
		return
	}
	rr, err = side(eq.RHS, "right")
	return
}

// eqMemo remembers two evaluations of one equation's residual, keyed by
// the values of the real unknowns it involves: the latest, and the one at
// the latest point where every unknown changed (the base of a Jacobian
// or of the classification, from which the other evaluations step one
// unknown at a time).
type eqMemo struct {
	key  [2][]float64 // 0: latest, 1: base
	res  [2]complex128
	size [2]float64 // max(|lhs|, |rhs|)
	have [2]bool
}

// residual is the Problem's residual function: r_row = Re(lhs − rhs) and,
// for a complex equation, r_row+1 = Im(lhs − rhs). An equation is
// evaluated only when the values of its unknowns differ (bit for bit) from
// both remembered evaluations; otherwise the remembered residual is used,
// which is the number a new evaluation would give (an equation's value
// depends on nothing but its unknowns and the names defined above).
func (r *solveRun) residual(x, out []float64) error {
	r.setX(x)
	if r.memo == nil {
		r.memo = make([]eqMemo, len(r.eqs))
		r.lastX = make([]float64, r.n)
		for i, eq := range r.eqs {
			w := 0
			for _, k := range eq.Unknowns {
				w += 2
				if r.unk[k].Real {
					w--
				}
			}
			for j := range r.memo[i].key {
				r.memo[i].key[j] = make([]float64, w)
			}
		}
	}
	fresh := !r.have
	if !fresh {
		fresh = true
		for c := range x {
			if math.Float64bits(x[c]) == math.Float64bits(r.lastX[c]) {
				fresh = false
				break
			}
		}
	}
	copy(r.lastX, x)
	r.have = false
	for i, eq := range r.eqs {
		m := &r.memo[i]
		key := r.keyBuf[:0]
		for _, k := range eq.Unknowns {
			c := r.col[k]
			key = append(key, x[c])
			if !r.unk[k].Real {
				key = append(key, x[c+1])
			}
		}
		r.keyBuf = key
		var d complex128
		var size float64
		switch {
		case m.have[0] && sameBits(m.key[0], key):
			d, size = m.res[0], m.size[0]
		case m.have[1] && sameBits(m.key[1], key):
			d, size = m.res[1], m.size[1]
		default:
			l, rr, err := r.sides(i)
			if err != nil {
				return err
			}
			d, size = l.Z-rr.Z, math.Max(cmplx.Abs(l.Z), cmplx.Abs(rr.Z))
			copy(m.key[0], key)
			m.res[0], m.size[0], m.have[0] = d, size, true
		}
		if fresh {
			copy(m.key[1], key)
			m.res[1], m.size[1], m.have[1] = d, size, true
		}
		if !r.lenient {
			if err := r.trialReal(i, size, d); err != nil {
				return err
			}
		}
		row := r.row[i]
		out[row] = real(d)
		if !eq.RealValued {
			out[row+1] = imag(d)
		}
	}
	r.have = true
	return nil
}

// verify evaluates both sides of every equation at x and records them and
// their difference on the equation; with res not nil it also fills in the
// real residuals.
func (r *solveRun) verify(x, res []float64) error {
	r.setX(x)
	r.verified = nil
	for i, eq := range r.eqs {
		l, rr, err := r.sides(i)
		if err != nil {
			return err
		}
		diff := expr.Scalar{Z: l.Z - rr.Z, Dim: eq.Dim}
		eq.LHS, eq.RHS, eq.Diff = &l, &rr, &diff
		if res != nil {
			res[r.row[i]] = real(diff.Z)
			if !eq.RealValued {
				res[r.row[i]+1] = imag(diff.Z)
			}
		}
	}
	r.verified = append(r.verified[:0], x...)
	return nil
}

func sameBits(a, b []float64) bool {
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

func (r *solveRun) problem(x0, rscale []float64) *numeric.Problem {
	var rows []int
	for i, eq := range r.eqs {
		if !eq.RealValued {
			rows = append(rows, r.row[i], r.row[i]+1)
		}
	}
	return &numeric.Problem{
		N: r.n, M: r.m, Residual: r.residual,
		X0: x0, XScale: r.xscale, RScale: rscale, Complex: r.pairs,
		ComplexRows: rows, Blocks: r.blocks(),
	}
}

// blocks is the structure of the residual: a block per equation (its one
// or two real residuals), depending on the real unknowns of the unknowns
// it involves. Linearize then evaluates an equation only where one of its
// own unknowns moved, so that classifying and assembling a set costs about
// (1 + its real unknowns + LinearProbes) evaluations of each equation.
func (r *solveRun) blocks() *numeric.Blocks {
	if r.blk != nil {
		return r.blk
	}
	bl := &numeric.Blocks{Rows: make([][]int, len(r.eqs)), Cols: make([][]int, len(r.eqs))}
	for i, eq := range r.eqs {
		row := r.row[i]
		if eq.RealValued {
			bl.Rows[i] = []int{row}
		} else {
			bl.Rows[i] = []int{row, row + 1}
		}
		var cols []int
		for _, k := range eq.Unknowns {
			c := r.col[k]
			cols = append(cols, c)
			if !r.unk[k].Real {
				cols = append(cols, c+1)
			}
		}
		bl.Cols[i] = cols
	}
	bl.Eval = r.evalEquation
	r.blk = bl
	return bl
}

// evalEquation is the block function of equation i: it sets the trial
// values of the equation's own unknowns from x and evaluates it, as the
// residual function does (an equation counted as real must stay real).
func (r *solveRun) evalEquation(i int, x, out []float64) error {
	eq := r.eqs[i]
	for _, k := range eq.Unknowns {
		c := r.col[k]
		if r.unk[k].Real {
			r.vals[k].Z = complex(x[c], 0)
		} else {
			r.vals[k].Z = complex(x[c], x[c+1])
		}
	}
	l, rr, err := r.sides(i)
	if err != nil {
		return err
	}
	d := l.Z - rr.Z
	if !r.lenient {
		if err := r.trialReal(i, math.Max(cmplx.Abs(l.Z), cmplx.Abs(rr.Z)), d); err != nil {
			return err
		}
	}
	row := r.row[i]
	out[row] = real(d)
	if !eq.RealValued {
		out[row+1] = imag(d)
	}
	return nil
}
