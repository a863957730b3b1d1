package mna

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// refNetworks is testdata/network/generated.json, written by
// testdata/refgen/gen_network.py: random networks of 3 to 200 nodes with
// every element kind, each solved by an independent NumPy modified nodal
// analysis (every branch current an unknown, numpy.linalg.solve).
type refNetworks struct {
	NumPy    string `json:"numpy"`
	Networks []struct {
		Nodes int                   `json:"nodes"`
		Tag   string                `json:"tag"`
		Text  string                `json:"text"`
		Kinds []string              `json:"kinds"`
		V     map[string][2]float64 `json:"V"`
		I     map[string][2]float64 `json:"I"`
		S     map[string][2]float64 `json:"S"`
		Cond  float64               `json:"cond"`
	} `json:"networks"`
}

func loadNetworks(t testing.TB) refNetworks {
	raw, err := os.ReadFile(filepath.Join("..", "..", "..", "..", "testdata", "network", "generated.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r refNetworks
	if err := json.Unmarshal(raw, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

func cx(p [2]float64) complex128 { return complex(p[0], p[1]) }

// refTol is the agreement asked of every node voltage, branch current and
// branch power, relative to the largest of its kind in the network: the
// reference's condition numbers are at most 1e9 (by construction; 2e5 at
// most in the committed set) and both solutions are backward stable, so
// they agree to about cond·2⁻⁵³ ≈ 1e-11 relative to the largest entry.
const refTol = 1e-9

// TestNumPyNetworks solves every generated network and compares it node
// by node and branch by branch with the NumPy reference
// (testdata/network/generated.json, NumPy modified nodal analysis).
func TestNumPyNetworks(t *testing.T) {
	ref := loadNetworks(t)
	if len(ref.Networks) < 10 {
		t.Fatalf("%d networks", len(ref.Networks))
	}
	kinds := map[string]bool{}
	for k, nw := range ref.Networks {
		for _, x := range nw.Kinds {
			kinds[x] = true
		}
		r := solveText(t, nw.Text, nw.Tag, nil)
		if got := len(r.Topo.Nodes); got != nw.Nodes {
			t.Errorf("network %d: %d nodes, the reference has %d", k, got, nw.Nodes)
		}
		maxOf := func(m map[string][2]float64) float64 {
			big := 0.0
			for _, p := range m {
				big = math.Max(big, cmplx.Abs(cx(p)))
			}
			return big
		}
		vs, is, ss := maxOf(nw.V), maxOf(nw.I), maxOf(nw.S)
		worst := 0.0
		for name, p := range nw.V {
			got := nodeV(r, name)
			worst = math.Max(worst, cmplx.Abs(got-cx(p))/vs)
			if !near(got, cx(p), refTol, vs) {
				t.Errorf("network %d (%d nodes): V_%s = %v, NumPy %v", k, nw.Nodes, name, got, cx(p))
			}
		}
		if len(nw.I) != len(r.Net.Branches) {
			t.Errorf("network %d: %d branches, the reference has %d", k, len(r.Net.Branches), len(nw.I))
		}
		for name, p := range nw.I {
			gi, gs := branchIS(r, name)
			worst = math.Max(worst, cmplx.Abs(gi-cx(p))/is)
			if !near(gi, cx(p), refTol, is) {
				t.Errorf("network %d: I_%s = %v, NumPy %v", k, name, gi, cx(p))
			}
			if sp := cx(nw.S[name]); !near(gs, sp, refTol, ss) {
				t.Errorf("network %d: S_%s = %v, NumPy %v", k, name, gs, sp)
			}
		}
		t.Logf("network %d: %d nodes, %d unknowns, cond %.2g (NumPy 2-norm %.2g), backward error %.2g, largest relative difference %.2g",
			k, nw.Nodes, len(r.Network.Unknowns), r.Solution.Cond, nw.Cond, r.Solution.Backward, worst)
	}
	for _, want := range []string{"Z", "Y", "source", "ideal source", "current", "controlled", "ratio", "couple"} {
		if !kinds[want] {
			t.Errorf("no generated network has %s", want)
		}
	}
}
