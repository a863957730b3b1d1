package mna

import (
	"math/cmplx"
	"strconv"

	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/expr"
	"calcdoc/expr/linalg/sparse"
)

// The acceptance of a solution, the rules of solve blocks (calcdoc
// SolveAcceptTol and calcdoc/solve CondLimit).
const (
	// AcceptTol bounds the componentwise backward error of every equation
	// at an accepted solution. With r_i the residual of equation i
	// evaluated as written (the branch relations, a controlled value
	// through the engine) and a_ij, b_i its coefficients and right-hand
	// side, each part (real and imaginary) must satisfy
	//
	//	|r_i| ≤ 1e-9 · (Σ_j (|Re a_ij| + |Im a_ij|)·|x_j| + |b_i|),
	//
	// |b_i| taken of the same part: the real form of the solve blocks'
	// test (Oettli–Prager).
	AcceptTol = 1e-9

	// CondLimit is the largest accepted 1-norm condition number estimate
	// of the equilibrated matrix.
	CondLimit = 1e12
)

// Solution is a solved network.
type Solution struct {
	X []complex128 // the unknowns, in the order of Network.Unknowns
	V []complex128 // by node (Topology index): 0 for a ground
	I []complex128 // by branch: its current from FROM to TO
	// S is by branch the complex power it takes in, (V_FROM − V_TO)·conj(I),
	// for Z, Y, current and a transformer (its first winding), and the
	// power it delivers, (V_TO − V_FROM)·conj(I), for a source.
	S []complex128

	// The power balance: what the sources deliver, what the Z, Y and
	// current branches take in, and Delivered − Taken. Transformers pass
	// power on and are in neither sum.
	Delivered, Taken, Mismatch complex128
	// BalanceError is |Mismatch| over the sum of the moduli of the
	// branches' powers (transformers included): by Tellegen's theorem it
	// is rounding at a solution that satisfies KCL, and at most AcceptTol
	// at an accepted one.
	BalanceError float64

	// Backward is the largest componentwise backward error of the
	// equations as written, at equation WorstEquation; Cond the 1-norm
	// condition number estimate of the equilibrated matrix.
	Backward      float64
	WorstEquation int
	Residual      []complex128 // by equation, as written
	Cond          float64
	NNZ, Fill     int // entries of the matrix, and of its LU factors
}

// Solve factorises and solves the assembled set, checks the solution
// equation by equation and fills in the branch currents, powers and the
// balance. at is where errors of the set as a whole are reported (the
// block's opening line).
func (nw *Network) Solve(at expr.Pos) (*Solution, error) {
	if nw.A == nil {
		nw.Assemble()
	}
	if len(nw.Unknowns) == 0 {
		return nil, expr.Errorf(at, "the network has no unknowns: every node is a ground")
	}
	f, err := sparse.Factor(nw.A)
	if err != nil {
		if se, ok := err.(*sparse.SingularError); ok {
			return nil, nw.singular(at, se)
		}
		return nil, expr.Errorf(at, "%s", err.Error())
	}
	cond := f.Cond1()
	if !(cond <= CondLimit) {
		return nil, expr.Errorf(at, "the network's equations are nearly singular (condition number estimate %s, above the limit %s): the node voltages would be rounding; look for a part joined to the rest only by very small admittances or very large impedances, or for sources or transformers in parallel",
			strconv.FormatFloat(cond, 'g', 3, 64), strconv.FormatFloat(CondLimit, 'g', 3, 64))
	}
	x, _ := f.SolveRefined(nw.B)
	s := &Solution{X: x, Cond: cond, NNZ: nw.A.NNZ(), Fill: f.Fill()}
	nw.results(s)
	if err := nw.accept(at, s); err != nil {
		return nil, err
	}
	return s, nil
}

// singular words a matrix without a pivot.
func (nw *Network) singular(at expr.Pos, se *sparse.SingularError) error {
	var un []string
	for _, c := range se.Cols {
		un = append(un, nw.Describe(c))
	}
	var eqs []string
	for _, r := range se.Rows {
		eqs = append(eqs, nw.EquationName(r))
	}
	msg := "the network's equations are singular"
	if len(un) > 0 {
		msg += ": " + joinAnd(un) + " " + isAre(len(un)) + " not determined by them"
	}
	if len(eqs) > 0 {
		msg += "; " + joinAnd(eqs) + " " + isAre(len(eqs)) + " left without an unknown"
	}
	return expr.Errorf(at, "%s; look for a branch of zero admittance (Y 0 S) that is a node's only way to the rest, or controlled sources that cancel each other", msg)
}

func isAre(n int) string {
	if n == 1 {
		return "is"
	}
	return "are"
}

// current returns branch bi's current from x.
func (nw *Network) current(x []complex128, v []complex128, bi int) complex128 {
	if c := nw.BranchCol[bi]; c >= 0 {
		return x[c]
	}
	b := nw.Net.Branches[bi]
	d := v[nw.Topo.Index[b.From.Key]] - v[nw.Topo.Index[b.To.Key]]
	e := nw.Elem[bi]
	if b.Element == netlist.Impedance {
		return d / e.Z // as written: V_FROM − V_TO = Z·I
	}
	return e.Y * d
}

// results fills in V, I, S and the balance from X.
func (nw *Network) results(s *Solution) {
	t, n := nw.Topo, nw.Net
	s.V = make([]complex128, len(t.Nodes))
	for i, c := range nw.NodeCol {
		if c >= 0 {
			s.V[i] = s.X[c]
		}
	}
	s.I = make([]complex128, len(n.Branches))
	s.S = make([]complex128, len(n.Branches))
	for i, b := range n.Branches {
		s.I[i] = nw.current(s.X, s.V, i)
		d := s.V[t.Index[b.From.Key]] - s.V[t.Index[b.To.Key]]
		ci := cmplx.Conj(s.I[i])
		switch b.Element {
		case netlist.Source:
			s.S[i] = -d * ci
			s.Delivered += s.S[i]
		case netlist.Ratio:
			s.S[i] = d * ci
		default:
			s.S[i] = d * ci
			s.Taken += s.S[i]
		}
	}
	s.Mismatch = s.Delivered - s.Taken
	size := 0.0
	for _, p := range s.S {
		size += cmplx.Abs(p)
	}
	if size > 0 {
		s.BalanceError = cmplx.Abs(s.Mismatch) / size
	}
}

// locals are the network's quantities at the solution, by name, for
// evaluating a controlled value again.
func (nw *Network) locals(s *Solution, uses []Quantity) map[string]expr.Value {
	loc := make(map[string]expr.Value, len(uses))
	for _, q := range uses {
		if q.Node >= 0 {
			loc[q.Name] = &expr.Scalar{Z: s.V[q.Node], Dim: expr.DimVoltage}
		} else {
			loc[q.Name] = &expr.Scalar{Z: s.I[q.Branch], Dim: expr.DimCurrent}
		}
	}
	return loc
}

// value is a source's or current's value at the solution, through the
// engine for a controlled one.
func (nw *Network) value(s *Solution, bi int) (complex128, error) {
	e := nw.Elem[bi]
	if len(e.Value.Uses) == 0 {
		return e.Value.C, nil
	}
	b := nw.Net.Branches[bi]
	want, what, unit := expr.DimVoltage, "voltage of the source "+b.Name, "V"
	if b.Element == netlist.Current {
		want, what, unit = expr.DimCurrent, "current of the source "+b.Name, "A"
	}
	return scalar(nw.env, b.Value, nw.locals(s, e.Value.Uses), want, what, unit)
}

// accept evaluates every equation as written at the solution and checks
// its componentwise backward error (AcceptTol).
func (nw *Network) accept(at expr.Pos, s *Solution) error {
	t, n := nw.Topo, nw.Net
	res := make([]complex128, len(nw.Equations))
	// KCL: the currents leaving each node
	for i, b := range n.Branches {
		if r := nw.NodeCol[t.Index[b.From.Key]]; r >= 0 {
			res[r] += s.I[i]
		}
		if r := nw.NodeCol[t.Index[b.To.Key]]; r >= 0 {
			res[r] -= s.I[i]
		}
		if b.Element == netlist.Ratio {
			out := cmplx.Conj(nw.Elem[i].Ratio) * s.I[i]
			if r := nw.NodeCol[t.Index[b.From2.Key]]; r >= 0 {
				res[r] -= out
			}
			if r := nw.NodeCol[t.Index[b.To2.Key]]; r >= 0 {
				res[r] += out
			}
		}
	}
	volt := func(nd netlist.Node) complex128 { return s.V[t.Index[nd.Key]] }
	for i, b := range n.Branches {
		row := nw.BranchCol[i]
		if row < 0 {
			continue
		}
		e := nw.Elem[i]
		d := volt(b.From) - volt(b.To)
		switch b.Element {
		case netlist.Source:
			v, err := nw.value(s, i)
			if err != nil {
				return err
			}
			res[row] = -d - (v - e.SeriesZ*s.I[i])
		case netlist.Current:
			v, err := nw.value(s, i)
			if err != nil {
				return err
			}
			res[row] = s.I[i] - v
		case netlist.Ratio:
			res[row] = d - e.Ratio*(volt(b.From2)-volt(b.To2))
		case netlist.Impedance:
			r := d - e.Z*s.I[i]
			for _, m := range e.Mutual {
				r -= m.Z * s.I[m.Branch]
			}
			res[row] = r
		}
	}
	s.Residual = res
	// the componentwise backward error of the equations as written, by the
	// sparse package's one formula (the solve blocks' test, Oettli–Prager)
	s.Backward, s.WorstEquation = nw.A.BackwardOf(res, s.X, nw.B)
	if !(s.Backward <= AcceptTol) || !(s.BalanceError <= AcceptTol) {
		if s.Backward <= AcceptTol {
			return expr.Errorf(at, "no solution found: the sources deliver %s but the branches take in %s, a difference of %s of the powers, above the tolerance %s",
				expr.Describe(&expr.Scalar{Z: s.Delivered, Dim: expr.DimPower}), expr.Describe(&expr.Scalar{Z: s.Taken, Dim: expr.DimPower}),
				strconv.FormatFloat(s.BalanceError, 'g', 3, 64), strconv.FormatFloat(AcceptTol, 'e', 0, 64))
		}
		i := s.WorstEquation
		dim := expr.DimVoltage
		if k := nw.Equations[i].Kind; k == KCL || k == CurrentEq {
			dim = expr.DimCurrent
		}
		return expr.Errorf(at, "no solution found: at the direct solution, %s does not hold (its two sides differ by %s, a componentwise backward error of %s, above the tolerance %s); the network's values may differ by many orders of magnitude: check their units",
			nw.EquationName(i), expr.Describe(&expr.Scalar{Z: res[i], Dim: dim}), strconv.FormatFloat(s.Backward, 'g', 3, 64), strconv.FormatFloat(AcceptTol, 'e', 0, 64))
	}
	return nil
}
