package solve

import (
	"math"
	"sort"

	"calcdoc/calcdoc"
	numeric "calcdoc/calcdoc/kind/solve/numeric"
	"calcdoc/expr"
)

// A solve block (LANGUAGE.md section 5) is evaluated in these steps:
//
//  1. The info string after "solve" is read by ParseSolveHeader into the
//     unknowns; each must be a new name. A starting value (near) is
//     evaluated in the names above the block.
//  2. The lines are read as equations lhs = rhs (expr.EquationMode). Every
//     unknown must appear in some equation, every equation must involve an
//     unknown.
//  3. Each unknown becomes one real unknown (real) or two (its real and
//     imaginary parts). Its dimension is that of its [unit], else that of
//     its starting value, else dimensionless.
//  4. Both sides of every equation are evaluated at a generic point (every
//     unknown x0 + s·(0.618 + j0.414), s its scale; a real unknown stays on
//     the side of zero of a non-zero start): their dimensions must
//     agree. An equation whose residual lhs − rhs is real at the starting
//     point, at the generic point and at SolveProbes pseudo-random points
//     (imaginary part at most 1e-12 of the larger side) counts as one real
//     equation (its real part), every other equation as two.
//  5. The real counts must agree; the set r(x) = 0 is then classified,
//     solved directly when affine and iteratively otherwise (package
//     calcdoc/kind/solve/numeric), and the solution is accepted only when its
//     componentwise backward error is at most SolveAcceptTol.
//  6. The unknowns are defined with their solved values (or defined as
//     unavailable when the set cannot be solved) and listed as values.

// Limits and tolerances of the document layer of solve blocks; the solver
// core's own are in package calcdoc/kind/solve/numeric.
const (
	// SolveProbes is the number of pseudo-random points (besides the
	// starting point and the generic point) at which each equation is
	// evaluated to find out whether its residual is real whatever the
	// unknowns.
	SolveProbes = 3

	// RealTol is the tolerance of that test: at every point,
	// |Im(lhs − rhs)| ≤ 1e-12 · max(|lhs|, |rhs|).
	RealTol = 1e-12

	// SolveAcceptTol bounds the componentwise backward error of an
	// accepted solution. With J the Jacobian of the real residuals at the
	// solution x (the matrix A of a linear set), m_k the magnitude of
	// unknown k (the modulus of a complex unknown) and
	// c_i = r_i(x) − Σ_k J_ik x_k the constant of the linear model at x
	// (−b_i for a linear set), each real residual must satisfy
	//
	//	ω_i = |r_i(x)| / (Σ_k |J_ik|·m_k + |c_i|) ≤ 1e-9,
	//
	// with ω_i = 0 when r_i(x) = 0. For a linear set this is the
	// Oettli–Prager componentwise backward error: x solves exactly a set
	// whose coefficients and right-hand sides differ from the written ones
	// by at most ω relative to each. It rejects a point at which the
	// equations balance only because every term has become small (such as
	// exp(x) = 0 at a large negative x), which a residual test alone would
	// accept.
	SolveAcceptTol = 1e-9

	// MaxSolveUnknowns is the largest number of real unknowns of one solve
	// block, a complex unknown counting two: 1000, such as 500 complex
	// unknowns. A linear set that is large and sparse is factored by the
	// sparse LU (numeric.UseSparse), at a cost about in proportion to its
	// entries; otherwise the solver works on the full (dense) matrix of the
	// set: the direct solution factors the n×n matrix (about 2n³/3
	// operations, 6.7·10⁸ at n = 1000), a Newton iteration does so at every
	// step, and a singular set, dense or sparse, is diagnosed from a
	// singular value decomposition of its dense real form, several times
	// dearer; memory grows as n². A larger set is refused before any of
	// this is done, with an error at the list of unknowns.
	MaxSolveUnknowns = 1000
)

// Unknown is one unknown of a solve block, as its info string lists it.
type Unknown struct {
	Name    string
	Pos     expr.Pos      // where the name is written
	Display *expr.Display // the [unit form] bracket, or nil
	Real    bool          // marked real: one real unknown instead of two

	// NearText is the starting value as written after "near" ("" when
	// none), NearNode its parse and NearPos where it starts.
	NearText string
	NearNode expr.Node
	NearPos  expr.Pos
	// Near is the starting value evaluated, or nil.
	Near *expr.Scalar

	// Dim is the unknown's dimension (from its unit, else its starting
	// value, else dimensionless); Angle marks an angle unit.
	Dim   expr.Dim
	Angle bool
	// AbsTemp marks an absolute temperature: a [°C] unknown, or one whose
	// starting value is in °C (LANGUAGE.md section 4).
	AbsTemp bool
	// Value is the solved value, nil when the set was not solved.
	Value *expr.Scalar
}

// HasUnit reports whether the unknown's bracket names a unit.
func (u *Unknown) HasUnit() bool { return u.Display != nil && u.Display.Unit != nil }

// SolveEquation is one equation of a solve block.
type SolveEquation struct {
	Eq   *expr.Equation
	Line int
	// Name is how messages and the sheet refer to it: its label, or
	// "line N".
	Name string
	// RealValued marks an equation whose residual is real whatever the
	// unknowns: it counts as one real equation.
	RealValued bool
	Dim        expr.Dim // the dimension of its two sides
	Unknowns   []int    // the unknowns it involves (indices into SolveSet.Unknowns)

	// At the solution: both sides, their difference LHS − RHS and the
	// largest componentwise backward error of its real residuals (see
	// SolveAcceptTol).
	LHS, RHS, Diff *expr.Scalar
	Backward       float64
}

// SolveLine is one line (statement) of a solve block.
type SolveLine struct {
	Stmt     expr.Stmt // *expr.Equation, *expr.Note or *expr.BadStmt
	Text     string    // the source text of a *expr.BadStmt, else ""
	Errs     []*expr.Error
	Equation *SolveEquation // nil unless Stmt is an *expr.Equation
}

// SolveSet is what a solve block evaluates to (Block.Result).
type SolveSet struct {
	Unknowns   []*Unknown
	HeaderErrs []*expr.Error // errors of the info string and of the unknowns
	Lines      []*SolveLine
	Equations  []*SolveEquation
	// SetErrs are errors of the set as a whole (the counts, a singular
	// matrix, no convergence); each error of the block is in exactly one
	// of HeaderErrs, a line's Errs and SetErrs, and in Block.Errors.
	SetErrs []*expr.Error
	// Unavailable is set when an equation uses a name whose definition
	// failed above: the set is not solved, and that is not a new error.
	Unavailable *expr.UnavailableError

	// RealUnknowns and RealEquations are the two counts (0 when they
	// could not be established).
	RealUnknowns, RealEquations int

	// Solved is true when the unknowns have values.
	Solved bool
	// Linear is true when the set was classified affine in its unknowns.
	Linear bool
	// ComplexLU is true for a linear set that is complex-linear (see
	// numeric.Linear.ComplexLinear): its complex matrix was factored rather
	// than the real form, and Cond is that matrix's.
	ComplexLU bool
	// Factorization says how a linear set was factored: dense or sparse
	// LU, complex or real form, the order and non-zero entries of the
	// matrix and the entries of its sparse factors.
	Factorization numeric.Factorization
	// Refined is true for a linear set whose direct solution did not meet
	// the residual tolerance and was refined by Newton iterations.
	Refined bool
	// Cond is the 1-norm condition number estimate of the equilibrated
	// matrix (linear) or of the last scaled Jacobian (non-linear).
	Cond float64
	// MaxDeviation is the largest departure from the affine model seen by
	// the classification of a linear set (see solve.LinearTol).
	MaxDeviation float64
	// Iterations, Criterion, ResidualNorm and History describe the Newton
	// iterations (a non-linear or refined set); ResidualNorm is the final
	// scaled residual norm of either method, InitialResidualNorm where the
	// method started.
	Iterations          int
	Criterion           numeric.Criterion
	ResidualNorm        float64
	InitialResidualNorm float64
	History             []numeric.Step
	// Polished is true when the accepted solution needed a second Newton
	// run with the residuals scaled at the first solution (see
	// SolveAcceptTol).
	Polished bool
	// Backward is the largest componentwise backward error at the
	// solution.
	Backward float64

	lin *numeric.Linear
	run *solveRun
}

// Part is a part of a complex quantity in the real form of a set.
type Part int

// The parts.
const (
	Whole    Part = iota // a real unknown, a real-valued equation, or a complex entry
	RealPart             // Re
	ImagPart             // Im
)

// SystemIndex names a row (an equation and part) or a column (an unknown
// and part) of a SolveSystem.
type SystemIndex struct {
	Index int // into SolveSet.Equations or SolveSet.Unknowns
	Part  Part
}

// SolveSystem is the linear system A x = b of a linear set, in its units.
// Row i of A·x − b is the residual of its equation written with the side
// that holds the unknowns first: lhs − rhs, or rhs − lhs when only the
// right side involves unknowns (so that KCL and KVL written as
// "source = sum of drops" give the admittance or impedance matrix with its
// natural signs). It is the real form (one row per real equation, one column per real
// unknown) unless every unknown and every equation is complex and the
// real matrix has the structure of a complex one (each 2×2 block
// [[a, −b], [b, a]] within 1e-9 of its size), in which case it is the
// complex form: a_ik = ∂r_i/∂Re(x_k) and b_i = Re b + j Im b of each
// equation. Entry (i, k) of A has the dimension of equation i divided by
// that of unknown k; b_i has the dimension of equation i.
type SolveSystem struct {
	Complex bool
	// Flipped[i] is true when the rows of equation i are rhs − lhs.
	Flipped []bool
	Rows    []SystemIndex
	Cols    []SystemIndex
	// Entries are the non-zero entries of A, row by row, each row by
	// column.
	Entries []SystemEntry
	// A is the whole matrix, zeros included, for a system of at most
	// FullTableLimit rows and columns (the sheet draws it as a table); nil
	// for a larger one, of which the sheet lists Entries.
	A *expr.Matrix
	B *expr.Matrix // a column vector
}

// SystemEntry is a non-zero entry of A.
type SystemEntry struct {
	Row, Col int
	V        expr.Scalar
}

// System returns the linear system of a solved linear set, or nil. Its
// cost is in proportion to the non-zero entries of the set's matrix (and
// to its size, for a system small enough to be drawn whole).
func (s *SolveSet) System() *SolveSystem {
	if s == nil || s.lin == nil || s.run == nil {
		return nil
	}
	r := s.run
	lin, bv := s.lin, s.lin.B
	flipped := make([]bool, len(s.Equations))
	sign := make([]float64, len(s.Equations))
	for i, e := range s.Equations {
		flipped[i] = !r.involves(e.Eq.LHS)
		sign[i] = 1
		if flipped[i] {
			sign[i] = -1
		}
	}
	allComplex := true
	for _, u := range s.Unknowns {
		allComplex = allComplex && !u.Real
	}
	for _, e := range s.Equations {
		allComplex = allComplex && !e.RealValued
	}
	if allComplex && complexStructure(lin) {
		n, m := len(s.Unknowns), len(s.Equations)
		sys := &SolveSystem{Complex: true, Flipped: flipped, B: expr.NewMatrix(m, 1)}
		// column c of the real form is part c%2 of unknown c/2 (every
		// unknown is complex)
		z := make([]complex128, n)
		touched := make([]bool, n)
		var list []int
		for i, e := range s.Equations {
			sys.Rows = append(sys.Rows, SystemIndex{i, Whole})
			ri := r.row[i]
			list = list[:0]
			for p, row := range [2][]numeric.Entry{lin.RowEntries(ri), lin.RowEntries(ri + 1)} {
				for _, t := range row {
					if t.Col%2 != 0 {
						continue // the imaginary part's column: a copy of the real part's
					}
					k := t.Col / 2
					if !touched[k] {
						touched[k], z[k] = true, 0
						list = append(list, k)
					}
					if p == 0 {
						z[k] += complex(t.V, 0)
					} else {
						z[k] += complex(0, t.V)
					}
				}
			}
			sort.Ints(list)
			sg := complex(sign[i], 0)
			for _, k := range list {
				touched[k] = false
				if z[k] != 0 {
					sys.Entries = append(sys.Entries, SystemEntry{i, k, expr.Scalar{Z: sg * z[k], Dim: e.Dim.Div(s.Unknowns[k].Dim)}})
				}
			}
			sys.B.Set(i, 0, expr.Scalar{Z: sg * complex(bv[ri], bv[ri+1]), Dim: e.Dim})
		}
		for k := range s.Unknowns {
			sys.Cols = append(sys.Cols, SystemIndex{k, Whole})
		}
		sys.fill(s)
		return sys
	}
	m, _ := lin.Dims()
	sys := &SolveSystem{Flipped: flipped, B: expr.NewMatrix(m, 1)}
	for i, e := range s.Equations {
		if e.RealValued {
			sys.Rows = append(sys.Rows, SystemIndex{i, Whole})
		} else {
			sys.Rows = append(sys.Rows, SystemIndex{i, RealPart}, SystemIndex{i, ImagPart})
		}
	}
	for k, u := range s.Unknowns {
		if u.Real {
			sys.Cols = append(sys.Cols, SystemIndex{k, Whole})
		} else {
			sys.Cols = append(sys.Cols, SystemIndex{k, RealPart}, SystemIndex{k, ImagPart})
		}
	}
	for i, ri := range sys.Rows {
		ed := s.Equations[ri.Index].Dim
		sg := sign[ri.Index]
		for _, t := range lin.RowEntries(i) {
			sys.Entries = append(sys.Entries, SystemEntry{i, t.Col, expr.Scalar{Z: complex(sg*t.V, 0), Dim: ed.Div(s.Unknowns[sys.Cols[t.Col].Index].Dim)}})
		}
		sys.B.Set(i, 0, expr.Scalar{Z: complex(sg*bv[i], 0), Dim: ed})
	}
	sys.fill(s)
	return sys
}

// fill makes the whole matrix A of a system small enough to be drawn
// whole: its entries, and zeros in the units of their row and column.
func (sys *SolveSystem) fill(s *SolveSet) {
	if len(sys.Rows) > FullTableLimit || len(sys.Cols) > FullTableLimit {
		return
	}
	sys.A = expr.NewMatrix(len(sys.Rows), len(sys.Cols))
	for i, ri := range sys.Rows {
		ed := s.Equations[ri.Index].Dim
		for k, ck := range sys.Cols {
			sys.A.Set(i, k, expr.Scalar{Dim: ed.Div(s.Unknowns[ck.Index].Dim)})
		}
	}
	for _, e := range sys.Entries {
		sys.A.Set(e.Row, e.Col, e.V)
	}
}

// involves reports whether an expression uses one of the unknowns.
func (r *solveRun) involves(n expr.Node) bool {
	found := false
	expr.Walk(n, func(n expr.Node) bool {
		if id, ok := n.(*expr.Ident); ok {
			if _, isU := r.loc[id.Key]; isU {
				found = true
			}
		}
		return !found
	})
	return found
}

// complexStructure reports whether every 2×2 block of the model's matrix
// is [[p, −q], [q, p]] within 1e-9 of the block's size (plus 1e-12 of the
// largest entry of its rows, for entries that are rounding noise). Only
// the blocks that hold a non-zero entry are looked at: a block of zeros
// has the structure.
func complexStructure(lin *numeric.Linear) bool {
	m, n := lin.Dims()
	if m%2 != 0 || n%2 != 0 {
		return false
	}
	type block struct{ p, mq, q, p2 float64 }
	blk := make([]block, n/2)
	touched := make([]bool, n/2)
	var list []int
	for i := 0; i < m; i += 2 {
		rowMax := 0.0
		list = list[:0]
		for p, row := range [2][]numeric.Entry{lin.RowEntries(i), lin.RowEntries(i + 1)} {
			for _, t := range row {
				rowMax = math.Max(rowMax, math.Abs(t.V))
				k := t.Col / 2
				if !touched[k] {
					touched[k], blk[k] = true, block{}
					list = append(list, k)
				}
				switch {
				case p == 0 && t.Col%2 == 0:
					blk[k].p = t.V
				case p == 0:
					blk[k].mq = t.V
				case t.Col%2 == 0:
					blk[k].q = t.V
				default:
					blk[k].p2 = t.V
				}
			}
		}
		ok := true
		for _, k := range list {
			touched[k] = false
			b := blk[k]
			size := math.Abs(b.p) + math.Abs(b.mq) + math.Abs(b.q) + math.Abs(b.p2)
			tol := 1e-9*size + 1e-12*rowMax
			if math.Abs(b.p-b.p2) > tol || math.Abs(b.mq+b.q) > tol {
				ok = false
			}
		}
		if !ok {
			return false
		}
	}
	return true
}

// ---------------------------------------------------------------------
// Evaluation.

// solveRun is the state of one solve block's evaluation: the unknowns as
// local values, the layout of the real form, and a cache of residuals.
type solveRun struct {
	b     *calcdoc.Block
	set   *SolveSet
	env   *expr.Env
	unk   []*Unknown
	eqs   []*SolveEquation
	vals  []*expr.Scalar // the trial value of each unknown, updated in place
	loc   map[string]expr.Value
	col   []int // first real unknown (column) of each unknown
	owner []int // the unknown of each real unknown (column)
	row   []int // first real residual (row) of each equation
	n, m  int   // real unknowns, real residuals

	x0, xscale, rscale []float64
	pairs              []int
	eqsOf              [][]int // the equations that involve each unknown

	// lenient turns off the test of residual that an equation counted as
	// real is real at the trial point (see TrialImagTol), for the
	// acceptance, which makes its own test
	lenient bool

	blk *numeric.Blocks // the structure of the residual (see blocks)
	// verified is the point verify last evaluated every equation at
	verified []float64

	// the residual cache (see residual)
	memo   []eqMemo
	lastX  []float64
	have   bool
	keyBuf []float64
}

func evalSolve(b *calcdoc.Block) {
	env := b.Env()
	// with cases: solve for the first case, noting whether the equations
	// read a value with cases; if they did, solve again for every other
	// case, each case's failure naming its case
	var sets []*SolveSet
	var oks []bool
	n := b.PerCase(func(k int) {
		nk := len(b.Errors)
		set, ok := runSolve(b)
		if k > 0 && !ok {
			// the first case's set is the one drawn: the other case's
			// failure is listed on the block
			sets[0].SetErrs = append(sets[0].SetErrs, b.Errors[nk:]...)
		}
		sets, oks = append(sets, set), append(oks, ok)
	})
	set0, ok0 := sets[0], oks[0]
	if n == 1 {
		defineSolve(b, set0, ok0)
		return
	}
	b.Result = set0
	set0.Solved = ok0
	if !ok0 {
		defer func() {
			for _, u := range set0.Unknowns {
				u.Value = nil
			}
		}()
	}
	for i, u := range set0.Unknowns {
		cases := make([]expr.Value, len(sets))
		var first expr.Value
		for k, set := range sets {
			if !oks[k] {
				continue
			}
			v := set.Unknowns[i].Value
			if kv, err := expr.BracketKind(v, nil, u.Display); err == nil {
				v = kv.(*expr.Scalar)
			}
			cases[k] = v
			if first == nil {
				first = v
			}
		}
		if first == nil {
			if env.CanDefine(u.Name, u.Pos) == nil {
				env.Define(&expr.Binding{Name: u.Name, Pos: u.Pos, Unavailable: true, Display: u.Display})
			}
			continue
		}
		disp := env.ChooseDisplay(first, u.Display, nil)
		env.Define(&expr.Binding{Name: u.Name, Value: first, Pos: u.Pos, Display: disp, Cases: cases})
		b.AddValue(&calcdoc.NamedValue{Name: u.Name, Pos: u.Pos, Value: first, Display: disp, Cases: cases})
	}
}

// runSolve prepares and solves the block's set in the current case.
func runSolve(b *calcdoc.Block) (*SolveSet, bool) {
	set := &SolveSet{}
	b.Result = set
	r := &solveRun{b: b, set: set, env: b.Env()}
	set.run = r
	ok := r.prepare()
	if ok {
		ok = r.solveSet()
	}
	return set, ok
}

// defineSolve defines the unknowns of a set solved once.
func defineSolve(b *calcdoc.Block, set *SolveSet, ok bool) {
	env := b.Env()
	b.Result = set
	if !ok {
		for _, u := range set.Unknowns {
			u.Value = nil
			if env.CanDefine(u.Name, u.Pos) == nil {
				env.Define(&expr.Binding{Name: u.Name, Pos: u.Pos, Unavailable: true, Display: u.Display})
			}
		}
		return
	}
	set.Solved = true
	for _, u := range set.Unknowns {
		if kv, err := expr.BracketKind(u.Value, nil, u.Display); err == nil {
			u.Value = kv.(*expr.Scalar) // an unknown shown in W, var or VA has that power kind
		}
		disp := env.ChooseDisplay(u.Value, u.Display, nil) // the bracket, else the preferred unit
		env.Define(&expr.Binding{Name: u.Name, Value: u.Value, Pos: u.Pos, Display: disp})
		b.AddValue(&calcdoc.NamedValue{Name: u.Name, Pos: u.Pos, Value: u.Value, Display: disp})
	}
}

func (r *solveRun) headerErr(e *expr.Error) {
	r.set.HeaderErrs = append(r.set.HeaderErrs, e)
	r.b.Errors = append(r.b.Errors, e)
}

func (r *solveRun) setErr(pos expr.Pos, format string, args ...any) {
	e := expr.Errorf(pos, format, args...)
	r.set.SetErrs = append(r.set.SetErrs, e)
	r.b.Errors = append(r.b.Errors, e)
}

func (r *solveRun) eqErr(eq *SolveEquation, e *expr.Error) {
	for _, l := range r.set.Lines {
		if l.Equation == eq {
			l.Errs = append(l.Errs, e)
		}
	}
	r.b.Errors = append(r.b.Errors, e)
}

// setPos is where errors of the whole set are reported: the list of
// unknowns.
func (r *solveRun) setPos() expr.Pos {
	if r.b.ArgPos.IsValid() {
		return r.b.ArgPos
	}
	return r.b.InfoPos
}
