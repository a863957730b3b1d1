package expr

import (
	"fmt"
	"strconv"
	"strings"
	"sync/atomic"
)

// DefaultBudget is the work one document may spend on evaluation, in work
// units (see Budget). It is chosen so that the slowest kind of unit
// measured on a 2-core machine (docs/robustness.md, "Work budget") keeps a
// document within a few seconds of evaluation.
const DefaultBudget = 100_000_000

// Budget is the evaluation work a document may still spend. One budget is
// shared by everything a document evaluates (calc lines, sweep points,
// solve residuals, inline values), through the Env that carries it.
//
// A work unit is about one complex multiply-add of a matrix product (A·B
// costs rows·columns·inner length, twice with its residue bound; inv and
// det of an n×n matrix n³ or 2n³). A node evaluated costs NodeWork, a
// user-function call CallWork more, an entry of a matrix value made or
// checked EntryWork, each local name handed to EvalWith LocalWork, each
// sweep line at a point and each side of an equation at a trial point
// KeyedWork (EvalKeyed).
// The work is charged before it is done where it is known beforehand, so
// an operation that would go over the budget is refused, not run.
type Budget struct {
	Limit int64 // the units the document may spend
	spent int64
	over  *Error // the error at the place the budget ran out

	// the current line (statement, block or inline value): where it
	// starts, what it is called and what had been spent when it started
	markPos  Pos
	markWhat string
	markAt   int64

	stopped atomic.Bool // set by Stop, from any goroutine
}

// Stop makes every later charge fail with a "not evaluated: the
// evaluation was stopped" error, so that an evaluation no longer wanted (a
// preview whose document was saved again) ends within a few steps. It may
// be called from any goroutine.
func (b *Budget) Stop() {
	if b != nil {
		b.stopped.Store(true)
	}
}

// Stopped reports whether Stop was called.
func (b *Budget) Stopped() bool { return b != nil && b.stopped.Load() }

// NewBudget returns a budget of limit units.
func NewBudget(limit int64) *Budget { return &Budget{Limit: limit} }

// Spent is the work spent so far.
func (b *Budget) Spent() int64 {
	if b == nil {
		return 0
	}
	return b.spent
}

// Over returns the error at the place the budget ran out, or nil while
// there is budget left.
func (b *Budget) Over() *Error {
	if b == nil {
		return nil
	}
	return b.over
}

// Begin marks the start of the work of one line, so that the error of a
// budget spent during it can say what the line spent. what names the line
// ("line", "sweep block", "solve block", "inline value").
func (b *Budget) Begin(pos Pos, what string) {
	if b == nil {
		return
	}
	b.markPos, b.markWhat, b.markAt = pos, what, b.spent
}

// Charge spends n units for work at pos. It returns nil when the budget
// holds them. The first charge that does not fit returns the error that
// says so (and which line spent what); every later charge returns a short
// "not evaluated" error that points back at it.
func (b *Budget) Charge(n int64, pos Pos) *Error {
	if b == nil {
		return nil
	}
	if b.over != nil {
		return Errorf(pos, notEvaluated+"at line %d (see the error there)", b.over.Pos.Line())
	}
	if b.stopped.Load() {
		return Errorf(pos, "not evaluated: the evaluation was stopped")
	}
	if n < 0 || b.spent+n > b.Limit || b.spent+n < b.spent {
		line, what := b.spent-b.markAt, b.markWhat
		if what == "" {
			what = "line"
		}
		at := ""
		if b.markPos.IsValid() && b.markPos.Line() != pos.Line() {
			at = fmt.Sprintf(" (from line %d)", b.markPos.Line())
		}
		b.over = Errorf(pos, "the document's work budget of %s units is spent here: this %s%s had used %s units and asked for %s more; the lines above it used %s. "+
			"Split the work: put heavy sweeps, solves or matrix products in documents of their own (one document can use the values of another), or use fewer sweep points, smaller matrices or fewer nested function calls",
			groupDigits(b.Limit), what, at, groupDigits(line), groupDigits(n), groupDigits(b.markAt))
		return b.over
	}
	b.spent += n
	return nil
}

// notEvaluated starts the error of every evaluation after the budget ran
// out.
const notEvaluated = "not evaluated: the document's work budget was spent "

// Owns reports whether err is the budget's error: the one where it ran out
// or one of the "not evaluated" errors after it. A block kind reports such
// an error as it is, not as a failure of its own (a solve block does not
// ask for other starting values).
func (b *Budget) Owns(err error) bool {
	e, ok := err.(*Error)
	if !ok || b == nil || b.over == nil {
		return false
	}
	return e == b.over || strings.HasPrefix(e.Msg, notEvaluated)
}

// TryCharge spends n units if the budget holds them and reports whether it
// did; it never marks the budget as spent. It is for optional work, such
// as looking for a name to suggest in an error message.
func (b *Budget) TryCharge(n int64) bool {
	if b == nil {
		return true
	}
	if b.over != nil || n < 0 || b.spent+n > b.Limit {
		return false
	}
	b.spent += n
	return true
}

// groupDigits writes n with thin groups of three digits: 200,000,000.
func groupDigits(n int64) string {
	s := strconv.FormatInt(n, 10)
	neg := ""
	if n < 0 {
		neg, s = "-", s[1:]
	}
	var out []byte
	for i := range len(s) {
		if i > 0 && (len(s)-i)%3 == 0 {
			out = append(out, ',')
		}
		out = append(out, s[i])
	}
	return neg + string(out)
}

// entries is the number of entries a value holds (1 for a scalar).
func entries(v Value) int64 {
	if m, ok := v.(*Matrix); ok {
		return int64(len(m.E))
	}
	return 1
}

// productWork is the work of a matrix product x·y beyond the entries of
// its result: rows·columns·inner length multiply-adds, twice (the value
// and its rounding-residue bound, residue.go). It is 0 for other
// operations, whose work is the entries they make.
func productWork(n *Binary, x, y Value) int64 {
	a, ok1 := x.(*Matrix)
	b, ok2 := y.(*Matrix)
	if n.Op != MUL || !ok1 || !ok2 || a.Cols != b.Rows || a.Rows*b.Cols > MaxMatrixEntries {
		return 0
	}
	return 2 * int64(a.Rows) * int64(b.Cols) * int64(a.Cols)
}

// builtinWork is the work of a built-in function call: n³ for det of an
// n×n matrix and 2n³ for inv (the factorisation, the inverse and its
// residue bound), else one unit for each entry of the arguments.
func builtinWork(key string, args []Value) int64 {
	var w int64
	for _, a := range args {
		w += EntryWork * entries(a)
	}
	if m, ok := args[0].(*Matrix); ok && m.Rows == m.Cols && (key == "inv" || key == "det") {
		n := int64(m.Rows)
		if key == "inv" {
			return w + 2*n*n*n
		}
		return w + n*n*n
	}
	return w
}

// The weights of the work units, measured against one complex
// multiply-add of a matrix product (BenchmarkWorkUnit).
const (
	// NodeWork is the work of evaluating one node of an expression
	// (checking its value, its unit and its kind).
	NodeWork = 10
	// CallWork is the extra work of calling a user function.
	CallWork = 10
	// EntryWork is the work of making or checking one entry of a matrix.
	EntryWork = 2
	// LocalWork is the work of handing one local name to EvalWith.
	LocalWork = 4
	// KeyedWork is the work of one EvalKeyed call beyond its expression
	// (a sweep line at one point, a side of an equation at one trial
	// point).
	KeyedWork = 50
	// suggestWork is the work of comparing a name with one other name
	// when looking for a suggestion (an edit distance of short words).
	suggestWork = 20
)
