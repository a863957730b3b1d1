package linalg

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

func near(a, b complex128, tol float64) bool {
	return cmplx.Abs(a-b) <= tol*math.Max(cmplx.Abs(b), math.SmallestNonzeroFloat64)
}

// TestHand2x2 checks a complex 2×2 system against the hand derivation for
// A = [a, b; c, d]:
//
//	det A = ad − bc,   A⁻¹ = [d, −b; −c, a]/det A,
//	x = A⁻¹y = (d·y₁ − b·y₂, a·y₂ − c·y₁)/det A   (Cramer's rule),
//
// evaluated with Go's complex128 arithmetic and math/cmplx. The entries are
// an impedance mesh of our own: 10∠30° Ω, 4∠−60° Ω, 4∠−60° Ω, 7∠45° Ω.
func TestHand2x2(t *testing.T) {
	rad := math.Pi / 180
	a, b := cmplx.Rect(10, 30*rad), cmplx.Rect(4, -60*rad)
	c, d := cmplx.Rect(4, -60*rad), cmplx.Rect(7, 45*rad)
	y1, y2 := complex(230, 0), cmplx.Rect(230, -120*rad)
	det := a*d - b*c
	f, err := Factorize(2, []complex128{a, b, c, d}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got, ok := f.DetValue(); !ok || !near(got, det, 1e-15) {
		t.Errorf("det = %v, hand derivation %v", got, det)
	}
	inv, err := f.Inverse()
	if err != nil {
		t.Fatal(err)
	}
	want := []complex128{d / det, -b / det, -c / det, a / det}
	for k := range want {
		if !near(inv[k], want[k], 1e-14) {
			t.Errorf("inv[%d] = %v, hand derivation %v", k, inv[k], want[k])
		}
	}
	x, err := f.Solve([]complex128{y1, y2})
	if err != nil {
		t.Fatal(err)
	}
	wx := []complex128{(d*y1 - b*y2) / det, (a*y2 - c*y1) / det}
	for k := range wx {
		if !near(x[k], wx[k], 1e-14) {
			t.Errorf("x[%d] = %v, Cramer's rule %v", k, x[k], wx[k])
		}
	}
	// κ₁(B) = ‖B‖₁‖B⁻¹‖₁ from the scaled matrix B and its inverse by the
	// same formula: for n = 2 the estimate is exact (the maximising vertex
	// is found in the first gradient step; hand derivation: ‖B⁻¹x‖₁ for
	// x = (½, ½) and then the column of larger 1-norm).
	bm := f.Scaled()
	bd := bm[0]*bm[3] - bm[1]*bm[2]
	bi := []complex128{bm[3] / bd, -bm[1] / bd, -bm[2] / bd, bm[0] / bd}
	col := func(m []complex128, j int) float64 { return cmplx.Abs(m[j]) + cmplx.Abs(m[2+j]) }
	kappa := math.Max(col(bm, 0), col(bm, 1)) * math.Max(col(bi, 0), col(bi, 1))
	if got := f.Cond(); math.Abs(got-kappa) > 1e-13*kappa {
		t.Errorf("Cond = %v, hand derivation κ₁(B) = %v", got, kappa)
	}
}

// TestBadlyScaledUnits: matrices whose entries carry very different units
// (in coherent SI units), regular whatever the scale. Hand derivations: a
// diagonal matrix has det = product of the diagonal, inverse = reciprocals,
// and after equilibration B is 0.5·I (each row's largest entry scaled to
// 0.5), so κ₁(B) = 1 exactly. For the triangular cases det = product of the
// diagonal and the inverse follows by back substitution.
//
// After equilibration a diagonal matrix becomes B = diag(m_i), m_i the
// binary mantissa of |A_ii| in [0.5, 1) (math.Frexp), so κ₁(B) = max m_i /
// min m_i < 2; the estimator finds it exactly (its first gradient step
// lands on the column of B⁻¹ with the largest entry 1/min m_i).
func TestBadlyScaledUnits(t *testing.T) {
	cases := []struct {
		name string
		a    []complex128
		det  complex128
		inv  []complex128
		diag bool // diagonal: κ₁(B) = max m_i / min m_i exactly
	}{
		{"1 MΩ and 1 nS", []complex128{1e6, 0, 0, 1e-9}, 1e-3,
			[]complex128{1e-6, 0, 0, 1e9}, true},
		{"1 pF and 1 kH", []complex128{1e-12, 0, 0, 1e3}, 1e-9,
			[]complex128{1e12, 0, 0, 1e-3}, true},
		{"j·1 GΩ and −j·1 µS", []complex128{1e9i, 0, 0, -1e-6i}, 1e3,
			[]complex128{-1e-9i, 0, 0, 1e6i}, true},
		// [R, k; 0, G]: det = R·G; inverse [1/R, −k/(R·G); 0, 1/G]
		{"hybrid: 50 kΩ, gain 0.98, 25 µS",
			[]complex128{50e3, 0.98, 0, 25e-6}, 50e3 * 25e-6,
			[]complex128{1 / 50e3, -0.98 / (50e3 * 25e-6), 0, 1 / 25e-6}, false},
		// three units at once: diag(1 MV, 1 mA, 1 µS)
		{"1 MV, 1 mA, 1 µS", []complex128{1e6, 0, 0, 0, 1e-3, 0, 0, 0, 1e-6}, 1e-3,
			[]complex128{1e-6, 0, 0, 0, 1e3, 0, 0, 0, 1e6}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			n := int(math.Sqrt(float64(len(c.a))))
			f, err := Factorize(n, c.a, nil)
			if err != nil {
				t.Fatalf("Factorize: %v (a badly scaled matrix is not singular)", err)
			}
			if d, ok := f.DetValue(); !ok || !near(d, c.det, 1e-15) {
				t.Errorf("det = %v, want %v", d, c.det)
			}
			inv, err := f.Inverse()
			if err != nil {
				t.Fatal(err)
			}
			for k := range inv {
				if c.inv[k] == 0 && inv[k] != 0 || c.inv[k] != 0 && !near(inv[k], c.inv[k], 1e-15) {
					t.Errorf("inv[%d] = %v, want %v", k, inv[k], c.inv[k])
				}
			}
			if c.diag {
				lo, hi := 1.0, 0.0
				for i := 0; i < n; i++ {
					m, _ := math.Frexp(cmplx.Abs(c.a[i*n+i]))
					lo, hi = math.Min(lo, m), math.Max(hi, m)
				}
				if got, want := f.Cond(), hi/lo; math.Abs(got-want) > 1e-15*want {
					t.Errorf("Cond = %v, want max/min mantissa %v", got, want)
				}
			}
			if !(f.Cond() < 10) {
				t.Errorf("Cond = %v, want below 10", f.Cond())
			}
			// the same matrix without equilibration (unit scales) is
			// reported: its scaled condition is at least the ratio of its
			// diagonal entries
			g, err := Factorize(n, c.a, &Options{RowScale: ones(n), ColScale: ones(n)})
			if err == nil {
				if !(g.Cond() > 1e8) {
					t.Errorf("unscaled Cond = %v, want above 1e8", g.Cond())
				}
			} else {
				var s *Singular
				if !errors.As(err, &s) {
					t.Errorf("unscaled: %v, want *Singular", err)
				}
			}
		})
	}
}

func ones(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 1
	}
	return v
}

// TestConditions: singular and ill-conditioned matrices are typed values.
func TestConditions(t *testing.T) {
	// hand derivation: row 2 = 2⁻³¹·row 1 (other units, exact in binary):
	// exactly singular; after scaling the second pivot is exactly 0
	f, err := Factorize(2, []complex128{3, 6i, 0x1p-31 * 3, 0x1p-31 * 6i}, nil)
	var s *Singular
	if !errors.As(err, &s) || s.Pivot != 1 || !s.Exact() || !math.IsInf(s.Cond, 1) {
		t.Fatalf("dependent rows: err = %v, want *Singular at pivot 1 with Cond +Inf", err)
	}
	if m, e := f.Det(); m != 0 || e != 0 {
		t.Errorf("Det of a singular matrix = %v·2^%d, want 0", m, e)
	}
	if _, err := f.Solve([]complex128{1, 1}); !errors.As(err, &s) {
		t.Errorf("Solve of a singular matrix: %v, want *Singular", err)
	}
	if _, err := f.Inverse(); !errors.As(err, &s) {
		t.Errorf("Inverse of a singular matrix: %v, want *Singular", err)
	}

	// hand derivation: [1, 1; 1, 1+1e-15] scales to [½, ½; ½, ½(1+5·2⁻⁵²)]
	// (1 + 1e-15 rounds to 1 + 5·2⁻⁵²), second pivot 2.5·2⁻⁵² ≈ 5.55e-16 ≤
	// PivotTol·½: singular, Cond = (largest entry)/pivot =
	// ½(1+5·2⁻⁵²)/(2.5·2⁻⁵²) ≈ 2⁵²/5 ≈ 9.0e14
	_, err = Factorize(2, []float64{1, 1, 1, 1 + 1e-15}, nil)
	if !errors.As(err, &s) || s.Exact() || math.Abs(s.Cond-0x1p52/5) > 1e-14*s.Cond {
		t.Errorf("nearly singular: %v, want *Singular with Cond ≈ 2⁵²/5", err)
	}

	// hand derivation: [1, 1; 1, 1+d], d = 2⁻²⁷: κ₁ = ‖A‖₁‖A⁻¹‖₁ =
	// (2+d)·(2+d)/d ≈ 5.4e8 (A⁻¹ = [1+d, −1; −1, 1]/d); scaling by ½
	// leaves κ unchanged. Above a limit of 1e8: *IllConditioned.
	const d = 0x1p-27
	g, err := Factorize(2, []float64{1, 1, 1, 1 + d}, nil)
	if err != nil {
		t.Fatal(err)
	}
	kappa := (2 + d) * (2 + d) / d
	if c := g.Cond(); math.Abs(c-kappa) > 1e-9*kappa {
		t.Errorf("Cond = %v, hand derivation %v", c, kappa)
	}
	var ic *IllConditioned
	if err := g.CheckCond(1e8); !errors.As(err, &ic) || ic.Limit != 1e8 {
		t.Errorf("CheckCond(1e8) = %v, want *IllConditioned", err)
	}
	if err := g.CheckCond(1e9); err != nil {
		t.Errorf("CheckCond(1e9) = %v, want nil", err)
	}

	// invalid input is a typed error, not a panic
	var ns *NotSquare
	if _, err := Factorize(2, []complex128{1, 2, 3}, nil); !errors.As(err, &ns) {
		t.Errorf("3 entries for 2×2: %v, want *NotSquare", err)
	}
	var nf *NotFinite
	if _, err := Factorize(1, []float64{math.NaN()}, nil); !errors.As(err, &nf) {
		t.Errorf("NaN entry: %v, want *NotFinite", err)
	}
	var bs *BadScale
	if _, err := Factorize(1, []float64{1}, &Options{RowScale: []float64{-1}}); !errors.As(err, &bs) {
		t.Errorf("negative scale: %v, want *BadScale", err)
	}
}

// TestGivenScales: with scales given, B = diag(1/q)·A·diag(s) and
// x = diag(s)·B⁻¹·diag(1/q)·b. Hand derivation: A = [1, 2e6; 1, −1e6],
// b = (10000, −2000) has x = (2000, 0.004) (subtract the rows: 3e6·x₂ =
// 12000); with s = (1e3, 1e-3), q = (1e4, 1e4), B = [0.1, 0.2; 0.1, −0.1],
// whose 1-norm condition is ‖B‖₁‖B⁻¹‖₁ = 0.3·10 = 3
// (B⁻¹ = [10/3, 20/3; 10/3, −10/3], column sums 20/3 and 10).
//
// The estimator's trace by hand: x = (½, ½), y = B⁻¹x = (5, 0), ‖y‖₁ = 5;
// ξ = (1, 1), z = B⁻ᵀξ = (20/3, 10/3), j = 0; x = e₀, y = (10/3, 10/3),
// ‖y‖₁ = 20/3 > 5 but sign(y) = ξ repeats, so the steps stop; the
// alternating vector (1, −2) gives y = (−10, 10) and 2·20/(3·2) = 20/3.
// The estimate of ‖B⁻¹‖₁ is 20/3 and of κ₁ 0.3·20/3 = 2: a lower bound
// within the factor 3 of the method (the column e₁ is not visited).
func TestGivenScales(t *testing.T) {
	f, err := Factorize(2, []float64{1, 2e6, 1, -1e6}, &Options{RowScale: []float64{1e4, 1e4}, ColScale: []float64{1e3, 1e-3}})
	if err != nil {
		t.Fatal(err)
	}
	x, err := f.Solve([]float64{10000, -2000})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(x[0]-2000) > 1e-12*2000 || math.Abs(x[1]-0.004) > 1e-12*0.004 {
		t.Errorf("x = %v, want (2000, 0.004)", x)
	}
	if c := f.Cond(); math.Abs(c-2) > 1e-14*2 {
		t.Errorf("Cond = %v, want the traced estimate 2 (κ₁ = 3)", c)
	}
	// det A = 1·(−1e6) − 2e6·1 = −3e6
	if d, ok := f.DetValue(); !ok || math.Abs(d+3e6) > 1e-15*3e6 {
		t.Errorf("det = %v, want −3e6", d)
	}
}

// TestBlockedEqualsUnblocked: the blocked complex elimination applies the
// same updates in the same order per entry as the unblocked one (blockSize
// 1), so the factors agree bit for bit (n = 77: two full panels and a part).
// The real elimination (gonum's Dgetrf) chooses the same pivots as the
// complex one on the same real matrix and agrees with it to rounding.
func TestBlockedEqualsUnblocked(t *testing.T) {
	const n = 77
	a := make([]complex128, n*n)
	ar := make([]float64, n*n)
	// pseudo-random entries (fixed seed) with magnitudes over 1e±4
	rng := rand.New(rand.NewPCG(77, 1))
	for i := range a {
		v := rng.NormFloat64() * math.Pow(10, float64(rng.IntN(9)-4))
		a[i] = complex(v, rng.NormFloat64())
		ar[i] = v
	}
	saved := blockSize
	defer func() { blockSize = saved }()
	blockSize = 1
	c1, err1 := Factorize(n, a, nil)
	blockSize = saved
	c2, err2 := Factorize(n, a, nil)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	for i := range c1.lu {
		if c1.lu[i] != c2.lu[i] {
			t.Fatalf("entry %d differs: %v, %v", i, c1.lu[i], c2.lu[i])
		}
	}

	r, err := Factorize(n, ar, nil)
	if err != nil {
		t.Fatal(err)
	}
	rc, err := Factorize(n, toC(ar), nil)
	if err != nil {
		t.Fatal(err)
	}
	for k := range r.perm {
		if r.perm[k] != rc.perm[k] {
			t.Fatalf("pivot order differs at %d: real %v, complex %v", k, r.perm, rc.perm)
		}
	}
	if r.sign != rc.sign {
		t.Errorf("det P: real %v, complex %v", r.sign, rc.sign)
	}
	if d := relVec(toC(r.lu), rc.lu); d > 1e-9 {
		t.Errorf("real and complex factors differ by %.3g", d)
	}
	if math.Abs(r.Cond()-rc.Cond()) > 1e-9*rc.Cond() {
		t.Errorf("Cond: real %v, complex %v", r.Cond(), rc.Cond())
	}
}

// TestDetRange: det diag(1e200, 1e200) = 1e400 and det diag(1e-200,
// 1e-200) = 1e-400 lie outside binary64 (largest 1.8e308, smallest
// subnormal 4.9e-324; hand derivation), but Det's mantissa and exponent
// hold them: log₂|det| = log₂|m| + e = ±400·log₂10.
func TestDetRange(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want float64 // log₂|det|
		inf  bool
	}{
		{1e200, 400 * math.Log2(10), true},
		{1e-200, -400 * math.Log2(10), false},
	} {
		f, err := Factorize(2, []complex128{complex(c.v, 0), 0, 0, complex(c.v, 0)}, nil)
		if err != nil {
			t.Fatal(err)
		}
		m, e := f.Det()
		if got := math.Log2(cmplx.Abs(m)) + float64(e); math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("det diag(%g, %g): log₂|det| = %v, want %v", c.v, c.v, got, c.want)
		}
		z, ok := f.DetValue()
		if ok || (c.inf && !cmplx.IsInf(z)) || (!c.inf && z != 0) {
			t.Errorf("DetValue = %v, %v; want out of range (ok false)", z, ok)
		}
	}
}
