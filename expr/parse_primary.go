package expr

import "fmt"

// The operands of an expression: numbers, names, calls, parentheses,
// magnitudes, matrices and case literals (parse_cases.go).

func (p *parser) primary() Node {
	t := p.tok()
	switch t.Kind {
	case NUMBER:
		p.i++
		n := p.a.numbers.one()
		*n = Number{span: span{p.pos(t.Off), p.pos(t.End)}, Text: t.Text, Value: t.Num, Imag: t.Imag}
		return n
	case IDENT:
		p.i++
		id := p.ident(t)
		if p.peek() == LPAREN {
			return p.call(id)
		}
		return id
	case LPAREN:
		p.i++
		p.enter(t.Off)
		defer p.leave()
		x := p.expr()
		if p.peek() != RPAREN {
			p.closeErr(t, ")")
		}
		e := p.tok()
		p.i++
		n := p.a.parens.one()
		*n = Paren{span: span{p.pos(t.Off), p.pos(e.End)}, X: x}
		return n
	case BAR:
		p.i++
		p.enter(t.Off)
		defer p.leave()
		x := p.expr()
		if p.peek() != BAR {
			p.closeErr(t, "|")
		}
		e := p.tok()
		p.i++
		n := p.a.abss.one()
		*n = Abs{span: span{p.pos(t.Off), p.pos(e.End)}, X: x}
		return n
	case LBRACK:
		return p.matrix()
	case LBRACE:
		return p.caseLit()
	case EOF:
		p.fail(t.Off, "expression ends too soon: a value is missing")
	case RPAREN:
		p.fail(t.Off, "unexpected \")\": a value is missing before it")
	case UNIT:
		p.fail(t.Off, "unexpected unit %q", t.Text)
	}
	p.fail(t.Off, "unexpected %q: a value is missing here", t.Text)
	return nil
}

func (p *parser) call(id *Ident) Node {
	open := p.tok()
	p.i++
	p.enter(open.Off)
	defer p.leave()
	var buf [4]Node
	args := buf[:0]
	if p.peek() != RPAREN {
		for {
			args = append(args, p.expr())
			if p.peek() == COMMA {
				p.i++
				continue
			}
			break
		}
	}
	c := p.a.calls.one()
	c.Fun, c.Args = id, p.a.nodes.list(args)
	if p.peek() != RPAREN {
		p.closeErr(open, ")")
	}
	e := p.tok()
	p.i++
	c.span = span{id.P, p.pos(e.End)}
	return c
}

func (p *parser) matrix() Node {
	open := p.tok()
	p.i++
	p.enter(open.Off)
	defer p.leave()
	m := &MatrixLit{}
	row := []Node{}
	for {
		if p.peek() == RBRACK && len(row) == 0 && len(m.Rows) == 0 {
			p.fail(open.Off, "empty matrix []")
		}
		row = append(row, p.expr())
		switch p.peek() {
		case COMMA:
			p.i++
			continue
		case SEMI:
			p.i++
			m.Rows = append(m.Rows, row)
			row = []Node{}
			continue
		case RBRACK:
			m.Rows = append(m.Rows, row)
			e := p.tok()
			p.i++
			m.span = span{p.pos(open.Off), p.pos(e.End)}
			for i, r := range m.Rows {
				if len(r) != len(m.Rows[0]) {
					p.errs.Add(r[0].Pos(), fmt.Sprintf("row %d of the matrix has %d entries, row 1 has %d: every row needs as many", i+1, len(r), len(m.Rows[0])))
					panic(bail{})
				}
			}
			return m
		}
		p.closeErr(open, "]")
	}
}
