package expr

import (
	"strings"
	"testing"
	"unicode/utf8"
)

// The expected trees below are written by hand from the grammar of
// /work/shared/LANGUAGE.md, sections 2 and 3 and "Vectors and matrices"
// (cited as LANGUAGE §n beside each group). The engine's output is never
// the source of an expectation.

func parseOne(t *testing.T, src string) (Stmt, ErrorList) {
	t.Helper()
	var errs ErrorList
	stmts := ParseBlock(NewSource(src, Pos{}), CalcMode, &errs)
	if len(stmts) != 1 {
		var got []string
		for _, s := range stmts {
			got = append(got, stmtString(s))
		}
		t.Fatalf("%q: want 1 statement, got %d: %v (errors %v)", src, len(stmts), got, errs)
	}
	return stmts[0], errs
}

func TestGrammar(t *testing.T) {
	tests := []struct {
		name, src, want string
	}{
		// LANGUAGE §3 numbers
		{"integer", "12", "12"},
		{"decimal", "0.5", "0.5"},
		{"exponent negative", "1e-3", "1e-3"},
		{"exponent", "4.7e3", "4.7e3"},
		// LANGUAGE §3: j directly followed by a number is an imaginary literal
		{"j literal", "j4", "j4"},
		{"negative j literal", "-j0.5", "(neg j0.5)"},
		{"j literal with exponent", "j1e3", "j1e3"},
		{"j alone is the constant", "2*j", "(* 2 j)"},
		{"i is an ordinary name", "i4 + i", "(+ i4 i)"},
		// LANGUAGE §3: a unit follows a number or ")" directly or after one space
		{"unit after one space", "230 V", "(unit 230 V)"},
		{"unit directly", "4.7µF", "(unit 4.7 µF)"},
		{"unit power", "16 mm^2", "(unit 16 mm^2)"},
		{"unit quotient", "0.2 Ω/km", "(unit 0.2 Ω/km)"},
		{"unit compound", "0.0175 Ω·mm²/m", "(unit 0.0175 Ω·mm²/m)"},
		{"unit with power in denominator", "9.81 m/s^2", "(unit 9.81 m/s^2)"},
		{"unit star joiner", "1 V*A", "(unit 1 V*A)"},
		{"unit after paren", "(0.12 + j0.08) Ω", "(unit (paren (+ 0.12 j0.08)) Ω)"},
		{"unit directly after paren", "(1 + 2)Ω", "(unit (paren (+ 1 2)) Ω)"},
		{"unit then operator", "2 V + 3 V", "(+ (unit 2 V) (unit 3 V))"},
		{"unit binds tighter than /", "1/2 A", "(/ 1 (unit 2 A))"},
		{"unit on its own needs a number", "x / (1 V)", "(/ x (paren (unit 1 V)))"},
		{"unit symbols are names elsewhere", "V * A / S", "(/ (* V A) S)"},
		{"space ends the unit", "2 V * x", "(* (unit 2 V) x)"},
		{"degree after number", "30°", "(unit 30 °)"},
		{"degree after name", "phi°", "(unit phi °)"},
		{"deg", "30 deg", "(unit 30 deg)"},
		{"rad", "0.5 rad", "(unit 0.5 rad)"},
		// LANGUAGE §3 polar form
		{"angle", "5 V ∠ 30°", "(∠ (unit 5 V) (unit 30 °))"},
		{"angle ascii", "5 V/_30°", "(∠ (unit 5 V) (unit 30 °))"},
		{"angle ascii spaced", "5 V /_ 30°", "(∠ (unit 5 V) (unit 30 °))"},
		{"angle with signed operand", "230 V∠-120°", "(∠ (unit 230 V) (neg (unit 120 °)))"},
		{"unit after the angle applies to the phasor", "16∠-40° A", "(unit (∠ 16 (neg (unit 40 °))) A)"},
		{"unit after the angle, unsigned", "16∠40° kA", "(unit (∠ 16 (unit 40 °)) kA)"},
		{"angle of an expression", "V_1 ∠ (phi + 30°)", "(∠ V_1 (paren (+ phi (unit 30 °))))"},
		{"angle tighter than unary minus", "-a∠30°", "(neg (∠ a (unit 30 °)))"},
		{"power tighter than angle", "a∠b^2", "(∠ a (^ b 2))"},
		{"angle tighter than *", "2*a∠b", "(* 2 (∠ a b))"},
		// LANGUAGE §3 operators, loosest first: + -; ∥; * /; unary -; ∠; ^
		{"parallel", "a ∥ b", "(∥ a b)"},
		{"parallel ascii", "a || b", "(∥ a b)"},
		{"parallel between + and *", "a + b ∥ c * d", "(+ a (∥ b (* c d)))"},
		{"parallel left to right", "a ∥ b ∥ c", "(∥ (∥ a b) c)"},
		{"abs bars", "|x|", "(abs x)"},
		{"abs of a sum", "|3 + j4|", "(abs (+ 3 j4))"},
		{"abs then parallel", "|a| ∥ |b|", "(∥ (abs a) (abs b))"},
		{"unary minus looser than ^", "-2^2", "(neg (^ 2 2))"},
		{"^ right to left", "2^3^2", "(^ 2 (^ 3 2))"},
		{"^ signed exponent", "10^-3", "(^ 10 (neg 3))"},
		{"^ signed exponent chain", "2^-3^2", "(^ 2 (neg (^ 3 2)))"},
		{"unary minus tighter than *", "-a * b", "(* (neg a) b)"},
		{"minus minus", "a - -b", "(- a (neg b))"},
		{"unary plus", "+a", "(pos a)"},
		{"left assoc + -", "a - b - c", "(- (- a b) c)"},
		{"left assoc * /", "a * b / c", "(/ (* a b) c)"},
		{"* tighter than +", "a + b * c", "(+ a (* b c))"},
		{"power of a quantity", "(2 A)^2", "(^ (paren (unit 2 A)) 2)"},
		{"middle dot multiplies", "a · b", "(* a b)"},
		{"unicode minus", "a − b", "(- a b)"},
		// LANGUAGE §3 functions
		{"call one arg", "sqrt(3 + j4)", "(call sqrt (+ 3 j4))"},
		{"call two args", "atan2(y, x)", "(call atan2 y x)"},
		{"call nested", "abs(conj(z))", "(call abs (call conj z))"},
		{"entry of a matrix", "M(1, 2)", "(call M 1 2)"},
		{"pi constant", "2*π", "(* 2 π)"},
		// LANGUAGE "Vectors and matrices"
		{"matrix", "[1, 2; 3, 4]", "[1 2; 3 4]"},
		{"column vector", "[V_a; V_b; V_c]", "[V_a; V_b; V_c]"},
		{"row vector", "[1, 2, 3]", "[1 2 3]"},
		{"matrix entries with units", "[1 Ω, -j2 Ω]", "[(unit 1 Ω) (neg (unit j2 Ω))]"},
		// LANGUAGE §2 statements
		{"assignment", "V_n = 230 V", "(= V_n (unit 230 V))"},
		{"assignment with display unit", "I_ef[kA] = V_n / Z_loop", "(= I_ef[kA] (/ V_n Z_loop))"},
		{"display unit and polar", "I[kA polar] = x", "(= I[kA polar] x)"},
		{"display unit and rect", "Z[Ω rect] = x", "(= Z[Ω rect] x)"},
		{"display polar only", "I[polar] = x", "(= I[polar] x)"},
		{"display rect only", "I[rect] = x", "(= I[rect] x)"},
		{"bare expression with display", "V_n / 2[kV]", "(/ V_n 2)[kV]"},
		{"display after a closing paren", "(a + b)[mA]", "(paren (+ a b))[mA]"},
		{"display after a closing bar", "|I|[kA]", "(abs I)[kA]"},
		{"display after a unit", "2 A[mA]", "(unit 2 A)[mA]"},
		{"an opening bar takes a matrix", "|[3 + j4]|", "(abs [(+ 3 j4)])"},
		{"abs of a matrix after a closed abs", "|a| * |[b]|", "(* (abs a) (abs [b]))"},
		{"display bracket with a compound unit", "rho[Ω·mm²/m] = x", "(= rho[Ω·mm²/m] x)"},
		{"display bracket percent", "u[%] = x", "(= u[%] x)"},
		{"function definition", "derate(x) = 0.87 * x", "(def derate(x) (* 0.87 x))"},
		{"function of two", "f(a, b) = a*b", "(def f(a,b) (* a b))"},
		{"multi-name assignment", "V_0, V_1, V_2 = seq(a, b, c)", "(= V_0,V_1,V_2 (call seq a b c))"},
		{"check", "check |I_ef| <= 6 kA", "(check (cmp (abs I_ef) <= (unit 6 kA)))"},
		{"check chain", "check 0.95 <= pf <= 1", "(check (cmp 0.95 <= pf <= 1))"},
		{"check <", "check a < b", "(check (cmp a < b))"},
		{"check >", "check a > b", "(check (cmp a > b))"},
		{"check >=", "check a >= b", "(check (cmp a >= b))"},
		{"check ==", "check a == b", "(check (cmp a == b))"},
		{"check !=", "check a != b", "(check (cmp a != b))"},
		{"check ≤", "check a ≤ b", "(check (cmp a <= b))"},
		{"check ≥", "check a ≥ b", "(check (cmp a >= b))"},
		{"check ≠", "check a ≠ b", "(check (cmp a != b))"},
		{"check comparison looser than +", "check a + b < c * d", "(check (cmp (+ a b) < (* c d)))"},
		{"note", "# a line that starts with # is a note", "(note a line that starts with # is a note)"},
		{"bare expression", "V_n / 2", "(/ V_n 2)"},
		// LANGUAGE §2: a statement continues while a parenthesis is open
		{"continuation in parenthesis", "x = (1 +\n  2)", "(= x (paren (+ 1 2)))"},
		{"continuation in call", "y = max(1,\n 2,\n 3)", "(= y (call max 1 2 3))"},
		{"continuation in brackets", "M = [1, 2;\n     3, 4]", "(= M [1 2; 3 4])"},
		{"continuation keeps comments as description", "x = (1 + # one\n 2) # two", "(= x (paren (+ 1 2)))"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, errs := parseOne(t, tc.src)
			if len(errs) > 0 {
				t.Fatalf("%q: unexpected errors %v", tc.src, errs)
			}
			if got := stmtString(s); got != tc.want {
				t.Errorf("%q:\n got %s\nwant %s", tc.src, got, tc.want)
			}
		})
	}
}

// TestTwoSpacesEndTheUnit: LANGUAGE §3, "directly or after one space": a
// symbol two spaces after a number is a name, and a name right after a
// number is a name, which the message says.
func TestTwoSpacesEndTheUnit(t *testing.T) {
	s, errs := parseOne(t, "2  V")
	if _, bad := s.(*BadStmt); !bad {
		t.Errorf("got %s, want a bad statement", stmtString(s))
	}
	if len(errs) != 1 || errs[0].Pos.Position().InFile() != (Position{Line: 1, Col: 4}) || !strings.Contains(errs[0].Msg, `"V" is read as a name here`) {
		t.Errorf("errors %v, want one at 1:4 about the name V", errs)
	}
}

func TestDescriptions(t *testing.T) {
	// LANGUAGE §2: "# text" after a statement is its description.
	tests := []struct {
		name, src, desc string
	}{
		{"assignment", "V_n = 230 V                     # nominal phase voltage", "nominal phase voltage"},
		{"check", "check 1 < 2 # holds", "holds"},
		{"function", "derate(x) = 0.87 * x # a user function", "a user function"},
		{"bare", "V_n / 2 # half", "half"},
		{"none", "x = 1", ""},
		{"joined across continued lines", "x = (1 + # one\n 2) # two", "one two"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, errs := parseOne(t, tc.src)
			if len(errs) > 0 {
				t.Fatal(errs)
			}
			if s.Desc() != tc.desc {
				t.Errorf("desc %q, want %q", s.Desc(), tc.desc)
			}
		})
	}
}

func TestDisplayBracket(t *testing.T) {
	// LANGUAGE §2: the bracket holds a unit and/or the form: [kA polar],
	// [Ω rect], [polar], [rect].
	tests := []struct {
		name, src string
		unit      string
		form      Form
	}{
		{"unit and polar", "I[kA polar] = 1 A", "kA", FormPolar},
		{"unit and rect", "Z[Ω rect] = 1 Ω", "Ω", FormRect},
		{"polar", "I[polar] = 1 A", "", FormPolar},
		{"rect", "I[rect] = 1 A", "", FormRect},
		{"unit", "I[mA] = 1 A", "mA", FormAuto},
		{"form first", "I[polar kA] = 1 A", "kA", FormPolar},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, errs := parseOne(t, tc.src)
			if len(errs) > 0 {
				t.Fatal(errs)
			}
			d := s.(*Assign).Display
			if d == nil {
				t.Fatal("no display")
			}
			u := ""
			if d.Unit != nil {
				u = d.Unit.Text
			}
			if u != tc.unit || d.Form != tc.form {
				t.Errorf("got unit %q form %v, want %q %v", u, d.Form, tc.unit, tc.form)
			}
		})
	}
}

func TestStatementsOfABlock(t *testing.T) {
	// LANGUAGE §2: one statement a line; blank lines hold none; the
	// example block of §2 gives six statements and a note.
	src := "# a line that starts with # is a note, shown on the sheet\n" +
		"V_n = 230 V                     # nominal phase voltage\n" +
		"Z_loop = (0.12 + j0.08) Ω       # earth-fault loop impedance\n" +
		"\n" +
		"I_ef[kA] = V_n / Z_loop         # prospective fault current, shown in kA\n" +
		"derate(x) = 0.87 * x            # a user function\n" +
		"check |I_ef| <= 6 kA            # breaking capacity of the protective device\n" +
		"V_n / 2                         # a bare expression: shown, not named\n"
	var errs ErrorList
	stmts := ParseBlock(NewSource(src, Pos{}), CalcMode, &errs)
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	want := []struct {
		kind string
		line int
	}{{"*expr.Note", 1}, {"*expr.Assign", 2}, {"*expr.Assign", 3}, {"*expr.Assign", 5}, {"*expr.FuncDef", 6}, {"*expr.Check", 7}, {"*expr.ExprStmt", 8}}
	if len(stmts) != len(want) {
		t.Fatalf("got %d statements, want %d", len(stmts), len(want))
	}
	for i, s := range stmts {
		if got := strings.TrimSpace(typeName(s)); got != want[i].kind || s.Pos().Line() != want[i].line {
			t.Errorf("statement %d: %s at line %d, want %s at line %d", i, got, s.Pos().Line(), want[i].kind, want[i].line)
		}
	}
	// and it evaluates: 230 V / (0.12 + j0.08) Ω, |I| = 230/|0.12+j0.08| = 1595 A
	b := runBlock(src)
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs)
	}
	if c := b.results[5].Check; c == nil || !c.Pass {
		t.Errorf("check |I_ef| <= 6 kA: %v", b.results[5])
	}
}

func typeName(s Stmt) string {
	switch s.(type) {
	case *Note:
		return "*expr.Note"
	case *Assign:
		return "*expr.Assign"
	case *FuncDef:
		return "*expr.FuncDef"
	case *Check:
		return "*expr.Check"
	case *ExprStmt:
		return "*expr.ExprStmt"
	case *BadStmt:
		return "*expr.BadStmt"
	}
	return "?"
}

// TestPositions: Pos is line:column counting from 1, the column in
// characters (pos.go); End is just after the last character. Expected
// spans are counted by hand on the source text.
func TestPositions(t *testing.T) {
	tests := []struct {
		name  string
		src   string
		stmt  int    // index of the statement
		span  string // the statement's span
		nodes string // spans of the nodes of its expression, Walk order
	}{
		{
			name: "phasor with signed angle",
			src:  "x = 230 V∠-120°",
			span: "1:1-1:16",
			// x=1 ' '=2 '='=3 ' '=4 230=5..7 ' '=8 V=9 ∠=10 -=11 120=12..14 °=15
			nodes: "Binary 1:5-1:16, WithUnit 1:5-1:10, Number 1:5-1:8, Unary 1:11-1:16, WithUnit 1:12-1:16, Number 1:12-1:15",
		},
		{
			name: "unit after the angle, third line",
			src:  "a = 1\n\ny = 16∠-40° A",
			stmt: 1,
			span: "3:1-3:14",
			// y=1 ' ' = ' ' 16=5..6 ∠=7 -=8 40=9..10 °=11 ' '=12 A=13
			nodes: "WithUnit 3:5-3:14, Binary 3:5-3:12, Number 3:5-3:7, Unary 3:8-3:12, WithUnit 3:9-3:12, Number 3:9-3:11",
		},
		{
			name:  "continued line",
			src:   "x = (1 +\n  2)",
			span:  "1:1-2:5",
			nodes: "Paren 1:5-2:5, Binary 1:6-2:4, Number 1:6-1:7, Number 2:3-2:4",
		},
		{
			name:  "call and abs",
			src:   "y = |sqrt(4 Ω²)|",
			span:  "1:1-1:17",
			nodes: "Abs 1:5-1:17, Call 1:6-1:16, WithUnit 1:11-1:15, Number 1:11-1:12",
		},
		{
			name:  "matrix",
			src:   "M = [1, 2;\n 3, 4]",
			span:  "1:1-2:7",
			nodes: "MatrixLit 1:5-2:7, Number 1:6-1:7, Number 1:9-1:10, Number 2:2-2:3, Number 2:5-2:6",
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var errs ErrorList
			stmts := ParseBlock(NewSource(tc.src, Pos{}), CalcMode, &errs)
			if len(errs) > 0 {
				t.Fatal(errs)
			}
			s := stmts[tc.stmt]
			if got := s.Pos().String() + "-" + s.End().String(); got != tc.span {
				t.Errorf("statement span %s, want %s", got, tc.span)
			}
			var x Node
			switch s := s.(type) {
			case *Assign:
				x = s.X
			case *ExprStmt:
				x = s.X
			}
			if got := spans(x); got != tc.nodes {
				t.Errorf("nodes\n got %s\nwant %s", got, tc.nodes)
			}
		})
	}
}

// TestSourcePositions: a block's positions are positions in the .md file
// (scan.go, NewSource and NewSourceLines).
func TestSourcePositions(t *testing.T) {
	t.Run("block starting at line 10", func(t *testing.T) {
		var errs ErrorList
		stmts := ParseBlock(NewSource("a = 1\nb = zz", PlaceAt("a = 1\nb = zz", 10, 1)), CalcMode, &errs)
		env := NewEnv()
		env.Exec(stmts[0])
		r := env.Exec(stmts[1])
		if errPos(r.Err).Position().InFile() != (Position{Line: 11, Col: 5}) {
			t.Errorf("error at %v, want 11:5: %v", errPos(r.Err), r.Err)
		}
	})
	t.Run("inline value inside a line of prose", func(t *testing.T) {
		// the text after "=" of `=I_ef[A]` starting at column 12 of line 7
		var errs ErrorList
		x, d := ParseExpr(NewSourceLines([]string{"I_x + zz[A]"}, Place([]string{"I_x + zz[A]"}, []Position{{Line: 7, Col: 12}})), &errs)
		if len(errs) > 0 || d == nil || d.Unit.Text != "A" {
			t.Fatalf("errs %v display %v", errs, d)
		}
		env := NewEnv()
		env.Define(&Binding{Name: "I_x", Value: Quantity(1, DimCurrent), Pos: PlaceAt("", 1, 1)})
		_, err := env.Eval(x, nil)
		if errPos(err).Position().InFile() != (Position{Line: 7, Col: 18}) || !strings.Contains(errMsg(err), `unknown name "zz"`) {
			t.Errorf("got %v, want unknown name zz at 7:18", err)
		}
	})
	t.Run("columns count characters not bytes", func(t *testing.T) {
		// Ω, ∥ and µ are several bytes each in UTF-8
		err := firstError("y = 1 Ω ∥ 2 µΩ ∥ zz")
		if errPos(err).Position().InFile() != (Position{Line: 1, Col: 18}) {
			t.Errorf("error at %v, want 1:18: %v", errPos(err), err)
		}
	})
}

func TestEquationMode(t *testing.T) {
	// LANGUAGE §5: [label:] lhs = rhs
	tests := []struct{ name, src, want string }{
		{"plain", "V_g = I_a*Z_g", "(eq V_g (* I_a Z_g))"},
		{"labelled", "mesh_b: 0 V = (I_b - I_a)*Z_m", "(eq mesh_b: (unit 0 V) (* (paren (- I_b I_a)) Z_m))"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var errs ErrorList
			stmts := ParseBlock(NewSource(tc.src, Pos{}), EquationMode, &errs)
			if len(errs) > 0 || len(stmts) != 1 {
				t.Fatalf("errs %v, %d statements", errs, len(stmts))
			}
			if got := stmtString(stmts[0]); got != tc.want {
				t.Errorf("got %s want %s", got, tc.want)
			}
		})
	}
}

// TestPositionMemo: File.Position counts on from the last position it
// computed; positions asked in any order (along a line, backwards, across
// lines) are those of a naive count from the start of the file: lines
// counted by "\n", columns by characters.
func TestPositionMemo(t *testing.T) {
	text := "V = 230 V∠-120°\r\n\n\tZ = 3 Ω ∥ (1 + j2) Ω\nµ"
	f := NewFile("memo.md", text)
	var offs []int
	for o := 0; o <= len(text)+2; o++ {
		offs = append(offs, o)
	}
	for o := len(text); o >= -1; o -= 3 {
		offs = append(offs, o, o+1, o-2)
	}
	for _, o := range offs {
		if o > 0 && o < len(text) && !utf8.RuneStart(text[o]) {
			continue // token offsets stand on character boundaries
		}
		c := max(0, min(o, len(text)))
		line := 1 + strings.Count(text[:c], "\n")
		col := 1 + utf8.RuneCountInString(text[strings.LastIndex(text[:c], "\n")+1:c])
		if got, want := f.Position(o), (Position{Filename: "memo.md", Line: line, Col: col}); got != want {
			t.Fatalf("offset %d: %v, counted %v", o, got, want)
		}
	}
}
