package mna

import (
	"math/cmplx"
	"testing"

	"calcdoc/expr"
)

func wantC(t *testing.T, what string, got, want complex128, tol float64) {
	t.Helper()
	if !near(got, want, tol, cmplx.Abs(want)+1e-300) {
		t.Errorf("%s = %v, want %v (hand derivation)", what, got, want)
	}
}

// TestHandDivider: a 100 V ideal source across 30 Ω and 70 Ω in series.
// Hand derivation: I = 100 V / (30 Ω + 70 Ω) = 1 A, V_B = 70 Ω · 1 A =
// 70 V, V_A = 100 V; S_r1 = 30 V · 1 A = 30 W (taken), S_r2 = 70 W, and
// the source delivers (V_A − 0)·1 A = 100 W.
func TestHandDivider(t *testing.T) {
	r := solveText(t, `ground 0
src: 0 -> A source 100 V
r1: A -> B Z 30 Ω
r2: B -> 0 Z 70 Ω`, "", nil)
	wantC(t, "V_A", nodeV(r, "A"), 100, 1e-14)
	wantC(t, "V_B", nodeV(r, "B"), 70, 1e-14)
	for _, c := range []struct {
		name string
		i, s complex128
	}{{"src", 1, 100}, {"r1", 1, 30}, {"r2", 1, 70}} {
		i, s := branchIS(r, c.name)
		wantC(t, "I_"+c.name, i, c.i, 1e-14)
		wantC(t, "S_"+c.name, s, c.s, 1e-14)
	}
}

// TestHandSeriesZ: a 230 V source with a series impedance (1 + j1) Ω into
// a load of (9 + j4) Ω. Hand derivation: I = 230 / (10 + j5) =
// 230·(10 − j5)/125 = 18.4 − j9.2 A; V_A = I·(9 + j4) = 202.4 − j9.2 V;
// S_load = V_A·conj(I) = |I|²·(9 + j4) = 423.2·(9 + j4) =
// 3808.8 + j1692.8 VA, which the source delivers at its terminals
// (V_A − 0)·conj(I); the power lost in its own series impedance is not
// in S_g (LANGUAGE.md section 11: (V_TO − V_FROM)·conj(I)).
func TestHandSeriesZ(t *testing.T) {
	r := solveText(t, `ground 0
g: 0 -> A source 230 V, Z (1 + j1) Ω
load: A -> 0 Z (9 + j4) Ω`, "", nil)
	wantC(t, "V_A", nodeV(r, "A"), complex(202.4, -9.2), 1e-13)
	i, s := branchIS(r, "g")
	wantC(t, "I_g", i, complex(18.4, -9.2), 1e-13)
	wantC(t, "S_g", s, complex(3808.8, 1692.8), 1e-13)
	i, s = branchIS(r, "load")
	wantC(t, "I_load", i, complex(18.4, -9.2), 1e-13)
	wantC(t, "S_load", s, complex(3808.8, 1692.8), 1e-13)
}

// TestHandTransformer: an ideal transformer of ratio 10∠30° fed by an
// ideal 1000 V source, its second winding into (3 + j4) Ω, each side with
// its own ground. Hand derivation: V_P − V_N = r·(V_S − V_n) gives
// V_S = 1000 / 10∠30° = 100∠−30° V; the load takes
// I_load = 100∠−30° / 5∠53.130° = 20∠−83.130° A, which is the current out
// of the second winding at S, conj(r)·I_tx, so I_tx = 20∠−83.130° /
// 10∠−30° = 2∠−53.130° A. S_tx = 1000·conj(I_tx) = 2000∠53.130° =
// 1200 + j1600 VA = |I_load|²·(3 + j4) = 400·(3 + j4) = S_load: the
// complex power into the first winding equals the power out of the
// second, with the phase shifted.
func TestHandTransformer(t *testing.T) {
	r := solveText(t, `ground N
ground n
g: N -> P source 1000 V
tx: P -> N ratio 10∠30° to S -> n
load: S -> n Z (3 + j4) Ω`, "", nil)
	ang := func(deg float64) float64 { return deg * 3.141592653589793 / 180 }
	phiZ := cmplx.Phase(3 + 4i)
	wantC(t, "V_S", nodeV(r, "S"), cmplx.Rect(100, ang(-30)), 1e-13)
	i, s := branchIS(r, "tx")
	wantC(t, "I_tx", i, cmplx.Rect(2, -phiZ), 1e-13)
	wantC(t, "S_tx", s, complex(1200, 1600), 1e-13)
	il, sl := branchIS(r, "load")
	wantC(t, "I_load", il, cmplx.Rect(20, ang(-30)-phiZ), 1e-13)
	wantC(t, "S_load", sl, complex(1200, 1600), 1e-13)
	ig, sg := branchIS(r, "g")
	wantC(t, "I_g", ig, cmplx.Rect(2, -phiZ), 1e-13)
	wantC(t, "S_g", sg, complex(1200, 1600), 1e-13)
}

// TestHandCoupled: two coupled reactances j10 Ω with a mutual impedance
// j5 Ω; a is fed by an ideal 100 V source, b is closed through 5 Ω.
// Hand derivation: 100 = j10·I_a + j5·I_b and V_B = j10·I_b + j5·I_a;
// KCL at B gives I_rb = −I_b, so V_B = −5·I_b; then
// I_b·(−5 − j10) = j5·I_a, I_b = −(2 + j)/5·I_a, and
// 100 = (j10 − j(2 + j))·I_a = (1 + j8)·I_a, so I_a = 100·(1 − j8)/65 =
// 1.538462 − j12.307692 A, I_b = (−1000 + j1500)/325 =
// −3.076923 + j4.615385 A, V_B = −5·I_b = 15.384615 − j23.076923 V and
// S_a = 100·conj(I_a) = 153.8462 + j1230.7692 VA.
func TestHandCoupled(t *testing.T) {
	r := solveText(t, `ground 0
g: 0 -> A source 100 V
a: A -> 0 Z j10 Ω
b: B -> 0 Z j10 Ω
rb: B -> 0 Z 5 Ω
couple a, b Z j5 Ω`, "", nil)
	ia, sa := branchIS(r, "a")
	wantC(t, "I_a", ia, complex(100, -800)/65, 1e-13)
	wantC(t, "S_a", sa, 100*cmplx.Conj(complex(100, -800)/65), 1e-13)
	ib, _ := branchIS(r, "b")
	wantC(t, "I_b", ib, complex(-1000, 1500)/325, 1e-13)
	wantC(t, "V_B", nodeV(r, "B"), -5*complex(-1000, 1500)/325, 1e-13)
	// the coupling is symmetric: V_B = j10·I_b + j5·I_a as written
	wantC(t, "V_B from the branch b", nodeV(r, "B"), 10i*ib+5i*ia, 1e-13)
}

// TestHandControlled: a voltage-controlled current source 0.5 S·V_A from
// A to 0 beside 1 Ω, fed by 10 V through 1 Ω. Hand derivation: KCL at A,
// (V_A − 10)/1 + V_A/1 + 0.5·V_A = 0, so V_A = 10/2.5 = 4 V, I_gm = 2 A,
// and the source's current is (10 − 4)/1 = 6 A.
func TestHandControlled(t *testing.T) {
	r := solveText(t, `ground 0
g: 0 -> A source 10 V, Z 1 Ω
r: A -> 0 Z 1 Ω
gm: A -> 0 current 0.5 S * V_A`, "", nil)
	wantC(t, "V_A", nodeV(r, "A"), 4, 1e-14)
	i, _ := branchIS(r, "gm")
	wantC(t, "I_gm", i, 2, 1e-14)
	i, _ = branchIS(r, "g")
	wantC(t, "I_g", i, 6, 1e-14)
	// the same with the tag: the controlled source uses the tagged name
	r = solveText(t, `ground 0
g: 0 -> A source 10 V, Z 1 Ω
r: A -> 0 Z 1 Ω
gm: A -> 0 current 0.5 S * V_A_pos`, "pos", nil)
	wantC(t, "V_A_pos", nodeV(r, "A"), 4, 1e-14)
	var names []string
	for _, d := range r.Defs() {
		names = append(names, d.Name)
	}
	want := []string{"V_A_pos", "I_g_pos", "S_g_pos", "I_r_pos", "S_r_pos", "I_gm_pos", "S_gm_pos"}
	if len(names) != len(want) {
		t.Fatalf("defines %v, want %v", names, want)
	}
	for i := range want {
		if names[i] != want[i] {
			t.Fatalf("defines %v, want %v", names, want)
		}
	}
}

// TestValuesFromEnv: element values use names defined above the block,
// with units (Ω/km · km), and the defined values carry their dimensions.
func TestValuesFromEnv(t *testing.T) {
	env := expr.NewEnv()
	if err := env.Define(&expr.Binding{Name: "Z_L", Value: &expr.Scalar{Z: complex(20, 8), Dim: expr.DimImpedance}, Pos: expr.PlaceAt("", 1, 1)}); err != nil {
		t.Fatal(err)
	}
	// hand derivation: 0.5 Ω/km · 4 km = 2 Ω in series with Z_L = (20 + j8) Ω
	// from an ideal 220 V: I = 220/(22 + j8), V_B = I·Z_L
	r := solveText(t, `ground N
grid: N -> A source 220 V
feed: A -> B Z 0.5 Ω/km * 4 km
mill: B -> N Z Z_L`, "", env)
	i := 220 / complex(22, 8)
	wantC(t, "V_B", nodeV(r, "B"), i*complex(20, 8), 1e-13)
	for _, d := range r.Defs() {
		want := expr.DimVoltage
		switch d.Kind {
		case DefCurrent:
			want = expr.DimCurrent
		case DefPower:
			want = expr.DimPower
		}
		if d.Value == nil || d.Value.Dim != want {
			t.Errorf("%s: %v", d.Name, d.Value)
		}
	}
}

// TestHandCurrentControlled: a current source controlled by the current
// of a voltage source, and one controlled by its own current. Hand
// derivation: with k = 0.5·I_g, KCL at A gives −I_g + V_A/4 + 0.5·I_g = 0
// and I_g = (10 − V_A)/1, so 0.75·V_A = 5, V_A = 20/3 V, I_g = 10/3 A,
// I_k = 5/3 A. With m = 1 A + 0.5·I_m alone, I_m = 2 A.
func TestHandCurrentControlled(t *testing.T) {
	r := solveText(t, `ground 0
g: 0 -> A source 10 V, Z 1 Ω
r: A -> 0 Z 4 Ω
k: A -> 0 current 0.5 * I_g`, "", nil)
	wantC(t, "V_A", nodeV(r, "A"), 20.0/3, 1e-14)
	ik, _ := branchIS(r, "k")
	wantC(t, "I_k", ik, 5.0/3, 1e-14)
	r = solveText(t, `ground 0
g: 0 -> A source 10 V, Z 1 Ω
r: A -> 0 Z 4 Ω
m: A -> 0 current 1 A + 0.5 * I_m`, "", nil)
	im, _ := branchIS(r, "m")
	wantC(t, "I_m", im, 2, 1e-14)
}

// TestKCLTerms: the KCL terms of the transformer example's nodes. At S
// (hand derivation): the second winding's current conj(r)·I_tx comes out
// at S (a term −conj(r)·I_tx leaving) and the load's (V_S − V_n)/Z leaves;
// with the solution the terms sum to zero.
func TestKCLTerms(t *testing.T) {
	r := solveText(t, `ground N
ground n
g: N -> P source 1000 V
tx: P -> N ratio 10∠30° to S -> n
load: S -> n Z (3 + j4) Ω`, "", nil)
	nw, s := r.Network, r.Solution
	terms := nw.KCLTerms(r.Topo.Index["S"])
	if len(terms) != 2 || terms[0].Form != BySecondWinding || terms[0].Sign != -1 || terms[1].Form != ByImpedance || terms[1].Sign != 1 {
		t.Fatalf("terms at S: %+v", terms)
	}
	if nw.KCLTerms(r.Topo.Index["N"]) != nil {
		t.Fatal("a ground has a KCL equation")
	}
	for i := range r.Topo.Nodes {
		var sum complex128
		for _, tm := range nw.KCLTerms(i) {
			sum += complex(float64(tm.Sign), 0) * tm.Factor * s.I[tm.Branch]
		}
		if cmplx.Abs(sum) > 1e-12 {
			t.Errorf("node %s: the terms sum to %v", r.Topo.Nodes[i].Name, sum)
		}
	}
}
