package solve

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	numeric "calcdoc/calcdoc/kind/solve/numeric"
	"calcdoc/expr"
	"calcdoc/render"
)

// preparedLadder evaluates the parameters of the ladder document and
// prepares (reads, checks, counts and scales) its solve block without
// solving it, for timing the solver's phases on their own.
func preparedLadder(b *testing.B, n int) *solveRun {
	b.Helper()
	return preparedRun(b, ladderDoc(n))
}

// preparedRun evaluates what stands above the (one) solve block of a
// document and prepares the block without solving it.
func preparedRun(t testing.TB, src string) *solveRun {
	t.Helper()
	d := calcdoc.Parse("set.md", []byte(src), testKinds)
	var blk *calcdoc.Block
	for _, x := range d.Blocks {
		if x.Kind == "solve" {
			blk = x
		}
	}
	if blk == nil {
		t.Fatal("no solve block")
	}
	// a fresh document in which the values are defined but not the
	// unknowns: evaluate only what stands above the solve block
	d2 := calcdoc.Parse("params.md", []byte(src[:strings.Index(src, "```solve")]), testKinds)
	copyBlk := d2.Attach(&calcdoc.Block{Kind: "solve", Arg: blk.Arg, ArgPos: blk.ArgPos, InfoPos: blk.InfoPos, Pos: blk.Pos,
		Lines: blk.Lines, LinePos: blk.LinePos})
	// the phases are timed over many runs: a budget that does not run out
	d2.Env.Budget = expr.NewBudget(math.MaxInt64)
	r := &solveRun{b: copyBlk, set: &SolveSet{}, env: d2.Env}
	if !r.prepare() {
		t.Fatalf("prepare failed: %v", copyBlk.Errors)
	}
	return r
}

// BenchmarkSolveLadder times a ladder network of n nodes written in the
// language (ladderDoc: KCL at every node, 2n real unknowns):
//
//   - document: calcdoc.Parse of the whole document, everything included
//     (reading, the checks, the counts, classification, assembly, solve,
//     acceptance and verification);
//   - classify+assemble: solve.Linearize on the prepared set (the affine
//     test, which builds A and b);
//   - solve: solve.SolveLinear of the assembled system (equilibrated LU and
//     condition estimate).
//
// The goal is 60 nodes in at most 5 ms for the whole document, and growth
// no worse than the n³ of a dense LU.
func BenchmarkSolveLadder(b *testing.B) {
	for _, n := range []int{60, 300, 500} {
		src := []byte(ladderDoc(n))
		b.Run(fmt.Sprintf("nodes=%d/document", n), func(b *testing.B) {
			for b.Loop() {
				d := calcdoc.Parse("ladder.md", src, testKinds)
				if len(d.Errors) > 0 {
					b.Fatal(d.Errors)
				}
			}
		})
		r := preparedLadder(b, n)
		p := r.problem(r.x0, r.rscale)
		b.Run(fmt.Sprintf("nodes=%d/classify+assemble", n), func(b *testing.B) {
			for b.Loop() {
				if _, ok, err := numeric.Linearize(p); err != nil || !ok {
					b.Fatalf("Linearize: ok=%v err=%v", ok, err)
				}
			}
		})
		lin, _, _ := numeric.Linearize(p)
		b.Run(fmt.Sprintf("nodes=%d/solve", n), func(b *testing.B) {
			for b.Loop() {
				if _, _, err := numeric.SolveLinear(lin); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkSolveSheet times a complex ladder of n nodes (ladderDoc: KCL at
// every node, n complex unknowns) from its source to its HTML sheet:
// calcdoc.Parse (reading, evaluation, classification, assembly, solve,
// acceptance) and render.Sheet (the equations, the method, the matrix
// appendix, the solution and the verification table), with the source
// embedded as a built sheet carries it. The target for 500 nodes
// is at most 3 times NumPy's numpy.linalg.solve of the same dense 500×500
// complex system (docs/performance.md).
func BenchmarkSolveSheet(b *testing.B) {
	for _, n := range []int{60, 500} {
		src := []byte(ladderDoc(n))
		b.Run(fmt.Sprintf("nodes=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				d := calcdoc.Parse("ladder.md", src, testKinds)
				if len(d.Errors) > 0 {
					b.Fatal(d.Errors)
				}
				if _, err := render.Sheet(d, render.Options{Version: "bench", EmbedSource: true}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
