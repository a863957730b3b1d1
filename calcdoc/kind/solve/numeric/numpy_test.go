package solve

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// refSystems is testdata/solve/complex_systems.json, written by
// testdata/refgen/gen_solve.py with numpy.linalg.solve.
type refSystems struct {
	NumPy string `json:"numpy"`
	Seed  int    `json:"seed"`
	Cases []struct {
		N     int            `json:"n"`
		Cond2 float64        `json:"cond2"`
		A     [][][2]float64 `json:"A"`
		B     [][2]float64   `json:"b"`
		X     [][2]float64   `json:"x"`
	} `json:"cases"`
}

func loadRef(t testing.TB) *refSystems {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("..", "..", "..", "..", "testdata", "solve", "complex_systems.json"))
	if err != nil {
		t.Fatalf("reading the NumPy reference vectors: %v", err)
	}
	var ref refSystems
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatalf("decoding the NumPy reference vectors: %v", err)
	}
	return &ref
}

func toComplex(v [][2]float64) []complex128 {
	out := make([]complex128, len(v))
	for i, p := range v {
		out[i] = complex(p[0], p[1])
	}
	return out
}

// TestNumPyComplexSystems classifies the real 2n×2n form of each reference
// system with Linearize, solves it with SolveLinear (through the complex LU of
// order n, the set being complex-linear) and compares with numpy.linalg.solve
// (reference: testdata/solve/complex_systems.json).
func TestNumPyComplexSystems(t *testing.T) {
	ref := loadRef(t)
	wantSizes := []int{2, 3, 5, 8, 13, 21, 34, 50}
	if len(ref.Cases) != len(wantSizes) {
		t.Fatalf("reference file has %d cases, want %d", len(ref.Cases), len(wantSizes))
	}
	for ci, c := range ref.Cases {
		t.Run(fmt.Sprintf("n=%d", c.N), func(t *testing.T) {
			if c.N != wantSizes[ci] || len(c.A) != c.N || len(c.B) != c.N || len(c.X) != c.N {
				t.Fatalf("malformed reference case: n=%d, %d rows, %d b, %d x", c.N, len(c.A), len(c.B), len(c.X))
			}
			a := make([][]complex128, c.N)
			for i := range a {
				a[i] = toComplex(c.A[i])
			}
			b := toComplex(c.B)
			p := complexProblem(a, b)

			lin, ok, err := Linearize(p)
			if err != nil || !ok {
				t.Fatalf("Linearize: ok=%v err=%v, want a linear system", ok, err)
			}
			// The real form of a_ik is [[Re, −Im], [Im, Re]] in rows 2i, 2i+1
			// and columns 2k, 2k+1; b becomes (Re b_i, Im b_i).
			for i := 0; i < c.N; i++ {
				for k := 0; k < c.N; k++ {
					v := a[i][k]
					want := [2][2]float64{{real(v), -imag(v)}, {imag(v), real(v)}}
					for di := 0; di < 2; di++ {
						for dk := 0; dk < 2; dk++ {
							got := lin.A.At(2*i+di, 2*k+dk)
							if math.Abs(got-want[di][dk]) > 1e-12*(1+math.Abs(want[di][dk])) {
								t.Fatalf("A[%d][%d] = %v, want %v", 2*i+di, 2*k+dk, got, want[di][dk])
							}
						}
					}
				}
				if math.Abs(lin.B[2*i]-real(b[i])) > 1e-12 || math.Abs(lin.B[2*i+1]-imag(b[i])) > 1e-12 {
					t.Fatalf("b[%d] = (%v, %v), want %v", i, lin.B[2*i], lin.B[2*i+1], b[i])
				}
			}

			if !lin.ComplexLinear() {
				t.Fatal("the real form of a complex system is not recognised as complex-linear")
			}
			x, cond, err := SolveLinear(lin)
			if err != nil {
				t.Fatalf("SolveLinear: %v", err)
			}
			// For an n×n matrix κ₁ ≤ n·κ₂ (norm equivalence ‖·‖₁ ≤ √n‖·‖₂),
			// NumPy's cond is κ₂ of the complex matrix, the scales are ones,
			// and the Hager–Higham estimate never exceeds κ₁.
			if !(cond >= 1) || cond > float64(c.N)*c.Cond2*(1+1e-9) {
				t.Errorf("cond = %v, NumPy 2-norm cond = %v", cond, c.Cond2)
			}
			want := toComplex(c.X)
			check := func(form string, x []float64) {
				num, den := 0.0, 0.0
				for k, w := range want {
					num = math.Max(num, cmplx.Abs(complex(x[2*k], x[2*k+1])-w))
					den = math.Max(den, cmplx.Abs(w))
				}
				if num/den > 1e-9 {
					t.Errorf("%s: relative difference from NumPy %.3g > 1e-9", form, num/den)
				}
			}
			check("complex LU", x)

			// the same set without its row pairs is solved in the real form
			real := *lin
			real.ComplexRows = nil
			xr, condr, err := SolveLinear(&real)
			if err != nil {
				t.Fatalf("SolveLinear, real form: %v", err)
			}
			check("real form", xr)
			// κ₁ of the real form of order 2n ≤ 2n·κ₂ (κ₂ is the same for
			// the complex matrix and its real form)
			if !(condr >= 1) || condr > float64(2*c.N)*c.Cond2*(1+1e-9) {
				t.Errorf("real form cond = %v, NumPy 2-norm cond = %v", condr, c.Cond2)
			}
		})
	}
}
