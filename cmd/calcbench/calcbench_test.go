package main

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"regexp"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/calcdoc/kind/solve"
	"calcdoc/expr"
)

// TestQuantile checks the median and quartiles against NumPy's
// percentile with its default (linear) method, Hyndman and Fan's
// definition 7; the expected values are worked by hand from that
// definition (e.g. numpy.percentile([1, 2, 3, 4], 25) = 1.75).
func TestQuantile(t *testing.T) {
	cases := []struct {
		name string
		xs   []float64
		q    float64
		want float64
	}{
		{"median of an odd count is the middle value", []float64{5, 1, 3}, 0.5, 3},
		{"median of an even count is the mean of the middle two", []float64{4, 1, 3, 2}, 0.5, 2.5},
		{"median of one value", []float64{7}, 0.5, 7},
		{"first quartile interpolates", []float64{1, 2, 3, 4}, 0.25, 1.75},
		{"third quartile interpolates", []float64{1, 2, 3, 4}, 0.75, 3.25},
		{"0 is the least value", []float64{9, -2, 4}, 0, -2},
		{"1 is the largest value", []float64{9, -2, 4}, 1, 9},
		{"repeated values", []float64{2, 2, 2, 8}, 0.5, 2},
		{"15 timings, the 8th in order", []float64{15, 3, 9, 1, 12, 7, 5, 14, 2, 11, 4, 13, 6, 10, 8}, 0.5, 8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := append([]float64(nil), c.xs...)
			got, err := Quantile(c.xs, c.q)
			if err != nil {
				t.Fatal(err)
			}
			if got != c.want {
				t.Errorf("Quantile(%v, %v) = %v, want %v", in, c.q, got, c.want)
			}
			for i := range in {
				if in[i] != c.xs[i] {
					t.Fatalf("the input was changed: %v, was %v", c.xs, in)
				}
			}
		})
	}
	m, err := Median([]float64{3, 1, 2})
	if err != nil || m != 2 {
		t.Errorf("Median = %v, %v; want 2", m, err)
	}
	bad := []struct {
		name string
		xs   []float64
		q    float64
	}{
		{"no values", nil, 0.5},
		{"NaN among the values", []float64{1, math.NaN()}, 0.5},
		{"q above 1", []float64{1}, 1.5},
		{"q below 0", []float64{1}, -0.1},
		{"q NaN", []float64{1}, math.NaN()},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			if _, err := Quantile(c.xs, c.q); err == nil {
				t.Error("no error")
			}
		})
	}
}

// calcStatements counts the statements of a document's calc blocks and
// the unknowns of its solve blocks, as calcdoc read them.
func calcStatements(d *calcdoc.Document) (stmts, unknowns, equations int) {
	for _, b := range d.Blocks {
		switch r := b.Result.(type) {
		case []*calcdoc.Stmt:
			for _, s := range r {
				if _, note := s.Stmt.(*expr.Note); !note {
					stmts++
				}
			}
		case *solve.SolveSet:
			unknowns += len(r.Unknowns)
			equations += len(r.Equations)
		}
	}
	return
}

var (
	pyShow  = regexp.MustCompile(`(?m)^show\("([^"]+)"`)
	pyCheck = regexp.MustCompile(`(?m)^checks\.append\(\("([^"]*)"`)
)

// TestGenerate: the document holds exactly the stated number of
// statements and ladder unknowns (counted by calcdoc's own parser),
// evaluates without errors or warnings with every check holding, and the
// script lists the same values, in the same order, and the same checks.
func TestGenerate(t *testing.T) {
	cases := []struct {
		name string
		p    Params
	}{
		{"the comparison: 2,000 statements and 60 nodes", Params{Statements: 2000, Nodes: 60}},
		{"a count that ends inside a feeder's group", Params{Statements: 1004, Nodes: 7}},
		{"the ladder alone", Params{Statements: ladderStatements, Nodes: 300}},
		{"a one-node ladder", Params{Statements: ladderStatements, Nodes: 1}},
		{"the schedule's header alone", Params{Statements: headerStatements, Nodes: 0}},
		{"feeders without a ladder", Params{Statements: 500, Nodes: 0}},
		{"the meshed feeder alone", Params{Statements: meshStatements, Nodes: 500, Mesh: true}},
		{"feeders and a small meshed feeder", Params{Statements: 300, Nodes: 10, Mesh: true}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			doc, script, err := Generate(c.p)
			if err != nil {
				t.Fatal(err)
			}
			d := calcdoc.Parse("gen.md", []byte(doc), kind.Standard())
			if len(d.Errors) > 0 {
				t.Fatalf("%d errors, the first: %v", len(d.Errors), d.Errors[0])
			}
			if len(d.Warnings) > 0 {
				t.Errorf("warnings: %v", d.Warnings)
			}
			stmts, unknowns, equations := calcStatements(d)
			if stmts != c.p.Statements {
				t.Errorf("%d statements, want %d", stmts, c.p.Statements)
			}
			if unknowns != c.p.Nodes || equations != c.p.Nodes {
				t.Errorf("%d unknowns and %d equations, want %d of each", unknowns, equations, c.p.Nodes)
			}
			if got, want := len(d.Values)+len(d.Checks), c.p.Statements+c.p.Nodes; got != want {
				t.Errorf("%d values and %d checks, want %d in all", len(d.Values), len(d.Checks), want)
			}
			for _, ch := range d.Checks {
				if ch.Result == nil || !ch.Result.Pass {
					t.Errorf("line %d: check %s does not hold", ch.Pos.Line(), ch.Text)
				}
			}
			// the script's values in order: a show() per assignment, and the
			// ladder's V_1 ... V_N from its loop, at the place of the solve
			var names []string
			for _, m := range pyShow.FindAllStringSubmatch(script, -1) {
				names = append(names, m[1])
				if m[1] == "Z_p" {
					for k := 1; k <= c.p.Nodes; k++ {
						names = append(names, fmt.Sprintf("V_%d", k))
					}
				}
			}
			if len(names) != len(d.Values) {
				t.Fatalf("the script shows %d values, the document defines %d", len(names), len(d.Values))
			}
			for i, v := range d.Values {
				if names[i] != v.Name {
					t.Fatalf("value %d: the document defines %s, the script shows %s", i+1, v.Name, names[i])
				}
			}
			checks := pyCheck.FindAllStringSubmatch(script, -1)
			if len(checks) != len(d.Checks) {
				t.Fatalf("the script has %d checks, the document %d", len(checks), len(d.Checks))
			}
			for i, ch := range d.Checks {
				if checks[i][1] != ch.Text {
					t.Errorf("check %d: the document says %q, the script %q", i+1, ch.Text, checks[i][1])
				}
			}
			if !strings.Contains(script, "np.linalg.solve(Y, b)") != (c.p.Nodes == 0) {
				t.Errorf("the script solves the ladder: %v, want %v", strings.Contains(script, "np.linalg.solve"), c.p.Nodes > 0)
			}
		})
	}
}

// TestGenerateRefuses: parameters the generator cannot honour are errors.
func TestGenerateRefuses(t *testing.T) {
	cases := []struct {
		name string
		p    Params
		want string
	}{
		{"no statements", Params{Statements: 0, Nodes: 0}, "must be 1 to"},
		{"fewer statements than the ladder needs", Params{Statements: ladderStatements - 1, Nodes: 60}, "needs 8 statements"},
		{"a schedule shorter than its header", Params{Statements: ladderStatements + 2, Nodes: 60}, "at least 3"},
		{"negative nodes", Params{Statements: 100, Nodes: -1}, "must be 0"},
		{"too many nodes", Params{Statements: 100, Nodes: MaxNodes + 1}, "must be 0"},
		{"too many statements", Params{Statements: MaxStatements + 1, Nodes: 0}, "must be 1 to"},
		{"a meshed feeder not a multiple of 5", Params{Statements: meshStatements, Nodes: 12, Mesh: true}, "multiple of 5"},
		{"fewer statements than the meshed feeder needs", Params{Statements: meshStatements - 1, Nodes: 10, Mesh: true}, "needs 10 statements"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, _, err := Generate(c.p)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one saying %q", err, c.want)
			}
		})
	}
}

func value(t *testing.T, d *calcdoc.Document, name string) complex128 {
	t.Helper()
	for _, v := range d.Values {
		if v.Name == name {
			s, ok := v.Value.(*expr.Scalar)
			if !ok {
				t.Fatalf("%s is not a scalar", name)
			}
			return s.Z
		}
	}
	t.Fatalf("%s is not defined", name)
	return 0
}

func near(t *testing.T, name string, got, want complex128) {
	t.Helper()
	if cmplx.Abs(got-want) > 1e-12*cmplx.Abs(want) {
		t.Errorf("%s = %v, want %v", name, got, want)
	}
}

// TestFeederArithmetic: the document computes the formulas stated in
// Generate's doc comment. The expected values are those formulas
// evaluated with Go's math/cmplx; a∥b = ab/(a+b) and S = V·conj(I) are
// common practice.
func TestFeederArithmetic(t *testing.T) {
	doc, _, err := Generate(Params{Statements: 600, Nodes: 0})
	if err != nil {
		t.Fatal(err)
	}
	d := calcdoc.Parse("gen.md", []byte(doc), kind.Standard())
	vn, zsrc := complex(230, 0), complex(0.02, 0.05)
	for _, k := range []int{1, 7, 29, 66} {
		t.Run(fmt.Sprintf("feeder %d", k), func(t *testing.T) {
			l := float64(20 + k%80)
			zc := complex(0.727e-3, 0.08e-3) * complex(l, 0)
			zt := zsrc + zc*(2*zc)/(zc+2*zc)
			ifault := vn / zt
			iload := cmplx.Rect(float64(10+k%30), -float64(25+k%10)*math.Pi/180)
			s := 3 * vn * cmplx.Conj(iload)
			dv := cmplx.Abs(iload*zc) / real(vn)
			near(t, "L", value(t, d, fmt.Sprintf("L_%d", k)), complex(l, 0))
			near(t, "Z_c", value(t, d, fmt.Sprintf("Z_c%d", k)), zc)
			near(t, "Z_t", value(t, d, fmt.Sprintf("Z_t%d", k)), zt)
			near(t, "I_f", value(t, d, fmt.Sprintf("I_f%d", k)), ifault)
			near(t, "I_l", value(t, d, fmt.Sprintf("I_l%d", k)), iload)
			near(t, "S", value(t, d, fmt.Sprintf("S_%d", k)), s)
			near(t, "dV", value(t, d, fmt.Sprintf("dV_%d", k)), complex(dv, 0))
		})
	}
}

// TestLadder: the solved node voltages of the generated ladder against
// the ladder method (common practice): from the far end, with V_N = 1,
// the current in each section is the sum of the shunt currents beyond it
// and each voltage the next one plus that current times Z_s; the source
// end then fixes the scale, V_k = V_s·v_k/v_0.
func TestLadder(t *testing.T) {
	for _, n := range []int{1, 2, 60, 300} {
		t.Run(fmt.Sprintf("%d nodes", n), func(t *testing.T) {
			doc, _, err := Generate(Params{Statements: ladderStatements, Nodes: n})
			if err != nil {
				t.Fatal(err)
			}
			d := calcdoc.Parse("ladder.md", []byte(doc), kind.Standard())
			if len(d.Errors) > 0 {
				t.Fatal(d.Errors)
			}
			vs := complex(11e3/math.Sqrt(3), 0)
			zs := complex(0.05, 0.12)
			zp := vs * vs / cmplx.Conj(complex(8e3, 3e3))
			v := make([]complex128, n+1) // v[0] is the source
			v[n] = 1
			var i complex128
			for k := n; k >= 1; k-- {
				i += v[k] / zp
				v[k-1] = v[k] + i*zs
			}
			scale := vs / v[0]
			for k := 1; k <= n; k++ {
				got := value(t, d, fmt.Sprintf("V_%d", k))
				if want := v[k] * scale; cmplx.Abs(got-want) > 1e-9*cmplx.Abs(want) {
					t.Errorf("V_%d = %v, want %v", k, got, want)
				}
			}
			iin := (vs - v[1]*scale) / zs
			if got := value(t, d, "I_in"); cmplx.Abs(got-iin) > 1e-9*cmplx.Abs(iin) {
				t.Errorf("I_in = %v, want %v", got, iin)
			}
		})
	}
}

const scriptHTML = `<table><tbody>
<tr class="v"><td>Z_c1</td><td>15.27 + j1.68</td><td>mΩ</td><td>0.015267</td><td>0.00168</td></tr>
<tr class="v"><td>I_f1</td><td>3.874∠-59.45°</td><td>kA</td><td>1969.6387066590162</td><td>-3336.4679794687827</td></tr>
</tbody></table>
<table><tbody>
<tr class="c"><td>|I_f1| &gt;= I_min</td><td>holds</td></tr>
<tr class="c"><td>dV_1 &lt;= 4 %</td><td>FAILS</td></tr>
</tbody></table>
`

const valuesJSON = `{"file": "doc.md",
 "values": [{"name": "Z_c1", "line": 5, "re": 0.015267, "im": 0.00168, "unit": "Ω", "shown": "(15.27 + j1.68) mΩ"},
            {"name": "I_f1", "line": 7, "re": 1969.6387066590162, "im": -3336.4679794687827, "unit": "A", "shown": "3.874∠-59.45° kA"}],
 "checks": [{"line": 9, "text": "|I_f1| >= I_min", "pass": true}, {"line": 10, "text": "dV_1 <= 4 %", "pass": false}],
 "errors": []}`

// TestReadBack: both programs' outputs are read back exactly (the
// numbers as written), and documents or tables that cannot be compared
// are errors.
func TestReadBack(t *testing.T) {
	want := &Outcome{
		Values: []Result{{"Z_c1", complex(0.015267, 0.00168)}, {"I_f1", complex(1969.6387066590162, -3336.4679794687827)}},
		Checks: []bool{true, false},
	}
	py, err := ParseScriptHTML([]byte(scriptHTML))
	if err != nil {
		t.Fatal(err)
	}
	cd, err := ParseValuesJSON([]byte(valuesJSON))
	if err != nil {
		t.Fatal(err)
	}
	for name, got := range map[string]*Outcome{"script": py, "calcdoc": cd} {
		if fmt.Sprint(got) != fmt.Sprint(want) {
			t.Errorf("%s: read %v, want %v", name, got, want)
		}
	}
	bad := []struct {
		name string
		read func() error
	}{
		{"a NaN in the table", func() error {
			_, err := ParseScriptHTML([]byte(`<tr class="v"><td>x</td><td>nan</td><td></td><td>nan</td><td>0.0</td></tr>`))
			return err
		}},
		{"an empty table", func() error { _, err := ParseScriptHTML([]byte("<table></table>")); return err }},
		{"a document with errors", func() error {
			_, err := ParseValuesJSON([]byte(`{"values": [], "checks": [], "errors": [{"line": 3, "col": 1, "message": "unknown name"}]}`))
			return err
		}},
		{"a value that is not finite", func() error {
			_, err := ParseValuesJSON([]byte(`{"values": [{"name": "x", "re": null, "im": 0}], "checks": [], "errors": []}`))
			return err
		}},
		{"a check not evaluated", func() error {
			_, err := ParseValuesJSON([]byte(`{"values": [], "checks": [{"line": 2, "text": "x > 1", "pass": null}], "errors": []}`))
			return err
		}},
		{"not JSON", func() error { _, err := ParseValuesJSON([]byte("calcdoc: no such file")); return err }},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			if c.read() == nil {
				t.Error("no error")
			}
		})
	}
}

// TestCompare: identical outcomes agree; a value off by more than the
// tolerance, a different name, a missing value or a different check
// result is a difference.
func TestCompare(t *testing.T) {
	base := func() *Outcome {
		return &Outcome{
			Values: []Result{{"a", complex(1, -2)}, {"b", 0}, {"c", complex(6131.4, -220.3)}},
			Checks: []bool{true, true},
		}
	}
	cases := []struct {
		name   string
		change func(o *Outcome)
		diffs  int
	}{
		{"the same", func(o *Outcome) {}, 0},
		{"within the tolerance", func(o *Outcome) { o.Values[2].Z *= 1 + 1e-12 }, 0},
		{"off by 1e-6 relative", func(o *Outcome) { o.Values[2].Z *= 1 + 1e-6 }, 1},
		{"zero against a tiny value", func(o *Outcome) { o.Values[1].Z = 1e-300 }, 1},
		{"another name", func(o *Outcome) { o.Values[0].Name = "x" }, 1},
		{"a value missing", func(o *Outcome) { o.Values = o.Values[:2] }, 1},
		{"a check result differs", func(o *Outcome) { o.Checks[1] = false }, 1},
		{"a check missing", func(o *Outcome) { o.Checks = o.Checks[:1] }, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := base()
			c.change(p)
			if d := Compare(base(), p, 10); len(d) != c.diffs {
				t.Errorf("%d differences %q, want %d", len(d), d, c.diffs)
			}
		})
	}
	// a long list is cut, and says how many more there are
	p := base()
	for i := range p.Values {
		p.Values[i].Name += "'"
	}
	d := Compare(base(), p, 2)
	if len(d) != 3 || d[2] != "and 1 more differences" {
		t.Errorf("differences %q, want 2 and a count of 1 more", d)
	}
}

// TestOptions: the flags and the refusals of bad ones.
func TestOptions(t *testing.T) {
	o, err := parseOptions([]string{"-runs", "3", "-scaling", "2000, 20000", "-solve-nodes", "", "-figures", "1,4", "-watch-sizes", "500"}, io.Discard)
	if err != nil {
		t.Fatal(err)
	}
	if o.runs != 3 || fmt.Sprint(o.scaling) != "[2000 20000]" || len(o.solveNodes) != 0 || o.statements != 2000 || o.nodes != 60 ||
		fmt.Sprint(o.figures) != "map[1:true 4:true]" || fmt.Sprint(o.watchSizes) != "[500]" {
		t.Errorf("options %+v", o)
	}
	d, err := parseOptions(nil, io.Discard)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.figures) != 5 || d.large != 20000 || d.meshNodes != 500 || fmt.Sprint(d.watchSizes) != "[1000 10000]" || d.watchWrite != "atomic" ||
		len(d.scaling) != 0 || len(d.solveNodes) != 0 {
		t.Errorf("default options %+v", d)
	}
	bad := []struct {
		name string
		args []string
	}{
		{"no runs", []string{"-runs", "0"}},
		{"a list entry that is not a number", []string{"-scaling", "2000,lots"}},
		{"a zero in a list", []string{"-solve-nodes", "0"}},
		{"a large size too small for the ladder", []string{"-large", "5"}},
		{"a figure that does not exist", []string{"-figures", "6"}},
		{"no figure", []string{"-figures", ""}},
		{"a mesh that is not a multiple of 5", []string{"-mesh-nodes", "502"}},
		{"a watch document without a value to edit", []string{"-watch-sizes", "3"}},
		{"an unknown way to save", []string{"-watch-write", "sync"}},
		{"no saves", []string{"-saves", "0"}},
		{"no solve runs", []string{"-solve-runs", "0"}},
		{"a statement count too small for the ladder", []string{"-statements", "9"}},
		{"an argument", []string{"extra"}},
		{"an unknown flag", []string{"-fast"}},
		{"no time allowed", []string{"-timeout", "0s"}},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			if _, err := parseOptions(c.args, io.Discard); err == nil {
				t.Error("no error")
			}
		})
	}
	if st := run([]string{"-runs", "-1"}, io.Discard, io.Discard); st != exitUsage {
		t.Errorf("exit %d for a bad flag, want %d", st, exitUsage)
	}
}
