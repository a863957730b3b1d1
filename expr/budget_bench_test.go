package expr

import (
	"strings"
	"testing"
	"time"
)

// workCases are generated worst cases of the evaluator's work, each a calc
// block: the benchmark below measures the time one work unit takes in
// each, which is how DefaultBudget is chosen (docs/robustness.md).
var workCases = []struct {
	name, text string
}{
	// 2^16 calls of nested user functions: call overhead
	{"nested functions", fnChain(16)},
	// a long sum of scalars: node overhead
	{"scalar sum", "y = " + strings.Repeat("1 + ", 20000) + "1"},
	// 100×100 matrix products: multiply-adds
	{"matrix products", "A = diag(" + vecOf(100) + ")\nB = A*A*A*A*A*A*A*A\n"},
	// inv and det of 100×100 matrices
	{"inv and det", "A = diag(" + vecOf(100) + ")*transpose(diag(" + vecOf(100) + "))\nB = inv(A)\nd = det(A)\n"},
	// entry-wise work on 100×100 matrices
	{"matrix sums", "A = diag(" + vecOf(100) + ")\nB = A + A + A + A + A + A + A + A + A + A + 2*A - A/3\n"},
	// many short lines of scalar arithmetic
	{"scalar lines", scalarLines(2000)},
	// picking entries
	{"indexing", "v = " + vecOf(100) + "\ny = " + strings.Repeat("v(3) + ", 5000) + "v(4)"},
	// unknown names with suggestions, among many names
	{"suggestions", manyNames(2000) + strings.Repeat("q = zzzzzz\n", 1) + unknownLines(500)},
}

func vecOf(n int) string {
	var b strings.Builder
	b.WriteString("[")
	for i := 1; i <= n; i++ {
		if i > 1 {
			b.WriteString("; ")
		}
		b.WriteString(itoa(i))
	}
	b.WriteString("]")
	return b.String()
}

func manyNames(n int) string {
	var b strings.Builder
	for i := 0; i < n; i++ {
		b.WriteString("name_" + itoa(i) + " = " + itoa(i) + "\n")
	}
	return b.String()
}

func unknownLines(n int) string {
	var b strings.Builder
	for i := 0; i < n; i++ {
		b.WriteString("w_" + itoa(i) + " = nane_" + itoa(i%50) + "x + 1\n")
	}
	return b.String()
}

// BenchmarkWorkUnit measures the time of one work unit in each generated
// worst case (metric ns/unit) and the units each case spends. The largest
// ns/unit times DefaultBudget bounds a document's evaluation time.
func BenchmarkWorkUnit(b *testing.B) {
	for _, c := range workCases {
		b.Run(c.name, func(b *testing.B) {
			var units int64
			var el time.Duration
			for i := 0; i < b.N; i++ {
				env := NewEnv()
				env.Budget = NewBudget(1 << 40)
				var errs ErrorList
				stmts := ParseBlock(NewSource(c.text, Pos{}), CalcMode, &errs)
				start := time.Now()
				for _, s := range stmts {
					env.Exec(s)
				}
				el += time.Since(start)
				units += env.Budget.Spent()
			}
			b.ReportMetric(float64(el.Nanoseconds())/float64(units), "ns/unit")
			b.ReportMetric(float64(units)/float64(b.N), "units/op")
		})
	}
}

func scalarLines(n int) string {
	var b strings.Builder
	b.WriteString("a_0 = 1 V\n")
	for i := 1; i < n; i++ {
		b.WriteString("a_" + itoa(i) + " = (a_" + itoa(i-1) + " * 2 + 3 V) / 2 - sqrt(4)*1 V + abs(a_" + itoa(i-1) + ") / 7\n")
	}
	return b.String()
}
