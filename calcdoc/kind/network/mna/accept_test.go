package mna

import (
	"strings"
	"testing"

	"calcdoc/expr"
)

// TestAcceptRejects: a solution moved off the true one by 1e-6 of a node
// voltage fails the acceptance with the equation named, and the exact one
// passes (the acceptance rule of solve blocks, LANGUAGE.md section 5: a
// wrong answer is never shown as a solution).
func TestAcceptRejects(t *testing.T) {
	r := solveText(t, feed+"k: A -> 0 current 0.5 * I_g", "", nil)
	nw, s := r.Network, r.Solution
	if err := nw.accept(expr.PlaceAt("", 1, 1), s); err != nil {
		t.Fatalf("the solution itself: %v", err)
	}
	bad := &Solution{X: append([]complex128(nil), s.X...)}
	bad.X[nw.NodeCol[r.Topo.Index["A"]]] *= 1 + 1e-6
	nw.results(bad)
	err := nw.accept(expr.PlaceAt("", 1, 1), bad)
	if err == nil || !strings.Contains(err.Error(), "does not hold") || !strings.Contains(err.Error(), "backward error") {
		t.Fatalf("a wrong solution: %v", err)
	}
}

// FuzzRun feeds arbitrary block text through the whole chain: it must
// return errors, never panic.
func FuzzRun(f *testing.F) {
	f.Add(feed + "k: A -> 0 current 0.5 * I_g")
	f.Add("ground N\ntx: P -> N ratio 10∠30° to S -> n\nground n\nl: S -> n Z 1 Ω\ng: N -> P source 1 V")
	f.Add("couple a, b Z 1 Ω\na: A -> 0 Z 1 Ω\nb: A -> 0 Z 2 Ω\nground 0\ng: 0 -> A source 1 V")
	f.Fuzz(func(t *testing.T, text string) {
		Run(block(text, ""), expr.NewEnv(), nil)
	})
}
