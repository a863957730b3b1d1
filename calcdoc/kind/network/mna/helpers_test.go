package mna

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/expr"
)

// block makes a Block of text whose first line is line 2 of a document
// (the opening line is line 1).
func block(text, tag string) Block {
	lines := strings.Split(text, "\n")
	at := []expr.Position{{Line: 1, Col: 12}}
	for i := range lines {
		at = append(at, expr.Position{Line: i + 2, Col: 1})
	}
	pos := expr.Place(append([]string{tag}, lines...), at)
	return Block{Lines: lines, LinePos: pos[1:], Tag: tag, TagPos: pos[0], Pos: pos[0].LineStart()}
}

// solveText runs a block that must solve.
func solveText(t *testing.T, text, tag string, env *expr.Env) *Result {
	t.Helper()
	if env == nil {
		env = expr.NewEnv()
	}
	r, errs := Run(block(text, tag), env, nil)
	if len(errs) > 0 || r.Solution == nil {
		t.Fatalf("errors: %v (unavailable %v)", errs, r.Unavailable)
	}
	tellegen(t, r)
	return r
}

// failText runs a block that must fail with an error containing want
// (at line:col when at is not zero).
func failText(t *testing.T, text, tag string, env *expr.Env, at expr.Position, want ...string) {
	t.Helper()
	if env == nil {
		env = expr.NewEnv()
	}
	_, errs := Run(block(text, tag), env, nil)
	if len(errs) == 0 {
		t.Fatalf("no error, want %q", want)
	}
	msg := errs.Error()
	for _, w := range want {
		if !strings.Contains(msg, w) {
			t.Errorf("error %q\ndoes not contain %q", msg, w)
		}
	}
	if at.IsValid() && errs[0].Pos.Position() != at {
		t.Errorf("error at %v, want %v: %v", errs[0].Pos, at, errs[0])
	}
}

// tellegen checks Tellegen's theorem on a solved network: with every
// branch's voltage V_FROM − V_TO and current taken in the same direction
// (FROM to TO), Σ_b v_b·conj(i_b) = 0 over all branches, a transformer
// counting as its two windings (the second carrying −conj(ratio)·I from
// FROM2 to TO2). The sum is tested against the sum of the moduli of its
// terms (B. D. H. Tellegen, "A general network theorem, with
// applications", Philips Research Reports 7 (1952); a consequence of KCL
// and KVL alone). It also checks each S against its definition in
// LANGUAGE.md section 11, and the power balance.
func tellegen(t *testing.T, r *Result) {
	t.Helper()
	s, n, top := r.Solution, r.Net, r.Topo
	v := func(nd netlist.Node) complex128 { return s.V[top.Index[nd.Key]] }
	var sum complex128
	size := 0.0
	for i, b := range n.Branches {
		d := v(b.From) - v(b.To)
		p := d * cmplx.Conj(s.I[i])
		sum += p
		size += cmplx.Abs(p)
		want := p
		if b.Element == netlist.Source {
			want = -p
		}
		if cmplx.Abs(s.S[i]-want) > 1e-12*cmplx.Abs(want) {
			t.Errorf("S_%s = %v, want %v", b.Name, s.S[i], want)
		}
		if b.Element == netlist.Ratio {
			i2 := -cmplx.Conj(r.Network.Elem[i].Ratio) * s.I[i]
			p2 := (v(b.From2) - v(b.To2)) * cmplx.Conj(i2)
			sum += p2
			size += cmplx.Abs(p2)
		}
	}
	if cmplx.Abs(sum) > 1e-9*size {
		t.Errorf("Tellegen: Σ v·conj(i) = %v against Σ|v·conj(i)| = %g", sum, size)
	}
	if cmplx.Abs(s.Mismatch) > 1e-9*size {
		t.Errorf("power balance: delivered %v, taken %v", s.Delivered, s.Taken)
	}
	if s.Backward > AcceptTol || !(s.Cond >= 1) {
		t.Errorf("backward error %g, condition %g", s.Backward, s.Cond)
	}
}

// near reports |a − b| ≤ tol·scale.
func near(a, b complex128, tol, scale float64) bool {
	return cmplx.Abs(a-b) <= tol*scale && !math.IsNaN(real(a))
}

// nodeV returns a solved node voltage by node name.
func nodeV(r *Result, name string) complex128 {
	return r.Solution.V[r.Topo.Index[expr.NameKey(name)]]
}

// branchI returns a solved branch current and power by branch name.
func branchIS(r *Result, name string) (complex128, complex128) {
	for i, b := range r.Net.Branches {
		if b.Name == name {
			return r.Solution.I[i], r.Solution.S[i]
		}
	}
	panic("no branch " + name)
}

func sprintf(format string, a ...any) string { return fmt.Sprintf(format, a...) }
