package render

// The typeset formula is the computed formula: a property test.
//
// Outside reference: the grammar of LANGUAGE.md section 3 (the operator
// table, loosest first: comparison; + -; ∥; * /; unary -; ∠; ^ right to
// left; then a unit and °), as implemented by the expression parser. For
// every statement (generated from a fixed seed, a table of named cases,
// and the fuzz corpus) the sheet's formula row is read back from its
// MathML by the reader in mathread_test.go, which knows only that table
// and what is visible on the page, and must give the parser's tree; no
// bracket of the formula may be removable without changing what is read
// (brackets exactly where precedence needs them; a bracket around a signed
// operand, a·(−b), is the one allowed extra, common practice). The
// substitution row, read back and evaluated by the expression engine,
// must give the statement's result.

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
)

// preamble defines the names the generated statements use: real,
// negative, complex, with units, a phasor, an angle, matrices, a function.
var preamble = []string{
	"a = 2.5",
	"b = -1.5",
	"c = 3 + j4",
	"d = 0.5 - j0.25",
	"k_1 = 1.2e-5",
	"phi = 30°",
	"omega = 314.159",
	"alpha_2 = -0.75",
	"u = 230 V",
	"i_1 = 10 A∠-30°",
	"i_2 = 4 A∠120°",
	"z_L = (0.12 + j0.08) Ω",
	"M = [1, 2; 3, 4]",
	"w = [1; -2]",
	"f(x, y) = x * y + 1",
}

// rtTable is a table the look-up statements read (data of our own, for
// the typesetting only).
const rtTable = "```table tb\nsource: test data of our own\nS [mm²] | R_20 [Ω/km]\n2.5 | 7.41\n4 | 4.61\n```\n"

type rtStats struct{ formulas, substs int }

// roundTrip builds a sheet of the preamble and stmts and checks every
// statement row. It returns how many formula and substitution rows it
// checked.
func roundTrip(t testing.TB, stmts []string) rtStats {
	t.Helper()
	src := "---\ndigits: 12\n---\n" + rtTable + "```calc\n" + strings.Join(preamble, "\n") + "\n" + strings.Join(stmts, "\n") + "\n```\n"
	doc := calcdoc.Parse("roundtrip.md", []byte(src), kind.Standard())
	html, err := Sheet(doc, Options{Version: "test"})
	if err != nil {
		t.Fatalf("no sheet: %v", err)
	}
	rows := map[int]string{}
	for _, m := range rowBodyRE.FindAllStringSubmatch(string(html), -1) {
		n, _ := strconv.Atoi(m[1])
		rows[n] = m[2]
	}
	var st rtStats
	for _, b := range doc.Blocks {
		list, _ := b.Result.([]*calcdoc.Stmt)
		for _, s := range list {
			switch s.Stmt.(type) {
			case *expr.Note, *expr.BadStmt:
				continue
			}
			line := s.Stmt.Pos().Line()
			row, ok := rows[line]
			if !ok {
				t.Errorf("line %d %q: no row on the sheet", line, s.Text)
				continue
			}
			checkFormulaRow(t, s, row)
			st.formulas++
			if checkSubstRow(t, doc, s, row) {
				st.substs++
			}
		}
	}
	return st
}

var (
	rowBodyRE = regexp.MustCompile(`(?s)<div class="row[^"]*" id="L(\d+)" data-line="\d+">(.*?)(?:<div class="desc">|</div>\n)`)
	fRowRE    = regexp.MustCompile(`(?s)<div class="f(?: brk)?">(.*?)</div>`)
	sRowRE    = regexp.MustCompile(`(?s)<div class="s(?: brk)?">(.*?)</div>`)
)

func checkFormulaRow(t testing.TB, s *calcdoc.Stmt, row string) {
	t.Helper()
	m := fRowRE.FindStringSubmatch(row)
	if m == nil {
		t.Errorf("%q: no formula row", s.Text)
		return
	}
	want := stmtCanon(s.Stmt)
	got, err := readStmtRow(s.Stmt, m[1])
	if err != nil {
		t.Errorf("%q: the formula cannot be read back: %v\n  MathML: %s", s.Text, err, m[1])
		return
	}
	if got != want {
		t.Errorf("%q: the formula reads back as another tree\n  parsed:  %s\n  typeset: %s\n  MathML: %s", s.Text, want, got, m[1])
		return
	}
	checkMinimalBrackets(t, s, m[1])
}

// checkMinimalBrackets removes each pair of brackets of the formula row in
// turn (outside calls), in the row and in every fraction, root, exponent
// and table cell: what is read must then change, or not be readable,
// unless the bracket holds a signed operand.
func checkMinimalBrackets(t testing.TB, s *calcdoc.Stmt, fml string) {
	t.Helper()
	toks, err := readRow(fml)
	if err != nil {
		return
	}
	read := func(ts []mlTok) (string, error) { return readToks(s.Stmt, ts) }
	for _, where := range redundantBrackets(toks, read) {
		t.Errorf("%q: a bracket that precedence does not need (%s)\n  MathML: %s", s.Text, where, fml)
	}
}

// redundantBrackets lists the bracket pairs of toks (and of the parts
// within them) that can be removed without changing what read gives.
func redundantBrackets(toks []mlTok, read func([]mlTok) (string, error)) []string {
	var out []string
	want, err := read(toks)
	if err != nil {
		return []string{"unreadable: " + err.Error()}
	}
	for i, tk := range toks {
		for _, part := range tk.parts {
			out = append(out, redundantBrackets(part, func(ts []mlTok) (string, error) {
				x, err := parseToks(ts)
				if err != nil {
					return "", err
				}
				return canon(x), nil
			})...)
		}
		if tk.kind != tOp || tk.text != "(" || i > 0 && toks[i-1].kind == tName {
			continue
		}
		depth, j := 0, i
		for ; j < len(toks); j++ {
			if toks[j].kind == tOp && toks[j].text == "(" {
				depth++
			}
			if toks[j].kind == tOp && toks[j].text == ")" {
				depth--
				if depth == 0 {
					break
				}
			}
		}
		if j == len(toks) {
			return append(out, "unbalanced brackets")
		}
		if i+1 < j && toks[i+1].kind == tOp && (toks[i+1].text == "−" || toks[i+1].text == "+") {
			continue // a·(−b): no two signs in a row
		}
		var less []mlTok
		less = append(less, toks[:i]...)
		less = append(less, toks[i+1:j]...)
		less = append(less, toks[j+1:]...)
		if got, err := read(less); err == nil && got == want {
			out = append(out, fmt.Sprintf("tokens %d..%d of %d", i, j, len(toks)))
		}
	}
	return out
}

// readToks is readStmtRow on tokens already read.
func readToks(st expr.Stmt, toks []mlTok) (string, error) {
	p := &mlParser{toks: toks}
	var out string
	_, err := p.run(func() expr.Node {
		out = readStmtTokens(p, st)
		return nil
	})
	return out, err
}

func checkSubstRow(t testing.TB, doc *calcdoc.Document, s *calcdoc.Stmt, row string) bool {
	t.Helper()
	m := sRowRE.FindStringSubmatch(row)
	if m == nil || s.Res == nil || s.Res.Value == nil {
		return false
	}
	toks, err := readRow(m[1])
	if err != nil {
		t.Errorf("%q: the substitution cannot be read: %v\n  MathML: %s", s.Text, err, m[1])
		return false
	}
	p := &mlParser{toks: toks}
	x, err := p.run(func() expr.Node {
		p.expect("=")
		return p.add()
	})
	if err != nil {
		t.Errorf("%q: the substitution cannot be read back: %v\n  MathML: %s", s.Text, err, m[1])
		return false
	}
	// every name has been replaced by its value; a table, or a column
	// of one, is not a value and stays named (its look-up keeps its key)
	var names []string
	walkCanon(x, func(n expr.Node) {
		if id, ok := n.(*expr.Ident); ok && id.Name != "π" && id.Name != "j" && !strings.Contains(id.Name, ".") && doc.Env.LookupTable(id.Name) == nil {
			names = append(names, id.Name)
		}
	})
	if len(names) > 0 {
		t.Errorf("%q: the substitution still shows names %v", s.Text, names)
	}
	text := canon(x)
	var errs expr.ErrorList
	n, _ := expr.ParseExpr(expr.NewSource(text, expr.Pos{}), &errs)
	if len(errs) > 0 {
		t.Errorf("%q: the substitution read as %q does not parse: %v", s.Text, text, errs)
		return false
	}
	got, err := doc.Env.Eval(n, nil)
	if err != nil {
		t.Errorf("%q: the substitution read as %q does not evaluate: %v", s.Text, text, err)
		return false
	}
	if msg := sameValue(got, s.Res.Value, 1e-6); msg != "" {
		t.Errorf("%q: the substitution %q evaluates to another value: %s", s.Text, text, msg)
	}
	return true
}

func walkCanon(n expr.Node, f func(expr.Node)) {
	f(n)
	switch n := n.(type) {
	case *expr.WithUnit:
		walkCanon(n.X, f)
	case *expr.Unary:
		walkCanon(n.X, f)
	case *expr.Binary:
		walkCanon(n.X, f)
		walkCanon(n.Y, f)
	case *expr.Abs:
		walkCanon(n.X, f)
	case *expr.Call:
		for _, a := range n.Args {
			walkCanon(a, f)
		}
	case *expr.MatrixLit:
		for _, r := range n.Rows {
			for _, e := range r {
				walkCanon(e, f)
			}
		}
	}
}

// sameValue compares two values within a relative tolerance: the
// substitution shows every value rounded to the sheet's 12 digits.
func sameValue(got, want expr.Value, tol float64) string {
	switch w := want.(type) {
	case *expr.Scalar:
		g, ok := got.(*expr.Scalar)
		if !ok {
			return fmt.Sprintf("a %T, not a scalar", got)
		}
		return sameScalar(g, w, tol)
	case *expr.Matrix:
		g, ok := got.(*expr.Matrix)
		if !ok || g.Rows != w.Rows || g.Cols != w.Cols {
			return fmt.Sprintf("%T of another shape", got)
		}
		for i := range w.E {
			if msg := sameScalar(&g.E[i], &w.E[i], tol); msg != "" {
				return fmt.Sprintf("entry %d: %s", i+1, msg)
			}
		}
	}
	return ""
}

func sameScalar(g, w *expr.Scalar, tol float64) string {
	if !finite(w.Z) {
		return ""
	}
	if g.Dim != w.Dim {
		return fmt.Sprintf("dimension %v, want %v", g.Dim, w.Dim)
	}
	scale := math.Max(cmplx.Abs(g.Z), cmplx.Abs(w.Z))
	if cmplx.Abs(g.Z-w.Z) > tol*scale+1e-300 {
		return fmt.Sprintf("%v, want %v", g.Z, w.Z)
	}
	return ""
}

func finite(z complex128) bool {
	return !cmplx.IsNaN(z) && !cmplx.IsInf(z)
}

// namedCases are statements for every operator and form of LANGUAGE.md
// section 3 where a bracket is at stake.
var namedCases = []string{
	"S_3 = 3 * u * conj(i_1 + i_2)",   // conjugate of a sum (issue 12)
	"s_ab = conj(a * c)",              // conjugate of a product (issue 12)
	"s_c = conj(c)^2",                 // a power of a conjugate
	"s_d = conj(c^2)",                 // a conjugate of a power
	"p_1 = -a^2",                      // unary minus before a power: −(a²)
	"p_2 = (-a)^2",                    // the power of a negative
	"p_3 = 2^3^2",                     // right to left
	"p_4 = (2^3)^2",                   // left grouping kept
	"p_5 = 10^-3",                     // a signed exponent
	"p_6 = (a + b)^2",                 //
	"p_7 = (a / b)^2",                 // a fraction under a power
	"p_8 = (1e-3)^2",                  // a number in powers of ten under a power
	"p_9 = (2 A)^2",                   // a unit under a power
	"p_10 = b^2",                      // substituted negative base
	"q_1 = a - (b - c)",               // right operand of −
	"q_2 = a - (b + c)",               //
	"q_3 = (a - b) - c",               // left to right: no bracket
	"q_4 = a + (b + c)",               // the tree is kept, not only the value
	"q_5 = a * (b * c)",               //
	"q_6 = a * -b",                    // a·(−b)
	"q_7 = -(a * b)",                  //
	"q_8 = -a * b",                    //
	"q_9 = - -a",                      //
	"q_10 = a / b / c",                // fractions
	"q_11 = a / (b / c)",              //
	"q_12 = (a + b) / (c - d)",        //
	"q_13 = a * b / c",                //
	"q_14 = a / b * c",                //
	"r_1 = z_L || z_L",                // parallel
	"r_2 = (z_L || z_L) * 2",          //
	"r_3 = z_L || (z_L + z_L)",        //
	"r_4 = z_L + z_L || z_L",          //
	"r_5 = z_L || z_L || z_L",         //
	"r_6 = z_L || (z_L || z_L)",       //
	"t_1 = 230 V∠-120°",               // polar literal
	"t_2 = 16∠-40° A",                 // a unit after the angle
	"t_3 = a ∠ (phi + 30°)",           // a sum right of ∠
	"t_4 = (a ∠ phi) * 2",             //
	"t_5 = (-a) ∠ phi",                // a signed left operand of ∠
	"t_6 = -a ∠ phi",                  // −(a∠φ)
	"t_7 = a ∠ -phi",                  // a signed angle
	"t_8 = a ∠ phi^2",                 //
	"t_9 = (a ∠ phi) ∠ phi",           //
	"t_10 = a ∠ (b ∠ phi)",            //
	"t_11 = (a ∠ phi) A",              // a unit on a phasor with a name for its angle
	"t_12 = (a + b)°",                 // degree on a sum
	"t_13 = (0.12 + j0.08) Ω",         // unit on a sum
	"t_14 = (a) Ω",                    //
	"t_15 = (a^2) A",                  //
	"t_16 = 4.7e3 Ω",                  //
	"t_17 = j1e3",                     //
	"t_18 = a * j4",                   //
	"v_1 = |a - c|",                   // |x|
	"v_2 = abs(a + c) * 2",            //
	"v_3 = ||a| - |c||",               //
	"v_4 = sqrt(a + 2)^2",             //
	"v_5 = exp(-a) + sin(phi)^2",      //
	"v_6 = f(a + b, c * d)",           // a user function
	"v_7 = polar(a, phi) + re(c)",     //
	"v_8 = atan2(a, b)",               //
	"m_1 = M * w",                     // matrices
	"m_2 = transpose(M)",              //
	"m_3 = transpose(M + M)",          // transpose of a compound operand
	"m_4 = [a, b + c; -c, d] * w",     //
	"m_5 = M(1, 2) + w(2)",            //
	"m_6 = inv(M) * (M * w)",          //
	"x_1, x_2 = [a + b; c * d]",       // several names
	"x_3, x_4 = M * w",                //
	"check a < b + c",                 // checks
	"check 1 < a <= 3 < omega",        // a chain
	"check |c| == 5",                  //
	"check a * b != -(b - a)",         //
	"h(s, t) = s * (t + 1) - s^2",     // a function definition
	"beta(x) = conj(x * x)",           // a function named by a Greek letter
	"a + b * c",                       // a bare expression
	"y_2[kV] = u * (a + b)",           // a display bracket
	"n_1 = k_1 * 1e-3 + omega * 1e5",  //
	"n_2 = -(-a)",                     //
	"n_3 = a - -b",                    //
	"n_4 = +a + +b",                   //
	"n_5 = omega * (alpha_2 - a) * b", //
	"l_1 = tb.R_20(2.5 mm^2) * a",     // a table look-up
	"l_2 = interp(tb.R_20, 3 mm^2)",   // interpolation names a column
	"l_3 = up(tb, 3 mm^2) + 1 mm^2",   // the next key up
}

func TestTypesetRoundTripNamed(t *testing.T) {
	st := roundTrip(t, namedCases)
	if st.formulas < len(namedCases) {
		t.Errorf("only %d of %d named cases were read", st.formulas, len(namedCases))
	}
	if st.substs < len(namedCases)/2 {
		t.Errorf("only %d substitutions were evaluated", st.substs)
	}
}

// gen makes random statement text from the grammar of LANGUAGE.md
// section 3, bracketing operands at random: whatever parses is checked.
type gen struct{ r *rand.Rand }

var (
	genLeaves     = []string{"a", "b", "c", "d", "k_1", "omega", "alpha_2", "2", "0.5", "3", "1e-3", "4.7e3", "j4", "j0.5", "pi", "w", "M"}
	genUnitLeaves = []string{"u", "i_1", "i_2", "z_L", "230 V", "2 A", "30°", "0.5 rad", "(0.12 + j0.08) Ω", "16 mm^2", "10 A∠-30°", "phi"}
	genOps        = []string{"+", "-", "*", "/", "^", "∥", "||", "∠", "/_", "+", "-", "*", "/"}
	genFuncs      = []string{"conj", "abs", "sqrt", "re", "im", "arg", "exp", "sin", "cos", "ln", "transpose", "f", "polar", "atan2", "min", "max"}
)

func (g *gen) pick(s []string) string { return s[g.r.Intn(len(s))] }

func (g *gen) leaf() string {
	if g.r.Intn(4) == 0 {
		return g.pick(genUnitLeaves)
	}
	return g.pick(genLeaves)
}

func (g *gen) operand(depth int) string {
	e := g.expr(depth)
	if g.r.Intn(2) == 0 {
		return "(" + e + ")"
	}
	return e
}

func (g *gen) expr(depth int) string {
	if depth <= 0 || g.r.Intn(5) == 0 {
		return g.leaf()
	}
	switch g.r.Intn(12) {
	case 0, 1, 2, 3, 4, 5:
		op := g.pick(genOps)
		x, y := g.operand(depth-1), g.operand(depth-1)
		switch op {
		case "^":
			y = g.pick([]string{"2", "-1", "0.5", "3", "-2", y})
		case "∠", "/_":
			y = g.pick([]string{"30°", "-40°", "phi", "-phi", "(phi + 10°)", "0.5 rad", "arg(c)", y})
		}
		sp := g.pick([]string{" ", ""})
		if op == "||" || op == "/_" {
			sp = " "
		}
		return x + sp + op + sp + y
	case 6:
		return g.pick([]string{"-", "+", "-"}) + g.operand(depth-1)
	case 7, 8:
		fn := g.pick(genFuncs)
		switch fn {
		case "f", "atan2", "min", "max":
			return fn + "(" + g.expr(depth-1) + ", " + g.expr(depth-1) + ")"
		case "polar":
			return "polar(" + g.expr(depth-1) + ", " + g.pick([]string{"phi", "30°", "arg(c)"}) + ")"
		}
		return fn + "(" + g.expr(depth-1) + ")"
	case 9:
		return "|" + g.expr(depth-1) + "|"
	case 10:
		return "(" + g.expr(depth-1) + ")" + g.pick([]string{" Ω", "°", " A", " kV", " rad"})
	default:
		switch g.r.Intn(3) {
		case 0:
			return "[" + g.expr(depth-1) + ", " + g.expr(depth-1) + "; " + g.expr(depth-1) + ", " + g.expr(depth-1) + "]"
		case 1:
			return g.pick([]string{"M(1, 2)", "w(2)", "M(2, 1)"})
		}
		return "[" + g.expr(depth-1) + "; " + g.expr(depth-1) + "]"
	}
}

func (g *gen) stmt(k int) string {
	switch g.r.Intn(10) {
	case 0:
		return "check " + g.expr(3) + g.pick([]string{" < ", " <= ", " > ", " >= ", " == ", " != "}) + g.expr(3)
	case 1:
		return fmt.Sprintf("check %s < %s <= %s", g.expr(2), g.expr(2), g.expr(2))
	case 2:
		return fmt.Sprintf("g_%d, h_%d = [%s; %s]", k, k, g.expr(3), g.expr(3))
	case 3:
		return fmt.Sprintf("fn_%d(s, t) = %s", k, strings.NewReplacer("k_1", "s", "omega", "t").Replace(g.expr(3)))
	case 4:
		return g.expr(4)
	}
	return fmt.Sprintf("r_%d = %s", k, g.expr(g.r.Intn(5)+1))
}

func TestTypesetRoundTripGenerated(t *testing.T) {
	g := &gen{rand.New(rand.NewSource(12))}
	var stmts []string
	for k := 1; k <= 1200; k++ {
		stmts = append(stmts, g.stmt(k))
	}
	st := roundTrip(t, stmts)
	t.Logf("%d statements: %d formulas read back, %d substitutions evaluated", len(stmts), st.formulas, st.substs)
	// most generated statements parse; many evaluate (the rest mix units)
	if st.formulas < 1000 || st.substs < 250 {
		t.Errorf("too few statements checked: %d formulas, %d substitutions", st.formulas, st.substs)
	}
}

// FuzzTypesetRoundTrip: whatever statement parses must read back from its
// typeset formula as the same tree, and its substitution must evaluate to
// its result. Its seeds run as an ordinary test.
//
//	go test ./render -run XXX -fuzz FuzzTypesetRoundTrip -fuzztime 5m
func FuzzTypesetRoundTrip(f *testing.F) {
	for _, s := range namedCases[:24] {
		f.Add(s)
	}
	for _, s := range []string{
		"x = -(a + b) * conj(c - d)^2 / (u ∠ phi)",
		"x = 3 * u * conj(i_1 + i_2) + 2 * u * conj(i_2) - u * conj(i_1)",
		"check (a + b) / 2 <= |c|",
		"x = [a, -b; c^2, (d)°]",
		"y = 1 / 2 A",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, line string) {
		if len(line) > 300 || strings.ContainsAny(line, "\n\r`#") || strings.TrimSpace(line) == "" {
			return
		}
		roundTrip(t, []string{line})
	})
}
