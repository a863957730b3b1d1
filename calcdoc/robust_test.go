package calcdoc_test

import (
	"calcdoc/calcdoc"
	"fmt"
	"strings"
	"testing"
	"time"

	"calcdoc/expr"
)

// TestFrontMatterLineBreaks: YAML ends a line at \r\n, \r, \n, NEL (U+0085),
// LS (U+2028) and PS (U+2029) (YAML 1.1 §5.4, which the YAML parser
// follows), the .md file at \n, \r\n and a lone \r (as an editor shows
// it); an error in the front matter is
// reported at its line and column in the file. The expected positions are
// counted by hand in each input (columns in characters, from 1).
func TestFrontMatterLineBreaks(t *testing.T) {
	cases := []struct {
		name string
		src  string
		at   expr.Position
		msg  string
	}{
		{"LF", "---\ntitle: a\ntitle: b\n---\n", expr.Position{Line: 3, Col: 1}, `key "title" is given twice`},
		{"CR LF", "---\r\ntitle: a\r\ntitle: b\r\n---\r\n", expr.Position{Line: 3, Col: 1}, `key "title" is given twice`},
		// "\rdigits: 99": a lone CR ends line 2 (as a reader sees the file),
		// so "digits: 99" is line 3 and the value starts after "digits: "
		{"a lone CR", "---\n\rdigits: 99\n---\n", expr.Position{Line: 3, Col: 9}, `"99" is not a whole number`},
		// "digits: 2" is 9 characters, NEL the 10th
		{"NEL", "---\ndigits: 2\u0085digits: 3\n---\n", expr.Position{Line: 2, Col: 11}, `key "digits" is given twice`},
		{"LS", "---\ndigits: 2\u2028digits: 3\n---\n", expr.Position{Line: 2, Col: 11}, `key "digits" is given twice`},
		// the fuzzer's input: "\r{0, 0}"; the CR ends line 2, and on line 3
		// the second key is the 5th character
		{"a flow mapping after a CR", "---\n\r{0, 0}\n---", expr.Position{Line: 3, Col: 5}, `key "0" is given twice`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := calcdoc.Parse("fm.md", []byte(c.src), kinds)
			if len(d.Errors) != 1 {
				t.Fatalf("errors %v, want one", d.Errors)
			}
			e := d.Errors[0]
			if e.Pos.Position().InFile() != c.at || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("error %v: %s; want it at %v, saying %q", e.Pos, e.Msg, c.at, c.msg)
			}
		})
	}
}

// TestInlineOverLines: an inline value whose code span runs over lines of
// its paragraph is evaluated as one expression (CommonMark 0.31 §6.1: a
// line ending in a code span is a space), and its errors are reported at
// their own line and column, counted by hand in each input.
func TestInlineOverLines(t *testing.T) {
	cases := []struct {
		name  string
		src   string
		value complex128    // when no error
		at    expr.Position // of the error
		msg   string
	}{
		{"a value over two lines", "Power `=2 *\n3` W\n", 6, expr.Position{}, ""},
		// "2))": the second ")" is the 3rd character of line 2
		{"an error on the second line", "Text `=(1 +\n2))` end.\n", 0, expr.Position{Line: 2, Col: 3}, `unexpected ")"`},
		// "> 2))": the quote marker and its space come first
		{"in a block quote", "> Quoted `=(1 +\n> 2))` end.\n", 0, expr.Position{Line: 2, Col: 5}, `unexpected ")"`},
		// the fuzzer's input: "(" alone on line 2, the value missing after it
		{"an open parenthesis on the second line", "``=\n( ``", 0, expr.Position{Line: 2, Col: 2}, "ends too soon"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := calcdoc.Parse("inline.md", []byte(c.src), kinds)
			if len(d.Inline) != 1 {
				t.Fatalf("%d inline values, want 1", len(d.Inline))
			}
			in := d.Inline[0]
			if c.msg == "" {
				s, ok := in.Value.(*expr.Scalar)
				if len(d.Errors) > 0 || !ok || s.Z != c.value {
					t.Fatalf("value %v, errors %v; want %v", in.Value, d.Errors, c.value)
				}
				return
			}
			if len(d.Errors) != 1 {
				t.Fatalf("errors %v, want one", d.Errors)
			}
			if e := d.Errors[0]; e.Pos.Position().InFile() != c.at || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("error %v: %s; want it at %v, saying %q", e.Pos, e.Msg, c.at, c.msg)
			}
		})
	}
}

// TestManyErrors: a reading that finds more than expr.MaxErrors errors (a
// line of characters outside the language, a header listing one name
// again and again) reports the first MaxErrors and then one error, at the
// next, saying that the rest are not reported; a block whose every
// statement fails evaluation reports each, on its own line.
func TestManyErrors(t *testing.T) {
	if expr.MaxErrors != 100 {
		t.Fatalf("expr.MaxErrors = %d; docs/robustness.md and this test state 100", expr.MaxErrors)
	}
	const n = 1 << 20
	cases := []struct {
		name  string
		src   string
		first expr.Position // the first error
		cut   expr.Position // the error saying the rest are not reported (none when zero)
		count int           // errors in all
	}{
		// "x = " is 4 characters, so the k-th '$' is at column 4+k
		{"a calc line of 1 MiB of '$'", "```calc\nx = " + strings.Repeat("$", n) + "\n```\n",
			expr.Position{Line: 2, Col: 5}, expr.Position{Line: 2, Col: 105}, 101},
		{"an inline value of 1 MiB of '$'", "Text `=" + strings.Repeat("$", n) + "` end.\n",
			expr.Position{Line: 1, Col: 8}, expr.Position{Line: 1, Col: 108}, 101},
		// "```solve q, " is 12 characters; each further "q, " is 3
		{"a solve header listing q 349,526 times", "```solve q, " + strings.Repeat("q, ", n/3) + "\nq = 1\n```\n",
			expr.Position{Line: 1, Col: 13}, expr.Position{Line: 1, Col: 13 + 3*100}, 101},
		{"100,000 statements that each fail", "```calc\n" + strings.Repeat("y = q\n", 100000) + "```\n",
			expr.Position{Line: 2, Col: 5}, expr.Position{}, 100000},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var d *calcdoc.Document
			finishes(t, 2*time.Minute, func() { d = calcdoc.Parse("errors.md", []byte(c.src), kinds) })
			if len(d.Errors) != c.count {
				t.Fatalf("%d errors, want %d", len(d.Errors), c.count)
			}
			if d.Errors[0].Pos.Position().InFile() != c.first {
				t.Errorf("the first error is at %v, want %v", d.Errors[0].Pos, c.first)
			}
			var cut *expr.Error
			for _, e := range d.Errors {
				if strings.Contains(e.Msg, fmt.Sprintf("more than %d errors here: the rest are not reported", expr.MaxErrors)) {
					cut = e
				}
			}
			switch {
			case c.cut == expr.Position{} && cut != nil:
				t.Errorf("an error says the rest are not reported, but every one should be: %v", cut)
			case c.cut != expr.Position{} && (cut == nil || cut.Pos.Position().InFile() != c.cut):
				t.Errorf("the error saying the rest are not reported is %v, want one at %v", cut, c.cut)
			}
		})
	}
}

// finishes runs f and fails the test if it has not returned within
// limit. The limit is a bound for a hang, far above the time taken, not a
// timing target (the benchmarks measure that).
func finishes(t *testing.T, limit time.Duration, f func()) {
	t.Helper()
	done := make(chan struct{})
	go func() {
		defer close(done)
		f()
	}()
	select {
	case <-done:
	case <-time.After(limit):
		t.Fatalf("did not finish within %v", limit)
	}
}
