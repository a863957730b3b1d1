package expr

import (
	"fmt"
	"strings"
	"testing"
)

// caseChain is a block of n lines, each computed from the one above,
// starting from a value with one entry per case (or a plain value when
// there are no cases).
func caseChain(n int, cases []string) string {
	var b strings.Builder
	if len(cases) == 0 {
		b.WriteString("x_0 = 1.5 Ω\n")
	} else {
		var parts []string
		for i, c := range cases {
			parts = append(parts, fmt.Sprintf("%s: %d Ω", c, i+1))
		}
		b.WriteString("x_0 = {" + strings.Join(parts, ", ") + "}\n")
	}
	for i := 1; i < n; i++ {
		fmt.Fprintf(&b, "x_%d = sqrt(x_%d^2 + (0.5 Ω)^2) * 1.0001\n", i, i-1)
	}
	return b.String()
}

// BenchmarkCases evaluates the same 400-line chain with no cases and with
// 2 and 4 cases: the time per chain grows about in proportion to the
// number of cases (each line worked once per case), never more.
func BenchmarkCases(b *testing.B) {
	for _, cases := range [][]string{nil, {"a", "b"}, {"a", "b", "c", "d"}} {
		text := caseChain(400, cases)
		b.Run(fmt.Sprintf("cases=%d", max(1, len(cases))), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if r := runCases(text, cases...); len(r.allErrors()) > 0 {
					b.Fatal(r.allErrors())
				}
			}
		})
	}
}
