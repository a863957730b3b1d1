package expr

import (
	"strings"
	"testing"
	"unicode/utf8"
)

// FuzzEngine scans, parses and evaluates arbitrary text as a calc block,
// as a solve block and as an inline value. Whatever the input, the engine
// must not panic, must finish (every loop and recursion is bounded:
// MaxNumberLen, MaxDepth, MaxCallDepth, the work budget, MaxMatrixEntries),
// and every position it reports (errors and node spans) must lie in the
// input: a line of the block, and a column from 1 to one past the end of
// that line.
//
// Run with: go test -fuzz=FuzzEngine ./expr/
// The seed corpus is in testdata/fuzz/FuzzEngine/.
func FuzzEngine(f *testing.F) {
	for _, s := range []string{
		"V_n = 230 V\nZ = (0.12 + j0.08) Ω\nI[kA] = V_n / Z\ncheck |I| <= 6 kA",
		"a, b, c = seq(1 V, 1 V∠-120°, 1 V∠120°)",
		"x = (1e200 Ω)^2 / (1 Ω)\ncheck x > 1 Ω\ny = 1e-170 Ω ∥ 3e-170 Ω\nM = inv([1 MΩ, 0; 0, 1 nS])",
		// the angle rule, names compared by key, the rewritten messages
		"V = 230 V∠-120\nW = 230 V /_ (pi/6) rad\nP = polar(1, -120)\nf(a) = 1∠a\nf(2)\nf(2°)",
		"phi = 1\nφ = 2\nV_phi = 1\nV_φ = 2\n\u00b5 = 1\n\u03bc = 2\nf(omega, ω) = 1\nx, χ, chi = [1; 2; 3]",
		"\u0399_k = 3 A\nV_\u0430 = 1\nI\u3164 = 1\na\u200bb = 2\nZ\ufeff_s = 1\nx = 1 +\u200d 2\nR\u0301 = 1\n\U0001d465 = 1",
		"I_k [kA] = 3 A\nx = 2Z_s\nA = 16 mm2\nQ = 50 kVAr\ny = ln 0\nz = 2  V\nw = (1)x_1\n2 A [mA]\n√3\n2²",
		// use statements (read line by line before scanning) and table look-ups
		"use I_k3, Z_Q as Z_src from ../fault/msb.md # fault level\nuse x in max as y from a.md\nuse = 3\nuse from\nuse a as from b.md",
		"a = cu.R_20(2.5 mm^2)\nb = interp(cu.R_20, 3 mm^2)\nc = up(cu, 3 mm^2)\nd = ceil(1.1 * 100 A, 10 A)\ne = 70 °C - 20 °C\nf = round(2.5)",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		if len(src) > 4096 {
			return // the engine is linear in the input; long inputs only slow the search
		}
		checkEngine(t, src)
	})
}

// checkEngine runs src through every entry point and checks positions.
func checkEngine(t *testing.T, src string) {
	lines := strings.Split(src, "\n")
	runes := make([]int, len(lines))
	for i, l := range lines {
		runes[i] = utf8.RuneCountInString(l)
	}
	inside := func(what string, pos Pos, end bool) {
		p := pos.Position()
		if !p.IsValid() {
			if !end {
				t.Fatalf("%s: no position (input %q)", what, src)
			}
			return
		}
		if p.Line < 1 || p.Line > len(lines) {
			t.Fatalf("%s: line %d outside the %d lines of %q", what, p.Line, len(lines), src)
		}
		if n := runes[p.Line-1]; p.Col < 1 || p.Col > n+1 {
			t.Fatalf("%s: column %d outside line %d (%d characters) of %q", what, p.Col, p.Line, n, src)
		}
	}
	checkErr := func(err error) {
		if err == nil {
			return
		}
		switch e := err.(type) {
		case *Error:
			inside("error "+e.Msg, e.Pos, false)
		case *UnavailableError:
			inside("unavailable "+e.Name, e.Pos, false)
			inside("definition of "+e.Name, e.Def, false)
		default:
			t.Fatalf("error of type %T: %v", err, err)
		}
		if err.Error() == "" {
			t.Fatal("empty error message")
		}
	}
	checkNode := func(n Node) {
		Walk(n, func(n Node) bool {
			inside("node start", n.Pos(), false)
			inside("node end", n.End(), true)
			return true
		})
	}
	show := func(v Value) {
		if v == nil {
			return
		}
		// nothing that is not finite is ever a value (LANGUAGE.md section 4)
		if err := nonFinite(&Number{}, v); err != nil {
			t.Fatalf("a value that is not finite: %v", v)
		}
		for d := 2; d <= 12; d += 5 {
			_ = FormatValue(v, nil, d)
		}
		_ = Describe(v)
	}

	// as a calc block
	var errs ErrorList
	stmts := ParseBlock(NewSource(src, Pos{}), CalcMode, &errs)
	for _, e := range errs {
		checkErr(e)
	}
	env := NewEnv()
	for _, s := range stmts {
		inside("statement start", s.Pos(), false)
		inside("statement end", s.End(), true)
		var disp *Display
		switch s := s.(type) {
		case *Assign:
			checkNode(s.X)
			disp = s.Display
		case *ExprStmt:
			checkNode(s.X)
			disp = s.Display
		case *FuncDef:
			checkNode(s.Body)
		case *Check:
			checkNode(s.Cmp)
		}
		r := env.Exec(s)
		checkErr(r.Err)
		show(r.Value)
		if r.Value != nil {
			_ = FormatValue(r.Value, disp, 4)
		}
		if r.Check != nil {
			for _, x := range r.Check.Values {
				show(x)
			}
		}
		if r.Check != nil && len(r.Check.Values) != len(r.Check.Holds)+1 {
			t.Fatalf("check with %d values and %d results", len(r.Check.Values), len(r.Check.Holds))
		}
	}

	// as a solve block: parsed, and each side evaluated in the calc block's names
	var eerrs ErrorList
	for _, s := range ParseBlock(NewSource(src, Pos{}), EquationMode, &eerrs) {
		if eq, ok := s.(*Equation); ok {
			checkNode(eq.LHS)
			checkNode(eq.RHS)
			v, err := env.Eval(eq.LHS, nil)
			checkErr(err)
			show(v)
		}
	}
	for _, e := range eerrs {
		checkErr(e)
	}

	// as an inline value
	var ierrs ErrorList
	x, d := ParseExpr(NewSource(src, Pos{}), &ierrs)
	for _, e := range ierrs {
		checkErr(e)
	}
	if len(ierrs) == 0 {
		checkNode(x)
		v, err := env.Eval(x, &Trace{})
		checkErr(err)
		if err == nil {
			if derr := CheckDisplay(v, d); derr == nil {
				_ = FormatValue(v, d, 4)
			}
		}
	}
}

// TestEngineCorner runs checkEngine on inputs that stress the bounds, so
// that a plain go test covers them without the fuzzer.
func TestEngineCorner(t *testing.T) {
	tests := []struct{ name, src string }{
		{"empty", ""},
		{"only newlines", "\n\n\n"},
		{"deep parentheses", strings.Repeat("(", 5000)},
		{"deep brackets", "x = " + strings.Repeat("[", 5000) + "1" + strings.Repeat("]", 5000)},
		{"deep abs", strings.Repeat("|", 3000) + "1"},
		{"deep unary", strings.Repeat("-", 5000) + "1"},
		{"long sum", strings.Repeat("1 + ", 5000) + "1"},
		{"long number", strings.Repeat("7", 10000)},
		{"long name", strings.Repeat("x", 10000) + " = 1"},
		{"long unit", "1 " + strings.Repeat("m·", 2000) + "m"},
		{"big unit power", "1 V^99"},
		{"unit powers that add up", "x = 1 m^99 * 1 m^99"},
		{"det of many rows", "det(diag([" + strings.Repeat("1 m; ", 150) + "1 m]))"},
		{"function blow-up", fnChain(40)},
		{"big outer product", "v = [" + strings.Repeat("1; ", 999) + "1]\nM = v * transpose(v)\nM * M"},
		{"unclosed on last line", "x = (1 +"},
		{"bad utf-8", "\xff\xfe = \xc3"},
		{"display only", "[kA]"},
		{"lone bracket", "x[kA"},
		{"tab and CR", "x\t=\r1 V\r\n"},
		{"comment only", "#"},
		{"check alone", "check"},
		{"angle chain", "1∠1∠1∠1"},
		{"bars", "|||||"},
		{"parallel bars", "1 || || 2"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) { checkEngine(t, tc.src) })
	}
}

// fnChain defines f0(x) = x and f_k(x) = f_{k-1}(x) + f_{k-1}(x) for k up
// to n, then calls f_n(1): 2^n evaluations unless something bounds them.
func fnChain(n int) string {
	var b strings.Builder
	b.WriteString("f0(x) = x\n")
	for k := 1; k <= n; k++ {
		b.WriteString("f" + itoa(k) + "(x) = f" + itoa(k-1) + "(x) + f" + itoa(k-1) + "(x)\n")
	}
	b.WriteString("y = f" + itoa(n) + "(1)")
	return b.String()
}

func itoa(n int) string {
	if n == 0 {
		return "0"
	}
	var d []byte
	for ; n > 0; n /= 10 {
		d = append([]byte{byte('0' + n%10)}, d...)
	}
	return string(d)
}
