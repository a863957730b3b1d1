package expr

import (
	"fmt"
	"strings"
)

// Mode selects the statements a block may hold.
type Mode int

// Block modes.
const (
	CalcMode     Mode = iota // statements of a calc block
	EquationMode             // equations of a solve block: [label:] lhs = rhs
)

// Equation is one equation of a solve block.
type Equation struct {
	span
	desc
	Label    *Ident // nil when unlabelled
	LHS, RHS Node
}

// ParseBlock parses the statements of a block. Each statement is one line,
// continued onto the next while a parenthesis or bracket is open. Errors
// are added to errs; a statement that cannot be parsed becomes a *BadStmt
// and parsing goes on with the next line.
func ParseBlock(src *Source, mode Mode, errs *ErrorList) []Stmt {
	var uses []Stmt
	if mode == CalcMode {
		// use statements (use.go) are read line by line before scanning
		src, uses = splitUses(src, errs)
	}
	sc := scratchPool.Get().(*scratch)
	defer sc.release()
	if need := len(src.Text)/4 + 8; cap(sc.toks) < need {
		sc.toks = make([]Token, 0, need)
	}
	toks := scanInto(src, errs, sc.toks)
	sc.toks = toks
	p := &parser{src: src, errs: errs}
	p.a.size(toks, mode)
	sc.stmts = p.split(toks, sc.stmts[:0])
	var out []Stmt
	if n := len(sc.stmts) + len(uses); n > 0 {
		out = make([]Stmt, 0, n)
	}
	for _, st := range sc.stmts {
		if s := p.stmt(st, mode); s != nil {
			for len(uses) > 0 && uses[0].Pos().Before(s.Pos()) {
				out, uses = append(out, uses[0]), uses[1:]
			}
			out = append(out, s)
		}
	}
	return append(out, uses...)
}

// ParseExpr parses a single expression, optionally followed by a display
// bracket "[unit form]" (as in an inline value). Extra text is an error.
func ParseExpr(src *Source, errs *ErrorList) (Node, *Display) {
	toks := Scan(src, errs)
	p := &parser{src: src, errs: errs}
	var clean []Token
	for _, t := range toks {
		if t.Kind == ILLEGAL {
			// the scanner has reported it already
			return &BadExpr{span{src.PosAt(0), src.PosAt(len(src.Text))}}, nil
		}
		if t.Kind != NEWLINE {
			clean = append(clean, t)
		}
	}
	if len(clean) == 0 {
		errs.Add(src.PosAt(0), "empty expression")
		return &BadExpr{span{src.PosAt(0), src.PosAt(0)}}, nil
	}
	p.toks = clean
	p.i = 0
	x, disp, ok := p.exprWithDisplay()
	if !ok {
		return &BadExpr{span{src.PosAt(0), src.PosAt(len(src.Text))}}, nil
	}
	return x, disp
}

type parser struct {
	src   *Source
	errs  *ErrorList
	toks  []Token // the current statement's tokens
	i     int
	depth int
	bad   bool
	opPos Pos
	a     arena // the slabs the nodes are allocated in (arena.go)
	line  int   // the line of the last position made (pos)
}

type bail struct{}

func (p *parser) pos(off int) Pos {
	pos, line := p.src.posNear(off, p.line)
	p.line = line
	return pos
}

func (p *parser) fail(off int, format string, args ...any) {
	p.errs.Add(p.pos(off), fmt.Sprintf(format, args...))
	panic(bail{})
}

// split cuts the token stream into statements (appended to out) at line
// breaks outside parentheses and brackets. An unclosed parenthesis is reported where it
// opened, and the statement is cut at the end of that line so that the
// lines after it are still read.
func (p *parser) split(toks []Token, out [][]Token) [][]Token {
	i := 0
	var open []Token // the brackets open at j, reused from statement to statement
	for i < len(toks) {
		open = open[:0]
		start := i
		j := i
		for ; j < len(toks); j++ {
			t := toks[j]
			if t.Kind == NEWLINE && len(open) == 0 {
				break
			}
			switch t.Kind {
			case LPAREN, LBRACK, LBRACE:
				open = append(open, t)
			case RPAREN, RBRACK, RBRACE:
				if len(open) > 0 {
					open = open[:len(open)-1]
				}
			}
		}
		if len(open) > 0 {
			o := open[0]
			what := "parenthesis"
			closer := ")"
			if o.Kind == LBRACK {
				what, closer = "bracket", "]"
			}
			if o.Kind == LBRACE {
				what, closer = "brace", "}"
			}
			p.errs.Add(p.pos(o.Off), fmt.Sprintf("unclosed %s: this %q is never closed (add %q)", what, o.Text, closer))
			// cut at the first line break after the opening token
			k := start
			for k < len(toks) && !(toks[k].Kind == NEWLINE && toks[k].Off > o.Off) {
				k++
			}
			bad := toks[start:k]
			if len(bad) > 0 {
				out = append(out, append([]Token{{Kind: ILLEGAL, Off: bad[0].Off, End: bad[len(bad)-1].End, Text: "unclosed"}}, bad...))
			}
			i = k + 1
			continue
		}
		// a statement on one line is a slice of toks; only one continued
		// over several lines is copied without its line breaks
		st := toks[start:j:j]
		for _, t := range st {
			if t.Kind == NEWLINE {
				st = nil
				for _, t := range toks[start:j] {
					if t.Kind != NEWLINE {
						st = append(st, t)
					}
				}
				break
			}
		}
		if len(st) > 0 {
			out = append(out, st)
		}
		i = j + 1
	}
	return out
}

func (p *parser) stmt(toks []Token, mode Mode) (s Stmt) {
	if toks[0].Kind == ILLEGAL && toks[0].Text == "unclosed" {
		p.toks = toks[1:]
		return &BadStmt{span: span{p.pos(toks[0].Off), p.pos(toks[0].End)}, Names: p.guessNames()}
	}
	first, last := toks[0], toks[len(toks)-1]
	sp := span{p.pos(first.Off), p.pos(last.End)}
	if first.Kind == COMMENT {
		return &Note{span: sp, Text: first.Text}
	}
	// descriptions: every comment in the statement, joined
	var comments []string
	body := toks
	for k, t := range toks {
		if t.Kind != COMMENT {
			continue
		}
		if k == len(toks)-1 {
			// the usual case, one description at the end: no copy
			body = toks[:k:k]
			if t.Text != "" {
				comments = append(comments, t.Text)
			}
			break
		}
		// comments inside a continued statement: copy the rest
		body = nil
		for _, t := range toks {
			if t.Kind == COMMENT {
				if t.Text != "" {
					comments = append(comments, t.Text)
				}
				continue
			}
			body = append(body, t)
		}
		break
	}
	d := desc{strings.Join(comments, " ")}
	for _, t := range body {
		if t.Kind == ILLEGAL {
			// the scanner has reported it already
			p.toks = body
			return &BadStmt{span: sp, desc: d, Names: p.guessNames()}
		}
	}
	sp = span{p.pos(body[0].Off), p.pos(body[len(body)-1].End)}
	p.toks = body
	p.i = 0
	p.depth = 0
	defer func() {
		if r := recover(); r != nil {
			if _, ok := r.(bail); !ok {
				panic(r)
			}
			s = &BadStmt{span: sp, desc: d, Names: p.guessNames()}
		}
	}()
	if mode == EquationMode {
		return p.equation(sp, d)
	}
	if body[0].Kind == IDENT && body[0].Text == "check" && len(body) > 1 && body[1].Kind != ASSIGN {
		p.i = 1
		in := p.checkIn()
		cmp := p.comparison()
		p.expectEnd()
		c := p.a.checks.one()
		*c = Check{span: sp, desc: d, Cmp: cmp, In: in}
		return c
	}
	if eq := p.topAssign(); eq >= 0 {
		return p.assignment(eq, sp, d)
	}
	x, disp, ok := p.exprWithDisplay()
	if !ok {
		// the error is in the list; a half-read expression is not evaluated
		return &BadStmt{span: sp, desc: d}
	}
	return &ExprStmt{span: sp, desc: d, X: x, Display: disp}
}

// guessNames returns the names a statement that failed to parse appears
// to define: "a = ...", "a[unit] = ...", "a, b = ...".
func (p *parser) guessNames() []*Ident {
	k := p.topAssign()
	if k < 1 || p.toks[0].Kind != IDENT {
		return nil
	}
	lhs := p.toks[:k]
	if len(lhs) > 1 && lhs[1].Kind == DISPLAY {
		return []*Ident{p.ident(lhs[0])}
	}
	var out []*Ident
	for i, t := range lhs {
		if i%2 == 0 && t.Kind != IDENT || i%2 == 1 && t.Kind != COMMA {
			return nil
		}
		if t.Kind == IDENT {
			out = append(out, p.ident(t))
		}
	}
	return out
}

// topAssign finds "=" outside parentheses and brackets, or -1.
func (p *parser) topAssign() int {
	depth := 0
	for i, t := range p.toks {
		switch t.Kind {
		case LPAREN, LBRACK, LBRACE:
			depth++
		case RPAREN, RBRACK, RBRACE:
			depth--
		case ASSIGN:
			if depth == 0 {
				return i
			}
		}
	}
	return -1
}

func (p *parser) equation(sp span, d desc) Stmt {
	eq := &Equation{span: sp, desc: d}
	if len(p.toks) > 2 && p.toks[0].Kind == IDENT && p.toks[1].Kind == COLON {
		eq.Label = p.ident(p.toks[0])
		p.i = 2
	}
	k := p.topAssign()
	if k < 0 {
		if cmp := p.firstComparison(); cmp >= 0 {
			p.fail(p.toks[cmp].Off, "an equation is written with \"=\", not %q", p.toks[cmp].Text)
		}
		p.fail(p.toks[p.i].Off, "an equation needs \"=\": write lhs = rhs")
	}
	if k == p.i {
		p.fail(p.toks[k].Off, "missing left side before \"=\"")
	}
	rest := p.toks
	p.toks = rest[:k]
	eq.LHS = p.expr()
	p.expectEnd()
	p.toks = rest
	p.i = k + 1
	if p.i >= len(p.toks) {
		p.fail(p.toks[k].End, "missing right side after \"=\"")
	}
	eq.RHS = p.expr()
	p.expectEnd()
	return eq
}

func (p *parser) firstComparison() int {
	for i, t := range p.toks {
		if t.Kind.IsComparison() {
			return i
		}
	}
	return -1
}

func (p *parser) ident(t Token) *Ident {
	id := p.a.idents.one()
	// the key is computed once here, for every later lookup of the node
	if dot := strings.IndexByte(t.Text, '.'); dot > 0 {
		// a column of a table: the key of each part, joined by "."
		*id = Ident{span: span{p.pos(t.Off), p.pos(t.End)}, Name: t.Text, Key: NameKey(t.Text[:dot]) + "." + NameKey(t.Text[dot+1:]), Dot: dot}
		return id
	}
	*id = Ident{span: span{p.pos(t.Off), p.pos(t.End)}, Name: t.Text, Key: NameKey(t.Text)}
	return id
}

// names is a list of one name.
func (p *parser) names(id *Ident) []*Ident {
	return p.a.names.list([]*Ident{id})
}

// assign allocates an assignment.
func (p *parser) assign(a Assign) *Assign {
	n := p.a.assigns.one()
	*n = a
	return n
}

func (p *parser) assignment(eq int, sp span, d desc) Stmt {
	lhs := p.toks[:eq]
	if len(lhs) == 0 {
		p.fail(p.toks[eq].Off, "missing name before \"=\"")
	}
	if eq+1 >= len(p.toks) {
		p.fail(p.toks[eq].End, "missing expression after \"=\"")
	}
	if lhs[0].Kind != IDENT {
		p.fail(lhs[0].Off, "the left side of \"=\" must be a name, a name[unit] or a function f(x) (to compare, use check with ==)")
	}
	parseRHS := func() Node {
		p.i = eq + 1
		x := p.expr()
		p.expectEnd()
		return x
	}
	switch {
	case len(lhs) == 1:
		return p.assign(Assign{span: sp, desc: d, Names: p.names(p.ident(lhs[0])), X: parseRHS()})
	case lhs[1].Kind == DISPLAY:
		if len(lhs) != 2 {
			p.fail(lhs[2].Off, "unexpected %q after the display bracket: write name[unit] = ...", lhs[2].Text)
		}
		disp := p.display(lhs[1])
		return p.assign(Assign{span: sp, desc: d, Names: p.names(p.ident(lhs[0])), Display: disp, X: parseRHS()})
	case lhs[1].Kind == LBRACK:
		if lhs[1].SpaceBefore {
			p.spaceBeforeDisplay(lhs[0], lhs[1])
		}
		p.fail(lhs[1].Off, "an unclosed display bracket: write name[unit] = ... with the \"]\" on the same line")
	case lhs[1].Kind == LPAREN:
		fd := &FuncDef{span: sp, desc: d, Name: p.ident(lhs[0])}
		i := 2
		for i < len(lhs) && lhs[i].Kind != RPAREN {
			if lhs[i].Kind != IDENT {
				p.fail(lhs[i].Off, "a function's parameters must be names, separated by commas")
			}
			fd.Params = append(fd.Params, p.ident(lhs[i]))
			i++
			if i < len(lhs) && lhs[i].Kind == COMMA {
				i++
				continue
			}
			if i < len(lhs) && lhs[i].Kind != RPAREN {
				p.fail(lhs[i].Off, "expected \",\" or \")\" in the parameter list")
			}
		}
		if i != len(lhs)-1 {
			p.fail(lhs[min(i, len(lhs)-1)].Off, "unexpected text after the parameter list")
		}
		if len(fd.Params) == 0 {
			p.fail(lhs[1].Off, "a function needs at least one parameter")
		}
		fd.Body = parseRHS()
		return fd
	case lhs[1].Kind == COMMA:
		a := &Assign{span: sp, desc: d}
		for i := 0; i < len(lhs); i += 2 {
			if lhs[i].Kind != IDENT {
				p.fail(lhs[i].Off, "expected a name in the list of names before \"=\"")
			}
			a.Names = append(a.Names, p.ident(lhs[i]))
			if i+1 < len(lhs) && lhs[i+1].Kind != COMMA {
				p.fail(lhs[i+1].Off, "names before \"=\" are separated by commas")
			}
		}
		a.X = parseRHS()
		return a
	}
	p.fail(lhs[1].Off, "the left side of \"=\" must be a name, a name[unit] or a function f(x) (to compare, use check with ==)")
	return nil
}

// display parses a display bracket's text as "unit", "form" or "unit form".
func (p *parser) display(t Token) *Display {
	d, err := ParseDisplay(t.Text)
	if err != nil {
		p.fail(t.Off+1, "%s", err.Error())
	}
	d.span = span{p.pos(t.Off), p.pos(t.End)}
	return d
}

// ParseDisplay reads "kA", "polar", "kA polar", "Ω rect".
func ParseDisplay(text string) (*Display, error) {
	d := &Display{Text: text}
	fields := strings.Fields(text)
	if len(fields) == 0 {
		return nil, fmt.Errorf("empty brackets: write a unit and/or a form, e.g. [kA] or [polar]")
	}
	for _, f := range fields {
		switch f {
		case "polar":
			d.Form = FormPolar
		case "rect":
			d.Form = FormRect
		default:
			if d.Unit != nil {
				return nil, fmt.Errorf("two units in brackets (%q and %q): write one unit and optionally polar or rect", d.Unit.Text, f)
			}
			u, err := ParseUnit(f)
			if err != nil {
				return nil, err
			}
			d.Unit = u
		}
	}
	return d, nil
}

func (p *parser) exprWithDisplay() (x Node, d *Display, ok bool) {
	defer func() {
		if r := recover(); r != nil {
			if _, isBail := r.(bail); !isBail {
				panic(r)
			}
			ok = false
		}
	}()
	x = p.expr()
	if p.i < len(p.toks) && p.toks[p.i].Kind == DISPLAY {
		d = p.display(p.toks[p.i])
		p.i++
	}
	p.expectEnd()
	return x, d, true
}

func (p *parser) peek() Kind {
	if p.i < len(p.toks) {
		return p.toks[p.i].Kind
	}
	return EOF
}

func (p *parser) tok() Token {
	if p.i < len(p.toks) {
		return p.toks[p.i]
	}
	end := 0
	if len(p.toks) > 0 {
		end = p.toks[len(p.toks)-1].End
	}
	return Token{Kind: EOF, Off: end, End: end}
}

func (p *parser) enter(off int) {
	p.depth++
	if p.depth > MaxDepth {
		p.fail(off, "expression nested too deeply (more than %d levels)", MaxDepth)
	}
}
func (p *parser) leave() { p.depth-- }

func (p *parser) expr() Node { return p.add() }

func (p *parser) comparison() *Compare {
	x := p.add()
	var xbuf [4]Node
	var obuf [3]Kind
	xs, ops := append(xbuf[:0], x), obuf[:0]
	for p.peek().IsComparison() {
		ops = append(ops, p.peek())
		p.i++
		xs = append(xs, p.add())
	}
	c := p.a.compares.one()
	c.X, c.Ops = p.a.nodes.list(xs), p.a.ops.list(ops)
	if len(c.Ops) == 0 {
		if p.peek() == ASSIGN {
			p.fail(p.tok().Off, "a check compares with ==, not =")
		}
		p.fail(p.tok().Off, "a check needs a comparison: <, <=, >, >=, == or !=")
	}
	c.span = span{x.Pos(), c.X[len(c.X)-1].End()}
	return c
}

func (p *parser) binary(op Kind, x, y Node) Node {
	b := p.a.binaries.one()
	*b = Binary{span: span{x.Pos(), y.End()}, Op: op, OpPos: p.opPos, X: x, Y: y}
	return b
}

// withUnit allocates x written with a unit.
func (p *parser) withUnit(w WithUnit) *WithUnit {
	n := p.a.units.one()
	*n = w
	return n
}

func (p *parser) add() Node {
	p.enter(p.tok().Off)
	defer p.leave()
	x := p.par()
	for k := p.peek(); k == ADD || k == SUB; k = p.peek() {
		op := p.pos(p.toks[p.i].Off)
		p.i++
		y := p.par()
		p.opPos = op
		x = p.binary(k, x, y)
	}
	return x
}

// isParallel reports whether the parser stands on "∥", or on two adjacent
// "|" followed by something that starts an operand.
func (p *parser) isParallel() int {
	if p.peek() == PAR {
		return 1
	}
	if p.peek() == BAR && p.i+2 < len(p.toks) {
		a, b, c := p.toks[p.i], p.toks[p.i+1], p.toks[p.i+2]
		if b.Kind == BAR && b.Off == a.End && startsOperand(c.Kind) {
			return 2
		}
	}
	return 0
}

func startsOperand(k Kind) bool {
	switch k {
	case NUMBER, IDENT, LPAREN, LBRACK, BAR, SUB, ADD:
		return true
	}
	return false
}

func (p *parser) par() Node {
	x := p.mul()
	for n := p.isParallel(); n > 0; n = p.isParallel() {
		op := p.pos(p.toks[p.i].Off)
		p.i += n
		y := p.mul()
		p.opPos = op
		x = p.binary(PAR, x, y)
	}
	return x
}

func (p *parser) mul() Node {
	x := p.unary()
	for k := p.peek(); k == MUL || k == DIV; k = p.peek() {
		op := p.pos(p.toks[p.i].Off)
		p.i++
		y := p.unary()
		p.opPos = op
		x = p.binary(k, x, y)
	}
	return x
}

func (p *parser) unary() Node {
	if k := p.peek(); k == SUB || k == ADD {
		t := p.tok()
		p.i++
		p.enter(t.Off)
		defer p.leave()
		x := p.unary()
		u := p.a.unaries.one()
		*u = Unary{span: span{p.pos(t.Off), x.End()}, Op: k, X: x}
		return u
	}
	return p.angle()
}

// signed is an operand that may carry its own sign, as on the right of ∠ and ^.
func (p *parser) signed(next func() Node) Node {
	if k := p.peek(); k == SUB || k == ADD {
		t := p.tok()
		p.i++
		p.enter(t.Off)
		defer p.leave()
		x := p.signed(next)
		u := p.a.unaries.one()
		*u = Unary{span: span{p.pos(t.Off), x.End()}, Op: k, X: x}
		return u
	}
	return next()
}

func (p *parser) angle() Node {
	x := p.pow()
	for p.peek() == ANGLE {
		op := p.pos(p.toks[p.i].Off)
		p.i++
		y := p.signed(p.pow)
		// "16∠-40° A": a unit after the angle applies to the whole phasor.
		y, u := liftPhasorUnit(y)
		p.opPos = op
		x = p.binary(ANGLE, x, y)
		if u != nil {
			x = p.withUnit(WithUnit{span: span{x.Pos(), u.E}, X: x, Unit: u.Unit, UPos: u.UPos})
		}
	}
	return x
}

// liftPhasorUnit takes a unit written after an angle unit off the angle.
func liftPhasorUnit(y Node) (Node, *WithUnit) {
	switch n := y.(type) {
	case *Unary:
		inner, u := liftPhasorUnit(n.X)
		if u != nil {
			return &Unary{span: span{n.P, inner.End()}, Op: n.Op, X: inner}, u
		}
	case *WithUnit:
		if in, ok := n.X.(*WithUnit); ok && in.Unit.Angle && !n.Unit.Angle {
			return in, n
		}
	}
	return y, nil
}

func (p *parser) pow() Node {
	x := p.postfix()
	if p.peek() == POW {
		t := p.tok()
		p.i++
		p.enter(t.Off)
		defer p.leave()
		y := p.signed(p.pow)
		p.opPos = p.pos(t.Off)
		return p.binary(POW, x, y)
	}
	return x
}

func (p *parser) postfix() Node {
	x := p.primary()
	for p.peek() == UNIT {
		t := p.tok()
		p.i++
		u, err := ParseUnit(t.Text)
		if err != nil {
			msg := err.Error()
			if strings.ContainsAny(t.Text, "*/·") {
				msg += fmt.Sprintf(" in %q (inside a unit, * and / join symbols; to multiply or divide by a name, put spaces around the operator)", t.Text)
			} else if _, isNum := x.(*Number); isNum && !t.SpaceBefore {
				msg += fmt.Sprintf(" (to multiply a number by a name, write %s*%s)", p.src.Text[p.toks[p.i-2].Off:p.toks[p.i-2].End], t.Text)
			}
			p.fail(t.Off, "%s", msg)
		}
		x = p.withUnit(WithUnit{span: span{x.Pos(), p.pos(t.End)}, X: x, Unit: u, UPos: p.pos(t.Off)})
	}
	return x
}
