package calcdoc_test

import (
	"strings"
	"testing"

	"calcdoc/calcdoc"
)

// TestSolveShortHintWording: the hint to mark complex unknowns real names
// its subject (it once read "if are a real quantity"). Counting by hand:
// x + y = 1 is one complex equation (two real ones) for two complex
// unknowns (four real ones), two short; a + b = 1 with b real is two real
// equations for three real unknowns, one short.
func TestSolveShortHintWording(t *testing.T) {
	tests := []struct {
		name, src, pos, msg string
	}{
		{"two short", "```solve x, y\nx + y = 1\n```\n", "short.md:1:10", "or mark 2 complex unknowns real (write real after their names) if they are real quantities)"},
		{"one short", "```solve a, b real\na + b = 1\n```\n", "short.md:1:10", "or mark one complex unknown real (write real after its name) if it is a real quantity)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := calcdoc.Parse("short.md", []byte(tc.src), kinds)
			if len(d.Errors) != 1 {
				t.Fatalf("errors %v, want one", d.Errors)
			}
			got := d.Errors[0].Error()
			if !strings.HasPrefix(got, tc.pos+": ") || !strings.Contains(got, tc.msg) {
				t.Errorf("error\n %s\nwant at %s, containing\n %s", got, tc.pos, tc.msg)
			}
		})
	}
}
