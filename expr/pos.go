package expr

import (
	"fmt"
	"sort"
	"strings"
)

// Pos is a position in a source file: a line and a column, both counting
// from 1. The column counts characters (runes), not bytes. The zero Pos is
// "no position".
type Pos struct {
	Line, Col int
}

// IsValid reports whether p names a real position.
func (p Pos) IsValid() bool { return p.Line > 0 }

// Before reports whether p comes strictly before q.
func (p Pos) Before(q Pos) bool {
	return p.Line < q.Line || (p.Line == q.Line && p.Col < q.Col)
}

func (p Pos) String() string {
	if !p.IsValid() {
		return "-"
	}
	return fmt.Sprintf("%d:%d", p.Line, p.Col)
}

// Error is one problem found in a document, at a position, in words an
// engineer understands. Fix, where not empty, says how to put it right.
type Error struct {
	Pos Pos
	Msg string
}

func (e *Error) Error() string {
	if e.Pos.IsValid() {
		return e.Pos.String() + ": " + e.Msg
	}
	return e.Msg
}

// Errorf makes an *Error at pos.
func Errorf(pos Pos, format string, args ...any) *Error {
	return &Error{Pos: pos, Msg: fmt.Sprintf(format, args...)}
}

// ErrorList is a list of errors, sorted by position with Sort.
type ErrorList []*Error

// MaxErrors is the largest number of errors a list takes through Add, so
// that one reading (of a block, an expression or the front matter) of a
// long line of characters outside the language costs no more than its
// length and is reported on a sheet of a readable size.
const MaxErrors = 100

// Add appends an error to a list of fewer than MaxErrors errors (however
// they were put there). The error that would be the list's MaxErrors+1st
// is replaced by one, at its position, saying that the rest are not
// reported; later ones are dropped.
func (l *ErrorList) Add(pos Pos, msg string) {
	switch n := len(*l); {
	case n < MaxErrors:
		*l = append(*l, &Error{Pos: pos, Msg: msg})
	case n == MaxErrors:
		*l = append(*l, &Error{Pos: pos, Msg: fmt.Sprintf("more than %d errors here: the rest are not reported (correct these first)", MaxErrors)})
	}
}

// Sort orders the list by position; errors at the same position keep their order.
func (l ErrorList) Sort() {
	sort.SliceStable(l, func(i, j int) bool { return l[i].Pos.Before(l[j].Pos) })
}

// Err returns the list as an error, or nil when it is empty.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	return l
}

func (l ErrorList) Error() string {
	var b strings.Builder
	for i, e := range l {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(e.Error())
	}
	return b.String()
}
