package solve

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	numeric "calcdoc/calcdoc/kind/solve/numeric"

	"gonum.org/v1/gonum/mat"
)

// sparseSets is testdata/solve/sparse_sets.json, written by
// testdata/refgen/gen_solve_sparse.py with numpy.linalg.solve.
type sparseSets struct {
	Cases []struct {
		Name        string       `json:"name"`
		Doc         string       `json:"doc"`
		Unknowns    []string     `json:"unknowns"`
		X           [][2]float64 `json:"x"`
		ComplexForm bool         `json:"complex_form"`
		Order       int          `json:"order"`
		NNZ         int          `json:"nnz"`
	} `json:"cases"`
}

func loadSparseSets(t testing.TB) *sparseSets {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "solve", "sparse_sets.json"))
	if err != nil {
		t.Fatalf("reading the NumPy reference: %v", err)
	}
	var ref sparseSets
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatalf("decoding the NumPy reference: %v", err)
	}
	return &ref
}

// TestSparseSetsNumPy solves networks written node by node as solve blocks
// (ladders of 40, 50 and 200 nodes, meshed feeders of 120 and 500 nodes,
// and a meshed feeder of 150 nodes with a real unknown and a real-valued
// equation) and compares every unknown with numpy.linalg.solve of the same
// equations assembled as a dense matrix by the generator (reference:
// testdata/solve/sparse_sets.json, testdata/refgen/gen_solve_sparse.py,
// Debian's python3-numpy). It also checks the factorisation the sheet
// names against the structure NumPy's matrix has: the complex form for
// the complex sets and the real form (2N + 1 real unknowns) for the one
// with a real unknown, its order and non-zero entries, and the sparse LU
// exactly where the rule of numeric.UseSparse puts it (at least 50 rows,
// at most 10 % non-zero).
func TestSparseSetsNumPy(t *testing.T) {
	ref := loadSparseSets(t)
	if len(ref.Cases) < 6 {
		t.Fatalf("%d reference sets, want 6", len(ref.Cases))
	}
	for _, c := range ref.Cases {
		t.Run(c.Name, func(t *testing.T) {
			d, page := solveSheet(t, c.Doc)
			noErrors(t, d)
			got := make([]complex128, len(c.Unknowns))
			want := make([]complex128, len(c.Unknowns))
			for k, name := range c.Unknowns {
				got[k] = valueOf(t, d, name)
				want[k] = complex(c.X[k][0], c.X[k][1])
			}
			if worst, ok := relClose(got, want, 1e-9); !ok {
				t.Errorf("largest deviation from NumPy %.3g of the largest unknown, want ≤ 1e-9", worst)
			}
			set := solveSets(d)[0]
			f := set.Factorization
			if !set.Linear || set.Iterations != 0 {
				t.Errorf("linear=%v, iterations=%d: the set must be solved directly", set.Linear, set.Iterations)
			}
			if f.Complex != c.ComplexForm || f.Order != c.Order || f.NNZ != c.NNZ {
				t.Errorf("factored: complex=%v, order %d, %d non-zero entries; NumPy's matrix: complex=%v, order %d, %d non-zero entries",
					f.Complex, f.Order, f.NNZ, c.ComplexForm, c.Order, c.NNZ)
			}
			wantSparse := c.Order >= 50 && float64(c.NNZ) <= 0.1*float64(c.Order)*float64(c.Order)
			if f.Sparse != wantSparse {
				t.Errorf("sparse LU = %v, want %v for order %d with %d non-zero entries", f.Sparse, wantSparse, c.Order, c.NNZ)
			}
			// the sheet names the method and the size
			method := "by dense LU factorisation with partial pivoting"
			if wantSparse {
				method = "by sparse LU factorisation of the scaled matrix"
			}
			size := fmt.Sprintf("(%d×%d, %s non-zero entries", c.Order, c.Order, group(c.NNZ))
			for _, w := range []string{method, size} {
				if !strings.Contains(page, w) {
					t.Errorf("the sheet does not say %q", w)
				}
			}
			// a matrix above FullTableLimit is listed by its non-zero entries
			if list := strings.Contains(page, "the non-zero entries of A and b</h3>"); list != (c.Order > FullTableLimit) {
				t.Errorf("appendix lists the non-zero entries: %v, want %v (order %d)", list, c.Order > FullTableLimit, c.Order)
			}
			if c.Order > FullTableLimit {
				app := page[strings.Index(page, "the non-zero entries of A and b</h3>"):]
				app = app[:strings.Index(app, "</section>")]
				// the entries of A, then the non-zero entries of b, one row each
				if rows := strings.Count(app, "<tr><td>"); rows < c.NNZ || rows > c.NNZ+c.Order {
					t.Errorf("the appendix has %d entry rows, want the %d non-zero entries of A and those of b", rows, c.NNZ)
				}
			}
		})
	}
}

// TestSparseDenseAgree factors the same linear sets by the dense and by the
// sparse LU (the 200-node ladder and the 120-node mesh of the NumPy
// reference, and the real form of the mesh with a real unknown) and
// requires the two solutions to agree to 1e-12 of the largest unknown and
// the two condition estimates to within a factor 3: both are Hager–Higham
// estimates of κ₁ of the same scaled matrix, made from different factors
// (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
// section 15.3: in practice within a factor 3 of the true value).
func TestSparseDenseAgree(t *testing.T) {
	ref := loadSparseSets(t)
	for _, c := range ref.Cases {
		if c.Order < numeric.SparseMinOrder || c.Order > 400 {
			continue
		}
		t.Run(c.Name, func(t *testing.T) {
			lin := linearOf(t, c.Doc)
			dense, err := numeric.SolveLinearForced(lin, false)
			if err != nil {
				t.Fatal(err)
			}
			sp, err := numeric.SolveLinearForced(lin, true)
			if err != nil {
				t.Fatal(err)
			}
			if dense.Method.Sparse || !sp.Method.Sparse {
				t.Fatalf("methods: %+v and %+v", dense.Method, sp.Method)
			}
			a := make([]complex128, len(dense.X))
			b := make([]complex128, len(dense.X))
			for k := range a {
				a[k], b[k] = complex(dense.X[k], 0), complex(sp.X[k], 0)
			}
			if worst, ok := relClose(b, a, 1e-12); !ok {
				t.Errorf("dense and sparse solutions differ by %.3g of the largest unknown", worst)
			}
			if r := sp.Cond / dense.Cond; !(r > 1.0/3 && r < 3) {
				t.Errorf("condition estimates: dense %.3g, sparse %.3g", dense.Cond, sp.Cond)
			}
		})
	}
}

// linearOf prepares the solve block of a document (its values evaluated
// above it) and returns its affine model.
func linearOf(t testing.TB, src string) *numeric.Linear {
	t.Helper()
	r := preparedRun(t, src)
	lin, ok, err := numeric.Linearize(r.problem(r.x0, r.rscale))
	if err != nil || !ok {
		t.Fatalf("Linearize: ok=%v err=%v", ok, err)
	}
	return lin
}

// islandDoc is the ladder of ladderDoc(n) and, in the same block, an
// island of m more nodes n+1 … n+m joined to each other by Z_s and to
// nothing else, each with a shunt: "" for none, else the shunt's impedance.
func islandDoc(n, m int, shunt string) string {
	lad := ladderDoc(n)
	head := strings.Index(lad, "```solve ")
	eol := head + strings.Index(lad[head:], "\n")
	var hdr, eqs strings.Builder
	for k := n + 1; k <= n+m; k++ {
		fmt.Fprintf(&hdr, ", V_%d[kV]", k)
		var terms []string
		if shunt != "" {
			terms = append(terms, fmt.Sprintf("V_%d/(%s)", k, shunt))
		}
		if k > n+1 {
			terms = append(terms, fmt.Sprintf("(V_%d - V_%d)/Z_s", k, k-1))
		}
		if k < n+m {
			terms = append(terms, fmt.Sprintf("(V_%d - V_%d)/Z_s", k, k+1))
		}
		fmt.Fprintf(&eqs, "i_%d: %s = 0 A\n", k, strings.Join(terms, " + "))
	}
	body := strings.TrimSuffix(lad[eol+1:], "```\n")
	return lad[:eol] + hdr.String() + "\n" + body + eqs.String() + "```\n"
}

// TestSparseSingular: a set large enough for the sparse LU whose matrix is
// singular or too badly conditioned is reported as an error on the block,
// never a panic, and its unknowns get no value. The set is a 60-node
// ladder and, in the same block, an island of 5 nodes joined only to each
// other (hand derivation: without shunts the island's KCL rows are its
// Laplacian, whose rows sum to zero, so all its voltages equal and of any
// value satisfy them: singular, and the unknowns not determined are the
// island's; with shunts of 1e13 Ω against series impedances of 0.13 Ω the
// island's smallest eigenvalue is about 1e-13 S against 15 S, a condition
// number far above CondLimit = 1e12).
func TestSparseSingular(t *testing.T) {
	cases := []struct {
		name, shunt string
		want        []string
	}{
		{"floating island", "", []string{"the equations", "i_61", "i_65", "V_61", "V_65"}},
		{"nearly floating island", "1e13 Ω", []string{"the condition number of the set's matrix", "exceeds 1e+12", "i_61", "V_61"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var d *calcdoc.Document
			func() {
				defer func() {
					if p := recover(); p != nil {
						t.Fatalf("panic: %v", p)
					}
				}()
				d = solveDoc(t, islandDoc(60, 5, c.shunt))
			}()
			set := solveSets(d)[0]
			if set.Solved || len(d.Errors) != 1 {
				t.Fatalf("solved=%v with %d errors %v: want one error", set.Solved, len(d.Errors), firstErrors(d.Errors))
			}
			if f := set.Factorization; !f.Sparse || f.Order != 65 {
				t.Errorf("factorisation %+v: want the sparse LU of the 65×65 complex matrix", f)
			}
			msg := d.Errors[0].Msg
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("the error %q does not say %q", msg, w)
				}
			}
			if strings.Contains(msg, "V_1,") || strings.Contains(msg, "n_1 ") {
				t.Errorf("the error %q names the ladder, which is determined", msg)
			}
			for _, name := range []string{"V_1", "V_61"} {
				if bd := d.Env.Lookup(name); bd == nil || !bd.Unavailable {
					t.Errorf("%s is defined, though its set was not solved", name)
				}
			}
		})
	}
}

// TestSparseRealForm: the real form (real and imaginary parts as separate
// unknowns) is used only where the set needs it. A 60-node ladder is
// complex-linear and is factored as its 60×60 complex matrix; the same
// ladder with conj of an unknown in its last equation is not
// complex-linear and is factored in its 120×120 real form, sparse in both
// cases. The conj ladder's solution is checked against gonum's dense solve
// of the real form written out here by hand derivation: with y = 1/Z and
// V = a + jb, conj(V)·y_c = (a·g + b·h) + j(a·h − b·g) for y_c = g + jh,
// and a complex coefficient c is the block [[Re c, −Im c], [Im c, Re c]].
func TestSparseRealForm(t *testing.T) {
	const n = 60
	zc := complex(50, 20)
	plain := ladderDoc(n)
	last := fmt.Sprintf("n_%d: (V_%d - V_%d)/Z_s = V_%d/Z_p\n", n, n-1, n, n)
	if !strings.Contains(plain, last) {
		t.Fatalf("the ladder's last equation is not %q", last)
	}
	conj := strings.Replace(plain, last, fmt.Sprintf("n_%d: (V_%d - V_%d)/Z_s = V_%d/Z_p + conj(V_%d)/Z_c\n", n, n-1, n, n, n), 1)
	conj = strings.Replace(conj, "```solve", "```calc\nZ_c = "+cnum(zc)+" Ω\n```\n\n```solve", 1)
	for _, c := range []struct {
		name    string
		src     string
		complex bool
		order   int
	}{{"complex-linear ladder", plain, true, n}, {"ladder with conj", conj, false, 2 * n}} {
		d := solveDoc(t, c.src)
		noErrors(t, d)
		f := solveSets(d)[0].Factorization
		if f.Complex != c.complex || f.Order != c.order || !f.Sparse {
			t.Errorf("%s: factorisation %+v, want complex=%v, order %d, sparse", c.name, f, c.complex, c.order)
		}
		if !c.complex {
			want := conjLadder(n, zc)
			got := make([]complex128, n)
			for k := 1; k <= n; k++ {
				got[k-1] = valueOf(t, d, fmt.Sprintf("V_%d", k))
			}
			if worst, ok := relClose(got, want, 1e-9); !ok {
				t.Errorf("%s: largest deviation from gonum's solve of the real form %.3g, want ≤ 1e-9", c.name, worst)
			}
		}
	}
}

// conjLadder solves the real form of the ladder with conj(V_n)/Z_c in its
// last equation with gonum (mat.Dense.Solve, LU with partial pivoting).
func conjLadder(n int, zc complex128) []complex128 {
	ys, yp, yc := 1/ladderZs, 1/ladderZp, 1/zc
	a := mat.NewDense(2*n, 2*n, nil)
	b := mat.NewVecDense(2*n, nil)
	put := func(i, k int, c complex128) {
		a.Set(2*i, 2*k, a.At(2*i, 2*k)+real(c))
		a.Set(2*i, 2*k+1, a.At(2*i, 2*k+1)-imag(c))
		a.Set(2*i+1, 2*k, a.At(2*i+1, 2*k)+imag(c))
		a.Set(2*i+1, 2*k+1, a.At(2*i+1, 2*k+1)+real(c))
	}
	// KCL, currents leaving node k: (V_k − V_{k−1})y_s + V_k y_p + (V_k − V_{k+1})y_s
	for k := 0; k < n; k++ {
		put(k, k, ys+yp)
		if k > 0 {
			put(k, k-1, -ys)
		}
		if k < n-1 {
			put(k, k, ys)
			put(k, k+1, -ys)
		}
	}
	src := complex(ladderVs, 0) * ys
	b.SetVec(0, real(src))
	b.SetVec(1, imag(src))
	// + conj(V_n)·y_c in the last row
	g, h := real(yc), imag(yc)
	i := 2 * (n - 1)
	a.Set(i, i, a.At(i, i)+g)
	a.Set(i, i+1, a.At(i, i+1)+h)
	a.Set(i+1, i, a.At(i+1, i)+h)
	a.Set(i+1, i+1, a.At(i+1, i+1)-g)
	var x mat.VecDense
	if err := x.SolveVec(a, b); err != nil {
		panic(err)
	}
	out := make([]complex128, n)
	for k := range out {
		out[k] = complex(x.AtVec(2*k), x.AtVec(2*k+1))
	}
	return out
}
