package calcdoc

import (
	"sort"
	"strings"

	"calcdoc/expr"
)

// Stmt is one evaluated statement of a calc block.
type Stmt struct {
	Stmt expr.Stmt
	Res  *expr.Result
	// Errs are the statement's own errors (parse and evaluation).
	Errs []*expr.Error
	// Unavailable is set when the statement could not be evaluated because
	// it uses a name whose definition failed; it is not a new error.
	Unavailable *expr.UnavailableError
	Text        string // the statement's source text
	// Use is the evaluated use statement (uses.go), or nil.
	Use *Use
}

// Display is the display bracket of the statement, or nil.
func (s *Stmt) Display() *expr.Display {
	switch st := s.Stmt.(type) {
	case *expr.Assign:
		return st.Display
	case *expr.ExprStmt:
		return st.Display
	}
	return nil
}

// Text returns the source between two positions of the block.
func (b *Block) Text(from, to expr.Pos) string {
	if i, ok := b.lineOf(from, to); ok {
		// a span on one line: a piece of it, no copy
		start, line := b.LinePos[i].Off, b.Lines[i]
		lo := max(0, min(from.Off-start, len(line)))
		hi := max(lo, min(to.Off-start, len(line)))
		return line[lo:hi]
	}
	var parts []string
	// LinePos is in document order: start at the first line of the span
	// and stop after its last, so that each statement costs its own lines
	// only (a block of n statements costs n, not n²).
	first := sort.Search(len(b.LinePos), func(i int) bool { return b.LinePos[i].Off+len(b.Lines[i]) >= from.Off })
	for i := first; i < len(b.LinePos); i++ {
		start, line := b.LinePos[i].Off, b.Lines[i]
		if start > to.Off {
			break
		}
		lo := max(0, min(from.Off-start, len(line)))
		hi := max(lo, min(to.Off-start, len(line)))
		parts = append(parts, line[lo:hi])
	}
	return strings.Join(parts, "\n")
}

// lineOf finds the line that holds the whole of from..to, if one does.
func (b *Block) lineOf(from, to expr.Pos) (int, bool) {
	i := sort.Search(len(b.LinePos), func(i int) bool { return b.LinePos[i].Off+len(b.Lines[i]) >= from.Off })
	if i >= len(b.LinePos) {
		return 0, false
	}
	start := b.LinePos[i].Off
	if start > to.Off || to.Off > start+len(b.Lines[i]) {
		return 0, false
	}
	// the next line must not start inside the span either
	if i+1 < len(b.LinePos) && b.LinePos[i+1].Off <= to.Off {
		return 0, false
	}
	return i, true
}

// EvalStatements runs parsed statements of a block in its environment and
// records values, checks and errors. Parse errors in errs are attached to
// the statements they fall in.
func EvalStatements(b *Block, stmts []expr.Stmt, errs expr.ErrorList) []*Stmt {
	var out []*Stmt
	var per [][]*expr.Error
	var rest []*expr.Error
	if len(errs) > 0 {
		per, rest = ErrorsOf(stmts, errs)
	}
	// the statements, their named values and check records in one
	// allocation each for the block
	var sts []Stmt
	var named []NamedValue
	var checks []CheckRecord
	if len(stmts) > 0 {
		out = make([]*Stmt, 0, len(stmts))
		sts = make([]Stmt, len(stmts))
		nv, nc := 0, 0
		for _, s := range stmts {
			switch s := s.(type) {
			case *expr.Assign:
				nv += len(s.Names)
			case *expr.Check:
				nc++
			}
		}
		named, checks = make([]NamedValue, 0, nv), make([]CheckRecord, 0, nc)
	}
	for k, s := range stmts {
		st := &sts[k]
		*st = Stmt{Stmt: s, Text: b.Text(s.Pos(), s.End())}
		if per != nil {
			st.Errs = per[k]
		}
		if u, ok := s.(*expr.Use); ok {
			st.Res = &expr.Result{Stmt: s, Trace: &expr.Trace{}}
			evalUse(b, u, st)
			b.Errors = append(b.Errors, st.Errs...)
			out = append(out, st)
			continue
		}
		st.Res = b.Env().Exec(s)
		if err := st.Res.Err; err != nil {
			switch e := err.(type) {
			case *expr.UnavailableError:
				st.Unavailable = e
			case *expr.Error:
				st.Errs = append(st.Errs, e)
			}
		}
		switch s := s.(type) {
		case *expr.Assign:
			if st.Res.Value != nil {
				if len(s.Names) == 1 {
					// a value of a one-name line is the binding Exec defined,
					// with the display it chose (includes the unit a literal is
					// written in): no look-up of the name again
					disp := st.Res.Display
					named = append(named, NamedValue{Name: s.Names[0].Name, Pos: s.Names[0].Pos(), Value: st.Res.Value, Display: disp, Cases: st.Res.Cases})
					b.AddValue(&named[len(named)-1])
				} else if m, ok := st.Res.Value.(*expr.Matrix); ok && len(m.E) == len(s.Names) {
					for i, id := range s.Names {
						e := m.E[i]
						var cases []expr.Value
						if bd := b.Env().Lookup(id.Name); bd != nil {
							cases = bd.Cases
						}
						named = append(named, NamedValue{Name: id.Name, Pos: id.Pos(), Value: &e, Display: s.Display, Cases: cases})
						b.AddValue(&named[len(named)-1])
					}
				}
			}
		case *expr.Check:
			checks = append(checks, CheckRecord{Pos: s.Pos(), Text: b.Text(s.Cmp.Pos(), s.Cmp.End()), Result: st.Res.Check, Cases: st.Res.CaseChecks, Governing: st.Res.Governing})
			rec := &checks[len(checks)-1]
			for _, err := range st.Res.CaseErrs {
				rec.NoVerdict = append(rec.NoVerdict, err != nil)
			}
			b.AddCheck(rec)
		}
		b.Errors = append(b.Errors, st.Errs...)
		out = append(out, st)
	}
	b.Errors = append(b.Errors, rest...)
	return out
}

// ErrorsOf hands each error of errs to the first statement whose lines
// hold it: per[k] are the errors of stmts[k], in the order of errs, and
// rest those on no statement's lines. The errors are found by line, so n
// statements and m errors cost O((n + m)·log m), not n·m.
func ErrorsOf(stmts []expr.Stmt, errs expr.ErrorList) (per [][]*expr.Error, rest []*expr.Error) {
	byLine := make([]int, len(errs))
	for i := range byLine {
		byLine[i] = i
	}
	sort.SliceStable(byLine, func(i, j int) bool { return errs[byLine[i]].Pos.Line() < errs[byLine[j]].Pos.Line() })
	attached := make([]bool, len(errs))
	per = make([][]*expr.Error, len(stmts))
	var mine []int
	for k, s := range stmts {
		mine = mine[:0]
		j := sort.Search(len(byLine), func(j int) bool { return errs[byLine[j]].Pos.Line() >= s.Pos().Line() })
		for ; j < len(byLine) && errs[byLine[j]].Pos.Line() <= s.End().Line(); j++ {
			if !attached[byLine[j]] {
				mine = append(mine, byLine[j])
			}
		}
		sort.Ints(mine)
		for _, i := range mine {
			per[k] = append(per[k], errs[i])
			attached[i] = true
		}
	}
	for i, e := range errs {
		if !attached[i] {
			rest = append(rest, e)
		}
	}
	return per, rest
}
