package solve

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

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
	// the byte offset in arg of each character (and of the end)
	boff := make([]int, 0, len(rs)+1)
	for o := range arg {
		boff = append(boff, o)
	}
	boff = append(boff, len(arg))
	at := func(i int) expr.Pos { return pos.Add(boff[max(0, min(i, len(rs)))]) }
	if strings.TrimSpace(arg) == "" {
		errs.Add(pos, "a solve block lists its unknowns after the word solve, separated by commas, e.g. solve I_a[A], I_b[A]")
		return nil, errs
	}
	// split at commas outside parentheses and brackets; parseUnknown
	// counts in characters
	type span struct{ a, b int }
	var parts []span
	texts, offs := calcdoc.SplitTopLevel(arg)
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
			errs.Add(u.Pos, fmt.Sprintf("%s is listed twice among the unknowns (first at column %d)", u.Name, prev.Pos.Col()))
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
