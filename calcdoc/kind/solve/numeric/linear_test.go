package solve

import (
	"errors"
	"math"
	"math/cmplx"
	"testing"

	"calcdoc/expr/linalg"

	"gonum.org/v1/gonum/mat"
)

// TestSingular checks that singular and near-singular systems are reported
// with the unknowns and equations involved. Each expected index set is the
// support of the exact null vectors, worked out by hand in the comment.
func TestSingular(t *testing.T) {
	cases := []struct {
		name      string
		a         [][]float64
		b         []float64
		rscale    []float64
		unknowns  []int
		equations []int
	}{
		{
			// Row 2 = 2·row 0: left null vector (2, 0, −1). Right null vector
			// (1,2,3)×(2,−1,1) = (5, 5, −5): every unknown moves.
			name:      "duplicate equation",
			a:         [][]float64{{1, 2, 3}, {2, -1, 1}, {2, 4, 6}},
			b:         []float64{1, 2, 2},
			unknowns:  []int{0, 1, 2},
			equations: []int{0, 2},
		},
		{
			// Row 3 = row 0 + row 1: left null vector (1, 1, 0, −1). Right
			// null vector: x0 = 0, x1 + x2 = 0, x3 = 0, so (0, 1, −1, 0).
			name:      "equation is the sum of two others",
			a:         [][]float64{{1, 0, 0, 0}, {0, 1, 1, 0}, {0, 0, 0, 1}, {1, 1, 1, 0}},
			b:         []float64{1, 2, 3, 3},
			unknowns:  []int{1, 2},
			equations: []int{0, 1, 3},
		},
		{
			// Column 1 is zero: right null vector e₁. Left null vector c
			// with 2c0 + c1 = 0 and c0 − c1 + 3c2 = 0: (1, −2, −1).
			name:      "unknown appears in no equation",
			a:         [][]float64{{2, 0, 1}, {1, 0, -1}, {0, 0, 3}},
			b:         []float64{1, 1, 1},
			unknowns:  []int{1},
			equations: []int{0, 1, 2},
		},
		{
			// Zero row 0 and zero column 0: an exactly zero pivot.
			name:      "zero pivot",
			a:         [][]float64{{0, 0}, {0, 1}},
			b:         []float64{0, 1},
			unknowns:  []int{0},
			equations: []int{0},
		},
		{
			// κ ≈ 4e14 > CondLimit; the near-null vectors are ≈ (1, −1)/√2
			// on both sides.
			name:      "near singular",
			a:         [][]float64{{1, 1}, {1, 1 + 1e-14}},
			b:         []float64{2, 2},
			unknowns:  []int{0, 1},
			equations: []int{0, 1},
		},
		{
			// Without residual scales κ = 1e14 > CondLimit: the second
			// equation looks like 0 = 0 (compare TestEquilibration).
			name:      "badly scaled, no scales given",
			a:         [][]float64{{1e7, 0}, {0, 1e-7}},
			b:         []float64{1e7, 1e-7},
			unknowns:  []int{1},
			equations: []int{1},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := realProblem(c.a, c.b)
			p.RScale = c.rscale
			lin, ok, err := Linearize(p)
			if err != nil || !ok {
				t.Fatalf("Linearize: ok=%v err=%v, want linear", ok, err)
			}
			x, cond, err := SolveLinear(lin)
			var se *SingularError
			if !errors.As(err, &se) {
				t.Fatalf("SolveLinear = %v, cond %v, err %v; want *SingularError", x, cond, err)
			}
			if x != nil {
				t.Errorf("x = %v returned with a singular system", x)
			}
			if !(cond > CondLimit) || !(se.Cond > CondLimit) {
				t.Errorf("cond = %v, SingularError.Cond = %v, want > %v", cond, se.Cond, float64(CondLimit))
			}
			if !sameInts(se.Unknowns, c.unknowns) {
				t.Errorf("Unknowns = %v, want %v", se.Unknowns, c.unknowns)
			}
			if !sameInts(se.Equations, c.equations) {
				t.Errorf("Equations = %v, want %v", se.Equations, c.equations)
			}
			if se.Error() == "" {
				t.Error("empty error message")
			}
			// the typed condition of expr/linalg is reachable by errors.As
			var ls *linalg.Singular
			var ic *linalg.IllConditioned
			if !errors.As(err, &ls) && !errors.As(err, &ic) {
				t.Errorf("cause %v: want a *linalg.Singular or *linalg.IllConditioned", se.Cause)
			}
			if ls != nil && ls.Exact() != se.ZeroPivot {
				t.Errorf("ZeroPivot = %v, linalg.Singular exact = %v", se.ZeroPivot, ls.Exact())
			}
		})
	}
}

// TestSingularComplex checks the real form of a complex set in which
// equation 1 is (1+2j) times equation 0 and z_1 appears in neither. The
// complex null vectors are (0, 1) on the right and (1+2j, −1) on the left,
// so both parts of z_1 (real unknowns 2, 3) and all four real equations are
// named.
func TestSingularComplex(t *testing.T) {
	a := [][]complex128{{2, 0}, {2 * (1 + 2i), 0}}
	b := []complex128{1, 1 + 2i}
	lin, ok, err := Linearize(complexProblem(a, b))
	if err != nil || !ok {
		t.Fatalf("Linearize: ok=%v err=%v", ok, err)
	}
	_, _, err = SolveLinear(lin)
	var se *SingularError
	if !errors.As(err, &se) {
		t.Fatalf("err = %v, want *SingularError", err)
	}
	if want := []int{2, 3}; !sameInts(se.Unknowns, want) {
		t.Errorf("Unknowns = %v, want %v", se.Unknowns, want)
	}
	if want := []int{0, 1, 2, 3}; !sameInts(se.Equations, want) {
		t.Errorf("Equations = %v, want %v", se.Equations, want)
	}
	if se.Rank != 2 {
		t.Errorf("Rank = %d, want 2", se.Rank)
	}
}

// TestLinearSolutions checks SolveLinear against systems with exact
// solutions.
func TestLinearSolutions(t *testing.T) {
	const d = 0x1p-27 // exactly representable, so the system below is exact
	cases := []struct {
		name    string
		a       [][]float64
		b       []float64
		xscale  []float64
		rscale  []float64
		want    []float64
		tol     float64
		condMin float64
		condMax float64
	}{
		{
			// Symmetric tridiagonal-like 3×3; b = A·(1, 2, 3).
			name: "3x3 exact",
			a:    [][]float64{{4, -2, 1}, {-2, 4, -2}, {1, -2, 4}},
			b:    []float64{3, 0, 9},
			want: []float64{1, 2, 3}, tol: 1e-14,
			condMin: 1, condMax: 10,
		},
		{
			// [[1, 1], [1, 1+d]] (1, 1) = (2, 2+d) exactly; κ₁ = (2+d)²/d ≈ 5.4e8,
			// so about 1e-7 relative accuracy is all the data support.
			name: "ill-conditioned within the limit",
			a:    [][]float64{{1, 1}, {1, 1 + d}},
			b:    []float64{2, 2 + d},
			want: []float64{1, 1}, tol: 1e-6,
			condMin: 1e8, condMax: 1e9,
		},
		{
			// The set of case "badly scaled, no scales given" in TestSingular
			// with its residual scales: equilibrated it is the identity.
			name:   "badly scaled with scales",
			a:      [][]float64{{1e7, 0}, {0, 1e-7}},
			b:      []float64{1e7, 1e-7},
			rscale: []float64{1e7, 1e-7},
			want:   []float64{1, 1}, tol: 1e-15,
			condMin: 1, condMax: 1,
		},
		{
			// Unknown scales of 1e3 and 1e-3: x = (2000, 0.004) from
			// x0 + 2 x1·1e6 = 10000 and x0 − x1·1e6 = −2000.
			name:   "unknown scales",
			a:      [][]float64{{1, 2e6}, {1, -1e6}},
			b:      []float64{10000, -2000},
			xscale: []float64{1e3, 1e-3},
			rscale: []float64{1e4, 1e4},
			want:   []float64{2000, 0.004}, tol: 1e-14,
			condMin: 1, condMax: 10,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := realProblem(c.a, c.b)
			p.XScale, p.RScale = c.xscale, c.rscale
			lin, ok, err := Linearize(p)
			if err != nil || !ok {
				t.Fatalf("Linearize: ok=%v err=%v", ok, err)
			}
			x, cond, err := SolveLinear(lin)
			if err != nil {
				t.Fatalf("SolveLinear: %v", err)
			}
			for k := range x {
				if e := math.Abs(x[k]-c.want[k]) / math.Abs(c.want[k]); e > c.tol {
					t.Errorf("x[%d] = %v, want %v (relative error %.3g)", k, x[k], c.want[k], e)
				}
			}
			if cond < c.condMin*(1-1e-9) || cond > c.condMax*(1+1e-9) {
				t.Errorf("cond = %v, want in [%v, %v]", cond, c.condMin, c.condMax)
			}
		})
	}
}

// TestClassification checks Linearize's verdict on sets whose linearity is
// known by inspection of their real form.
func TestClassification(t *testing.T) {
	z := func(x []float64, k int) complex128 { return complex(x[2*k], x[2*k+1]) }
	put := func(r []float64, i int, v complex128) { r[2*i], r[2*i+1] = real(v), imag(v) }
	cases := []struct {
		name   string
		p      Problem
		linear bool
	}{
		{
			name: "real affine 3x3",
			p: Problem{N: 3, M: 3, Residual: func(x, r []float64) error {
				r[0] = 2*x[0] - x[1] + 3
				r[1] = x[1] + 4*x[2] - 1
				r[2] = -x[0] + 0.5*x[2]
				return nil
			}},
			linear: true,
		},
		{
			// V = Z·I + V_0 with complex Z: analytic and linear in I.
			name: "complex Z*I = V",
			p: Problem{N: 2, M: 2, Complex: []int{0, 1}, Residual: func(x, r []float64) error {
				put(r, 0, (3+4i)*z(x, 0)-(10-5i))
				return nil
			}},
			linear: true,
		},
		{
			// conj(z) = w is not complex-analytic but is affine over the
			// reals: (x, −y) − (u, v). Real linearity is what matters here.
			name: "conj(z) is real-linear",
			p: Problem{N: 2, M: 2, Complex: []int{0, 1}, Residual: func(x, r []float64) error {
				put(r, 0, cmplx.Conj(z(x, 0))-(1+2i))
				return nil
			}},
			linear: true,
		},
		{
			name: "large constant offset",
			p: Problem{N: 1, M: 1, RScale: []float64{1e6}, Residual: func(x, r []float64) error {
				r[0] = 3*x[0] - 1e6
				return nil
			}},
			linear: true,
		},
		{
			name: "product x*y",
			p: Problem{N: 2, M: 2, Residual: func(x, r []float64) error {
				r[0] = x[0]*x[1] - 2
				r[1] = x[0] - x[1]
				return nil
			}},
		},
		{
			name: "square x^2",
			p: Problem{N: 1, M: 1, Residual: func(x, r []float64) error {
				r[0] = x[0]*x[0] - 2
				return nil
			}},
		},
		{
			// |z| = sqrt(x² + y²), a magnitude equation: one real equation,
			// so two are given for the two unknowns.
			name: "modulus sqrt(x^2+y^2)",
			p: Problem{N: 2, M: 2, Complex: []int{0, 1}, Residual: func(x, r []float64) error {
				r[0] = cmplx.Abs(z(x, 0)) - 5
				r[1] = x[1] - 3
				return nil
			}},
		},
		{
			name: "z*conj(z)",
			p: Problem{N: 2, M: 2, Complex: []int{0, 1}, Residual: func(x, r []float64) error {
				put(r, 0, z(x, 0)*cmplx.Conj(z(x, 0))-25)
				return nil
			}},
		},
		{
			// Kinked exactly at X0 = 0: the column step (+1) sees slope 1,
			// the first probe (negative offsets) sees slope −1.
			name: "abs(x) kinked at X0",
			p: Problem{N: 1, M: 1, Residual: func(x, r []float64) error {
				r[0] = math.Abs(x[0]) - 1
				return nil
			}},
		},
		{
			name: "weak square 1e-6*x^2",
			p: Problem{N: 1, M: 1, Residual: func(x, r []float64) error {
				r[0] = x[0] + 1e-6*x[0]*x[0] - 2
				return nil
			}},
		},
		{
			name: "exp(x)",
			p: Problem{N: 1, M: 1, Residual: func(x, r []float64) error {
				r[0] = math.Exp(x[0]) - 2
				return nil
			}},
		},
		{
			// sqrt cannot be evaluated at the negative probe: an affine map
			// would be defined everywhere.
			name: "sqrt(x) with a probe outside its domain",
			p: Problem{N: 1, M: 1, X0: []float64{4}, XScale: []float64{10}, Residual: func(x, r []float64) error {
				if x[0] < 0 {
					return errors.New("sqrt of a negative number")
				}
				r[0] = math.Sqrt(x[0]) - 3
				return nil
			}},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			lin, ok, err := Linearize(&c.p)
			if err != nil {
				t.Fatalf("Linearize: %v", err)
			}
			if ok != c.linear {
				t.Fatalf("linear = %v, want %v", ok, c.linear)
			}
			if ok && !(lin.MaxDeviation <= LinearTol) {
				t.Errorf("MaxDeviation = %v > LinearTol", lin.MaxDeviation)
			}
			if !ok && lin != nil {
				t.Errorf("non-nil Linear for a non-linear set")
			}
		})
	}
}

// TestLinearizeModel checks A and b against the coefficients of a real
// affine set, including a non-zero X0 and unknown scales.
func TestLinearizeModel(t *testing.T) {
	a := [][]float64{{2, -1e3, 0}, {0.5, 0, 4e-3}, {-1, 1e3, 1e-3}}
	b := []float64{7, -2, 0.25}
	p := realProblem(a, b)
	p.X0 = []float64{10, -0.02, 300}
	p.XScale = []float64{10, 0.01, 1000}
	lin, ok, err := Linearize(p)
	if err != nil || !ok {
		t.Fatalf("Linearize: ok=%v err=%v", ok, err)
	}
	for i := range a {
		for k := range a[i] {
			if got := lin.A.At(i, k); math.Abs(got-a[i][k]) > 1e-12*math.Max(1, math.Abs(a[i][k])) {
				t.Errorf("A[%d][%d] = %v, want %v", i, k, got, a[i][k])
			}
		}
		if math.Abs(lin.B[i]-b[i]) > 1e-11 {
			t.Errorf("b[%d] = %v, want %v", i, lin.B[i], b[i])
		}
	}
}

// TestBadInput checks that invalid problems are reported as errors by every
// entry point.
func TestBadInput(t *testing.T) {
	ok := func(x, r []float64) error {
		for i := range r {
			r[i] = x[i]
		}
		return nil
	}
	cases := []struct {
		name string
		p    *Problem
		dim  bool // want *DimensionError rather than ErrBadProblem
	}{
		{name: "nil problem", p: nil},
		{name: "no unknowns", p: &Problem{N: 0, M: 0, Residual: ok}},
		{name: "more unknowns than equations", p: &Problem{N: 3, M: 2, Residual: ok}, dim: true},
		{name: "more equations than unknowns", p: &Problem{N: 2, M: 3, Residual: ok}, dim: true},
		{name: "nil residual", p: &Problem{N: 1, M: 1}},
		{name: "X0 length", p: &Problem{N: 2, M: 2, Residual: ok, X0: []float64{1}}},
		{name: "X0 not finite", p: &Problem{N: 1, M: 1, Residual: ok, X0: []float64{math.NaN()}}},
		{name: "XScale zero", p: &Problem{N: 1, M: 1, Residual: ok, XScale: []float64{0}}},
		{name: "XScale negative", p: &Problem{N: 1, M: 1, Residual: ok, XScale: []float64{-1}}},
		{name: "RScale infinite", p: &Problem{N: 1, M: 1, Residual: ok, RScale: []float64{math.Inf(1)}}},
		{name: "RScale length", p: &Problem{N: 2, M: 2, Residual: ok, RScale: []float64{1}}},
		{name: "Complex odd length", p: &Problem{N: 2, M: 2, Residual: ok, Complex: []int{0}}},
		{name: "Complex out of range", p: &Problem{N: 2, M: 2, Residual: ok, Complex: []int{0, 2}}},
		{name: "Complex repeated index", p: &Problem{N: 2, M: 2, Residual: ok, Complex: []int{1, 1}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			check := func(fn string, err error) {
				t.Helper()
				var de *DimensionError
				switch {
				case c.dim && !errors.As(err, &de):
					t.Errorf("%s: err = %v, want *DimensionError", fn, err)
				case !c.dim && !errors.Is(err, ErrBadProblem):
					t.Errorf("%s: err = %v, want ErrBadProblem", fn, err)
				}
			}
			_, _, err := Linearize(c.p)
			check("Linearize", err)
			_, err = Newton(c.p, Options{})
			check("Newton", err)
			_, err = Solve(c.p, Options{})
			check("Solve", err)
		})
	}
}

// TestBadLinear checks SolveLinear's validation of its argument.
func TestBadLinear(t *testing.T) {
	cases := []struct {
		name string
		lin  *Linear
		dim  bool
	}{
		{name: "nil", lin: nil},
		{name: "nil matrix", lin: &Linear{N: 2, M: 2, B: []float64{1, 2}}},
		{name: "empty matrix", lin: &Linear{A: &mat.Dense{}}},
		{name: "scaled entry overflows", lin: &Linear{A: mat.NewDense(1, 1, []float64{1e300}), B: []float64{1}, XScale: []float64{1e300}}},
		{name: "not square", lin: &Linear{A: mat.NewDense(2, 3, nil), B: []float64{1, 2}}, dim: true},
		{name: "b length", lin: &Linear{A: mat.NewDense(2, 2, []float64{1, 0, 0, 1}), B: []float64{1}}},
		{name: "N disagrees with A", lin: &Linear{N: 3, M: 2, A: mat.NewDense(2, 2, []float64{1, 0, 0, 1}), B: []float64{1, 2}}},
		{name: "NaN entry", lin: &Linear{A: mat.NewDense(2, 2, []float64{1, math.NaN(), 0, 1}), B: []float64{1, 2}}},
		{name: "infinite b", lin: &Linear{A: mat.NewDense(2, 2, []float64{1, 0, 0, 1}), B: []float64{1, math.Inf(-1)}}},
		{name: "bad scale", lin: &Linear{A: mat.NewDense(2, 2, []float64{1, 0, 0, 1}), B: []float64{1, 2}, XScale: []float64{1, 0}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x, _, err := SolveLinear(c.lin)
			var de *DimensionError
			if c.dim && !errors.As(err, &de) {
				t.Errorf("err = %v, want *DimensionError", err)
			}
			if !c.dim && !errors.Is(err, ErrBadProblem) {
				t.Errorf("err = %v, want ErrBadProblem", err)
			}
			if x != nil {
				t.Errorf("x = %v with an error", x)
			}
		})
	}
}

// TestEvalErrors checks that a residual that fails, or leaves an entry unset
// or not finite, at X0 is reported as an *EvalError.
func TestEvalErrors(t *testing.T) {
	cause := errors.New("division by zero")
	cases := []struct {
		name     string
		residual func(x, r []float64) error
		equation int
		cause    error
	}{
		{
			name:     "residual returns an error",
			residual: func(x, r []float64) error { return cause },
			equation: -1, cause: cause,
		},
		{
			name:     "residual leaves an entry unset",
			residual: func(x, r []float64) error { r[0] = x[0]; return nil },
			equation: 1, cause: ErrNotFinite,
		},
		{
			name: "residual is infinite",
			residual: func(x, r []float64) error {
				r[0], r[1] = math.Inf(1), 0
				return nil
			},
			equation: 0, cause: ErrNotFinite,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := &Problem{N: 2, M: 2, Residual: c.residual}
			_, _, errL := Linearize(p)
			_, errN := Newton(p, Options{})
			_, errS := Solve(p, Options{})
			for fn, err := range map[string]error{"Linearize": errL, "Newton": errN, "Solve": errS} {
				var ee *EvalError
				if !errors.As(err, &ee) {
					t.Errorf("%s: err = %v, want *EvalError", fn, err)
					continue
				}
				if ee.Equation != c.equation || !errors.Is(err, c.cause) {
					t.Errorf("%s: Equation = %d, err = %v; want equation %d, cause %v", fn, ee.Equation, err, c.equation, c.cause)
				}
			}
		})
	}
}

// TestComplexLinearForm checks which form SolveLinear factors. Hand
// derivation for the set 3z + conj(z) = b with z = x + jy: 4x + j2y = b, so
// x = Re b/4 and y = Im b/2; its real form [[4, 0], [0, 2]] is not of the
// complex shape [[a, −b], [b, a]], so the real form is factored. The set
// (2 − j)z = b is complex-linear: z = b/(2 − j) = b(2 + j)/5.
func TestComplexLinearForm(t *testing.T) {
	b := complex(8, -6)
	conjSet := &Problem{
		N: 2, M: 2, Complex: []int{0, 1}, ComplexRows: []int{0, 1},
		Residual: func(x, r []float64) error {
			z := complex(x[0], x[1])
			d := 3*z + complex(real(z), -imag(z)) - b
			r[0], r[1] = real(d), imag(d)
			return nil
		},
	}
	lin, ok, err := Linearize(conjSet)
	if err != nil || !ok {
		t.Fatalf("Linearize: ok=%v err=%v", ok, err)
	}
	if lin.ComplexLinear() {
		t.Error("3z + conj(z) classified complex-linear")
	}
	x, _, err := SolveLinear(lin)
	if err != nil {
		t.Fatal(err)
	}
	checkClose(t, x, []float64{real(b) / 4, imag(b) / 2}, 1e-15)

	cp := complexProblem([][]complex128{{2 - 1i}}, []complex128{b})
	lin, ok, err = Linearize(cp)
	if err != nil || !ok {
		t.Fatalf("Linearize: ok=%v err=%v", ok, err)
	}
	if !lin.ComplexLinear() {
		t.Error("(2 − j)z classified not complex-linear")
	}
	x, cond, err := SolveLinear(lin)
	if err != nil {
		t.Fatal(err)
	}
	want := b * (2 + 1i) / 5
	checkClose(t, x, []float64{real(want), imag(want)}, 1e-15)
	if math.Abs(cond-1) > 1e-15 {
		// a 1×1 matrix: κ₁ = |c|·|1/c| = 1 (up to rounding of 1/c)
		t.Errorf("cond = %v, want 1", cond)
	}
	// without the row pairs the real form is factored
	cp.ComplexRows = nil
	lin, _, _ = Linearize(cp)
	if lin.ComplexLinear() {
		t.Error("complex-linear without ComplexRows")
	}
	if x, _, err = SolveLinear(lin); err != nil {
		t.Fatal(err)
	}
	checkClose(t, x, []float64{real(want), imag(want)}, 1e-15)
}
