package expr

import (
	"fmt"
	"runtime"
	"strings"
	"testing"
)

// acBlock writes n statements (n a multiple of 10) of an AC calculation of
// our own invention: phasor sources, series and parallel impedances,
// currents shown in a chosen unit, complex power, power factor, functions
// and checks. Every name is new, as a sheet requires.
func acBlock(n int) string {
	var b strings.Builder
	for k := 0; k < n/10; k++ {
		fmt.Fprintf(&b, "V_%d = 230 V∠-120°                 # phase voltage\n", k)
		fmt.Fprintf(&b, "Z_s%d = (0.12 + j0.08) Ω\n", k)
		fmt.Fprintf(&b, "X_%d = 2*pi*50 Hz * 0.3 mH\n", k)
		fmt.Fprintf(&b, "Z_p%d = 3 Ω ∥ (1 Ω + j*X_%d)\n", k, k)
		fmt.Fprintf(&b, "I_%d[kA] = V_%d / (Z_s%d + Z_p%d)     # fault current\n", k, k, k, k)
		fmt.Fprintf(&b, "S_%d = 3 * V_%d * conj(I_%d)\n", k, k, k)
		fmt.Fprintf(&b, "pf_%d = re(S_%d) / abs(S_%d)\n", k, k, k)
		fmt.Fprintf(&b, "phi_%d = arg(I_%d) - arg(V_%d)\n", k, k, k)
		fmt.Fprintf(&b, "check |I_%d| <= 6 kA\n", k)
		fmt.Fprintf(&b, "check 0.5 <= pf_%d <= 1\n", k)
	}
	return b.String()
}

// BenchmarkStatements scans, parses and evaluates 1,000 statements per
// iteration and reports the cost per statement. Goal: at least 200,000
// statements a second, i.e. at most 5,000 ns per statement.
func BenchmarkStatements(b *testing.B) {
	const n = 1000
	text := acBlock(n)
	// the block must be clean, or the benchmark measures error paths
	{
		var errs ErrorList
		stmts := ParseBlock(NewSource(text, Pos{}), CalcMode, &errs)
		if len(errs) > 0 || len(stmts) != n {
			b.Fatalf("%d statements, errors %v", len(stmts), errs)
		}
		env := NewEnv()
		for _, s := range stmts {
			if r := env.Exec(s); r.Err != nil || (r.Check != nil && !r.Check.Pass) {
				b.Fatalf("%v: %v", s.Pos(), r)
			}
		}
	}
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	cpu0 := cpuTime()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var errs ErrorList
		stmts := ParseBlock(NewSource(text, Pos{}), CalcMode, &errs)
		env := NewEnv()
		for _, s := range stmts {
			env.Exec(s)
		}
	}
	b.StopTimer()
	cpu := cpuTime() - cpu0
	runtime.ReadMemStats(&after)
	perStmt := float64(b.Elapsed().Nanoseconds()) / float64(b.N*n)
	b.ReportMetric(perStmt, "ns/stmt")
	b.ReportMetric(1e9/perStmt, "stmts/s")
	// CPU time of the process (all threads, the garbage collector's too):
	// on a machine shared with others it varies less than the wall clock
	b.ReportMetric(float64(cpu.Nanoseconds())/float64(b.N*n), "cpu-ns/stmt")
	b.ReportMetric(float64(after.Mallocs-before.Mallocs)/float64(b.N*n), "allocs/stmt")
	b.ReportMetric(float64(after.TotalAlloc-before.TotalAlloc)/float64(b.N*n), "B/stmt")
}
