package render

// A small MathML reader for the round-trip tests: it reads the sheet's
// typeset formula back into an expression tree, the way a reader of the
// printed sheet sees it. Only what is visible counts: the <mrow> grouping
// is flattened away, so brackets must be written where the grammar of
// LANGUAGE.md section 3 needs them. A fraction's line, a square root and a
// superscript group by themselves; a superscript (power, conjugate star,
// transpose T) applies to the single visible operand before it, and is
// refused after a unit, a fraction, a number in powers of ten or another
// mark, where what it applies to could not be told.

import (
	"encoding/xml"
	"fmt"
	"io"
	"regexp"
	"strconv"
	"strings"

	"calcdoc/expr"
	"calcdoc/render/markup"
)

// mlNode is an element of the MathML read back.
type mlNode struct {
	name  string
	attrs map[string]string
	text  string
	kids  []*mlNode
}

// parseML reads the content of one or more <math> elements (a row split
// into pieces is joined: the pieces follow each other).
func parseML(fragment string) (*mlNode, error) {
	dec := xml.NewDecoder(strings.NewReader("<mrow>" + fragment + "</mrow>"))
	root := &mlNode{name: "root"}
	stack := []*mlNode{root}
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		top := stack[len(stack)-1]
		switch t := tok.(type) {
		case xml.StartElement:
			n := &mlNode{name: t.Name.Local, attrs: map[string]string{}}
			for _, a := range t.Attr {
				n.attrs[a.Name.Local] = a.Value
			}
			top.kids = append(top.kids, n)
			stack = append(stack, n)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			top.text += string(t)
		}
	}
	if len(root.kids) != 1 {
		return nil, fmt.Errorf("no MathML")
	}
	return root.kids[0], nil
}

var mathElemRE = regexp.MustCompile(`(?s)<math[^>]*>(.*?)</math>`)

// readRow reads the MathML of a sheet row (one or more <math> elements)
// into tokens.
func readRow(html string) ([]mlTok, error) {
	var parts []string
	for _, m := range mathElemRE.FindAllStringSubmatch(html, -1) {
		parts = append(parts, m[1])
	}
	if len(parts) == 0 {
		return nil, fmt.Errorf("no <math> in %q", html)
	}
	root, err := parseML(strings.Join(parts, ""))
	if err != nil {
		return nil, err
	}
	return flatten(root)
}

type tokKind int

const (
	tNum    tokKind = iota // a number; sci: written in powers of ten
	tName                  // a name (with its subscript joined by "_")
	tUnit                  // a unit, ° included
	tOp                    // an operator or a bracket
	tFrac                  // a fraction: x is its DIV node
	tSqrt                  // a square root: x is its call
	tSup                   // a superscript: mark "*" or "T", else x is the exponent
	tMatrix                // a table: rows
)

type mlTok struct {
	kind tokKind
	text string
	val  float64
	sci  bool
	mark string
	x    expr.Node
	rows [][]expr.Node
	// parts holds the tokens of what a fraction, root, exponent or table
	// holds, read on their own
	parts [][]mlTok
}

// flatten turns an element and its children into the tokens a reader sees.
func flatten(n *mlNode) ([]mlTok, error) {
	switch n.name {
	case "mrow":
		if n.attrs["class"] == "tcol" {
			// a column of a table: <mtext>cu</mtext><mo>.</mo> and the
			// column's name, read back as the one name cu.R_20
			if len(n.kids) != 3 || n.kids[0].name != "mtext" || n.kids[1].name != "mo" || n.kids[1].text != "." {
				return nil, fmt.Errorf("a table column that is not table . name")
			}
			col, err := flatten(n.kids[2])
			if err != nil || len(col) != 1 || col[0].kind != tName {
				return nil, fmt.Errorf("a table column whose column is not a name")
			}
			return []mlTok{{kind: tName, text: n.kids[0].text + "." + col[0].text}}, nil
		}
		return flattenKids(n.kids)
	case "math", "mtd", "root":
		return flattenKids(n.kids)
	case "mi":
		if n.attrs["class"] == "u" {
			// a unit: upright after a quarter em by its class (style.go)
			return []mlTok{{kind: tUnit, text: n.text}}, nil
		}
		if len(n.attrs) != 0 {
			return nil, fmt.Errorf("<mi> with attributes %v", n.attrs)
		}
		return []mlTok{{kind: tName, text: n.text}}, nil // "A_" stays "A_"
	case "mn":
		return numTok(n.text, "")
	case "mo":
		if n.text == "°" {
			return []mlTok{{kind: tUnit, text: "°"}}, nil
		}
		return []mlTok{{kind: tOp, text: n.text}}, nil
	case "msub":
		if len(n.kids) != 2 || n.kids[0].name != "mi" || n.kids[1].name != "mi" {
			return nil, fmt.Errorf("msub that is not a name")
		}
		return []mlTok{{kind: tName, text: n.kids[0].text + "_" + strings.ReplaceAll(n.kids[1].text, ",", "_")}}, nil
	case "mfrac":
		if len(n.kids) != 2 {
			return nil, fmt.Errorf("mfrac with %d parts", len(n.kids))
		}
		num, nt, err := readExprToks(n.kids[0])
		if err != nil {
			return nil, err
		}
		den, dt, err := readExprToks(n.kids[1])
		if err != nil {
			return nil, err
		}
		return []mlTok{{kind: tFrac, x: &expr.Binary{Op: expr.DIV, X: num, Y: den}, parts: [][]mlTok{nt, dt}}}, nil
	case "msqrt":
		x, xt, err := readExprToks(&mlNode{name: "mrow", kids: n.kids})
		if err != nil {
			return nil, err
		}
		return []mlTok{{kind: tSqrt, x: &expr.Call{Fun: &expr.Ident{Name: "sqrt"}, Args: []expr.Node{x}}, parts: [][]mlTok{xt}}}, nil
	case "msup":
		if len(n.kids) != 2 {
			return nil, fmt.Errorf("msup with %d parts", len(n.kids))
		}
		base, err := flatten(n.kids[0])
		if err != nil {
			return nil, err
		}
		s := n.kids[1]
		switch {
		case s.name == "mo" && s.text == "*":
			return append(base, mlTok{kind: tSup, mark: "*"}), nil
		case s.name == "mi" && s.text == "T" && s.attrs["mathvariant"] == "normal":
			return append(base, mlTok{kind: tSup, mark: "T"}), nil
		}
		e, et, err := readExprToks(s)
		if err != nil {
			return nil, err
		}
		return append(base, mlTok{kind: tSup, x: e, parts: [][]mlTok{et}}), nil
	case "mtable":
		var rows [][]expr.Node
		var parts [][]mlTok
		for _, tr := range n.kids {
			var row []expr.Node
			for _, td := range tr.kids {
				x, xt, err := readExprToks(td)
				if err != nil {
					return nil, err
				}
				row = append(row, x)
				parts = append(parts, xt)
			}
			rows = append(rows, row)
		}
		return []mlTok{{kind: tMatrix, rows: rows, parts: parts}}, nil
	}
	return nil, fmt.Errorf("unexpected <%s>", n.name)
}

// flattenKids flattens a list of siblings, reading m×10^e as one number.
func flattenKids(kids []*mlNode) ([]mlTok, error) {
	var out []mlTok
	for i := 0; i < len(kids); i++ {
		k := kids[i]
		if k.name == "mn" && i+2 < len(kids) && kids[i+1].name == "mo" && kids[i+1].text == "×" {
			p := kids[i+2]
			if p.name == "msup" && len(p.kids) == 2 && p.kids[0].text == "10" && p.kids[1].name == "mn" {
				ts, err := numTok(k.text, strings.Replace(p.kids[1].text, "−", "-", 1))
				if err != nil {
					return nil, err
				}
				out = append(out, ts...)
				i += 2
				continue
			}
		}
		ts, err := flatten(k)
		if err != nil {
			return nil, err
		}
		out = append(out, ts...)
	}
	return out, nil
}

// numTok reads a number's text ("−" before it is a sign of its own) and
// its power of ten.
func numTok(text, exp string) ([]mlTok, error) {
	var out []mlTok
	if rest, ok := strings.CutPrefix(text, "−"); ok {
		out = append(out, mlTok{kind: tOp, text: "−"})
		text = rest
	}
	s := text
	if exp != "" {
		s += "e" + exp
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return nil, fmt.Errorf("number %q: %v", s, err)
	}
	return append(out, mlTok{kind: tNum, val: v, sci: exp != "", text: s}), nil
}

// readExprToks reads an element as one expression, and returns its
// tokens too.
func readExprToks(n *mlNode) (expr.Node, []mlTok, error) {
	toks, err := flatten(n)
	if err != nil {
		return nil, nil, err
	}
	x, err := parseToks(toks)
	return x, toks, err
}

func parseToks(toks []mlTok) (expr.Node, error) {
	p := &mlParser{toks: toks}
	return p.run(func() expr.Node { return p.add() })
}

// mlParser parses tokens by the operator table of LANGUAGE.md section 3.
type mlParser struct {
	toks []mlTok
	i    int
}

type mlFail struct{ msg string }

func (p *mlParser) run(f func() expr.Node) (x expr.Node, err error) {
	defer func() {
		if r := recover(); r != nil {
			e, ok := r.(mlFail)
			if !ok {
				panic(r)
			}
			x, err = nil, fmt.Errorf("%s", e.msg)
		}
	}()
	x = f()
	if p.i < len(p.toks) {
		p.fail("unread %+v", p.toks[p.i])
	}
	return x, nil
}

func (p *mlParser) fail(format string, args ...any) {
	panic(mlFail{fmt.Sprintf(format, args...) + fmt.Sprintf(" (at token %d of %d)", p.i, len(p.toks))})
}

func (p *mlParser) peekOp(ops ...string) string {
	if p.i < len(p.toks) && p.toks[p.i].kind == tOp {
		for _, o := range ops {
			if p.toks[p.i].text == o {
				return o
			}
		}
	}
	return ""
}

func (p *mlParser) expect(op string) {
	if p.peekOp(op) == "" {
		p.fail("expected %q", op)
	}
	p.i++
}

var cmpOps = map[string]expr.Kind{"<": expr.LT, "≤": expr.LE, ">": expr.GT, "≥": expr.GE, "=": expr.EQ, "≠": expr.NE}

// compare reads a check's chain.
func (p *mlParser) compare() expr.Node {
	c := &expr.Compare{X: []expr.Node{p.add()}}
	for p.peekOp("<", "≤", ">", "≥", "=", "≠") != "" {
		c.Ops = append(c.Ops, cmpOps[p.toks[p.i].text])
		p.i++
		c.X = append(c.X, p.add())
	}
	return c
}

func (p *mlParser) add() expr.Node {
	x := p.par()
	for o := p.peekOp("+", "−"); o != ""; o = p.peekOp("+", "−") {
		p.i++
		k := expr.ADD
		if o == "−" {
			k = expr.SUB
		}
		x = &expr.Binary{Op: k, X: x, Y: p.par()}
	}
	return x
}

func (p *mlParser) par() expr.Node {
	x := p.mul()
	for p.peekOp("∥") != "" {
		p.i++
		x = &expr.Binary{Op: expr.PAR, X: x, Y: p.mul()}
	}
	return x
}

func (p *mlParser) mul() expr.Node {
	x := p.unary()
	for p.peekOp("·") != "" {
		p.i++
		x = &expr.Binary{Op: expr.MUL, X: x, Y: p.unary()}
	}
	return x
}

func (p *mlParser) unary() expr.Node {
	if o := p.peekOp("+", "−"); o != "" {
		p.i++
		k := expr.ADD
		if o == "−" {
			k = expr.SUB
		}
		return &expr.Unary{Op: k, X: p.unary()}
	}
	return p.angle()
}

func (p *mlParser) signed() expr.Node {
	if o := p.peekOp("+", "−"); o != "" {
		p.i++
		k := expr.ADD
		if o == "−" {
			k = expr.SUB
		}
		return &expr.Unary{Op: k, X: p.signed()}
	}
	return p.postfix()
}

func (p *mlParser) angle() expr.Node {
	x := p.postfix()
	for p.peekOp("∠") != "" {
		p.i++
		y := p.signed()
		// a unit written after the angle's own unit is the phasor's
		var u *expr.WithUnit
		if w, ok := lastUnit(y); ok {
			y, u = w.inner, w.outer
		}
		x = &expr.Binary{Op: expr.ANGLE, X: x, Y: y}
		if u != nil {
			x = &expr.WithUnit{X: x, Unit: u.Unit}
		}
	}
	return x
}

type lifted struct {
	inner expr.Node
	outer *expr.WithUnit
}

// lastUnit is the parser's rule for "16∠−40° A" (expr.liftPhasorUnit).
func lastUnit(y expr.Node) (lifted, bool) {
	switch n := y.(type) {
	case *expr.Unary:
		if l, ok := lastUnit(n.X); ok {
			return lifted{&expr.Unary{Op: n.Op, X: l.inner}, l.outer}, true
		}
	case *expr.WithUnit:
		if in, ok := n.X.(*expr.WithUnit); ok && in.Unit.Angle && !n.Unit.Angle {
			return lifted{in, n}, true
		}
	}
	return lifted{}, false
}

// postfix reads an operand, a superscript on it, and its units.
func (p *mlParser) postfix() expr.Node {
	x, canMark := p.primary()
	if p.i < len(p.toks) && p.toks[p.i].kind == tSup {
		t := p.toks[p.i]
		if !canMark {
			p.fail("a superscript after a compound operand that is not bracketed")
		}
		p.i++
		switch t.mark {
		case "*":
			x = &expr.Call{Fun: &expr.Ident{Name: "conj"}, Args: []expr.Node{x}}
		case "T":
			x = &expr.Call{Fun: &expr.Ident{Name: "transpose"}, Args: []expr.Node{x}}
		default:
			x = &expr.Binary{Op: expr.POW, X: x, Y: t.x}
		}
		if p.i < len(p.toks) && p.toks[p.i].kind == tSup {
			p.fail("two superscripts on one operand")
		}
	}
	for p.i < len(p.toks) && p.toks[p.i].kind == tUnit {
		u, err := expr.ParseUnit(unitSource(p.toks[p.i].text))
		if err != nil {
			p.fail("unit %q: %v", p.toks[p.i].text, err)
		}
		u.Text = p.toks[p.i].text
		p.i++
		x = &expr.WithUnit{X: x, Unit: u}
		if p.i < len(p.toks) && p.toks[p.i].kind == tSup {
			p.fail("a superscript after a unit")
		}
	}
	return x
}

// primary reads an operand; canMark: a superscript may stand on it.
func (p *mlParser) primary() (expr.Node, bool) {
	if p.i >= len(p.toks) {
		p.fail("a value is missing")
	}
	t := p.toks[p.i]
	p.i++
	switch t.kind {
	case tNum:
		return &expr.Number{Value: t.val, Text: t.text}, !t.sci
	case tFrac:
		return t.x, false
	case tSqrt:
		return t.x, true
	case tName:
		// j directly before a number is an imaginary literal
		if t.text == "j" && p.i < len(p.toks) && p.toks[p.i].kind == tNum {
			n := p.toks[p.i]
			p.i++
			return &expr.Number{Value: n.val, Text: "j" + n.text, Imag: true}, !n.sci
		}
		if p.peekOp("(") != "" {
			p.i++
			c := &expr.Call{Fun: &expr.Ident{Name: t.text}}
			if p.peekOp(")") == "" {
				for {
					c.Args = append(c.Args, p.add())
					if p.peekOp(",") == "" {
						break
					}
					p.i++
				}
			}
			p.expect(")")
			return c, true
		}
		return &expr.Ident{Name: t.text}, true
	case tOp:
		switch t.text {
		case "(":
			x := p.add()
			p.expect(")")
			return x, true
		case "|":
			x := p.add()
			p.expect("|")
			return &expr.Abs{X: x}, true
		case "[":
			if p.i >= len(p.toks) || p.toks[p.i].kind != tMatrix {
				p.fail("[ without a table")
			}
			m := &expr.MatrixLit{Rows: p.toks[p.i].rows}
			p.i++
			p.expect("]")
			return m, true
		}
	}
	p.i--
	p.fail("unexpected %+v", t)
	return nil, false
}

// readStmtRow reads a formula row of the statement kind of st: "names =
// x", "f(params) = x", a check's chain, or a bare x. It returns the
// canonical printing of what it read.
func readStmtRow(st expr.Stmt, html string) (string, error) {
	toks, err := readRow(html)
	if err != nil {
		return "", err
	}
	p := &mlParser{toks: toks}
	var out string
	_, err = p.run(func() expr.Node {
		out = readStmtTokens(p, st)
		return nil
	})
	return out, err
}

// readStmtTokens reads a statement row of st's kind from p.
func readStmtTokens(p *mlParser, st expr.Stmt) string {
	switch st.(type) {
	case *expr.Assign:
		var names []string
		for {
			if p.i >= len(p.toks) || p.toks[p.i].kind != tName {
				p.fail("a name is missing before \"=\"")
			}
			names = append(names, canonName(p.toks[p.i].text))
			p.i++
			if p.peekOp(",") == "" {
				break
			}
			p.i++
		}
		p.expect("=")
		return strings.Join(names, ", ") + " = " + canon(p.add())
	case *expr.FuncDef:
		head, _ := p.primary()
		c, ok := head.(*expr.Call)
		if !ok {
			p.fail("no function head")
		}
		p.expect("=")
		return canon(c) + " = " + canon(p.add())
	case *expr.Check:
		return "check " + canon(p.compare())
	}
	return canon(p.add())
}

// stmtCanon is the canonical printing of a parsed statement, as
// readStmtRow prints what it read.
func stmtCanon(st expr.Stmt) string {
	switch st := st.(type) {
	case *expr.Assign:
		var names []string
		for _, id := range st.Names {
			names = append(names, canonName(id.Name))
		}
		return strings.Join(names, ", ") + " = " + canon(st.X)
	case *expr.FuncDef:
		var ps []string
		for _, id := range st.Params {
			ps = append(ps, canonName(id.Name))
		}
		return canonName(st.Name.Name) + "(" + strings.Join(ps, ", ") + ") = " + canon(st.Body)
	case *expr.Check:
		return "check " + canon(st.Cmp)
	case *expr.ExprStmt:
		return canon(st.X)
	}
	return fmt.Sprintf("%T", st)
}

// canonName is a name as the sheet shows it: spelled Greek parts as
// letters.
func canonName(name string) string {
	parts := strings.Split(name, "_")
	for i, s := range parts {
		parts[i] = markup.GreekOf(s)
	}
	return strings.Join(parts, "_")
}

// unitSource writes a unit as the sheet shows it back in source form.
var unitSource = strings.NewReplacer("²", "^2", "³", "^3", "⁻¹", "^-1", "⁻²", "^-2", "⁻³", "^-3").Replace

func canonNum(v float64) string {
	return strings.Replace(strconv.FormatFloat(v, 'g', -1, 64), "e+", "e", 1)
}

var canonOps = map[expr.Kind]string{
	expr.ADD: "+", expr.SUB: "-", expr.MUL: "*", expr.DIV: "/", expr.POW: "^", expr.PAR: "∥", expr.ANGLE: "∠",
	expr.LT: "<", expr.LE: "<=", expr.GT: ">", expr.GE: ">=", expr.EQ: "==", expr.NE: "!=",
}

// canon prints a tree fully bracketed, without the source's parentheses,
// as expression text that expr parses back to the same tree.
func canon(n expr.Node) string {
	switch n := n.(type) {
	case *expr.Number:
		if n.Imag {
			return "j" + canonNum(n.Value)
		}
		return canonNum(n.Value)
	case *expr.Ident:
		return canonName(n.Name)
	case *expr.Paren:
		return canon(n.X)
	case *expr.WithUnit:
		u := unitSource(markup.UnitText(n.Unit.Text))
		if u == "°" {
			return "(" + canon(n.X) + ")°"
		}
		return "(" + canon(n.X) + ") " + u
	case *expr.Unary:
		return "(" + canonOps[n.Op] + canon(n.X) + ")"
	case *expr.Binary:
		return "(" + canon(n.X) + " " + canonOps[n.Op] + " " + canon(n.Y) + ")"
	case *expr.Abs:
		return "abs(" + canon(n.X) + ")"
	case *expr.Call:
		var as []string
		for _, a := range n.Args {
			as = append(as, canon(a))
		}
		return canonName(n.Fun.Name) + "(" + strings.Join(as, ", ") + ")"
	case *expr.MatrixLit:
		var rs []string
		for _, r := range n.Rows {
			var es []string
			for _, e := range r {
				es = append(es, canon(e))
			}
			rs = append(rs, strings.Join(es, ", "))
		}
		return "[" + strings.Join(rs, "; ") + "]"
	case *expr.Compare:
		s := canon(n.X[0])
		for i, op := range n.Ops {
			s += " " + canonOps[op] + " " + canon(n.X[i+1])
		}
		return s
	}
	return fmt.Sprintf("<%T>", n)
}
