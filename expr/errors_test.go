package expr

import (
	"strings"
	"testing"
)

// Every error has a position (line:col in the file, LANGUAGE §8 "errors")
// and a message in words an engineer understands. An error of an
// operator (units or shapes that do not fit) stands on the operator. The rules that make
// these inputs errors are those of LANGUAGE §2-§4; positions are counted
// by hand on the source.

func TestErrors(t *testing.T) {
	tests := []struct {
		name, src, pos, msg string
	}{
		// units
		{"unknown unit ohms", "x = 5 ohms", "1:7", `unknown unit "ohms" (did you mean "ohm" or "Ω"?)`},
		{"unknown prefixed unit", "t = 5 mmin", "1:7", `unknown unit "mmin"`},
		{"name inside a unit", "y = 2 V/x", "1:7", `in "V/x" (inside a unit, * and / join symbols`},
		{"number glued to a name", "y = 2x", "1:6", `unknown unit "x" (to multiply a number by a name, write 2*x)`},
		{"bad unit power", "a = 2 m^", "1:7", "bad power in unit"},
		{"add different units", "P = 3 V + 2 A", "1:9", "cannot add 3 V and 2 A: the units differ (a voltage and a current)"},
		// names
		{"unknown name", "y = 2*zz", "1:7", `unknown name "zz"`},
		{"unknown name close to a defined one", "V_line = 1 V\nV_lime", "2:1", `unknown name "V_lime" (did you mean "V_line"?)`},
		{"unit used as a name", "x = kV", "1:5", `"kV" is a unit: write a unit after a number`},
		{"redefined name", "a = 1\nb = 2\na = 3", "3:1", `"a" is already defined at line 1: each name is defined once`},
		{"redefined by multi-name", "a = 1\nb, a = [1; 2]", "2:4", `"a" is already defined at line 1`},
		{"function redefined as a value", "g(x) = 2*x\ng = 3", "2:1", `"g" is already defined as a function at line 1`},
		{"hides a built-in function", "sqrt = 2", "1:1", `"sqrt" is a built-in function and cannot be redefined`},
		{"hides a built-in constant", "pi = 3.14", "1:1", `"pi" is a built-in constant and cannot be redefined`},
		{"hides j", "x = 1\nj = 2", "2:1", `"j" is a built-in constant`},
		{"function hides a built-in", "sin(x) = x", "1:1", `"sin" is a built-in function`},
		{"parameter hides a built-in", "f(abs) = 1", "1:3", `parameter "abs" would hide a built-in`},
		{"keyword", "check = 3", "1:1", `"check" is a keyword`},
		{"function name without call", "y = sin", "1:5", `"sin" is a function: call it with parentheses`},
		{"unknown function", "y = sqr(4)", "1:5", `unknown function "sqr" (did you mean "sqrt"?)`},
		{"built-in argument count", "y = sqrt(1, 2)", "1:5", "sqrt takes 1 argument, not 2"},
		{"user function argument count", "f(x) = 2*x\nf(1, 2)", "2:1", "f takes 1 argument (defined at line 1), not 2"},
		{"unknown name in a function body", "f(x) = x + y", "1:12", `unknown name "y" in the body of f`},
		{"function calling itself", "f(x) = f(x)", "1:8", "f cannot call itself"},
		{"parameter twice", "f(x, x) = 1", "1:6", `parameter "x" is listed twice`},
		{"function without parameters", "f() = 1", "1:2", "a function needs at least one parameter"},
		{"error inside a function", "f(x) = sqrt(x)\ny = f(2 V)", "2:5", "in f (defined at line 1): sqrt: the square root of a voltage"},
		// syntax
		{"unclosed parenthesis points where it opened", "x = 2*(1 + 3\ny = 1", "1:7", `unclosed parenthesis: this "(" is never closed (add ")")`},
		{"unclosed bracket", "M = [1, 2", "1:5", `unclosed bracket: this "[" is never closed (add "]")`},
		{"wrong closer", "x = (1 + 2]", "1:11", `expected ")" to close the "(" at 1:5, found "]"`},
		{"stray closing parenthesis", "x = 1)", "1:6", `unexpected ")": no parenthesis is open here`},
		{"missing operator", "x = 2 (3)", "1:7", `unexpected ( "(": an operator is missing before it`},
		{"two spaces end the unit", "x = 2  V", "1:8", `"V" is read as a name here: a unit follows its number directly or after one space (write 2 V), and * multiplies by a name`},
		{"expression ends too soon", "x = 1 ∠", "1:8", "expression ends too soon: a value is missing"},
		{"missing expression", "x =", "1:4", `missing expression after "="`},
		{"missing name", "= 3", "1:1", `missing name before "="`},
		{"number on the left", "2 = x", "1:1", `the left side of "=" must be a name`},
		{"check with =", "check 1 = 2", "1:9", "a check compares with ==, not ="},
		{"check without comparison", "check x", "1:8", "a check needs a comparison"},
		{"comparison outside a check", "x = 1 < 2", "1:7", `unexpected "<"`},
		{"illegal character", "x = 2 $ 3", "1:7", `unexpected character '$'`},
		{"exclamation mark", "x = 2 ! 3", "1:7", `unexpected "!" (write != for "not equal")`},
		{"invalid UTF-8", "x = 2 \xff", "1:7", "invalid UTF-8 in the source"},
		{"empty matrix", "M = []", "1:5", "empty matrix []"},
		{"ragged matrix", "M = [1, 2; 3]", "1:12", "row 2 of the matrix has 1 entries, row 1 has 2"},
		{"empty display brackets", "x[] = 1", "1:3", "empty brackets"},
		{"two units in brackets", "x[kA mA] = 1 A", "1:3", `two units in brackets ("kA" and "mA")`},
		{"unknown unit in brackets", "x[ohms] = 1 Ω", "1:3", `unknown unit "ohms"`},
		{"too-deep nesting", "x = " + strings.Repeat("(", 300) + "1" + strings.Repeat(")", 300), "", "expression nested too deeply (more than 200 levels)"},
		{"too-deep unary minus", "x = " + strings.Repeat("-", 500) + "1", "", "expression nested too deeply"},
		{"too-deep powers", "x = 2" + strings.Repeat("^2", 500), "", "expression nested too deeply"},
		{"functions calling each other 2^40 times", fnChain(40), "42:5", "work budget of 100,000,000 units is spent here"},
		{"product too large", "v = [" + strings.Repeat("1; ", 199) + "1]\nM = v * transpose(v)", "2:7", "the product would be a 200×200 matrix: at most 10000 entries are allowed"},
		{"diagonal too large", "v = [" + strings.Repeat("1; ", 199) + "1]\nD = diag(v)", "2:5", "diag: the diagonal matrix would be 200×200"},
		{"unit exponent too large", "x = 1 m^41", "1:7", `unit "m^41" has an exponent beyond ±40`},
		{"unit exponents that add up", "x = 1 m^30·m^30", "1:7", "has an exponent beyond ±40"},
		{"product exponent too large", "x = (1 m^30) * (1 m^30)", "1:5", "the unit of this value has an exponent beyond ±40"},
		{"determinant exponent too large", "x = det(diag([" + strings.Repeat("1 m^5; ", 8) + "1 m^5]))", "1:5", "det: the determinant's unit would have an exponent of 45"},
		{"1000-character number", "x = " + strings.Repeat("1", 1000), "1:5", "number too long (more than 64 characters)"},
		{"number out of range", "x = 1e999", "1:5", "number 1e999 is out of range"},
		// evaluation
		{"division by zero", "x = 1 V / 0", "1:11", "division by zero"},
		{"zero to a negative power", "x = 0^-1", "1:5", "0 raised to a negative power is infinite"},
		{"log of zero", "x = ln(0)", "1:5", "ln: the logarithm of zero is -∞"},
		{"angle of zero", "x = arg(0)", "1:5", "arg: the angle of zero is undefined"},
		{"infinite parallel", "x = 3 Ω ∥ -3 Ω", "1:9", "parallel combination is infinite"},
		{"overflow", "x = exp(1000)", "1:5", "exp: the result is not finite"},
		{"comparing complex values with <", "check (1 + j) < 2", "1:7", "cannot compare the complex value 1 + j1 with <: compare abs(...), re(...) or im(...)"},
		{"comparing a matrix", "check [1; 2] < 3", "1:7", "a check compares single values, not a vector of 2 entries"},
		// vectors and matrices
		{"product of mismatched shapes", "y = [1, 2; 3, 4] * [1, 2, 3]", "1:18", "cannot multiply a 2×2 matrix by a 1×3 matrix: the first needs as many columns (2) as the second has rows (1)"},
		{"sum of mismatched shapes", "y = [1, 2] + [1; 2]", "1:12", "cannot add a 1×2 matrix and a vector of 2 entries: the shapes differ"},
		{"matrix plus scalar", "y = [1, 2] + 1", "1:5", "cannot add a 1×2 matrix and a single value"},
		{"divide by a matrix", "y = 2/[1; 2]", "1:7", "cannot divide by a vector of 2 entries: multiply by inv(...) instead"},
		{"index out of range", "v = [1; 2]\nv(3)", "2:3", "index 3 out of range: v has 2 entries (counting from 1)"},
		{"row out of range", "M = [1, 2; 3, 4]\nM(3, 1)", "2:3", "row 3 out of range: M has 2 rows (counting from 1)"},
		{"column out of range", "M = [1, 2; 3, 4]\nM(1, 0)", "2:6", "column 0 out of range: M has 2 columns (counting from 1)"},
		{"one index into a matrix", "M = [1, 2; 3, 4]\nM(1)", "2:1", "pick an entry with two indices"},
		{"fractional index", "v = [1; 2]\nv(1.5)", "2:3", "an index must be a whole number counting from 1"},
		{"indexing a scalar", "x = 1 A\nx(1)", "2:1", `"x" is a value, not a function or a matrix`},
		{"multi-name assignment with the wrong count", "a, b = [1; 2; 3]", "1:1", "2 names are assigned but the value is a vector of 3 entries: give as many names as it has entries"},
		{"multi-name assignment of a scalar", "a, b = 3", "1:1", "2 names are assigned but the value is a single value"},
		{"inv of a singular matrix", "y = inv([1, 2; 2, 4])", "1:5", "inv: the matrix is singular: it has no inverse"},
		{"inv of a non-square matrix", "y = inv([1, 2])", "1:5", "inv: needs a square matrix, not a 1×2 matrix"},
		{"inv of a scalar", "y = inv(2)", "1:5", "inv: needs a square matrix, not a single value"},
		{"abs bars of a vector", "y = |[1; 2]|", "1:5", "|x| needs a single value, not a vector of 2 entries"},
		{"matrix inside a matrix", "y = [[1; 2], 3]", "1:6", "a matrix entry must be a single value"},
		{"seq of four", "y = seq(1, 2, 3, 4)", "1:5", "seq takes 1 to 3 arguments, not 4"},
		{"seq of a 2-vector", "y = seq([1; 2])", "1:5", "seq: needs three values or a vector of three entries"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := firstError(tc.src)
			if err == nil {
				t.Fatalf("%q: no error", tc.src)
			}
			p := errPos(err)
			if tc.pos != "" && p.String() != tc.pos {
				t.Errorf("error at %s, want %s (%v)", p, tc.pos, err)
			}
			if !posInside(tc.src, p) {
				t.Errorf("error position %s is outside the input", p)
			}
			if !strings.Contains(errMsg(err), tc.msg) {
				t.Errorf("message\n %q\nwant it to contain\n %q", errMsg(err), tc.msg)
			}
		})
	}
}

// posInside reports whether p lies in text: a line of the text, and a
// column from 1 to one past the line's last character.
func posInside(text string, pos Pos) bool {
	p := pos.Position()
	lines := strings.Split(text, "\n")
	if p.Line < 1 || p.Line > len(lines) {
		return false
	}
	return p.Col >= 1 && p.Col <= len([]rune(lines[p.Line-1]))+1
}

// TestMisleadingMessages: messages that used to name a symptom (an
// unclosed bracket, a stray "_", a missing operator) name the cause and
// the fix (issue 12). Positions are counted by hand on the source.
func TestMisleadingMessages(t *testing.T) {
	tests := []struct {
		name, src, pos, msg string
	}{
		{"space before a display bracket", "I_k [kA] = 3 A", "1:4", "a space stands between I_k and the display bracket [kA]: the bracket follows directly, write I_k[kA]"},
		{"space before a display bracket with a form", "Z_s  [Ω rect] = 3 Ω", "1:4", "a space stands between Z_s and the display bracket [Ω rect]"},
		{"bracket holding no unit after a space", "x = 2\ny = x [1]", "2:7", `unexpected "[": brackets after a value hold its display unit, written directly after it (x[kA]); an entry of a vector or matrix is picked with parentheses, v(1) or M(1, 2)`},
		{"space before the bracket of a bare expression", "2 A [mA]", "1:4", "a space stands between A and the display bracket [mA]: the bracket follows directly, write A[mA]"},
		{"number glued to a subscripted name", "x = 2Z_s", "1:6", `"Z_s" after a number is read as a unit, and a unit holds no "_" or digits: to multiply by the name Z_s, write 2*Z_s`},
		{"number and space before a subscripted name", "x = 0.5 V_1", "1:9", `to multiply by the name V_1, write 0.5*V_1`},
		{"parenthesis glued to a subscripted name", "x = (1 + 2)Z_s", "1:12", `write (...)*Z_s`},
		{"number glued to a name with a digit", "x = 2x1", "1:6", `to multiply by the name x1, write 2*x1`},
		{"square millimetres written mm2", "A_c = 16 mm2", "1:10", `"mm2" is not a unit: write mm² or mm^2 for mm squared (or 16*mm2 to multiply by a name mm2)`},
		{"cubic metres written m3", "v = 2 m3", "1:7", `write m³ or m^3 for m cubed`},
		{"kvar in the wrong case", "Q = 50 kVAr", "1:8", `unknown unit "kVAr" (did you mean "kvar"`},
		{"kVA in the wrong case", "S = 50 KVA", "1:8", `(did you mean "kVA"`},
		{"function without parentheses", "y = ln 0", "1:5", "ln is a function: put its argument in parentheses, ln(0)"},
		{"function of a name without parentheses", "x = 2\ny = sqrt x", "2:5", "sqrt is a function: put its argument in parentheses, sqrt(x)"},
		{"square-root sign", "x = √3", "1:5", "unexpected character '√' (write sqrt(x) for a square root)"},
		{"superscript outside a unit", "y = 2²", "1:6", "(² is read only inside a unit, as in mm²: write ^2 for a power)"},
		{"two units with a space", "P = 2 V A", "1:9", `"A" is read as a name here: a space ends a unit, and inside a unit symbols are joined by · or * with no space (write V·A)`},
		{"ohm glued to a subscript", "R = 2 Ω_1", "1:7", `to multiply by the name Ω_1, write 2*Ω_1`},
		{"subscript digit", "V₁ = 2", "1:2", "unexpected character '₁' (a subscript is written with _, as in V_1)"},
		{"a value followed by a value", "x = 2\ny = x 3", "2:7", `unexpected number "3": an operator is missing before it (write * to multiply)`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := firstError(tc.src)
			if err == nil {
				t.Fatalf("%q: no error", tc.src)
			}
			if got := errPos(err).String(); got != tc.pos {
				t.Errorf("%q: error at %s, want %s (%v)", tc.src, got, tc.pos, err)
			}
			if !strings.Contains(errMsg(err), tc.msg) {
				t.Errorf("%q: message\n %q\nwant it to contain\n %q", tc.src, errMsg(err), tc.msg)
			}
		})
	}
}

func TestNestingErrorPointsAtAParenthesis(t *testing.T) {
	// MaxDepth: the error stands on one of the opening parentheses.
	src := strings.Repeat("(", 300) + "1" + strings.Repeat(")", 300)
	err := firstError(src)
	if err == nil {
		t.Fatal("no error")
	}
	p := errPos(err).Position()
	if p.Line != 1 || p.Col < 1 || p.Col > 300 {
		t.Errorf("error at %s, want on one of the 300 parentheses", p)
	}
}

func TestErrorRecovery(t *testing.T) {
	// parse.go: a statement that cannot be parsed becomes a BadStmt and the
	// next lines are still read and evaluated.
	b := runBlock("x = 2*(1 + 3\ny = 1 V\nz = 5 ohms\nw = y * 2")
	if len(b.parse) != 2 {
		t.Fatalf("parse errors %v, want 2", b.parse)
	}
	if _, ok := b.stmts[0].(*BadStmt); !ok {
		t.Errorf("statement 1 is %s", stmtString(b.stmts[0]))
	}
	w := b.env.Lookup("w")
	if w == nil || w.Value.(*Scalar).Z != 2 {
		t.Errorf("w = %v, want 2 V", w)
	}
	// the names of a statement that did not parse are unavailable, so that
	// their uses say so once (exec.go)
	for _, name := range []string{"x", "z"} {
		if bd := b.env.Lookup(name); bd == nil || !bd.Unavailable || bd.Value != nil {
			t.Errorf("%s: binding %+v, want unavailable", name, bd)
		}
	}
}

func TestBadNumberIsNotEvaluated(t *testing.T) {
	// A number the scanner cannot read must not stand in as some value.
	for _, src := range []string{"x = " + strings.Repeat("9", 1000), "x = 1e999", "x = 2 * 1e400 V"} {
		b := runBlock(src)
		if len(b.parse) == 0 {
			t.Errorf("%q: no error", src)
		}
		if bd := b.env.Lookup("x"); bd == nil || !bd.Unavailable || bd.Value != nil {
			t.Errorf("%q: x bound as %+v, want unavailable", src, bd)
		}
	}
	var errs ErrorList
	x, _ := ParseExpr(NewSource("1e999 V", Pos{}), &errs)
	if _, ok := x.(*BadExpr); !ok || len(errs) != 1 {
		t.Errorf("ParseExpr: %s, errors %v; want a BadExpr and one error", sexpr(x), errs)
	}
}

func TestErrorListSort(t *testing.T) {
	// pos.go: Sort orders by position, Error writes line:col: message.
	f := NewFile("", " a  b\n\nc") // a at 1:2, b at 1:5, c at 3:1
	l := ErrorList{{f.Pos(7), "c"}, {f.Pos(4), "b"}, {f.Pos(1), "a"}}
	l.Sort()
	if got := l.Error(); got != "1:2: a\n1:5: b\n3:1: c" {
		t.Errorf("got %q", got)
	}
	if (ErrorList{}).Err() != nil {
		t.Error("empty list is not nil error")
	}
}

// TestErrorReport: an error is written "file:line:col: message" (the
// line and column counted by hand in the text: "b" is the 3rd character
// of line 2, "é" counting as one), a label before the message, without
// the file when it has none, and the message alone without a position.
func TestErrorReport(t *testing.T) {
	f := NewFile("feeder.md", "x\né b")
	e := &Error{Pos: f.Pos(5), Msg: "m"}
	for got, want := range map[string]string{
		e.Error():                            "feeder.md:2:3: m",
		e.Report("warning"):                  "feeder.md:2:3: warning: m",
		e.InFile():                           "2:3: m",
		e.Pos.String():                       "2:3",
		(&Error{Msg: "m"}).Report("warning"): "warning: m",
		(&Error{Pos: PlaceAt("b", 2, 3), Msg: "m"}).Error(): "2:3: m",
	} {
		if got != want {
			t.Errorf("got %q, want %q", got, want)
		}
	}
}
