package calcdoc

import (
	"fmt"
	"path"
	"strings"

	"calcdoc/expr"
)

// UsedValue is one value a sheet offers to the use statements of others:
// its name, the line of its definition, the value (unit, power kind, angle
// and temperature marks included) and the display its line chose.
type UsedValue struct {
	Name    string
	Line    int
	Value   expr.Value
	Display *expr.Display
	// Cases is the value in each of the sheet's cases (Sheet.Cases) for a
	// value that depends on a case, else nil.
	Cases []expr.Value
}

// Sheet is a document as a use statement sees it: where it is, the
// SHA-256 of its source, its title block, its values, and its first error.
type Sheet struct {
	Path     string // the path it was read from, as the user's paths run
	SHA256   string
	Number   string
	Revision string
	Title    string
	Values   []*UsedValue
	// Errors counts the sheet's errors; FirstError is the first, as
	// "line L:C: message", or "".
	Errors     int
	FirstError string
	// Funcs are the names of its user functions (which cannot be used).
	Funcs []string
	// Cases names the sheet's cases (its front matter), or nil.
	Cases []string
	// Doc is the evaluated document, or nil when the sheet was read back
	// from the records a built sheet carries (verify).
	Doc *Document

	byKey map[string]*UsedValue
}

// Lookup returns the value of name, or nil. A sheet is shared by the
// goroutines of a build: Lookup only reads (index builds the map once,
// before the sheet is handed out).
func (s *Sheet) Lookup(name string) *UsedValue {
	key := expr.NameKey(name)
	if s.byKey != nil {
		return s.byKey[key]
	}
	for _, v := range s.Values {
		if expr.NameKey(v.Name) == key {
			return v
		}
	}
	return nil
}

// index builds the map Lookup reads.
func (s *Sheet) index() *Sheet {
	s.byKey = make(map[string]*UsedValue, len(s.Values))
	for _, v := range s.Values {
		s.byKey[expr.NameKey(v.Name)] = v
	}
	return s
}

// SheetOf is the sheet a document offers to use statements.
func SheetOf(d *Document) *Sheet {
	s := &Sheet{Path: d.Path, SHA256: d.SourceSHA256(), Number: d.Front.Number, Revision: d.Front.Revision, Title: d.Front.Title, Errors: len(d.Errors), Doc: d}
	if len(d.Errors) > 0 {
		s.FirstError = "line " + d.Errors[0].Pos.String() + ": " + d.Errors[0].Msg
	}
	for _, v := range d.Values {
		s.Values = append(s.Values, &UsedValue{Name: v.Name, Line: v.Pos.Line(), Value: v.Value, Display: v.Display, Cases: v.Cases})
	}
	s.Cases = d.Front.Cases
	s.Funcs = append(s.Funcs, d.Env.FuncNames()...)
	return s.index()
}

// Sheets gives the documents that use statements name. A Loader reads and
// evaluates them from files; verify gives the records a sheet carries.
type Sheets interface {
	// Sheet returns the sheet that the document from names by rel (as
	// written after from), or an error saying what is wrong and how to
	// put it right (without a position: the caller places it).
	Sheet(from *Document, rel string) (*Sheet, error)
}

// Use is one use statement of a document, as evaluated.
type Use struct {
	Pos  expr.Pos // the statement
	Rel  string   // the path as written
	Link string   // the used sheet's HTML relative to this one's (as build places them)
	// Sheet is the used sheet, or nil when it could not be had.
	Sheet *Sheet
	Names []*UseBinding

	err string // why the sheet could not be had
}

// UseBinding is one name a use statement defines: Local in this
// document, Name in the other, Value its value there (nil on an error).
type UseBinding struct {
	Local string
	Name  string
	Pos   expr.Pos
	Value *UsedValue
}

// HTMLLink is the relative link from a sheet to the sheet of the document
// that it names by rel: build writes NAME.html for NAME.md and keeps the
// paths relative to the folder given, so the link is the path with .md
// replaced by .html.
func HTMLLink(rel string) string {
	p := path.Clean(strings.ReplaceAll(rel, `\`, "/"))
	return strings.TrimSuffix(p, ".md") + ".html"
}

// evalUse evaluates a use statement in the block's document: it asks the
// document's sheets for the other document and defines each name it takes
// as an input of this one, with the value, display and marks it has there.
// Every failure is an error at the statement (the path or the name), and
// the names it would define are defined as unavailable.
func evalUse(b *Block, s *expr.Use, st *Stmt) {
	d := b.doc
	u := &Use{Pos: s.Pos(), Rel: s.Path, Link: HTMLLink(s.Path)}
	st.Use = u
	d.Uses = append(d.Uses, u)
	env := b.Env()
	unavailable := func(cause expr.Pos) {
		for _, n := range s.Names {
			id := n.Local()
			if env.CanDefine(id.Name, id.Pos()) == nil {
				env.Define(&expr.Binding{Name: id.Name, Pos: id.Pos(), Unavailable: true, Cause: cause})
			}
		}
	}
	fail := func(pos expr.Pos, format string, args ...any) {
		st.Errs = append(st.Errs, expr.Errorf(pos, format, args...))
	}
	if d.sheets == nil {
		fail(s.PathPos, "this document cannot use other sheets here: no sheets are available to read %s from", s.Path)
		unavailable(s.Pos())
		return
	}
	sh, err := d.sheets.Sheet(d, s.Path)
	if err != nil {
		u.err = err.Error()
		fail(s.PathPos, "%s", err.Error())
		unavailable(s.Pos())
		return
	}
	u.Sheet = sh
	if sh.Errors > 0 {
		first := ""
		if sh.FirstError != "" {
			first = ", the first at " + sh.FirstError
		}
		fail(s.PathPos, "%s has %d error%s%s: correct that sheet first, then this one", s.Path, sh.Errors, pluralS(sh.Errors), first)
		unavailable(s.Pos())
		return
	}
	for _, n := range s.Names {
		id := n.Local()
		bind := &UseBinding{Local: id.Name, Name: n.Name.Name, Pos: n.Name.Pos()}
		u.Names = append(u.Names, bind)
		v := sh.Lookup(n.Name.Name)
		if v == nil {
			fail(n.Name.Pos(), "%s", notDefinedIn(n.Name.Name, s.Path, sh))
			env.Define(&expr.Binding{Name: id.Name, Pos: id.Pos(), Unavailable: true, Cause: n.Name.Pos()})
			continue
		}
		if err := env.CanDefine(id.Name, id.Pos()); err != nil {
			st.Errs = append(st.Errs, err)
			continue
		}
		val, cases, msg := useCase(n, v, sh, s.Path, d.Front.Cases)
		if msg != "" {
			pos := n.Name.Pos()
			if n.Case != nil {
				pos = n.Case.Pos()
			}
			fail(pos, "%s", msg)
			env.Define(&expr.Binding{Name: id.Name, Pos: id.Pos(), Unavailable: true, Cause: pos})
			continue
		}
		bind.Value = v
		env.Define(&expr.Binding{Name: id.Name, Value: val, Pos: id.Pos(), Display: v.Display, Cases: cases})
		b.AddValue(&NamedValue{Name: id.Name, Pos: id.Pos(), Value: val, Display: v.Display, Cases: cases})
	}
}

// notDefinedIn says that a sheet defines no such name, suggesting the
// nearest of its names.
func notDefinedIn(name, rel string, sh *Sheet) string {
	for _, f := range sh.Funcs {
		if expr.NameKey(f) == expr.NameKey(name) {
			return fmt.Sprintf("%s is a function in %s: only values can be used (define the value there, or the function here)", name, rel)
		}
	}
	best, bestD := "", 1<<30
	for _, v := range sh.Values {
		if dd := nameDistance(name, v.Name); dd < bestD {
			best, bestD = v.Name, dd
		}
	}
	msg := fmt.Sprintf("%s does not define %q", rel, name)
	switch {
	case best != "" && bestD <= max(2, len([]rune(name))/2):
		msg += fmt.Sprintf(": did you mean %q (line %d there)?", best, sh.Lookup(best).Line)
	case len(sh.Values) == 0:
		msg += ": it defines no values"
	default:
		var names []string
		for i, v := range sh.Values {
			if i == 8 {
				names = append(names, "…")
				break
			}
			names = append(names, v.Name)
		}
		msg += ": it defines " + strings.Join(names, ", ")
	}
	return msg
}

// nameDistance is the edit distance (Levenshtein) of two names, counted
// in characters.
func nameDistance(a, b string) int {
	x, y := []rune(a), []rune(b)
	prev := make([]int, len(y)+1)
	cur := make([]int, len(y)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(x); i++ {
		cur[0] = i
		for j := 1; j <= len(y); j++ {
			c := prev[j-1]
			if x[i-1] != y[j-1] {
				c++
			}
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(y)]
}

func pluralS(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}
