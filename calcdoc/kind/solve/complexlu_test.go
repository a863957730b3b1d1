package solve

import (
	"math/cmplx"
	"testing"

	"calcdoc/calcdoc"
)

// TestSolveComplexLU: a set of complex unknowns and complex equations that
// is complex-linear is solved by the complex LU (SolveSet.ComplexLU); conj
// or re/im of an unknown, and real unknowns, need the real form. The values
// are checked against closed forms (hand derivations in the comments).
func TestSolveComplexLU(t *testing.T) {
	cases := []struct {
		name      string
		src       string
		complexLU bool
		check     func(t *testing.T, d *calcdoc.Document)
	}{
		{"mesh pair", "```calc\nZ = (3 + j4) Ω\n```\n```solve I_a[A], I_b[A]\nm_1: 100 V = I_a*Z + (I_a - I_b)*10 Ω\nm_2: 0 V = (I_b - I_a)*10 Ω + I_b*Z\n```\n", true,
			func(t *testing.T, d *calcdoc.Document) {
				// Cramer's rule on [[Z+10, −10], [−10, Z+10]]·[I_a; I_b] = [100; 0]
				z := complex(3, 4)
				det := (z+10)*(z+10) - 100
				closeTo(t, "I_a", valueOf(t, d, "I_a"), 100*(z+10)/det)
				closeTo(t, "I_b", valueOf(t, d, "I_b"), 100*10/det)
			}},
		{"conj of an unknown", "```solve I[A]\nconj(I)*(2 + j1) Ω = (10 + j5) V\n```\n", false,
			func(t *testing.T, d *calcdoc.Document) {
				// conj(I) = (10 + j5)/(2 + j1) = 5, so I = 5
				closeTo(t, "I", valueOf(t, d, "I"), cmplx.Conj(complex(10, 5)/complex(2, 1)))
			}},
		{"re and im of an unknown", "```solve V[V]\nre(V) = 3 V\nim(V) = -4 V\n```\n", false,
			func(t *testing.T, d *calcdoc.Document) { closeTo(t, "V", valueOf(t, d, "V"), complex(3, -4)) }},
		{"real unknowns", "```solve x real, y real\nx + 2*y = 5\n3*x - y = 1\n```\n", false,
			func(t *testing.T, d *calcdoc.Document) {
				// y = 3x − 1, x + 6x − 2 = 5: x = 1, y = 2
				closeTo(t, "x", valueOf(t, d, "x"), 1)
				closeTo(t, "y", valueOf(t, d, "y"), 2)
			}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := solveDoc(t, c.src)
			noErrors(t, d)
			sets := solveSets(d)
			if len(sets) != 1 || !sets[0].Solved || !sets[0].Linear {
				t.Fatal("the set was not solved directly")
			}
			if sets[0].ComplexLU != c.complexLU {
				t.Errorf("ComplexLU = %v, want %v", sets[0].ComplexLU, c.complexLU)
			}
			if !(sets[0].Cond >= 1) {
				t.Errorf("Cond = %v, want ≥ 1", sets[0].Cond)
			}
			c.check(t, d)
		})
	}
}
