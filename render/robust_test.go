package render

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
)

// build runs a document through calcdoc.Parse and Sheet, and fails the
// test if that has not finished within limit: a bound for a hang (or a
// cost that grows as the square of the input), far above the time taken,
// not a timing target (the benchmarks measure that).
func build(t *testing.T, src string, limit time.Duration) (*calcdoc.Document, string) {
	t.Helper()
	var d *calcdoc.Document
	var html []byte
	var err error
	done := make(chan struct{})
	go func() {
		defer close(done)
		d = calcdoc.Parse("robust.md", []byte(src), kind.Standard())
		html, err = Sheet(d, Options{Version: "test"})
	}()
	select {
	case <-done:
	case <-time.After(limit):
		t.Fatalf("Parse and Sheet did not finish within %v", limit)
	}
	if err != nil {
		t.Fatalf("no sheet: %v", err)
	}
	return d, string(html)
}

// scalarOf is the value of a name the document defines, in SI units.
func scalarOf(t *testing.T, d *calcdoc.Document, name string) *expr.Scalar {
	t.Helper()
	for _, v := range d.Values {
		if v.Name == name {
			if s, ok := v.Value.(*expr.Scalar); ok {
				return s
			}
		}
	}
	t.Fatalf("%s is not a value of the document", name)
	return nil
}

// mib is the length of the long lines: 1 MiB.
const mib = 1 << 20

// TestLongLine: a line of 1 MiB in a calc block, in prose or in an inline
// value is evaluated, or refused by a stated limit with an error at its
// place; Parse and Sheet finish, and the sheet grows with the line, not
// with its square.
func TestLongLine(t *testing.T) {
	// terms of 1 + 1 + … so that the line "x = 1 + 1 + …" is at least 1 MiB
	terms := 1 + (mib-len("x = 1")+len(" + 1")-1)/len(" + 1")
	dense := 1 + (mib-len("x = 1")+len("+1")-1)/len("+1") // the same, "x = 1+1+…"
	words := strings.Repeat("word ", mib/len("word "))
	cases := []struct {
		name  string
		src   string
		check func(t *testing.T, d *calcdoc.Document, html string)
	}{
		{"an expression of 1 MiB", "```calc\nx = 1" + strings.Repeat(" + 1", terms-1) + "\n```\n",
			func(t *testing.T, d *calcdoc.Document, html string) {
				noDocErrors(t, d)
				// a sum of ones is exact in binary floating point (IEEE 754)
				if s := scalarOf(t, d, "x"); s.Z != complex(float64(terms), 0) {
					t.Errorf("x = %v, want %d", s.Z, terms)
				}
				if !strings.Contains(html, `id="L2"`) {
					t.Errorf("the sheet has no row for line 2")
				}
			}},
		{"an expression of 1 MiB without spaces: within the work budget",
			"```calc\nx = 1" + strings.Repeat("+1", dense-1) + "\n```\n",
			func(t *testing.T, d *calcdoc.Document, html string) {
				// its 524,287 numbers and 524,286 sums cost 10 units each
				// (expr.NodeWork), about a tenth of the document's budget
				noDocErrors(t, d)
				if s := scalarOf(t, d, "x"); s.Z != complex(float64(dense), 0) {
					t.Errorf("x = %v, want %d", s.Z, dense)
				}
				if spent := d.Env.Budget.Spent(); spent != expr.NodeWork*int64(2*dense-1) {
					t.Errorf("spent %d units, want %d (10 for each of %d nodes)", spent, expr.NodeWork*int64(2*dense-1), 2*dense-1)
				}
			}},
		{"a description of 1 MiB", "```calc\nx = 2 V   # " + strings.Repeat("a", mib) + "\n```\n",
			func(t *testing.T, d *calcdoc.Document, html string) {
				noDocErrors(t, d)
				if s := scalarOf(t, d, "x"); s.Z != 2 {
					t.Errorf("x = %v, want 2 V", s.Z)
				}
				if !strings.Contains(html, strings.Repeat("a", mib)) {
					t.Errorf("the sheet does not show the description")
				}
			}},
		{"a note of 1 MiB", "```calc\n# " + words + "\ny = 3\n```\n",
			func(t *testing.T, d *calcdoc.Document, html string) {
				noDocErrors(t, d)
				if s := scalarOf(t, d, "y"); s.Z != 3 {
					t.Errorf("y = %v, want 3", s.Z)
				}
				if !strings.Contains(html, strings.TrimSpace(words)) {
					t.Errorf("the sheet does not show the note")
				}
			}},
		{"a prose line of 1 MiB", words + "\n\n```calc\nz = 4\n```\n",
			func(t *testing.T, d *calcdoc.Document, html string) {
				noDocErrors(t, d)
				if s := scalarOf(t, d, "z"); s.Z != 4 {
					t.Errorf("z = %v, want 4", s.Z)
				}
				if !strings.Contains(html, strings.TrimSpace(words)) {
					t.Errorf("the sheet does not show the paragraph")
				}
			}},
		{"an inline value of 1 MiB", "```calc\nx = 1\n```\n\nSum `=x" + strings.Repeat(" + 1", terms-1) + "`.\n",
			func(t *testing.T, d *calcdoc.Document, html string) {
				noDocErrors(t, d)
				if len(d.Inline) != 1 {
					t.Fatalf("%d inline values, want 1", len(d.Inline))
				}
				if s, ok := d.Inline[0].Value.(*expr.Scalar); !ok || s.Z != complex(float64(terms), 0) {
					t.Errorf("the inline value is %v, want %d", d.Inline[0].Value, terms)
				}
			}},
		{"1 MiB of characters outside the language: expr.MaxErrors", "```calc\nx = " + strings.Repeat("$", mib) + "\n```\n",
			func(t *testing.T, d *calcdoc.Document, html string) {
				if len(d.Errors) != expr.MaxErrors+1 {
					t.Errorf("%d errors, want %d and one saying that the rest are not reported", len(d.Errors), expr.MaxErrors)
				}
				for _, e := range d.Errors {
					if e.Pos.Line() != 2 {
						t.Fatalf("error %v not on line 2", e)
					}
				}
				// the line itself (shown once in the sheet's rows) and the
				// errors, not an error row for each of its characters
				if len(html) > 4*mib {
					t.Errorf("the sheet has %d bytes for a line of 1 MiB", len(html))
				}
			}},
		{"1 MiB of open parentheses: expr.MaxTokens", "```calc\nx = " + strings.Repeat("(", mib) + "\n```\n",
			func(t *testing.T, d *calcdoc.Document, html string) {
				found := false
				for _, e := range d.Errors {
					if e.Pos.Line() != 2 {
						t.Fatalf("error %v not on line 2", e)
					}
					found = found || strings.Contains(e.Msg, "too many tokens")
				}
				if !found {
					t.Errorf("errors %v, want one saying that there are too many tokens", firstErrors(d.Errors))
				}
			}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, html := build(t, c.src, 2*time.Minute)
			c.check(t, d, html)
		})
	}
}

// TestManyStatements: a calc block of 100,000 statements is evaluated and
// drawn, each statement in its own row.
func TestManyStatements(t *testing.T) {
	const n = 100000
	var sb strings.Builder
	sb.WriteString("```calc\nv_0 = 0 V\n")
	for k := 1; k < n; k++ {
		fmt.Fprintf(&sb, "v_%d = v_%d + 2 V\n", k, k-1)
	}
	sb.WriteString("```\n")
	d, html := build(t, sb.String(), 5*time.Minute)
	noDocErrors(t, d)
	if len(d.Values) != n {
		t.Fatalf("%d values, want %d", len(d.Values), n)
	}
	// v_k = 2k V: sums of small integers are exact (IEEE 754)
	if s := scalarOf(t, d, fmt.Sprintf("v_%d", n-1)); s.Z != complex(2*float64(n-1), 0) {
		t.Errorf("v_%d = %v, want %d V", n-1, s.Z, 2*(n-1))
	}
	if rows := strings.Count(html, `<div class="row`); rows != n {
		t.Errorf("the sheet has %d statement rows, want %d", rows, n)
	}
	if !strings.Contains(html, fmt.Sprintf(`id="L%d"`, n+1)) {
		t.Errorf("the sheet has no row for the last line, %d", n+1)
	}
}

func noDocErrors(t *testing.T, d *calcdoc.Document) {
	t.Helper()
	if len(d.Errors) > 0 {
		t.Fatalf("unexpected errors: %v", firstErrors(d.Errors))
	}
}

func firstErrors(l expr.ErrorList) expr.ErrorList { return l[:min(len(l), 5)] }
