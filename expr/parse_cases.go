package expr

// caseLit reads {name: expr, ...} (LANGUAGE.md section 10). A case
// given twice is an error here; a missing or unknown case is one when
// the value is evaluated, against the document's cases.
func (p *parser) caseLit() Node {
	open := p.tok()
	p.i++
	p.enter(open.Off)
	defer p.leave()
	c := &CaseLit{}
	for {
		t := p.tok()
		if t.Kind != IDENT {
			p.fail(t.Off, "a case value is written {case: value, ...}: a case name is missing here")
		}
		p.i++
		id := p.ident(t)
		if p.peek() != COLON {
			p.fail(p.tok().Off, "a case value is written {case: value, ...}: \":\" is missing after %q", t.Text)
		}
		p.i++
		for _, prev := range c.Names {
			if prev.Name == id.Name {
				p.fail(t.Off, "case %q is given twice in {…}: give each case once", id.Name)
			}
		}
		c.Names = append(c.Names, id)
		c.X = append(c.X, p.expr())
		switch p.peek() {
		case COMMA:
			p.i++
			continue
		case RBRACE:
			e := p.tok()
			p.i++
			c.span = span{p.pos(open.Off), p.pos(e.End)}
			return c
		}
		p.closeErr(open, "}")
	}
}

// checkIn reads "in CASE, ...:" after "check", or nothing.
func (p *parser) checkIn() []*Ident {
	if p.i >= len(p.toks) || p.toks[p.i].Kind != IDENT || p.toks[p.i].Text != "in" {
		return nil
	}
	// "in" followed by names separated by commas and a colon
	j := p.i + 1
	for {
		if j >= len(p.toks) || p.toks[j].Kind != IDENT {
			return nil
		}
		j++
		if j < len(p.toks) && p.toks[j].Kind == COLON {
			break
		}
		if j >= len(p.toks) || p.toks[j].Kind != COMMA {
			return nil
		}
		j++
	}
	var in []*Ident
	for k := p.i + 1; k < j; k += 2 {
		id := p.ident(p.toks[k])
		for _, prev := range in {
			if prev.Name == id.Name {
				p.fail(p.toks[k].Off, "case %q is named twice after \"check in\"", id.Name)
			}
		}
		in = append(in, id)
	}
	p.i = j + 1
	return in
}
