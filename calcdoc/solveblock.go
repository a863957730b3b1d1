package calcdoc

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"unicode"
	"unicode/utf8"

	"calcdoc/calcdoc/solve"
	"calcdoc/expr"

	"gonum.org/v1/gonum/mat"
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
//     calcdoc/solve), and the solution is accepted only when its
//     componentwise backward error is at most SolveAcceptTol.
//  6. The unknowns are defined with their solved values (or defined as
//     unavailable when the set cannot be solved) and listed as values.

func init() {
	RegisterKind("solve", KindFunc(evalSolve))
}

// Limits and tolerances of the document layer of solve blocks; the solver
// core's own are in package calcdoc/solve.
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
	// unknowns. The solver works on the full (dense) matrix of the set:
	// the direct solution factors the n×n matrix (about 2n³/3 operations,
	// 6.7·10⁸ at n = 1000), a Newton iteration does so at every step, and
	// a singular set is diagnosed from a singular value decomposition,
	// several times dearer; memory grows as n². A larger set is refused
	// before any of this is done, with an error at the list of unknowns.
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
	Criterion           solve.Criterion
	ResidualNorm        float64
	InitialResidualNorm float64
	History             []solve.Step
	// Polished is true when the accepted solution needed a second Newton
	// run with the residuals scaled at the first solution (see
	// SolveAcceptTol).
	Polished bool
	// Backward is the largest componentwise backward error at the
	// solution.
	Backward float64

	lin *solve.Linear
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
	A       *expr.Matrix
	B       *expr.Matrix // a column vector
}

// System returns the linear system of a solved linear set, or nil.
func (s *SolveSet) System() *SolveSystem {
	if s == nil || s.lin == nil || s.run == nil {
		return nil
	}
	r := s.run
	a, bv := s.lin.A, s.lin.B
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
	if allComplex && complexStructure(a) {
		n, m := len(s.Unknowns), len(s.Equations)
		sys := &SolveSystem{Complex: true, Flipped: flipped, A: expr.NewMatrix(m, n), B: expr.NewMatrix(m, 1)}
		for i, e := range s.Equations {
			sys.Rows = append(sys.Rows, SystemIndex{i, Whole})
			ri := r.row[i]
			sg := complex(sign[i], 0)
			for k, u := range s.Unknowns {
				c := r.col[k]
				z := complex(a.At(ri, c), a.At(ri+1, c))
				sys.A.Set(i, k, expr.Scalar{Z: sg * z, Dim: e.Dim.Div(u.Dim)})
			}
			sys.B.Set(i, 0, expr.Scalar{Z: sg * complex(bv[ri], bv[ri+1]), Dim: e.Dim})
		}
		for k := range s.Unknowns {
			sys.Cols = append(sys.Cols, SystemIndex{k, Whole})
		}
		return sys
	}
	m, n := a.Dims()
	sys := &SolveSystem{Flipped: flipped, A: expr.NewMatrix(m, n), B: expr.NewMatrix(m, 1)}
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
		for k, ck := range sys.Cols {
			sys.A.Set(i, k, expr.Scalar{Z: complex(sg*a.At(i, k), 0), Dim: ed.Div(s.Unknowns[ck.Index].Dim)})
		}
		sys.B.Set(i, 0, expr.Scalar{Z: complex(sg*bv[i], 0), Dim: ed})
	}
	return sys
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

// complexStructure reports whether every 2×2 block of a is [[p, −q], [q, p]]
// within 1e-9 of the block's size (plus 1e-12 of the largest entry of its
// rows, for entries that are rounding noise).
func complexStructure(a *mat.Dense) bool {
	m, n := a.Dims()
	if m%2 != 0 || n%2 != 0 {
		return false
	}
	for i := 0; i < m; i += 2 {
		rowMax := 0.0
		for k := 0; k < n; k++ {
			rowMax = math.Max(rowMax, math.Max(math.Abs(a.At(i, k)), math.Abs(a.At(i+1, k))))
		}
		for k := 0; k < n; k += 2 {
			p, mq := a.At(i, k), a.At(i, k+1)
			q, p2 := a.At(i+1, k), a.At(i+1, k+1)
			size := math.Abs(p) + math.Abs(mq) + math.Abs(q) + math.Abs(p2)
			tol := 1e-9*size + 1e-12*rowMax
			if math.Abs(p-p2) > tol || math.Abs(mq+q) > tol {
				return false
			}
		}
	}
	return true
}

// ---------------------------------------------------------------------
// The info string.

// ParseSolveHeader reads the info string of a solve block after the word
// "solve": unknowns separated by commas (outside parentheses and
// brackets), each
//
//	name [ "[" unit and/or form "]" ] [ "real" ] [ "near" expression ]
//
// pos is where arg starts in the file (on one line). It returns every
// unknown whose name it could read (listed once) and an error, positioned
// in arg, for each part it could not read; an unknown of an entry with an
// error may lack its bracket or starting value. A starting value is parsed
// but not evaluated.
func ParseSolveHeader(arg string, pos expr.Pos) ([]*Unknown, expr.ErrorList) {
	var errs expr.ErrorList
	rs := []rune(arg)
	at := func(i int) expr.Pos { return expr.Pos{Line: pos.Line, Col: pos.Col + i} }
	if strings.TrimSpace(arg) == "" {
		errs.Add(pos, "a solve block lists its unknowns after the word solve, separated by commas, e.g. solve I_a[A], I_b[A]")
		return nil, errs
	}
	// split at commas outside parentheses and brackets; parseUnknown
	// counts in characters
	type span struct{ a, b int }
	var parts []span
	texts, offs := splitTopLevel(arg)
	a, prev := 0, 0 // characters before offs[i], counted on from the last part
	for i, t := range texts {
		a += utf8.RuneCountInString(arg[prev:offs[i]])
		prev = offs[i]
		parts = append(parts, span{a, a + utf8.RuneCountInString(t)})
	}

	var out []*Unknown
	seen := map[string]*Unknown{}
	for _, p := range parts {
		u, err := parseUnknown(rs, p.a, p.b, at)
		for _, e := range err {
			errs.Add(e.Pos, e.Msg)
		}
		if u == nil {
			continue
		}
		if prev := seen[expr.NameKey(u.Name)]; prev != nil {
			errs.Add(u.Pos, fmt.Sprintf("%s is listed twice among the unknowns (first at column %d)", u.Name, prev.Pos.Col))
			continue
		}
		seen[expr.NameKey(u.Name)] = u
		out = append(out, u)
	}
	return out, errs
}

func isNameStart(r rune) bool {
	return r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= 0x80 && unicode.IsLetter(r)
}

func isNameRune(r rune) bool { return isNameStart(r) || r >= '0' && r <= '9' || r == '_' }

// parseUnknown reads rs[a:b] as one unknown. It returns nil and an error
// when no name can be read; once the name is read it returns the unknown,
// with errors for what follows the name that could not be read.
func parseUnknown(rs []rune, a, b int, at func(int) expr.Pos) (*Unknown, expr.ErrorList) {
	var errs expr.ErrorList
	var u *Unknown
	fail := func(i int, format string, args ...any) (*Unknown, expr.ErrorList) {
		errs = append(errs, expr.Errorf(at(i), format, args...))
		return u, errs
	}
	i := a
	skip := func() {
		for i < b && unicode.IsSpace(rs[i]) {
			i++
		}
	}
	skip()
	if i >= b {
		return fail(min(a, max(0, len(rs)-1)), "empty entry in the list of unknowns (two commas in a row, or a comma at the end)")
	}
	if !isNameStart(rs[i]) {
		return fail(i, "expected the name of an unknown, found %q: an unknown is written name or name[unit], e.g. I_a[A]", string(rs[i]))
	}
	ns := i
	for i < b && isNameRune(rs[i]) {
		i++
	}
	u = &Unknown{Name: string(rs[ns:i]), Pos: at(ns)}
	skip()
	if i < b && rs[i] == '[' {
		j := i + 1
		for j < b && rs[j] != ']' {
			j++
		}
		if j >= b {
			return fail(i, "the bracket after %s is never closed: write %s[unit], e.g. %s[A]", u.Name, u.Name, u.Name)
		}
		d, err := expr.ParseDisplay(strings.TrimSpace(string(rs[i+1 : j])))
		if err != nil {
			return fail(i+1, "%s: %s", u.Name, err.Error())
		}
		u.Display = d
		i = j + 1
	}
	for {
		skip()
		if i >= b {
			break
		}
		ws := i
		for i < b && !unicode.IsSpace(rs[i]) {
			i++
		}
		word := string(rs[ws:i])
		switch word {
		case "real":
			if u.Real {
				return fail(ws, "real is written twice after %s", u.Name)
			}
			u.Real = true
			continue
		case "near":
			skip()
			if i >= b {
				return fail(ws, "near needs a starting value after it, e.g. %s near 230 V", u.Name)
			}
			text := strings.TrimRightFunc(string(rs[i:b]), unicode.IsSpace)
			if f := strings.Fields(text); len(f) > 0 && f[len(f)-1] == "real" {
				return fail(i, "write real before near: %s real near value", u.Name)
			}
			if k := strings.IndexRune(text, '['); k >= 0 {
				return fail(i+utf8.RuneCountInString(text[:k]), "a starting value takes no bracket: give the unit after the name, %s[unit] near value", u.Name)
			}
			u.NearText, u.NearPos = text, at(i)
			var perrs expr.ErrorList
			x, disp := expr.ParseExpr(expr.NewSource(text, u.NearPos), &perrs)
			if len(perrs) > 0 {
				errs = append(errs, perrs...)
				return u, errs
			}
			if disp != nil {
				return fail(i, "a starting value takes no display bracket: give the unit after the name, %s[unit] near value", u.Name)
			}
			u.NearNode = x
			return u, errs
		default:
			if strings.HasPrefix(word, "[") {
				return fail(ws, "the unit bracket comes directly after the name and before real or near: %s[unit] real near value", u.Name)
			}
			return fail(ws, "unexpected %q after %s: an unknown is written name or name[unit], then optionally real and near value", word, u.Name)
		}
	}
	return u, errs
}

// ---------------------------------------------------------------------
// Evaluation.

// solveRun is the state of one solve block's evaluation: the unknowns as
// local values, the layout of the real form, and a cache of residuals.
type solveRun struct {
	b     *Block
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

	// the residual cache (see residual)
	memo   []eqMemo
	lastX  []float64
	have   bool
	keyBuf []float64
}

func evalSolve(b *Block) {
	set := &SolveSet{}
	b.Result = set
	r := &solveRun{b: b, set: set, env: b.Env()}
	set.run = r
	ok := r.prepare()
	if ok {
		ok = r.solveSet()
	}
	if !ok {
		for _, u := range set.Unknowns {
			u.Value = nil
			if r.env.CanDefine(u.Name, u.Pos) == nil {
				r.env.Define(&expr.Binding{Name: u.Name, Pos: u.Pos, Unavailable: true, Display: u.Display})
			}
		}
		return
	}
	set.Solved = true
	for _, u := range set.Unknowns {
		if kv, err := expr.BracketKind(u.Value, nil, u.Display); err == nil {
			u.Value = kv.(*expr.Scalar) // an unknown shown in W, var or VA has that power kind
		}
		disp := r.env.ChooseDisplay(u.Value, u.Display, nil) // the bracket, else the preferred unit
		r.env.Define(&expr.Binding{Name: u.Name, Value: u.Value, Pos: u.Pos, Display: disp})
		b.AddValue(&NamedValue{Name: u.Name, Pos: u.Pos, Value: u.Value, Display: disp})
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

// prepare reads the block, checks it and lays out the real form. It
// returns false when the set cannot be solved (the reason is recorded).
func (r *solveRun) prepare() bool {
	b, set := r.b, r.set
	pos := b.ArgPos
	if !pos.IsValid() {
		pos = expr.Pos{Line: b.InfoPos.Line, Col: b.InfoPos.Col + utf8.RuneCountInString("solve")}
	}
	unk, herrs := ParseSolveHeader(b.Arg, pos)
	set.Unknowns = unk
	for _, e := range herrs {
		r.headerErr(e)
	}
	ok := len(herrs) == 0

	// the equations, read whatever the header says, so they are shown
	var perrs expr.ErrorList
	stmts := expr.ParseBlock(b.Source(), expr.EquationMode, &perrs)
	per, rest := errorsOf(stmts, perrs)
	labels := map[string]*SolveEquation{}
	for k, s := range stmts {
		l := &SolveLine{Stmt: s}
		if _, bad := s.(*expr.BadStmt); bad {
			l.Text = b.Text(s.Pos(), s.End())
		}
		for _, e := range per[k] {
			l.Errs = append(l.Errs, e)
			b.Errors = append(b.Errors, e)
			ok = false
		}
		switch s := s.(type) {
		case *expr.Equation:
			eq := &SolveEquation{Eq: s, Line: s.Pos().Line, Name: fmt.Sprintf("line %d", s.Pos().Line)}
			if s.Label != nil {
				eq.Name = fmt.Sprintf("%s (line %d)", s.Label.Name, eq.Line)
				if prev := labels[s.Label.Name]; prev != nil {
					e := expr.Errorf(s.Label.Pos(), "the label %s is used twice (also at line %d): give each equation its own label", s.Label.Name, prev.Line)
					l.Errs = append(l.Errs, e)
					b.Errors = append(b.Errors, e)
					ok = false
				} else {
					labels[s.Label.Name] = eq
				}
			}
			l.Equation = eq
			set.Equations = append(set.Equations, eq)
		case *expr.BadStmt:
			ok = false
		}
		set.Lines = append(set.Lines, l)
	}
	for _, e := range rest {
		r.headerErr(e)
		ok = false
	}
	if len(set.Equations) == 0 && ok {
		r.setErr(r.setPos(), "the solve block has no equations: write one equation a line, lhs = rhs (optionally label: lhs = rhs)")
		return false
	}

	// each unknown is a new name, with a usable starting value
	for _, u := range unk {
		if bd := r.env.Lookup(u.Name); bd != nil {
			r.headerErr(expr.Errorf(u.Pos, "%s is already defined at line %d: the unknowns of a solve block must be new names (choose another name, e.g. %s_2)", u.Name, bd.Pos.Line, u.Name))
			ok = false
			continue
		}
		if e := r.env.CanDefine(u.Name, u.Pos); e != nil {
			r.headerErr(e)
			ok = false
			continue
		}
		if u.HasUnit() {
			u.Dim, u.Angle = u.Display.Unit.Dim, u.Display.Unit.Angle && u.Display.Unit.Dim.IsZero()
		}
		if u.NearNode != nil {
			v, err := r.env.Eval(u.NearNode, nil)
			if err != nil {
				if ue, isU := err.(*expr.UnavailableError); isU {
					// not a new error: the definition that failed has its own
					if set.Unavailable == nil {
						set.Unavailable = ue
					}
				} else {
					r.headerErr(asExprError(err, u.NearPos))
				}
				ok = false
				continue
			}
			s, isS := v.(*expr.Scalar)
			switch {
			case !isS:
				r.headerErr(expr.Errorf(u.NearPos, "the starting value of %s must be a single value, not %s", u.Name, expr.Describe(v)))
				ok = false
				continue
			case !s.IsFinite():
				r.headerErr(expr.Errorf(u.NearPos, "the starting value of %s is not finite", u.Name))
				ok = false
				continue
			case u.HasUnit() && s.Dim != u.Dim && !(s.Z == 0 && s.Dim.IsZero()):
				r.headerErr(expr.Errorf(u.NearPos, "the starting value %s is %s, but %s[%s] is %s", expr.Describe(s), expr.DimWord(s.Dim), u.Name, u.Display.Unit.Text, expr.DimWord(u.Dim)))
				ok = false
				continue
			case u.Real && !s.IsReal():
				r.headerErr(expr.Errorf(u.NearPos, "%s is marked real, but its starting value %s is complex", u.Name, expr.Describe(s)))
				ok = false
				continue
			}
			if !u.HasUnit() {
				u.Dim, u.Angle = s.Dim, s.Angle
			}
			near := *s
			near.Dim = u.Dim
			if u.Real {
				near.Z = complex(real(near.Z), 0)
			}
			u.Near = &near
		}
	}
	if !ok || len(unk) == 0 {
		return false
	}

	// which unknowns each equation involves
	index := map[string]int{}
	for k, u := range unk {
		index[expr.NameKey(u.Name)] = k
	}
	r.eqsOf = make([][]int, len(unk))
	for i, eq := range set.Equations {
		seen := map[int]bool{}
		for _, side := range []expr.Node{eq.Eq.LHS, eq.Eq.RHS} {
			expr.Walk(side, func(n expr.Node) bool {
				if id, isID := n.(*expr.Ident); isID {
					if k, isU := index[id.Key]; isU && !seen[k] {
						seen[k] = true
						eq.Unknowns = append(eq.Unknowns, k)
						r.eqsOf[k] = append(r.eqsOf[k], i)
					}
				}
				return true
			})
		}
		if len(eq.Unknowns) == 0 {
			r.eqErr(eq, expr.Errorf(eq.Eq.Pos(), "this equation involves none of the unknowns (%s): every equation of a solve block must involve one (to check a relation between known values, use check in a calc block)", unknownList(unk)))
			ok = false
		}
	}
	for k, u := range unk {
		if len(r.eqsOf[k]) == 0 {
			r.headerErr(expr.Errorf(u.Pos, "%s appears in no equation: remove it from the list of unknowns, or add an equation that involves it", u.Name))
			ok = false
		}
	}
	if !ok {
		return false
	}

	// the layout of the real form, the starting point and the scales
	r.unk, r.eqs = unk, set.Equations
	r.loc = make(map[string]expr.Value, len(unk))
	r.vals = make([]*expr.Scalar, len(unk))
	r.col = make([]int, len(unk))
	for k, u := range unk {
		r.vals[k] = &expr.Scalar{Dim: u.Dim, Angle: u.Angle}
		r.loc[expr.NameKey(u.Name)] = r.vals[k] // keyed as the evaluator looks names up
		r.col[k] = r.n
		scale := 1.0
		if u.HasUnit() {
			scale = u.Display.Unit.Scale
		}
		var z complex128
		if u.Near != nil {
			z = u.Near.Z
			if a := cmplx.Abs(z); a > 0 {
				scale = a
			}
		}
		if !(scale > 0) || math.IsInf(scale, 0) {
			scale = 1
		}
		if u.Real {
			r.x0 = append(r.x0, real(z))
			r.xscale = append(r.xscale, scale)
			r.owner = append(r.owner, k)
			r.n++
		} else {
			r.x0 = append(r.x0, real(z), imag(z))
			r.xscale = append(r.xscale, scale, scale)
			r.owner = append(r.owner, k, k)
			r.pairs = append(r.pairs, r.n, r.n+1)
			r.n += 2
		}
	}

	if r.n > MaxSolveUnknowns {
		cu := r.n - len(unk) // each complex unknown counts one more
		var kinds []string
		if cu > 0 {
			kinds = append(kinds, fmt.Sprintf("%d complex", cu))
		}
		if ru := len(unk) - cu; ru > 0 {
			kinds = append(kinds, fmt.Sprintf("%d real", ru))
		}
		r.setErr(r.setPos(), "the set has %d real unknowns (%s), but a solve block takes at most %d (such as %d complex unknowns): the solver works on the full matrix of the set, and its time grows as the cube of the count. Split the network into blocks of at most %d complex unknowns, e.g. reduce each part to an equivalent (Thévenin or Norton) at the nodes where it joins the rest and solve the joined equivalents in a further block",
			r.n, strings.Join(kinds, " and "), MaxSolveUnknowns, MaxSolveUnknowns/2, MaxSolveUnknowns/2)
		return false
	}

	// dimensions, at the generic point: no unknown zero, no two alike
	generic := make([]float64, r.n)
	for k, u := range unk {
		c := r.col[k]
		generic[c] = r.sameSide(c, genericFactor(k, 0.6180339887498949)*r.xscale[c])
		if !u.Real {
			generic[c+1] = r.x0[c+1] + genericFactor(k, 0.41421356237309503)*r.xscale[c+1]
		}
	}
	r.setX(generic)
	genL := make([]expr.Scalar, len(r.eqs))
	genR := make([]expr.Scalar, len(r.eqs))
	for i, eq := range r.eqs {
		l, rr, err := r.sides(i)
		if err != nil {
			if !r.evalFailed(eq, err, "", "") {
				return false
			}
			ok = false
			continue
		}
		genL[i], genR[i] = l, rr
		switch {
		case l.Dim == rr.Dim:
			eq.Dim = l.Dim
		case l.Z == 0 && l.Dim.IsZero():
			eq.Dim = rr.Dim
		case rr.Z == 0 && rr.Dim.IsZero():
			eq.Dim = l.Dim
		default:
			msg := fmt.Sprintf("the two sides of this equation have different units: the left side is %s, the right side %s", expr.DimWord(l.Dim), expr.DimWord(rr.Dim))
			if hint := r.unitHint(eq); hint != "" {
				msg += "; " + hint
			}
			r.eqErr(eq, expr.Errorf(eq.Eq.Pos(), "%s", msg))
			ok = false
		}
	}
	if !ok {
		return false
	}

	// the starting point
	r.setX(r.x0)
	baseL := make([]expr.Scalar, len(r.eqs))
	baseR := make([]expr.Scalar, len(r.eqs))
	for i, eq := range r.eqs {
		l, rr, err := r.sides(i)
		if err != nil {
			hint := "; give the unknowns starting values with near, e.g. solve " + nearExample(unk[eq.Unknowns[0]])
			r.evalFailed(eq, err, "the equations cannot be evaluated at the starting point ("+startWords(unk)+"): ", hint)
			return false
		}
		baseL[i], baseR[i] = l, rr
	}

	// real-valued equations: the residual is real at every point tried
	realValued := make([]bool, len(r.eqs))
	for i := range r.eqs {
		realValued[i] = isRealDiff(baseL[i], baseR[i]) && isRealDiff(genL[i], genR[i])
	}
	rng := rand.New(rand.NewPCG(0x736f6c7665626c6b, 0x7265616c76616c75)) // "solveblk", "realvalu"
	probe := make([]float64, r.n)
	for j := 0; j < SolveProbes; j++ {
		for c := range probe {
			u := 0.5 + rng.Float64()
			if rng.IntN(2) == 0 {
				u = -u
			}
			probe[c] = r.sameSide(c, u*r.xscale[c])
		}
		r.setX(probe)
		for i := range r.eqs {
			if !realValued[i] {
				continue
			}
			l, rr, err := r.sides(i)
			if err != nil {
				continue // a point outside the domain tells nothing
			}
			realValued[i] = isRealDiff(l, rr)
		}
	}

	// the counts
	r.row = make([]int, len(r.eqs))
	for i, eq := range r.eqs {
		eq.RealValued = realValued[i]
		r.row[i] = r.m
		if eq.RealValued {
			r.m++
		} else {
			r.m += 2
		}
	}
	set.RealUnknowns, set.RealEquations = r.n, r.m
	if r.m != r.n {
		r.setErr(r.setPos(), "%s", r.countMessage())
		return false
	}

	// the residual scales: the largest term of each equation at the
	// generic point (1 in SI units where all are zero). A term that
	// involves an unknown is not zero there, and one that does not has the
	// same value everywhere.
	r.setX(generic)
	r.rscale = make([]float64, r.m)
	for i, eq := range r.eqs {
		q := 0.0
		for _, t := range terms(eq.Eq.RHS, terms(eq.Eq.LHS, nil)) {
			v, err := r.env.EvalKeyed(t, r.loc, nil)
			if s, isS := v.(*expr.Scalar); err == nil && isS && s.IsFinite() {
				q = math.Max(q, cmplx.Abs(s.Z))
			}
		}
		if !(q > 0) || math.IsInf(q, 0) {
			q = 1
		}
		r.rscale[r.row[i]] = q
		if !eq.RealValued {
			r.rscale[r.row[i]+1] = q
		}
	}
	return true
}

// genericFactor is the multiple of its scale by which unknown k departs
// from the starting point at the generic point: 0.5 + frac((k+1)·a), in
// [0.5, 1.5), different for neighbouring unknowns (a irrational).
func genericFactor(k int, a float64) float64 {
	_, f := math.Modf(float64(k+1) * a)
	return 0.5 + f
}

// isRealDiff reports whether lhs − rhs is real: its imaginary part is at
// most RealTol of the larger side.
func isRealDiff(l, r expr.Scalar) bool {
	d := imag(l.Z - r.Z)
	return math.Abs(d) <= RealTol*math.Max(cmplx.Abs(l.Z), cmplx.Abs(r.Z))
}

// terms appends the top-level terms of a sum: a + b − c gives a, b, c.
func terms(n expr.Node, out []expr.Node) []expr.Node {
	switch x := n.(type) {
	case *expr.Binary:
		if x.Op == expr.ADD || x.Op == expr.SUB {
			return terms(x.Y, terms(x.X, out))
		}
	case *expr.Paren:
		return terms(x.X, out)
	case *expr.Unary:
		return terms(x.X, out)
	}
	return append(out, n)
}

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

func (r *solveRun) problem(x0, rscale []float64) *solve.Problem {
	return &solve.Problem{
		N: r.n, M: r.m, Residual: r.residual,
		X0: x0, XScale: r.xscale, RScale: rscale, Complex: r.pairs,
	}
}

// coreFailed turns an error of the solver core into a positioned error in
// plain words. It returns false.
func (r *solveRun) coreFailed(err error) bool {
	var (
		se *solve.SingularError
		ne *solve.NoConvergenceError
		ee *solve.EvalError
		de *solve.DimensionError
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
		v := &expr.Scalar{Dim: u.Dim, Angle: u.Angle, Z: complex(x[c], 0)}
		if !u.Real {
			v.Z = complex(x[c], x[c+1])
		}
		s = append(s, u.Name+" = "+expr.Describe(v))
	}
	return strings.Join(s, ", ")
}

// singular words a SingularError: the equations that depend on each other
// and the unknowns no equation determines.
func (r *solveRun) singular(se *solve.SingularError) {
	if se.Contradiction != nil {
		r.contradiction(se)
		return
	}
	var msg strings.Builder
	if se.ZeroPivot || math.IsInf(se.Cond, 1) {
		msg.WriteString("the equations do not determine the unknowns: the matrix of the set is singular")
	} else {
		fmt.Fprintf(&msg, "the equations nearly depend on each other: the condition number of the set's matrix, %.3g, exceeds %.0e, so a solution would not be reliable", se.Cond, float64(solve.CondLimit))
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
func (r *solveRun) noConvergence(ne *solve.NoConvergenceError) {
	var reason string
	switch {
	case strings.HasPrefix(ne.Reason, "iteration limit"):
		reason = fmt.Sprintf("the iteration limit of %d iterations was reached", solve.MaxIterations)
	case strings.HasPrefix(ne.Reason, "no step reduces"):
		reason = "no step brings the equations closer to balance: the iteration is stuck at a point that is not a solution, so the set may have no solution, or the starting point is too far from one"
	case strings.HasPrefix(ne.Reason, "the Jacobian"):
		reason = "the equations could not be evaluated near the last iterate"
		var xe *expr.Error
		if errors.As(ne.Err, &xe) {
			reason += " (" + xe.Msg + ")"
		}
	default:
		reason = ne.Reason
	}
	msg := fmt.Sprintf("no solution found: %s; after %d iteration%s the scaled residual is %.3g (the tolerance is %.0e)", reason, ne.Iterations, plural(ne.Iterations), ne.ResidualNorm, solve.ResidualTol)
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
