package network

import (
	"calcdoc/calcdoc/kind/network/internal/netgen"
	"strings"
	"testing"
	"time"
)

// networkDoc is a document holding the network of about n nodes.
func networkDoc(n int) []byte {
	return []byte("# Large network\n\n```network\n" + netgen.Grid(n) + "\n```\n")
}

// TestLargeNetworkSheet evaluates and draws the 500-node network once and
// logs the time taken: every node has its KCL row, and the matrix is in
// the appendix as its non-zero entries.
func TestLargeNetworkSheet(t *testing.T) {
	src := networkDoc(500)
	start := time.Now()
	d := parse(t, string(src))
	page := sheet(t, d)
	took := time.Since(start)
	noErrors(t, d)
	res := d.Blocks[0].Result.(*Result)
	kcl := strings.Count(page, "<div class=\"desc\">KCL at node ")
	grounds := 0
	for _, g := range res.Topo.Ground {
		if g {
			grounds++
		}
	}
	if kcl != len(res.Topo.Nodes)-grounds || len(res.Topo.Nodes) < 500 {
		t.Errorf("%d KCL rows for %d nodes (%d grounds)", kcl, len(res.Topo.Nodes), grounds)
	}
	if !strings.Contains(page, "the non-zero entries of A and b") {
		t.Errorf("the matrix is not in the appendix")
	}
	t.Logf("%d nodes, %d unknowns, %d entries of A: evaluated and drawn in %v, %d bytes of sheet",
		len(res.Topo.Nodes), len(res.Network.Unknowns), res.Solution.NNZ, took, len(page))
}

// BenchmarkNetworkSheet500 times a document holding a 500-node network
// from its text to the written sheet: parse, checks, evaluation,
// assembly, sparse LU, acceptance, definitions, and the whole sheet (KCL
// rows, equations, appendix of non-zero entries, results, balance).
func BenchmarkNetworkSheet500(b *testing.B) {
	src := string(networkDoc(500))
	for i := 0; i < b.N; i++ {
		d := parse(b, src)
		if len(d.Errors) > 0 {
			b.Fatal(d.Errors)
		}
		sheet(b, d)
	}
}
