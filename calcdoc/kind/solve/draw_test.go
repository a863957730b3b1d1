package solve

import (
	"encoding/xml"
	"fmt"
	"math/cmplx"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render"
	"calcdoc/render/markup"
)

func solveSheet(t *testing.T, src string) (*calcdoc.Document, string) {
	t.Helper()
	doc := calcdoc.Parse("solve.md", []byte(src), testKinds)
	html, err := render.Sheet(doc, render.Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	return doc, string(html)
}

// blockHTML returns the HTML of the solve block whose info string is on
// line.
func blockHTML(t *testing.T, page string, line int) string {
	t.Helper()
	start := strings.Index(page, fmt.Sprintf(`<div class="block solve" id="B%d">`, line))
	if start < 0 {
		t.Fatalf("no solve block at line %d", line)
	}
	rest := page[start:]
	end := len(rest)
	for _, next := range []string{"<div class=\"block", "</main>"} {
		if i := strings.Index(rest[1:], next); i >= 0 && i+1 < end {
			end = i + 1
		}
	}
	return rest[:end]
}

func shown(z complex128, d expr.Dim) string {
	return markup.ShownML(expr.FormatScalar(&expr.Scalar{Z: z, Dim: d}, nil, 4), false)
}

// TestSolveSheetLinear draws a mesh pair and checks the sheet against the
// closed form of the 2×2 system by Cramer's rule (common practice):
// [[Z+10 Ω, −10 Ω], [−10 Ω, Z+10 Ω]]·[I_a; I_b] = [100 V; 0].
func TestSolveSheetLinear(t *testing.T) {
	src := "```calc\nZ = (3 + j4) Ω\n```\n\n" +
		"```solve I_a[A], I_b[A]\n# two meshes\nm_1: 100 V = I_a*Z + (I_a - I_b)*10 Ω\nm_2: 0 V = (I_b - I_a)*10 Ω + I_b*Z # shared branch\n```\n"
	doc, page := solveSheet(t, src)
	if len(doc.Errors) > 0 {
		t.Fatal(doc.Errors)
	}
	z := complex(3, 4)
	det := (z+10)*(z+10) - 100
	ia, ib := 100*(z+10)/det, 100*10/det
	blk := blockHTML(t, page, 5)
	for _, want := range []string{
		// the unknowns, each equation as written with its label, the note, the description
		`id="L5"`, `id="L6"`, `id="L7"`, `id="L8"`, "two meshes", "shared branch",
		`<b class="eqlabel">m_1:</b>`, `<b class="eqlabel">m_2:</b>`,
		"4 real equations for 4 real unknowns",
		// the method and the matrix in its units, rows rhs − lhs (the
		// unknowns are on the right): A = [[Z+10, −10], [−10, Z+10]] Ω, b = [100 V; 0]
		"Linear, solved directly", "condition number estimate κ₁ =", "complex form",
		"<td>" + markup.Math(shown(z+10, expr.DimImpedance)) + "</td><td>" + markup.Math(shown(-10, expr.DimImpedance)) + "</td><td>" + markup.Math(shown(100, expr.DimVoltage)) + "</td>",
		// the solution, marked for verify, at the line of the info string
		`<div class="r" data-value="I_a" data-line="5">` + markup.Math(markup.NameML("I_a")+"<mo>=</mo>"+shown(ia, expr.DimCurrent)),
		`<div class="r" data-value="I_b" data-line="5">` + markup.Math(markup.NameML("I_b")+"<mo>=</mo>"+shown(ib, expr.DimCurrent)),
		// the verification: both sides of m_1 at the solution
		"Verification", "m_1 <span class=\"at\">(line 7)</span>", markup.Math(shown(100, expr.DimVoltage)),
	} {
		if !strings.Contains(blk, want) {
			t.Errorf("the block lacks %q", want)
		}
	}
	if n := strings.Count(blk, "<tr><td>m_"); n != 4 {
		t.Errorf("%d table rows of equations, want 2 in the matrix and 2 in the verification", n)
	}
	wellFormedMath(t, page)
}

// TestSolveSheetRealForm: conj of an unknown is not complex-analytic, so
// the matrix is shown in the real form, with Re and Im rows and columns.
// conj(V) = (3 + j4) V gives Re V = 3 V, Im V = −4 V.
func TestSolveSheetRealForm(t *testing.T) {
	doc, page := solveSheet(t, "```solve V[V]\nconj(V) = (3 + j4) V\n```\n")
	if len(doc.Errors) > 0 {
		t.Fatal(doc.Errors)
	}
	blk := blockHTML(t, page, 1)
	for _, want := range []string{"real form", "<th>Re " + markup.Math(markup.NameML("V")) + "</th>", "<th>Im " + markup.Math(markup.NameML("V")) + "</th>",
		"<td>Re line 2</td>", "<td>Im line 2</td>",
		`data-value="V" data-line="1">` + markup.Math(markup.NameML("V")+"<mo>=</mo>"+shown(complex(3, -4), expr.DimVoltage))} {
		if !strings.Contains(blk, want) {
			t.Errorf("the block lacks %q", want)
		}
	}
}

// TestSolveSheetNonLinear: a non-linear set shows its iterations, one
// history row each, and no matrix. x² = 2 from x = 1 has the root √2.
func TestSolveSheetNonLinear(t *testing.T) {
	doc, page := solveSheet(t, "```solve x real near 1\nx^2 = 2 # the positive root\n```\n")
	if len(doc.Errors) > 0 {
		t.Fatal(doc.Errors)
	}
	var set *SolveSet
	for _, b := range doc.Blocks {
		set, _ = b.Result.(*SolveSet)
	}
	blk := blockHTML(t, page, 1)
	want := fmt.Sprintf("Non-linear, %d iterations.", set.Iterations)
	if !strings.Contains(blk, want) {
		t.Errorf("the block lacks %q", want)
	}
	if n := strings.Count(blk, "Newton step</td></tr>"); n != set.Iterations {
		t.Errorf("%d history rows for %d iterations", n, set.Iterations)
	}
	if strings.Contains(blk, "linear system A·x = b") {
		t.Error("a non-linear set shows a matrix")
	}
	if !strings.Contains(blk, "(real-valued: counts as one real equation)") {
		t.Error("the real-valued equation is not marked")
	}
	if !strings.Contains(blk, markup.Math(markup.NameML("x")+"<mo>=</mo>"+markup.ShownML(expr.FormatScalar(expr.Real(1.4142135623730951), nil, 4), false))) {
		t.Error("the solution √2 is not shown")
	}
}

// TestSolveSheetAppendix: a set of more than InlineSystemLimit unknowns
// shows its matrix in the appendix, linked from the block.
func TestSolveSheetAppendix(t *testing.T) {
	var sb strings.Builder
	n := InlineSystemLimit + 1
	sb.WriteString("```solve ")
	for k := 1; k <= n; k++ {
		if k > 1 {
			sb.WriteString(", ")
		}
		fmt.Fprintf(&sb, "V_%d[V]", k)
	}
	sb.WriteString("\n")
	for k := 1; k <= n; k++ {
		next := ""
		if k < n {
			next = fmt.Sprintf(" - V_%d", k+1)
		}
		fmt.Fprintf(&sb, "e_%d: 2*V_%d%s = %d V\n", k, k, next, k)
	}
	sb.WriteString("```\n")
	doc, page := solveSheet(t, sb.String())
	if len(doc.Errors) > 0 {
		t.Fatal(doc.Errors)
	}
	blk := blockHTML(t, page, 1)
	if !strings.Contains(blk, `<a href="#S1">`) || strings.Contains(blk, "<table class=\"data system\"") {
		t.Error("the block should link to the appendix instead of drawing the matrix")
	}
	app := page[strings.Index(page, "<section class=\"appendix\">"):]
	if !strings.Contains(app, `id="S1"`) || !strings.Contains(app, "<table class=\"data system\"") {
		t.Error("the appendix lacks the matrix")
	}
	if got := strings.Count(app, "<tr><td>e_"); got != n {
		t.Errorf("the appendix matrix has %d rows, want %d", got, n)
	}
	for k := 1; k <= n; k++ {
		if !strings.Contains(blk, fmt.Sprintf(`data-value="V_%d" data-line="1"`, k)) {
			t.Errorf("no result row for V_%d", k)
		}
	}
}

// TestSolveSheetErrors: errors are drawn in place, in the row they belong
// to, and an unsolved set says its unknowns have no value.
func TestSolveSheetErrors(t *testing.T) {
	cases := []struct {
		name, src string
		row       string // the row whose HTML must hold the error
		msg       string
	}{
		{"header", "```solve a, b[XYZ]\na = 1\n```\n", `id="L1"`, "XYZ"},
		{"equation", "```solve I\nI*10 Ω = 230 V\n```\n", `id="L2"`, "different units"},
		{"set", "```solve a, b\ne_1: a + b = 1\ne_2: 2*a + 2*b = 2\n```\n", `class="part"`, "depend on each other"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			doc, page := solveSheet(t, c.src)
			if len(doc.Errors) != 1 {
				t.Fatalf("want one error, got %v", doc.Errors)
			}
			blk := blockHTML(t, page, 1)
			i := strings.Index(blk, c.row)
			if i < 0 {
				t.Fatalf("no %s in the block", c.row)
			}
			rowHTML := blk[i:]
			if j := strings.Index(rowHTML[1:], `<div class="row`); j >= 0 {
				rowHTML = rowHTML[:j+1]
			}
			if !strings.Contains(rowHTML, `<div class="err" role="alert">`) || !strings.Contains(rowHTML, markup.Esc(c.msg)) {
				t.Errorf("the error %q is not drawn in place in %s", c.msg, c.row)
			}
			if strings.Contains(blk, `data-value=`) {
				t.Error("an unsolved set shows a result")
			}
			if !strings.Contains(blk, "Not solved") {
				t.Error("the block does not say the set is not solved")
			}
		})
	}
}

// TestSolveSheetExamples builds the three solve examples: they evaluate
// without errors, every value has its result row at its line, every
// equation of every set has a verification row, and the MathML is
// well-formed.
func TestSolveSheetExamples(t *testing.T) {
	for _, name := range []string{"feeder-regulator-nodal", "parallel-transformers-mesh", "service-cable-constant-power"} {
		t.Run(name, func(t *testing.T) {
			src, err := os.ReadFile(filepath.Join("..", "..", "..", "examples", name+".md"))
			if err != nil {
				t.Fatal(err)
			}
			doc, page := solveSheet(t, string(src))
			if len(doc.Errors) > 0 {
				t.Fatal(doc.Errors)
			}
			if doc.FailedChecks() > 0 {
				t.Errorf("%d checks fail", doc.FailedChecks())
			}
			sets := 0
			for _, b := range doc.Blocks {
				s, ok := b.Result.(*SolveSet)
				if !ok {
					continue
				}
				sets++
				if !s.Solved {
					t.Errorf("the set at line %d is not solved", b.Pos.Line())
				}
				blk := blockHTML(t, page, b.Pos.Line())
				for _, e := range s.Equations {
					if !strings.Contains(blk, fmt.Sprintf("(line %d)</span></td>", e.Line)) && !strings.Contains(blk, fmt.Sprintf("<td>line %d</td><td>", e.Line)) {
						t.Errorf("no verification row for line %d", e.Line)
					}
					// check the verification independently: |LHS − RHS| against the shown difference
					if cmplx.Abs(e.LHS.Z-e.RHS.Z-e.Diff.Z) != 0 {
						t.Errorf("line %d: the difference is not LHS − RHS", e.Line)
					}
				}
			}
			if sets == 0 {
				t.Error("the example has no solve block")
			}
			for _, v := range doc.Values {
				// a solution row names its line; a statement's result line
				// stands in the row of its line, which carries it
				inRow := regexp.MustCompile(fmt.Sprintf(`id="L%d" data-line="%d">[^\n]*<div data-value="%s"[ >]`, v.Pos.Line(), v.Pos.Line(), regexp.QuoteMeta(v.Name))).MatchString(page)
				if !inRow && !strings.Contains(page, fmt.Sprintf(`data-value="%s" data-line="%d"`, v.Name, v.Pos.Line())) {
					t.Errorf("no result row for %s at line %d", v.Name, v.Pos.Line())
				}
			}
			wellFormedMath(t, page)
		})
	}
}

var mathRE = regexp.MustCompile(`(?s)<math.*?</math>`)

func wellFormedMath(t *testing.T, page string) {
	t.Helper()
	for _, m := range mathRE.FindAllString(page, -1) {
		d := xml.NewDecoder(strings.NewReader(m))
		d.Strict = true
		d.Entity = xml.HTMLEntity
		for {
			_, err := d.Token()
			if err != nil {
				if err.Error() != "EOF" {
					t.Errorf("MathML not well-formed: %v in %s", err, m)
				}
				break
			}
		}
	}
}

// A long equation breaks like a long formula row (issue: rows that run off
// the printed page): its row is written in pieces, one <math> per term,
// in a wrapping container, with every term of both sides present. A short
// equation has one box for its right side. The terms are the source's own, so the
// reference is the equation as written.
func TestSolveLongEquationBreaks(t *testing.T) {
	src := "```calc\nZ_1 = 1 Ω\nZ_2 = 2 Ω\nZ_3 = 3 Ω\nZ_4 = 4 Ω\nZ_5 = 5 Ω\nZ_6 = 6 Ω\n```\n" +
		"```solve I[A]\nlong: 100 V = I*Z_1 + I*Z_2 + I*Z_3 + I*Z_4 + I*Z_5 + I*Z_6\n```\n" +
		"```solve J[A]\nshort: 10 V = J*Z_1\n```\n"
	_, page := solveSheet(t, src)
	long := blockHTML(t, page, 9)
	if !strings.Contains(long, `<div class="f brk"><b class="eqlabel">long:</b> `) {
		t.Errorf("the long equation is not written in pieces:\n%s", long)
	}
	if n := strings.Count(long, `<span class="t">`); n < 6 {
		t.Errorf("the long equation has %d term boxes, want at least 6 (one for = and each later term)", n)
	}
	for k := 1; k <= 6; k++ {
		if !strings.Contains(long, fmt.Sprintf("<msub><mi>Z</mi><mi>%d</mi></msub>", k)) {
			t.Errorf("term Z_%d is missing from the long equation", k)
		}
	}
	// an equation of one term a side is one piece a side
	short := blockHTML(t, page, 12)
	if n := strings.Count(short, `<span class="t">`); n != 1 {
		t.Errorf("the short equation has %d term boxes, want 1 (its right side)", n)
	}
	wellFormedMath(t, page)
}
