package calcdoc_test

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
)

// Generated worst cases of evaluation work, each at most 1 MB: each would
// run for minutes to hours without the document's work budget
// (expr.Budget). The test checks that each stops with the budget's error,
// at the line that spent it, having spent no more than the budget; the
// benchmark below times them (docs/robustness.md, "Work budget").
func budgetCases() []struct{ name, doc, line string } {
	var nested strings.Builder
	nested.WriteString("```calc\nf_0(x) = x\n")
	for k := 1; k <= 40; k++ {
		fmt.Fprintf(&nested, "f_%d(x) = f_%d(x) + f_%d(x)\n", k, k-1, k-1)
	}
	nested.WriteString("y = f_40(1)\nz = 2\n```\n")

	vec := make([]string, 100)
	for i := range vec {
		vec[i] = fmt.Sprint(i + 1)
	}
	mat := "```calc\nA = diag([" + strings.Join(vec, "; ") + "])\n```\n\n"
	products := mat + "```sweep f = 1 Hz .. 2 Hz 10000\nB = A*A*(f/(1 Hz))\ny = B(1, 1)\n```\n"

	sweepOf := func(n int) string {
		var lines strings.Builder
		lines.WriteString("```sweep x = 0 .. 1 10000\ny_0 = x\n")
		for k := 1; k <= n; k++ {
			fmt.Fprintf(&lines, "y_%d = y_%d*1.0001 + sin(x)\n", k, k-1)
		}
		lines.WriteString("```\n\n")
		return lines.String()
	}
	repeat := func(s string) string {
		return strings.Repeat(s, 900_000/len(s))
	}

	var heavy strings.Builder
	heavy.WriteString("```calc\ng_0(x) = x\n")
	for k := 1; k <= 14; k++ {
		fmt.Fprintf(&heavy, "g_%d(x) = g_%d(x)/2 + g_%d(x)/2\n", k, k-1, k-1)
	}
	heavy.WriteString("```\n\n")
	for k := 0; k < 200; k++ {
		fmt.Fprintf(&heavy, "```solve u_%d\nu_%d^3 + g_14(u_%d) = 10\n```\n\n", k, k, k)
	}

	return []struct{ name, doc, line string }{
		{"nested user functions", nested.String(), "y = f_40(1)"},
		{"100×100 products in a sweep of 10000 points", products, "B = A*A*(f/(1 Hz))"},
		{"sweeps of 200 lines and 10000 points to 1 MB", repeat(sweepOf(200)), "y_"},
		// refused before its table of 2·10⁷ values is made
		{"sweeps of 2000 lines and 10000 points to 1 MB", repeat(sweepOf(2000)), "```sweep x"},
		{"200 solves with a residual of 2^14 calls", heavy.String(), "u_"},
	}
}

func TestWorkBudget(t *testing.T) {
	for _, c := range budgetCases() {
		t.Run(c.name, func(t *testing.T) {
			if len(c.doc) > 1<<20 {
				t.Fatalf("the document has %d bytes, more than 1 MB", len(c.doc))
			}
			d := calcdoc.Parse("w.md", []byte(c.doc), kind.Standard())
			b := d.Env.Budget
			over := b.Over()
			if over == nil {
				t.Fatalf("the budget was not spent (spent %d of %d); errors %v", b.Spent(), b.Limit, d.Errors)
			}
			if b.Limit != expr.DefaultBudget || b.Spent() > b.Limit {
				t.Errorf("spent %d units of a budget of %d (DefaultBudget %d)", b.Spent(), b.Limit, expr.DefaultBudget)
			}
			found := false
			for _, e := range d.Errors {
				found = found || e == over
			}
			if !found {
				t.Errorf("the budget's error %v is not among the document's errors", over)
			}
			for _, want := range []string{"work budget of 100,000,000 units is spent here", "Split the work"} {
				if !strings.Contains(over.Msg, want) {
					t.Errorf("message %q lacks %q", over.Msg, want)
				}
			}
			for _, e := range d.Errors {
				if strings.Contains(e.Msg, "work budget") && strings.Contains(e.Msg, "starting values") {
					t.Errorf("a spent budget is reported as a failure to evaluate at a point: %v", e)
				}
			}
			lines := strings.Split(c.doc, "\n")
			if l := over.Pos.Line(); l < 1 || l > len(lines) || !strings.Contains(lines[l-1], c.line) {
				t.Errorf("the error is at line %d, want a line with %q", over.Pos.Line(), c.line)
			}
		})
	}
}

// TestWorkBudgetRest: after the budget is spent, each later line says it
// was not evaluated and points at the line that spent it, and a later
// check is counted as not evaluated, never as satisfied.
func TestWorkBudgetRest(t *testing.T) {
	doc := budgetCases()[0].doc + "\nThe value is `=2*3`.\n\n```calc\nq = 5\ncheck q < 6\n```\n"
	d := calcdoc.Parse("w.md", []byte(doc), kind.Standard())
	over := d.Env.Budget.Over()
	if over == nil {
		t.Fatal("the budget was not spent")
	}
	if over.Pos.Line() != 43 {
		t.Errorf("budget error at line %d, want 43 (y = f_40(1))", over.Pos.Line())
	}
	var rest int
	for _, e := range d.Errors {
		if e.Pos.Line() > over.Pos.Line() {
			rest++
			if want := fmt.Sprintf("not evaluated: the document's work budget was spent at line %d", over.Pos.Line()); !strings.Contains(e.Msg, want) {
				t.Errorf("later error %v, want %q", e, want)
			}
		}
	}
	if rest != 4 { // z = 2, the inline value, q = 5, the check
		t.Errorf("%d later errors, want 4: %v", rest, d.Errors)
	}
	held, failed, notEval := d.CheckCounts()
	if held != 0 || failed != 0 || notEval != 1 {
		t.Errorf("checks held %d failed %d not evaluated %d, want 0 0 1", held, failed, notEval)
	}
}

// BenchmarkWorkBudget times each generated worst case from start to the
// budget's error (the figures in docs/robustness.md).
func BenchmarkWorkBudget(b *testing.B) {
	for _, c := range budgetCases() {
		b.Run(c.name, func(b *testing.B) {
			var el time.Duration
			for i := 0; i < b.N; i++ {
				start := time.Now()
				d := calcdoc.Parse("w.md", []byte(c.doc), kind.Standard())
				el += time.Since(start)
				if d.Env.Budget.Over() == nil {
					b.Fatal("the budget was not spent")
				}
			}
			b.ReportMetric(el.Seconds()/float64(b.N), "s/doc")
			b.ReportMetric(float64(len(c.doc)), "bytes")
		})
	}
}
