package calcdoc_test

import (
	"calcdoc/calcdoc"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"calcdoc/expr"
)

func parse(t *testing.T, src string) *calcdoc.Document {
	t.Helper()
	return calcdoc.Parse("test.md", []byte(src), kinds)
}

func value(t *testing.T, d *calcdoc.Document, name string) *expr.Scalar {
	t.Helper()
	for _, v := range d.Values {
		if v.Name == name {
			s, ok := v.Value.(*expr.Scalar)
			if !ok {
				t.Fatalf("%s is not a scalar", name)
			}
			return s
		}
	}
	t.Fatalf("no value %s; errors: %v", name, d.Errors)
	return nil
}

func near(a, b complex128, rel float64) bool {
	return cmplx.Abs(a-b) <= rel*math.Max(cmplx.Abs(a), cmplx.Abs(b))
}

func TestFrontMatter(t *testing.T) {
	cases := []struct {
		name    string
		fm      string
		wantErr string // substring of the one error, "" for none
		warn    string
		check   func(t *testing.T, fm calcdoc.FrontMatter)
	}{
		{name: "all keys", fm: "title: T\nproject: P\nnumber: N-1\nrevision: B\nprepared: a\nchecked: b\napproved: c\ndate: 2026-11-30\nclient: C\ndigits: 6\nphasors: peak\npaper: letter\nrevisions:\n  - {rev: A, date: 2026-10-01, by: x, note: first}\n",
			check: func(t *testing.T, fm calcdoc.FrontMatter) {
				if fm.Title != "T" || fm.Number != "N-1" || fm.Digits != 6 || fm.Phasors != "peak" || fm.Paper != "letter" || len(fm.Revisions) != 1 || fm.Revisions[0].Note != "first" || fm.Client != "C" {
					t.Errorf("got %+v", fm)
				}
			}},
		{name: "negative digits", fm: "digits: -3\n", wantErr: `"digits"`},
		{name: "too many digits", fm: "digits: 13\n", wantErr: `"digits"`},
		{name: "bad phasors", fm: "phasors: average\n", wantErr: `"phasors"`},
		{name: "bad paper", fm: "paper: a3\n", wantErr: `"paper"`},
		{name: "bad date", fm: "date: 30/11/2026\n", wantErr: `"date"`},
		{name: "impossible date", fm: "date: 2026-02-30\n", wantErr: `"date"`},
		{name: "unknown key warns", fm: "colour: red\n", warn: `unknown front matter key "colour"`},
		{name: "not yaml", fm: "title: [unclosed\n", wantErr: "not valid YAML"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := parse(t, "---\n"+c.fm+"---\n\n```calc\nx = 1\n```\n")
			if c.wantErr == "" && len(d.Errors) > 0 {
				t.Fatalf("unexpected errors: %v", d.Errors)
			}
			if c.wantErr != "" {
				if len(d.Errors) != 1 || !strings.Contains(d.Errors[0].Msg, c.wantErr) {
					t.Fatalf("want one error with %q, got %v", c.wantErr, d.Errors)
				}
				if d.Errors[0].Pos.Line() < 2 {
					t.Errorf("error line %d should be inside the front matter", d.Errors[0].Pos.Line())
				}
			}
			if c.warn != "" && (len(d.Warnings) != 1 || !strings.Contains(d.Warnings[0].Msg, c.warn)) {
				t.Errorf("want warning %q, got %v", c.warn, d.Warnings)
			}
			if c.check != nil {
				c.check(t, d.Front)
			}
		})
	}
}

func TestLineNumbersAreFileLines(t *testing.T) {
	src := "---\ntitle: x\n---\n\nSome prose.\n\n```calc\na = 1 V\nb = a + 2 A\n```\n\nMore `=zz` here.\n"
	d := parse(t, src)
	if len(d.Errors) != 2 {
		t.Fatalf("want 2 errors, got %v", d.Errors)
	}
	// b = a + 2 A is line 9; the "+" is at column 7
	if e := d.Errors[0]; e.Pos.Position().InFile() != (expr.Position{Line: 9, Col: 7}) || !strings.Contains(e.Msg, "cannot add 1 V and 2 A") {
		t.Errorf("first error %v", e)
	}
	// `=zz` on line 12: zz starts at column 8
	if e := d.Errors[1]; e.Pos.Position().InFile() != (expr.Position{Line: 12, Col: 8}) || !strings.Contains(e.Msg, `unknown name "zz"`) {
		t.Errorf("second error %v", e)
	}
	if v := d.Values[0]; v.Name != "a" || v.Pos.Line() != 8 {
		t.Errorf("value a at %v", v.Pos)
	}
}

func TestTopToBottom(t *testing.T) {
	d := parse(t, "Use `=x` before it is defined.\n\n```calc\nx = 2\ny = z\n```\n\n```calc\nz = 3\n```\n")
	if len(d.Errors) != 2 {
		t.Fatalf("want 2 errors (x used above, z used above), got %v", d.Errors)
	}
	for _, e := range d.Errors {
		if !strings.Contains(e.Msg, "unknown name") {
			t.Errorf("unexpected error %v", e)
		}
	}
}

func TestUnavailableDoesNotCascade(t *testing.T) {
	src := "```calc\nI_x = 3 V + 2 A\nP = I_x * 2\nQ = P + 1\ncheck P < 1\n```\n\nThe value `=P`.\n"
	d := parse(t, src)
	if len(d.Errors) != 1 {
		t.Fatalf("want only the root error, got %v", d.Errors)
	}
	b := d.Blocks[0]
	stmts := b.Result.([]*calcdoc.Stmt)
	for _, st := range stmts[1:] {
		if st.Unavailable == nil {
			t.Errorf("line %d should be marked not evaluated", st.Stmt.Pos().Line())
		} else if st.Unavailable.Def.Line() != 2 {
			t.Errorf("line %d points at line %d, want 2", st.Stmt.Pos().Line(), st.Unavailable.Def.Line())
		}
	}
	if d.Checks[0].Result != nil {
		t.Errorf("the check should not have been evaluated")
	}
	if d.Inline[0].Err == nil {
		t.Errorf("the inline value should carry the unavailable note")
	}
	// a statement that failed to parse also marks its name
	d = parse(t, "```calc\nf = (1 + 2\ng = f * 2\n```\n")
	if len(d.Errors) != 1 || !strings.Contains(d.Errors[0].Msg, "unclosed") {
		t.Fatalf("want the unclosed parenthesis only, got %v", d.Errors)
	}
	if st := d.Blocks[0].Result.([]*calcdoc.Stmt)[1]; st.Unavailable == nil {
		t.Errorf("g should be not evaluated, got %+v", st.Res)
	}
}

func TestErrorsSortedAndEvaluationGoesOn(t *testing.T) {
	src := "```calc\na = 1 ohms\nb = 2 V\nc = b / 0\nd = b * 2\n```\n"
	d := parse(t, src)
	if len(d.Errors) != 2 {
		t.Fatalf("got %v", d.Errors)
	}
	if !d.Errors[0].Pos.Before(d.Errors[1].Pos) {
		t.Errorf("errors not sorted: %v", d.Errors)
	}
	if got := value(t, d, "d"); got.Z != 4 {
		t.Errorf("d = %v", got.Z)
	}
}

func TestInvalidUTF8(t *testing.T) {
	d := calcdoc.Parse("bad.md", []byte("# Title \xff\n\n```calc\nx = 1\n```\n"), kinds)
	if len(d.Errors) != 1 || !strings.Contains(d.Errors[0].Msg, "UTF-8") || d.Errors[0].Pos.Position().InFile() != (expr.Position{Line: 1, Col: 9}) {
		t.Fatalf("got %v", d.Errors)
	}
	if strings.Contains(string(d.Text), "\xff") {
		t.Errorf("invalid byte kept in the text")
	}
}

// IEEE Std 1459-2010 defines the complex power S = V·I*, the active power
// P = Re S, the reactive power Q = Im S and the power factor PF = P/|S|.
// Hand-computed for V = 230∠0° V and I = 10∠-30° A: S = 2300∠30° VA,
// P = 2300·cos 30° = 1991.858 W, Q = 2300·sin 30° = 1150 var, PF = 0.8660254.
func TestIEEE1459Definitions(t *testing.T) {
	d := parse(t, "```calc\nV = 230 V\nI = 10 A∠-30°\nS = V * conj(I)\nP = re(S)\nQ = im(S)\nPF = P / abs(S)\n```\n")
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	checks := []struct {
		name string
		want complex128
		dim  expr.Dim
	}{
		{"S", complex(1991.858428704209, 1150), expr.DimPower},
		{"P", 1991.858428704209, expr.DimPower},
		{"Q", 1150, expr.DimPower},
		{"PF", 0.8660254037844386, expr.Dim{}},
	}
	for _, c := range checks {
		v := value(t, d, c.name)
		if !near(v.Z, c.want, 1e-12) || v.Dim != c.dim {
			t.Errorf("%s = %v %v, want %v", c.name, v.Z, v.Dim, c.want)
		}
	}
	if got := expr.FormatValue(value(t, d, "S"), nil, 4); got != "1.992 + j1.150 kVA" {
		t.Errorf("S shown as %q", got)
	}
	if got := expr.FormatValue(value(t, d, "P"), nil, 4); got != "1.992 kW" {
		t.Errorf("P shown as %q", got)
	}
}

// Power in a resistor, P = V²/R (common practice): 230 V across 52.9 Ω
// dissipates 1000 W.
func TestResistorPower(t *testing.T) {
	d := parse(t, "```calc\nV = 230 V\nR = 52.9 Ω\nP = V^2 / R\n```\n")
	if v := value(t, d, "P"); !near(v.Z, 1000, 1e-12) || v.Dim != expr.DimPower {
		t.Errorf("P = %v", v.Z)
	}
}

func TestValuesJSONShape(t *testing.T) {
	d := parse(t, "```calc\nI_ef[kA] = 230 V / ((0.12 + j0.08) Ω)\nM = [1 Ω, 2 Ω; 3 Ω, 4 Ω]\ncheck |I_ef| <= 6 kA\nx = 1 ohms\n```\n")
	js := string(d.MarshalValues())
	for _, want := range []string{`"file": "test.md"`, `"name": "I_ef"`, `"line": 2`, `"unit": "A"`, `"shown": "1.595∠-33.69° kA"`,
		`"text": "|I_ef| <= 6 kA"`, `"pass": true`, `"col": 7`, `"message": "unknown unit \"ohms\" (did you mean \"ohm\" or \"Ω\"?)"`,
		"\"re\": [\n        [\n          1,\n          2\n        ],"} {
		if !strings.Contains(js, want) {
			t.Errorf("JSON lacks %s:\n%s", want, js)
		}
	}
	// re and im in coherent SI: 230/(0.12+0.08j) = 1326.92 - 884.62j A
	v := d.ValuesJSON().Values[0]
	if re := v.Re.(float64); math.Abs(re-1326.923076923077) > 1e-9 {
		t.Errorf("re = %v", re)
	}
}

func TestRawHTMLNotExecuted(t *testing.T) {
	d := parse(t, "<script>alert(1)</script>\n\n```calc\nx = 1\n```\n")
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
}
