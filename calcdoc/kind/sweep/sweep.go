package sweep

import (
	"math"
	"math/cmplx"
	"sort"
	"strconv"
	"strings"
	"unicode"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// Limits of a sweep block.
const (
	// DefaultSweepPoints is the number of points when the header names none.
	DefaultSweepPoints = 50
	// MaxSweepPoints is the largest number of points a sweep may ask for.
	MaxSweepPoints = 10000
	// SweepTableRows is the number of evenly spread rows the sheet's table
	// aims at; the first and last point and each line's extremes and first
	// gap are added to them (see Sweep.TableRows).
	SweepTableRows = 15
)

// Sweep is what a `sweep` block holds once evaluated: the header, the
// grid of points and every line's value at each point.
type Sweep struct {
	Var    string   // the sweep variable
	VarPos expr.Pos // where it is written
	// Start and Stop are the ends of the range; Log is set for points
	// spaced evenly on a logarithmic scale; N is the number of points.
	Start, Stop *expr.Scalar
	Log         bool
	N           int
	// Dim and Angle are the sweep variable's dimension and whether it is a
	// plane angle (from Start).
	Dim   expr.Dim
	Angle bool
	// Kind is the power kind of a power sweep variable: that of Start and
	// Stop when they agree, else none.
	Kind expr.PowerKind
	// AbsTemp marks an absolute temperature (°C, LANGUAGE.md section 4),
	// shown and plotted in °C.
	AbsTemp bool
	// X holds the points in coherent SI units (radians for an angle):
	// X[i] = Start + (Stop − Start)·i/(N − 1), or with Log
	// X[i] = Start·(Stop/Start)^(i/(N − 1)); X[0] and X[N−1] are exactly
	// Start and Stop. X is nil when the header has an error.
	X     []float64
	Lines []*SweepLine
	// Unavailable is set when the range uses a name whose definition
	// failed: the block is not evaluated, and that is not a new error.
	Unavailable *expr.UnavailableError
	// Case names the case of a sweep whose lines read a value with cases
	// (LANGUAGE.md section 10), else ""; CaseSweeps are the same sweep
	// worked in each other case, in the document's order (cases.go).
	Case       string
	CaseSweeps []*Sweep
}

// SweepLine is one line of a sweep block.
type SweepLine struct {
	Stmt expr.Stmt // *expr.Assign, *expr.ExprStmt, *expr.Note, or another statement (an error)
	Text string    // the source text of the line
	// Name is the name an assignment defines (local to the block), "" for
	// a bare expression or a note.
	Name    string
	X       expr.Node     // the expression; nil for a note or a rejected statement
	Display *expr.Display // the display bracket, or nil
	// Plotted is set for an assignment or a bare expression: the lines
	// that have a table column and a plot.
	Plotted bool
	// Dim and Angle are the dimension and angle flag of the line's value
	// (from its first point with a value); Complex is set when the value
	// has a non-negligible imaginary part at some point.
	Dim     expr.Dim
	Angle   bool
	Complex bool
	// Kind is the power kind of a power line (IEEE 1459): apparent when
	// Complex, else the first kind known at a point (a display bracket in
	// W, var or VA sets it on a computed power).
	Kind expr.PowerKind
	// AbsTemp marks an absolute temperature (°C, LANGUAGE.md section 4),
	// shown and plotted in °C.
	AbsTemp bool
	// Z holds the value at each point in coherent SI units; NaN (both
	// parts) where the line has no value: a gap.
	Z []complex128
	// Gaps counts the points without a value; GapErr is the first
	// evaluation error at a point (an operation that overflows or is
	// undefined there is such an error, at its operator; GapErr is nil
	// only when every gap follows from a gap in a line above) and GapAt
	// its point's index.
	Gaps   int
	GapErr error
	GapAt  int
	// Errs are the line's errors (parse, statement and evaluation errors
	// that hold at every point); Unavailable is set instead when it uses a
	// name whose definition failed.
	Errs        []*expr.Error
	Unavailable *expr.UnavailableError
	deps        []int    // indices of earlier lines whose names it uses
	depNames    []string // the names, parallel to deps

	// Sense holds the sense of a power factor at each point (nil when no
	// point's value is one), so that the table and the values show
	// powerfactor(S) with its "lagging" or "leading" (see At).
	Sense []expr.PFSense
}

// OK reports whether the line has a value at some point.
func (l *SweepLine) OK() bool {
	return l.Plotted && len(l.Errs) == 0 && l.Unavailable == nil && l.Gaps < len(l.Z)
}

// Plot returns the quantity the sheet plots and whose extremes its table
// shows, at point i: |Z| for a complex line, the value re Z for a real
// one; NaN at a gap.
func (l *SweepLine) Plot(i int) float64 {
	z := l.Z[i]
	if cmplx.IsNaN(z) {
		return math.NaN()
	}
	if l.Complex {
		return cmplx.Abs(z)
	}
	return real(z)
}

// Extremes returns the indices of the smallest and largest Plot value
// (the first of equal ones), or -1, -1 when the line has no value.
func (l *SweepLine) Extremes() (lo, hi int) {
	lo, hi = -1, -1
	for i := range l.Z {
		v := l.Plot(i)
		if math.IsNaN(v) {
			continue
		}
		if lo < 0 || v < l.Plot(lo) {
			lo = i
		}
		if hi < 0 || v > l.Plot(hi) {
			hi = i
		}
	}
	return lo, hi
}

// FirstGap returns the index of the line's first gap, or -1.
func (l *SweepLine) FirstGap() int {
	for i, z := range l.Z {
		if cmplx.IsNaN(z) {
			return i
		}
	}
	return -1
}

// TableRows returns the indices of the points the sheet's table shows, in
// increasing order: every point when there are at most SweepTableRows+5;
// otherwise SweepTableRows points spread evenly (index round(k·(N−1)/(M−1)),
// k = 0 … M−1, M = SweepTableRows, so the first and the last are among
// them), and for each plotted line the points of its smallest and largest
// Plot value and its first gap.
func (s *Sweep) TableRows() []int {
	n := len(s.X)
	if n == 0 {
		return nil
	}
	if n <= SweepTableRows+5 {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	set := map[int]bool{}
	m := SweepTableRows
	for k := 0; k < m; k++ {
		set[int(math.Round(float64(k)*float64(n-1)/float64(m-1)))] = true
	}
	for _, l := range s.Lines {
		if !l.Plotted || l.Z == nil {
			continue
		}
		lo, hi := l.Extremes()
		for _, i := range []int{lo, hi, l.FirstGap()} {
			if i >= 0 {
				set[i] = true
			}
		}
	}
	out := make([]int, 0, len(set))
	for i := range set {
		out = append(out, i)
	}
	sort.Ints(out)
	return out
}

// isName reports whether s is a name: a letter, then letters, digits and _.
func isName(s string) bool {
	for i, r := range s {
		if !(unicode.IsLetter(r) || i > 0 && (r == '_' || r >= '0' && r <= '9')) {
			return false
		}
	}
	return s != ""
}

// sweepUsage is the header's form, quoted in header errors.
const sweepUsage = "write sweep NAME = START .. STOP, then optionally log and the number of points, e.g. sweep f = 10 Hz .. 100 kHz log 200"

// evalSweep evaluates a sweep block (LANGUAGE.md section 6).
func evalSweepOnce(b *calcdoc.Block) *Sweep {
	sw := &Sweep{}
	b.Result = sw
	headerOK := parseSweepHeader(b, sw)
	var errs expr.ErrorList
	stmts := expr.ParseBlock(b.Source(), expr.CalcMode, &errs)
	prepareSweepLines(b, sw, stmts, errs, headerOK)
	onlyNotes := true
	for _, l := range sw.Lines {
		if _, note := l.Stmt.(*expr.Note); !note {
			onlyNotes = false
		}
	}
	if onlyNotes && len(errs) == 0 {
		b.Errorf(b.InfoPos, "the sweep block has no line to evaluate: write one expression or assignment a line, e.g. Z = R + j*2*pi*%s*L", sw.Var)
	}
	if headerOK && sweepWork(b, sw) { // the work budget (sweepwork.go)
		runSweep(b, sw)
	}
	for _, l := range sw.Lines {
		b.Errors = append(b.Errors, l.Errs...)
	}
	return sw
}

// parseSweepHeader reads "NAME = START .. STOP [log] [N]" from b.Arg.
func parseSweepHeader(b *calcdoc.Block, sw *Sweep) bool {
	arg := b.Arg
	if strings.TrimSpace(arg) == "" {
		b.Errorf(b.InfoPos, "a sweep block needs its range after the word sweep: %s", sweepUsage)
		return false
	}
	eq := strings.IndexByte(arg, '=')
	if eq < 0 {
		b.Errorf(b.ArgPos, "the sweep header has no \"=\": %s", sweepUsage)
		return false
	}
	name := strings.TrimSpace(arg[:eq])
	sw.Var, sw.VarPos = name, b.ArgPos
	if !isName(name) {
		b.Errorf(b.ArgPos, "%q is not a name for the sweep variable (a letter, then letters, digits and _): %s", name, sweepUsage)
		return false
	}
	if msg := expr.NameProblem(name); msg != "" {
		b.Errorf(b.ArgPos, "%s", msg)
		return false
	}
	if err := b.Env().CanDefine(name, b.ArgPos); err != nil {
		b.Errorf(b.ArgPos, "the sweep variable must be a new name: %s", err.Msg)
		return false
	}
	restOff := eq + 1
	dd := strings.Index(arg[restOff:], "..")
	if dd < 0 {
		b.Errorf(b.ArgAt(restOff), "the sweep range has no \"..\" between its start and its stop: %s", sweepUsage)
		return false
	}
	startOff, stopOff := restOff, restOff+dd+2
	startText := arg[startOff : restOff+dd]
	stopText := arg[stopOff:]

	// trailing words: "log" and the number of points, in either order
	words := fieldsWithOffsets(stopText)
	nPos, nWord := expr.Pos{}, ""
	logSeen := false
	cut := len(stopText)
	for len(words) > 1 {
		w := words[len(words)-1]
		if w.text == "log" && !logSeen {
			logSeen = true
		} else if nWord == "" && looksNumeric(w.text) {
			// a number is the point count only when what is before it
			// reads as an expression (so "0 .. 2 * 5" stops at 10)
			before := w.off
			if k := len(words) - 2; !logSeen && words[k].text == "log" && k > 0 {
				before = words[k].off
			}
			if !parsesClean(stopText[:before], b.ArgAt(stopOff)) {
				break
			}
			nWord, nPos = w.text, b.ArgAt(stopOff+w.off)
		} else {
			break
		}
		cut = w.off
		words = words[:len(words)-1]
	}
	stopText = stopText[:cut]
	sw.Log = logSeen
	sw.N = DefaultSweepPoints
	if nWord != "" {
		n, err := strconv.Atoi(nWord)
		switch {
		case err != nil && allDigits(nWord):
			b.Errorf(nPos, "%s points is more than a sweep may have (at most %d)", nWord, MaxSweepPoints)
			return false
		case err != nil:
			b.Errorf(nPos, "the number of points must be a whole number from 2 to %d, not %s", MaxSweepPoints, nWord)
			return false
		case n < 2:
			b.Errorf(nPos, "a sweep needs at least 2 points, not %d", n)
			return false
		case n > MaxSweepPoints:
			b.Errorf(nPos, "%d points is more than a sweep may have (at most %d): use fewer points or a narrower range", n, MaxSweepPoints)
			return false
		}
		sw.N = n
	}

	start, ok1 := sweepEnd(b, sw, "start", startText, startOff)
	stop, ok2 := sweepEnd(b, sw, "stop", stopText, stopOff)
	if !ok1 || !ok2 {
		return false
	}
	sw.Start, sw.Stop = start.s, stop.s
	if start.s.Dim != stop.s.Dim {
		b.Errorf(stop.pos, "the start and the stop of the range differ in unit: %s is %s, %s is %s", expr.Describe(start.s), expr.DimWord(start.s.Dim), expr.Describe(stop.s), expr.DimWord(stop.s.Dim))
		return false
	}
	if start.s.AbsTemp != stop.s.AbsTemp {
		b.Errorf(stop.pos, "the start and the stop of the range are not both temperatures in °C or both differences: %s and %s (write both in °C, or both in K)", expr.Describe(start.s), expr.Describe(stop.s))
		return false
	}
	a, z := real(start.s.Z), real(stop.s.Z)
	if !(a < z) {
		b.Errorf(stop.pos, "the start of the range must be below its stop (start %s, stop %s)", expr.Describe(start.s), expr.Describe(stop.s))
		return false
	}
	if sw.Log && a <= 0 {
		b.Errorf(start.pos, "a log sweep needs a start above zero (start %s): start at a small positive value, or drop log", expr.Describe(start.s))
		return false
	}
	sw.Dim, sw.Angle, sw.AbsTemp = start.s.Dim, start.s.Angle || stop.s.Angle, start.s.AbsTemp
	if start.s.Kind == stop.s.Kind {
		sw.Kind = start.s.Kind
	}
	sw.X = sweepGrid(a, z, sw.N, sw.Log)
	for i := 1; i < len(sw.X); i++ {
		if !(sw.X[i] > sw.X[i-1]) {
			b.Errorf(stop.pos, "the range from %s to %s is too narrow for %d distinct points", expr.Describe(start.s), expr.Describe(stop.s), sw.N)
			sw.X = nil
			return false
		}
	}
	return true
}

// sweepGrid returns n points from a to z (n ≥ 2): a + (z − a)·i/(n − 1), or,
// when log, exp(ln a + (ln z − ln a)·i/(n − 1)); the ends are exactly a and z.
func sweepGrid(a, z float64, n int, log bool) []float64 {
	x := make([]float64, n)
	la, lz := math.Log(a), math.Log(z)
	for i := range x {
		t := float64(i) / float64(n-1)
		if log {
			x[i] = math.Exp(la + (lz-la)*t)
		} else {
			x[i] = a + (z-a)*t
		}
	}
	x[0], x[n-1] = a, z
	return x
}

type word struct {
	text string
	off  int
}

// fieldsWithOffsets splits s at spaces and tabs, keeping byte offsets.
func fieldsWithOffsets(s string) []word {
	var out []word
	start := -1
	for i := 0; i <= len(s); i++ {
		if i == len(s) || s[i] == ' ' || s[i] == '\t' {
			if start >= 0 {
				out = append(out, word{s[start:i], start})
				start = -1
			}
		} else if start < 0 {
			start = i
		}
	}
	return out
}

func allDigits(s string) bool {
	for _, r := range s {
		if r < '0' || r > '9' {
			return false
		}
	}
	return s != ""
}

// looksNumeric reports whether s is a plain decimal number: digits with an
// optional point and exponent (no sign, no unit).
func looksNumeric(s string) bool {
	if s == "" || s[0] < '0' || s[0] > '9' {
		return false
	}
	_, err := strconv.ParseFloat(s, 64)
	return err == nil || allDigits(s)
}

// parsesClean reports whether text is one expression without errors.
func parsesClean(text string, pos expr.Pos) bool {
	if strings.TrimSpace(text) == "" {
		return false
	}
	var errs expr.ErrorList
	_, d := expr.ParseExpr(expr.NewSource(text, pos), &errs)
	return len(errs) == 0 && d == nil
}

type sweepEndValue struct {
	s   *expr.Scalar
	pos expr.Pos
}

// sweepEnd parses and evaluates the start or stop of the range: text lies
// at byte offset off of b.Arg.
func sweepEnd(b *calcdoc.Block, sw *Sweep, what, text string, off int) (sweepEndValue, bool) {
	lead := len(text) - len(strings.TrimLeft(text, " \t"))
	pos := b.ArgAt(off + lead)
	text = strings.TrimSpace(text)
	if text == "" {
		b.Errorf(pos, "the sweep range has no %s: %s", what, sweepUsage)
		return sweepEndValue{}, false
	}
	var errs expr.ErrorList
	x, disp := expr.ParseExpr(expr.NewSource(text, pos), &errs)
	if len(errs) > 0 {
		b.Errors = append(b.Errors, errs...)
		return sweepEndValue{}, false
	}
	if disp != nil {
		b.Errorf(disp.Pos(), "the %s of a sweep takes no unit bracket: write the unit after the number, e.g. 10 kHz", what)
		return sweepEndValue{}, false
	}
	v, err := b.Env().Eval(x, nil)
	if err != nil {
		switch e := err.(type) {
		case *expr.Error:
			b.Errors = append(b.Errors, e)
		case *expr.UnavailableError:
			// not a new error: the failed definition has its own
			sw.Unavailable = e
		}
		return sweepEndValue{}, false
	}
	s, ok := v.(*expr.Scalar)
	switch {
	case !ok:
		b.Errorf(pos, "the %s of a sweep must be a single value, not %s", what, expr.Describe(v))
	case !s.IsFinite():
		b.Errorf(pos, "the %s of the sweep is not finite", what)
	case !s.IsReal():
		b.Errorf(pos, "the %s of a sweep must be real, not %s (use abs, re or im)", what, expr.Describe(s))
	default:
		return sweepEndValue{&expr.Scalar{Z: complex(real(s.Z), 0), Dim: s.Dim, Angle: s.Angle, AbsTemp: s.AbsTemp}, pos}, true
	}
	return sweepEndValue{}, false
}

// prepareSweepLines turns the parsed statements into lines, attaches
// parse errors, rejects statements a sweep does not take, checks the
// names the block defines and finds each line's dependencies.
func prepareSweepLines(b *calcdoc.Block, sw *Sweep, stmts []expr.Stmt, errs expr.ErrorList, headerOK bool) {
	per, rest := calcdoc.ErrorsOf(stmts, errs)
	local := map[string]int{} // name -> line index
	for k, s := range stmts {
		l := &SweepLine{Stmt: s, Text: b.Text(s.Pos(), s.End()), Errs: per[k]}
		idx := len(sw.Lines)
		sw.Lines = append(sw.Lines, l)
		switch st := s.(type) {
		case *expr.Note:
		case *expr.Assign:
			l.Plotted, l.Display = true, st.Display
			if len(st.Names) != 1 {
				l.Errs = append(l.Errs, expr.Errorf(st.Names[0].Pos(), "a sweep line assigns one name, not %d (the block plots single values)", len(st.Names)))
				for _, id := range st.Names {
					if local[id.Key] == 0 {
						local[id.Key] = idx + 1
					}
				}
				continue
			}
			id := st.Names[0]
			l.Name = id.Name
			switch {
			case headerOK && id.Key == expr.NameKey(sw.Var):
				l.Errs = append(l.Errs, expr.Errorf(id.Pos(), "%q is the sweep variable: choose another name", id.Name))
			case local[id.Key] > 0:
				l.Errs = append(l.Errs, expr.Errorf(id.Pos(), "%q is already defined in this block at line %d: each name is defined once", id.Name, sw.Lines[local[id.Key]-1].Stmt.Pos().Line()))
			default:
				if err := b.Env().CanDefine(id.Name, id.Pos()); err != nil {
					l.Errs = append(l.Errs, err)
				}
			}
			if local[id.Key] == 0 {
				local[id.Key] = idx + 1
			}
			l.X = st.X
		case *expr.ExprStmt:
			l.Plotted, l.Display, l.X = true, st.Display, st.X
		case *expr.BadStmt:
			for _, id := range st.Names {
				if local[id.Key] == 0 {
					local[id.Key] = idx + 1
				}
			}
		case *expr.FuncDef:
			l.Errs = append(l.Errs, expr.Errorf(st.Pos(), "a sweep block takes no function definitions: define %s in a calc block above", st.Name.Name))
		case *expr.Check:
			l.Errs = append(l.Errs, expr.Errorf(st.Pos(), "a sweep block takes no checks: check a value of the sweep in a calc block (e.g. a value at one point, computed there)"))
		default:
			l.Errs = append(l.Errs, expr.Errorf(s.Pos(), "this statement is not allowed in a sweep block"))
		}
		if l.X != nil {
			seen := map[int]bool{}
			expr.Walk(l.X, func(n expr.Node) bool {
				var name, key string
				switch n := n.(type) {
				case *expr.Ident:
					name, key = n.Name, n.Key
				case *expr.Call:
					name, key = n.Fun.Name, n.Fun.Key
				}
				if k := local[key]; k > 0 && k-1 < idx && !seen[k-1] {
					seen[k-1] = true
					l.deps = append(l.deps, k-1)
					l.depNames = append(l.depNames, name)
				}
				return true
			})
		}
	}
	b.Errors = append(b.Errors, rest...)
}

// runSweep evaluates every line at every point. The sweep variable and the
// block's assignments are local names of the evaluation; nothing is
// defined in the document's names.
func runSweep(b *calcdoc.Block, sw *Sweep) {
	env := b.Env()
	n := len(sw.X)
	locals := make(map[string]expr.Value, len(sw.Lines)+1)
	bad := make([]bool, len(sw.Lines))
	// Each line's first point with a value, -1 until there is one; the
	// first error (at every point an error, it is the line's error).
	first := make([]int, len(sw.Lines))
	errPoints := make([]int, len(sw.Lines))
	firstErr := make([]error, len(sw.Lines))
	firstErrAt := make([]int, len(sw.Lines))
	// a line whose definition failed before evaluation counts as bad at
	// every point
	static := make([]bool, len(sw.Lines))
	for i, l := range sw.Lines {
		first[i] = -1
		if l.Plotted {
			l.Z = make([]complex128, n)
		}
		static[i] = !l.Plotted || len(l.Errs) > 0 || l.X == nil
		if _, note := l.Stmt.(*expr.Note); note {
			static[i] = false
		}
	}
	nan := complex(math.NaN(), math.NaN())
	for i, x := range sw.X {
		locals[expr.NameKey(sw.Var)] = &expr.Scalar{Z: complex(x, 0), Dim: sw.Dim, Angle: sw.Angle, Kind: sw.Kind, AbsTemp: sw.AbsTemp}
		for _, l := range sw.Lines {
			if l.Name != "" {
				delete(locals, expr.NameKey(l.Name))
			}
		}
		for li, l := range sw.Lines {
			bad[li] = false
			if !l.Plotted {
				bad[li] = static[li]
				continue
			}
			if static[li] {
				bad[li] = true
				l.Z[i] = nan
				l.Gaps++
				continue
			}
			dep := false
			for _, d := range l.deps {
				dep = dep || bad[d]
			}
			if dep {
				bad[li] = true
				l.Z[i] = nan
				l.Gaps++
				continue
			}
			v, err := env.EvalKeyed(l.X, locals, nil)
			var s *expr.Scalar
			if err == nil {
				var ok bool
				if s, ok = v.(*expr.Scalar); !ok {
					err = expr.Errorf(l.X.Pos(), "the value is %s: a sweep line must give a single value at each point", expr.Describe(v))
				} else if !s.IsFinite() {
					// the evaluator refuses non-finite results at their
					// operator; a value that still is not finite (a name
					// bound elsewhere) is an error at this point, never a
					// silent gap (LANGUAGE.md section 4)
					err = expr.Errorf(l.X.Pos(), "the value is not finite at this point")
				} else if first[li] >= 0 && s.Dim != l.Dim {
					err = expr.Errorf(l.X.Pos(), "the value changes unit across the sweep (%s here, %s at the first point)", expr.DimWord(s.Dim), expr.DimWord(l.Dim))
				} else if kv, kerr := expr.BracketKind(s, l.X, l.Display); kerr != nil {
					err = kerr
				} else {
					s = kv.(*expr.Scalar)
				}
			}
			if err != nil {
				if firstErr[li] == nil {
					firstErr[li], firstErrAt[li] = err, i
				}
				errPoints[li]++
				bad[li] = true
				l.Z[i] = nan
				l.Gaps++
				continue
			}
			if first[li] < 0 {
				first[li] = i
				l.Dim, l.Angle, l.Kind, l.AbsTemp = s.Dim, s.Angle, s.Kind, s.AbsTemp
				if derr := expr.CheckDisplay(s, l.Display); derr != nil {
					// a failed display unit defines nothing: the line has
					// no value at any point, and the lines that use it
					// are not evaluated (as in a calc block)
					l.Errs = append(l.Errs, expr.Errorf(l.Display.Pos(), "%s", derr.Error()))
					l.Display = nil
					static[li], bad[li] = true, true
					l.Z[i] = nan
					l.Gaps++
					continue
				}
			}
			if !s.IsReal() {
				l.Complex = true
				l.Kind = s.Kind
			} else if l.Kind == expr.PowerNone {
				l.Kind = s.Kind // a real power's kind may show only where it is complex upstream
			}
			l.Z[i] = s.Z
			if s.Sense != 0 {
				l.setSense(i, s.Sense)
			}
			if l.Name != "" {
				locals[expr.NameKey(l.Name)] = s
			}
		}
	}
	for li, l := range sw.Lines {
		if !l.Plotted || static[li] {
			continue
		}
		if errPoints[li] > 0 {
			l.GapErr, l.GapAt = firstErr[li], firstErrAt[li]
		}
		if first[li] >= 0 {
			continue
		}
		// no point has a value
		switch e := firstErr[li].(type) {
		case *expr.Error:
			l.Errs = append(l.Errs, e)
			continue
		case *expr.UnavailableError:
			l.Unavailable = e
			continue
		}
		if d, name := failedDep(sw, l); d != nil {
			l.Unavailable = &expr.UnavailableError{Pos: l.X.Pos(), Name: name, Def: d.Stmt.Pos()}
			continue
		}
		l.Errs = append(l.Errs, expr.Errorf(l.X.Pos(), "the value is not finite at any point of the sweep"))
	}
}

// failedDep returns the first line that l depends on and that has no
// value, with the name l uses of it.
func failedDep(sw *Sweep, l *SweepLine) (*SweepLine, string) {
	for k, d := range l.deps {
		if dl := sw.Lines[d]; !dl.OK() {
			return dl, l.depNames[k]
		}
	}
	return nil, ""
}
