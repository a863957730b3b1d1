package mna

import (
	"testing"

	"calcdoc/expr"
)

// The errors of LANGUAGE.md section 11, each naming the nodes or branches
// and the fix.

const feed = `ground 0
g: 0 -> A source 10 V, Z 1 Ω
r: A -> 0 Z 1 Ω
`

func TestErrorOneBranch(t *testing.T) {
	failText(t, feed+"x: A -> B Z 1 Ω", "", nil, expr.Position{Line: 5, Col: 9},
		"node B is connected by one branch only (x)")
}

func TestErrorNoGround(t *testing.T) {
	failText(t, `g: 0 -> A source 10 V, Z 1 Ω
r: A -> 0 Z 1 Ω`, "", nil, expr.Position{Line: 2, Col: 4}, "the network made of nodes 0 and A has no ground", "ground NODE")
	// a transformer's secondary without its own ground
	failText(t, feed+`tx: A -> 0 ratio 25 to S -> n
load: S -> n Z 4 Ω`, "", nil, expr.Position{}, "the part of the network made of nodes S and n has no ground")
}

func TestErrorTwoGrounds(t *testing.T) {
	failText(t, "ground A\n"+feed, "", nil, expr.Position{Line: 3, Col: 1},
		"nodes A and 0 are all grounds of one connected part", "keep one ground line")
}

func TestErrorSourceLoop(t *testing.T) {
	failText(t, feed+"s1: 0 -> A source 10 V\ns2: 0 -> A source 10 V", "", nil, expr.Position{Line: 6, Col: 1},
		"the ideal voltage sources s1 and s2 (nodes 0 and A) form a loop", "series impedance")
	// a loop through three nodes
	failText(t, feed+`s1: 0 -> A source 10 V
s2: A -> B source 1 V
s3: B -> 0 source 3 V
rb: B -> 0 Z 1 Ω`, "", nil, expr.Position{}, "the ideal voltage sources s1, s2 and s3 (nodes 0, A and B) form a loop")
	// the same voltage fixed on both sides of a transformer
	failText(t, `ground N
ground n
g: N -> P source 1000 V
tx: P -> N ratio 10 to S -> n
e2: n -> S source 100 V
load: S -> n Z 4 Ω`, "", nil, expr.Position{Line: 6, Col: 1},
		"the ideal voltage sources and transformer windings g, tx and e2 (nodes N, P, S and n) form a loop")
	// two transformers in parallel with the same ratio: the current
	// between them is not determined; with different ratios they are not a
	// loop of this kind (they force the voltages to zero instead)
	two := `ground N
ground n
g: N -> P source 1000 V, Z 1 Ω
t1: P -> N ratio 10 to S -> n
t2: P -> N ratio %s to S -> n
load: S -> n Z 4 Ω`
	failText(t, sprintf(two, "10"), "", nil, expr.Position{}, "transformer windings t1 and t2")
	// hand derivation for different ratios: V_P − V_N = 10·V_S = 12·V_S
	// only with V_S = 0 and V_P = 0, so the source drives 1000 V / 1 Ω
	// into the windings
	r := solveText(t, sprintf(two, "12"), "", nil)
	wantC(t, "V_S", nodeV(r, "S")+1, 1, 1e-12)
	ig, _ := branchIS(r, "g")
	wantC(t, "I_g", ig, 1000, 1e-12)
}

func TestErrorCurrentCutSet(t *testing.T) {
	failText(t, feed+"j1: A -> B current 1 A\nj2: B -> A current 2 A", "", nil, expr.Position{Line: 5, Col: 10},
		"node B is joined to the rest of the network only through the current sources j1 and j2 (a cut set of current sources)")
}

func TestErrorDuplicateBranch(t *testing.T) {
	failText(t, feed+"r: A -> 0 Z 2 Ω", "", nil, expr.Position{Line: 5, Col: 1},
		"the branch name r is used twice (first at line 4)")
	// parallel branches under different names are allowed
	solveText(t, feed+"r2: A -> 0 Z 2 Ω", "", nil)
}

func TestErrorNameExists(t *testing.T) {
	env := expr.NewEnv()
	env.Define(&expr.Binding{Name: "V_A", Value: expr.Real(1), Pos: expr.PlaceAt("", 1, 1)})
	env.Define(&expr.Binding{Name: "S_r", Value: expr.Real(1), Pos: expr.PlaceAt("", 1, 1)})
	failText(t, feed, "", env, expr.Position{Line: 3, Col: 9},
		"V_A is already defined, and the network would define it as the voltage of node A", "S_r is already defined", "```network TAG")
	// the tag moves the block's names out of the way
	solveText(t, feed, "b", env)
}

func TestErrorNonLinear(t *testing.T) {
	failText(t, feed+"k: A -> 0 current 0.1 S * V_A * V_A / (1 V)", "", nil, expr.Position{Line: 5, Col: 19},
		"the current of the source k is not linear in V_A")
	// conj is not linear over the complex numbers
	failText(t, feed+"k: A -> 0 current 0.1 S * conj(V_A)", "", nil, expr.Position{}, "not linear in V_A")
	// a value that fails at zero
	failText(t, feed+"k: A -> 0 current 1 A * V_A / V_A", "", nil, expr.Position{}, "not linear in V_A", "where they are all zero")
	// abs(I) is not linear either
	failText(t, feed+"k: A -> 0 current 0.1 * abs(I_r)", "", nil, expr.Position{}, "not linear in I_r")
}

func TestErrorControlledWhere(t *testing.T) {
	failText(t, feed+"x: A -> 0 Z 1 Ω * V_A / (1 V)", "", nil, expr.Position{Line: 5, Col: 19},
		"only a source or current value may use the network's voltages and currents")
	failText(t, feed+"k: A -> 0 current 0.1 S * V_0", "", nil, expr.Position{}, "node 0 is a ground", "write 0 V")
	failText(t, feed+"k: A -> 0 current 1 A + S_r / (1 VA) * 1 A", "", nil, expr.Position{}, "S_r is the complex power of the branch r")
}

func TestErrorUnits(t *testing.T) {
	failText(t, feed+"x: A -> 0 Z 3 A", "", nil, expr.Position{Line: 5, Col: 13}, "the impedance of x is 3 A", "must be in Ω")
	failText(t, feed+"x: A -> 0 Y 3 Ω", "", nil, expr.Position{}, "must be in S")
	failText(t, feed+"x: A -> 0 current 3 V", "", nil, expr.Position{}, "must be in A")
	failText(t, "ground 0\ng: 0 -> A source 10 A, Z 1 Ω\nr: A -> 0 Z 1 Ω", "", nil, expr.Position{}, "must be in V")
	failText(t, feed+"tx: A -> 0 ratio 30° to S -> n\nground n\nl: S -> n Z 1 Ω", "", nil, expr.Position{}, "an angle")
	failText(t, feed+"tx: A -> 0 ratio 3 V to S -> n\nground n\nl: S -> n Z 1 Ω", "", nil, expr.Position{}, "a plain number")
	failText(t, feed+"x: A -> 0 Z 0 Ω", "", nil, expr.Position{}, "0 Ω, a short circuit")
	failText(t, feed+"x: A -> 0 Z Z_unknown", "", nil, expr.Position{Line: 5, Col: 13}, "unknown name")
}

func TestErrorSingular(t *testing.T) {
	failText(t, feed+"y1: A -> B Y 0 S\ny2: B -> 0 Y 0 S", "", nil, expr.Position{Line: 1, Col: 1},
		"the network's equations are singular: V_B is not determined")
}

func TestUnavailable(t *testing.T) {
	env := expr.NewEnv()
	env.Define(&expr.Binding{Name: "Z_bad", Unavailable: true, Pos: expr.PlaceAt("", 1, 1), Cause: expr.PlaceAt("", 1, 1)})
	r, errs := Run(block(feed+"x: A -> 0 Z Z_bad", ""), env, nil)
	if len(errs) > 0 || r.Unavailable == nil || r.Solution != nil {
		t.Fatalf("errs %v, unavailable %v", errs, r.Unavailable)
	}
	// the names are still listed, without values
	for _, d := range r.Defs() {
		if d.Value != nil {
			t.Fatalf("%s has a value", d.Name)
		}
	}
}
