package phasors

import (
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// splitFrom splits a phasors entry "EXPR from NAME" at its last word
// "from" outside parentheses and brackets. It returns EXPR and NAME
// trimmed, the byte offset of NAME in entry, and whether entry has the
// form.
func splitFrom(entry string) (x, name string, nameOff int, ok bool) {
	depth, at := 0, -1
	for i := 0; i < len(entry); i++ {
		switch entry[i] {
		case '(', '[':
			depth++
		case ')', ']':
			if depth > 0 {
				depth--
			}
		case 'f':
			if depth == 0 && strings.HasPrefix(entry[i:], "from") && (i == 0 || isBlank(entry[i-1])) &&
				(i+4 == len(entry) || isBlank(entry[i+4])) {
				at = i
			}
		}
	}
	if at < 0 {
		return "", "", 0, false
	}
	rest := entry[at+4:]
	lead := len(rest) - len(strings.TrimLeft(rest, " \t"))
	return strings.TrimSpace(entry[:at]), strings.TrimSpace(rest), at + 4 + lead, true
}

func isBlank(c byte) bool { return c == ' ' || c == '\t' }

// resolveFrom finds the earlier entry an entry "EXPR from NAME" starts
// from: the nearest entry before it that is the bare name NAME (an entry
// "NAME from OTHER" counts: its arrow is NAME's). It records an
// error (or, when that entry has no value, the entry as not evaluated)
// and returns false when there is none.
func resolveFrom(b *calcdoc.Block, res *Phasors, it *PhasorItem) bool {
	fail := func(format string, args ...any) bool {
		it.Err = expr.Errorf(it.FromPos, format, args...)
		b.Errors = append(b.Errors, it.Err)
		return false
	}
	if it.FromName == "" {
		return fail("after from comes the name of an earlier entry of this diagram, at whose tip the arrow starts, e.g. phasors V_r, I_L*Z_c from V_r")
	}
	if it.Text == "" {
		it.Err = expr.Errorf(it.Pos, "nothing before from: write the value to draw, e.g. I_L*Z_c from %s", it.FromName)
		b.Errors = append(b.Errors, it.Err)
		return false
	}
	var errs expr.ErrorList
	n, _ := expr.ParseExpr(expr.NewSource(it.FromName, it.FromPos), &errs)
	if _, isName := n.(*expr.Ident); len(errs) > 0 || !isName {
		return fail("after from comes the name of an earlier entry of this diagram, not %q: the arrow starts at that entry's tip", it.FromName)
	}
	for _, e := range res.Items[:len(res.Items)-1] {
		if e.Text == it.FromName {
			it.From = e
		}
	}
	if it.From == nil {
		return fail("%s is not an earlier entry of this diagram: an arrow drawn from %s starts at the tip of %s's arrow, so list %s before this entry (phasors %s, %s from %s)",
			it.FromName, it.FromName, it.FromName, it.FromName, it.FromName, it.Text, it.FromName)
	}
	switch f := it.From; {
	case f.Unavailable != nil:
		it.Unavailable = &expr.UnavailableError{Pos: it.FromPos, Name: f.Unavailable.Name, Def: f.Unavailable.Def}
		return false
	case !f.OK():
		it.Unavailable = &expr.UnavailableError{Pos: it.FromPos, Name: f.Text, Def: f.Pos}
		return false
	}
	return true
}
