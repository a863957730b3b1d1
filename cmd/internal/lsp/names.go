package lsp

import (
	"strings"
	"unicode"
	"unicode/utf8"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

func decodeRune(b []byte) (rune, int) { return utf8.DecodeRune(b) }

// isNameRune reports whether r may stand in a name (letters of any
// script, digits, _, combining marks and primes).
func isNameRune(r rune) bool {
	return r == '_' || r == '\'' || r == '′' || unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.IsMark(r)
}

// wordAt is the name (a table column's dot included) around byte offset
// off of b, with its start and end, or "" when there is none.
func wordAt(b []byte, off int) (string, int, int) {
	off = max(0, min(off, len(b)))
	start := off
	for start > 0 {
		r, w := utf8.DecodeLastRune(b[:start])
		if !isNameRune(r) && r != '.' {
			break
		}
		start -= w
	}
	end := off
	for end < len(b) {
		r, w := utf8.DecodeRune(b[end:])
		if !isNameRune(r) && r != '.' {
			break
		}
		end += w
	}
	word := strings.Trim(string(b[start:end]), ".")
	if word == "" {
		return "", off, off
	}
	start += strings.Index(string(b[start:end]), word)
	if r, _ := utf8.DecodeRuneInString(word); unicode.IsDigit(r) {
		return "", off, off // a number
	}
	return word, start, start + len(word)
}

// inEvaluated reports whether the document offset off lies in an
// evaluated block (its info line included) or an inline value.
func inEvaluated(d *calcdoc.Document, off int) bool {
	for _, b := range d.Blocks {
		from := b.InfoPos.Off
		to := from
		if n := len(b.LinePos); n > 0 {
			to = b.LinePos[n-1].Off + len(b.Lines[n-1])
		} else {
			to = from + len(b.Kind) + 1 + len(b.Arg)
		}
		if off >= from && off <= to {
			return true
		}
	}
	for _, in := range d.Inline {
		if off >= in.Pos.Off && off <= in.Pos.Off+len(in.Text)+1 {
			return true
		}
	}
	return false
}

// target is what a name at a place of a document stands for.
type target struct {
	name  string
	value *calcdoc.NamedValue // a value the document defines
	fn    *expr.Func          // a user function
	table *calcdoc.Block      // a table block
	built bool                // a built-in function or constant
}

// tableName is the name a table block defines, or "".
func tableName(b *calcdoc.Block) string {
	if b.Kind != "table" {
		return ""
	}
	name, _, _ := strings.Cut(b.Arg, " ")
	return name
}

// resolve finds what word, written at document offset off, stands for:
// the definition above off that is in force there (else the first below),
// a user function, a table (a column's table too), or a built-in.
func resolve(d *calcdoc.Document, word string, off int) (target, bool) {
	t := target{name: word}
	if tab, _, ok := strings.Cut(word, "."); ok {
		word = tab // a column names its table
	}
	key := expr.NameKey(word)
	for _, b := range d.Blocks {
		if n := tableName(b); n != "" && expr.NameKey(n) == key {
			t.table = b
			return t, true
		}
	}
	if strings.Contains(t.name, ".") {
		return t, false
	}
	var before, after *calcdoc.NamedValue
	for _, v := range d.Values {
		if v.Pos.File != d.File || expr.NameKey(v.Name) != key {
			continue
		}
		if v.Pos.Off <= off {
			before = v
		} else if after == nil {
			after = v
		}
	}
	if before == nil {
		before = after
	}
	if before != nil {
		t.value = before
		return t, true
	}
	if f := d.Env.LookupFunc(word); f != nil {
		t.fn = f
		return t, true
	}
	if expr.IsBuiltin(word) {
		t.built = true
		return t, true
	}
	return t, false
}

// stmtIndex maps the offset of each name a calc statement defines to its
// statement (use statements included).
func stmtIndex(d *calcdoc.Document) map[int]*calcdoc.Stmt {
	out := map[int]*calcdoc.Stmt{}
	for _, b := range d.Blocks {
		stmts, _ := b.Result.([]*calcdoc.Stmt)
		for _, st := range stmts {
			switch s := st.Stmt.(type) {
			case *expr.Assign:
				for _, id := range s.Names {
					out[id.Pos().Off] = st
				}
			case *expr.FuncDef:
				out[s.Name.Pos().Off] = st
			}
			if st.Use != nil {
				for _, u := range st.Use.Names {
					out[u.Pos.Off] = st
				}
			}
		}
	}
	return out
}

// useOf is the use statement binding and its use that define the name at
// document offset off, or nils.
func useOf(d *calcdoc.Document, off int) (*calcdoc.Use, *calcdoc.UseBinding) {
	for _, u := range d.Uses {
		for _, b := range u.Names {
			if b.Pos.Off == off && b.Pos.File == d.File {
				return u, b
			}
		}
	}
	return nil, nil
}
