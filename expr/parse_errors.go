package expr

import "strings"

// The parser's messages for text that does not fit the grammar: each
// names the cause and the fix, not only the token where reading stopped.

// expectEnd reports any token left after a complete statement.
func (p *parser) expectEnd() {
	if p.i < len(p.toks) {
		t := p.toks[p.i]
		switch t.Kind {
		case RPAREN:
			p.fail(t.Off, "unexpected \")\": no parenthesis is open here")
		case RBRACK:
			p.fail(t.Off, "unexpected \"]\": no bracket is open here")
		case ASSIGN:
			p.fail(t.Off, "unexpected \"=\" (to compare, use check with ==)")
		case IDENT, NUMBER, LPAREN:
			p.operandWithoutOperator(t)
		case LBRACK:
			if t.SpaceBefore && p.i > 0 {
				p.spaceBeforeDisplay(p.toks[p.i-1], t)
			}
			p.fail(t.Off, "unexpected \"[\": brackets after a value hold its display unit, written directly after it (x[kA]); an entry of a vector or matrix is picked with parentheses, v(1) or M(1, 2)")
		case UNIT:
			p.fail(t.Off, "unexpected unit %q here", t.Text)
		case DISPLAY:
			p.fail(t.Off, "a display bracket [%s] may stand only after the name being defined or at the end of a bare expression", t.Text)
		}
		p.fail(t.Off, "unexpected %q", t.Text)
	}
}

// spaceBeforeDisplay reports a display bracket written after a space
// ("I_k [kA] = ..."): the bracket holds the unit only when it follows the
// name or value directly.
func (p *parser) spaceBeforeDisplay(before, open Token) {
	closeAt := -1
	for k := p.indexOf(open) + 1; k >= 0 && k < len(p.toks); k++ {
		if p.toks[k].Kind == RBRACK {
			closeAt = k
			break
		}
	}
	if closeAt < 0 {
		return // not a display bracket: the caller's message stands
	}
	inner := strings.TrimSpace(p.src.Text[open.End:p.toks[closeAt].Off])
	if _, err := ParseDisplay(inner); err != nil {
		return // what the brackets hold is no unit or form: not a display bracket
	}
	what := p.src.Text[before.Off:before.End]
	p.fail(before.End, "a space stands between %s and the display bracket [%s]: the bracket follows directly, write %s[%s]", what, inner, what, inner)
}

// indexOf returns the index of t among the statement's tokens, or -1.
func (p *parser) indexOf(t Token) int {
	for k := range p.toks {
		if p.toks[k].Off == t.Off {
			return k
		}
	}
	return -1
}

// operandWithoutOperator reports an operand that follows another with no
// operator between them, naming the likely cause.
func (p *parser) operandWithoutOperator(t Token) {
	if p.i > 0 {
		prev := p.toks[p.i-1]
		if prev.Kind == IDENT {
			if _, ok := builtins[NameKey(prev.Text)]; ok && t.Kind != LPAREN {
				// "ln 0": a function is called with parentheses
				p.fail(prev.Off, "%s is a function: put its argument in parentheses, %s(%s)", prev.Text, prev.Text, t.Text)
			}
		}
		if t.Kind == IDENT && prev.Kind == UNIT {
			if u, err := ParseUnit(t.Text); err == nil && !u.Angle {
				// "2 V A": a space ends a unit
				p.fail(t.Off, "%q is read as a name here: a space ends a unit, and inside a unit symbols are joined by · or * with no space (write %s·%s)", t.Text, prev.Text, t.Text)
			}
		}
		if t.Kind == IDENT && prev.Kind == NUMBER && t.Off-prev.End > 1 && strings.TrimSpace(p.src.Text[prev.End:t.Off]) == "" {
			if _, err := ParseUnit(t.Text); err == nil {
				// "2  V": the second space ended the number
				p.fail(t.Off, "%q is read as a name here: a unit follows its number directly or after one space (write %s %s), and * multiplies by a name", t.Text, prev.Text, t.Text)
			}
		}
	}
	p.fail(t.Off, "unexpected %s %q: an operator is missing before it (write * to multiply)", t.Kind, t.Text)
}

func (p *parser) closeErr(open Token, closer string) {
	t := p.tok()
	if t.Kind == EOF {
		p.fail(open.Off, "unclosed %q: add %q", open.Text, closer)
	}
	p.fail(t.Off, "expected %q to close the %q at %s, found %q", closer, open.Text, p.pos(open.Off), t.Text)
}
