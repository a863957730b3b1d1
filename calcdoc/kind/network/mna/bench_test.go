package mna

import (
	"calcdoc/calcdoc/kind/network/internal/netgen"
	"testing"
	"time"

	"calcdoc/expr"
)

// TestLargeNetwork solves the 500-node network once (its checks:
// Tellegen's theorem, the balance and the acceptance, in solveText) and
// logs the time taken.
func TestLargeNetwork(t *testing.T) {
	text := netgen.Grid(500)
	start := time.Now()
	r := solveText(t, text, "", nil)
	t.Logf("%d nodes, %d branches, %d unknowns, %d matrix entries, %d in the factors, cond %.3g, backward error %.2g: %v",
		len(r.Topo.Nodes), len(r.Net.Branches), len(r.Network.Unknowns), r.Solution.NNZ, r.Solution.Fill, r.Solution.Cond, r.Solution.Backward, time.Since(start))
	if len(r.Topo.Nodes) < 500 {
		t.Fatalf("%d nodes", len(r.Topo.Nodes))
	}
}

// BenchmarkNetwork500 times a 500-node network block from its text to
// the accepted solution: parse, checks, evaluation of every element by
// the engine, assembly, sparse LU, refinement, condition estimate and
// acceptance.
func BenchmarkNetwork500(b *testing.B) {
	blk := block(netgen.Grid(500), "")
	for i := 0; i < b.N; i++ {
		r, errs := Run(blk, expr.NewEnv(), nil)
		if len(errs) > 0 || r.Solution == nil {
			b.Fatal(errs)
		}
	}
}
