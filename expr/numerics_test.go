package expr

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// Non-finite results (LANGUAGE.md section 4: nothing that is not finite
// is ever a value). The rules are IEEE 754-2019's for binary64: the
// largest finite number is (2 − 2⁻⁵²)·2¹⁰²³ ≈ 1.798e308 and a larger
// result overflows to ±∞ (section 7.4); the smallest positive (subnormal)
// number is 2⁻¹⁰⁷⁴ ≈ 4.94e-324 and a smaller non-zero result rounds to 0
// (section 7.5, underflow); 0·∞, ∞ − ∞ and 0/0 are invalid operations
// giving NaN (section 7.2). Each is an error at the operator (or function
// call) that produced it.
func TestNonFiniteIsAnErrorAtItsOperator(t *testing.T) {
	cases := []struct {
		name, src string
		col       int    // column of the operator or call named
		msg       string // part of the message
	}{
		// issue 12: (1e200)² = 1e400 > 1.798e308 (IEEE 754-2019 7.4)
		{"issue 12 power overflows", "(1e200 Ω)^2 / (1 Ω)", 10, "this power overflows"},
		{"product overflows", "1e300 * 1e300", 7, "this product overflows"},
		{"quotient overflows", "1e300 / 1e-300", 7, "this quotient overflows"},
		{"sum overflows", "1.7e308 + 1.7e308", 9, "this sum overflows"},
		// 1e306 kV = 1e309 V: the unit's scaling is the operation that overflows
		{"unit scaling overflows", "1e306 kV * 1e3", 7, "this value in kV overflows"},
		{"complex product overflows", "(1e200 + j1e200) * 1e200", 18, "this product overflows"},
		// 1e-200·1e-200 = 1e-400 < 4.94e-324: rounds to 0 (IEEE 754-2019 7.5)
		{"product underflows", "1e-200 * 1e-200", 8, "this product underflows"},
		{"quotient underflows", "1e-300 / 1e100", 8, "this quotient underflows"},
		{"power underflows", "(1e-200)^2", 9, "this power underflows"},
		{"exp underflows", "exp(-1000)", 1, "underflows"},
		// a literal below 2⁻¹⁰⁷⁴ ≈ 4.94e-324 reads as 0 (IEEE 754-2019 7.5)
		{"literal underflows", "2 * 1e-330", 5, "number 1e-330 underflows"},
		// exp(1000) ≈ 1.97e434 and cosh(1000) ≈ 9.85e433 overflow
		{"exp overflows", "exp(1000)", 1, "not finite"},
		{"cosh overflows", "cosh(1000)", 1, "not finite"},
		{"inner operator is the one named", "sqrt(1e300 * 1e300)", 12, "this product overflows"},
		{"matrix scaling overflows", "[1e300, 1] * 1e10", 12, "this product overflows"},
		{"matrix product overflows", "[1e200; 1] * [1e200, 1]", 12, "this product overflows"},
		{"matrix sum overflows", "[1.7e308] + [1.7e308]", 11, "this sum overflows"},
		// 1e-200·1e-200 = 1e-400 rounds to 0 (IEEE 754-2019 7.5) in an entry
		{"matrix scaling underflows", "[1e-200, 1] * 1e-200", 13, "this product underflows"},
		{"matrix quotient underflows", "[1e-200, 1] / 1e200", 13, "this quotient underflows"},
		{"matrix product entry underflows", "[1e-200, 0] * [1e-200; 1]", 13, "this product underflows"},
		// hand derivation: det diag(1e200, 1e200) = 1e400, det diag(1e-200, 1e-200) = 1e-400
		{"det overflows", "det([1e200, 0; 0, 1e200])", 1, "det(...) overflows"},
		{"det underflows", "det([1e-200, 0; 0, 1e-200])", 1, "the determinant underflows"},
		// inv diag(1e-310, 1) = diag(1e310, 1): 1e310 > 1.798e308
		{"inv overflows", "inv([1e-310, 0; 0, 1])", 1, "inv(...) overflows"},
		// hand derivation: a∥b with a + b = 0 is a·b/0
		{"parallel of opposite sides", "1 Ω ∥ -1 Ω", 5, "parallel combination is infinite"},
		// 2⁻¹⁰⁷⁴∥2⁻¹⁰⁷⁴ = 2⁻¹⁰⁷⁵, below the smallest subnormal: rounds (to even) to 0
		{"parallel underflows where the true result does", "5e-324 ∥ 5e-324", 8, "this parallel combination underflows"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := firstError(c.src)
			if err == nil {
				t.Fatalf("%s: no error, want %q", c.src, c.msg)
			}
			if p := errPos(err).Position(); p.Line != 1 || p.Col != c.col || !strings.Contains(errMsg(err), c.msg) {
				t.Errorf("%s: error at %v %q, want at column %d containing %q", c.src, p, errMsg(err), c.col, c.msg)
			}
		})
	}
}

// The parallel combination is computed without needless underflow or
// overflow: only where a∥b itself is not representable is it an error.
func TestParallelRepresentableResults(t *testing.T) {
	cases := []struct {
		name, src string
		want      complex128
		dim       Dim
		source    string
	}{
		// hand derivation: a∥b = a·b/(a+b) = 1e-170·3e-170/4e-170 = 0.75e-170;
		// the product a·b = 3e-340 underflows in binary64, the result does not
		{"issue 12 tiny impedances", "1e-170 Ω ∥ 3e-170 Ω", 7.5e-171, DimImpedance, "hand derivation"},
		// hand derivation: 1e170·3e170/4e170 = 7.5e169; a·b = 3e340 overflows
		{"huge impedances", "1e170 Ω ∥ 3e170 Ω", 7.5e169, DimImpedance, "hand derivation"},
		// hand derivation: (3+j4)(3−j4)/((3+j4)+(3−j4)) = 25/6
		{"conjugate pair", "(3 + j4) Ω ∥ (3 - j4) Ω", 25.0 / 6, DimImpedance, "hand derivation"},
		// hand derivation: a∥a = a/2; 1e-320 is subnormal, 5e-321 too (IEEE 754-2019 3.3)
		{"subnormal result is kept", "1e-320 ∥ 1e-320", 5e-321, Dim{}, "hand derivation"},
		// hand derivation: a∥b ≈ a when |a| ≪ |b|: 1e-300·1e300/(1e-300 + 1e300) = 1e-300
		{"very unequal sides", "1e-300 Ω ∥ 1e300 Ω", 1e-300, DimImpedance, "hand derivation"},
		{"zero side", "0 Ω ∥ 5 Ω", 0, DimImpedance, "hand derivation: 0·b/(0+b) = 0"},
		{"both zero", "0 Ω ∥ 0 Ω", 0, DimImpedance, "LANGUAGE.md: 0∥0 is 0 (the limit of a short beside a short)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := evalScalar(t, c.src)
			// source: c.source
			if !closeZ(s.Z, c.want, 1e-15, 0) || s.Dim != c.dim {
				t.Errorf("%s = %v %v, want %v (%s)", c.src, s.Z, s.Dim, c.want, c.source)
			}
		})
	}
	// the textbook form agrees where it does not underflow (math/cmplx
	// arithmetic on moderate magnitudes is a reference: no scaling there)
	for _, ab := range [][2]complex128{{2 + 3i, 4 - 1i}, {0.5, 1e3 + 2e3i}, {1e-3i, 7}} {
		a, b := ab[0], ab[1]
		want := a * b / (a + b)
		got, err := parallel(Pos{}, a, b)
		if err != nil || !closeZ(got, want, 4e-16*4, 0) {
			t.Errorf("%v∥%v = %v %v, a·b/(a+b) = %v", a, b, got, err, want)
		}
	}
}

// A check never holds on an overflowed value: there is no verdict, the
// line has the error (LANGUAGE.md section 4).
func TestCheckOnOverflowHasNoVerdict(t *testing.T) {
	for _, src := range []string{
		"check (1e200 Ω)^2 / (1 Ω) > 1 Ω",
		"check 1e-170 * 1e-170 < 1",
		"check exp(1000) != 0",
	} {
		b := runBlock(src)
		errs := b.allErrors()
		if len(errs) != 1 {
			t.Errorf("%s: errors %v, want one", src, errs)
		}
		for _, r := range b.results {
			if r.Check != nil {
				t.Errorf("%s: a verdict (pass=%v) on a value that is not finite", src, r.Check.Pass)
			}
		}
	}
}

// refLinalgUnits is testdata/expr/linalg_units_ref.json, from
// testdata/refgen/gen_linalg_units.py (numpy.linalg.inv and
// numpy.linalg.det of A = diag(10^r)·A0·diag(10^c), r, c in −12..12).
type refLinalgUnits struct {
	Cases []struct {
		N   int            `json:"n"`
		A   [][][2]float64 `json:"A"`
		Inv [][][2]float64 `json:"inv"`
		Det [2]float64     `json:"det"`
	} `json:"cases"`
}

// unitsOfRow are the units of the rows in TestLinalgUnitsNumPy: row i of
// the matrix is in unitsOfRow[i%4] (scale 1, so the SI values are exact).
var unitsOfRow = []struct {
	sym string
	dim Dim
}{{"Ω", DimImpedance}, {"S", DimAdmittance}, {"", Dim{}}, {"V", DimVoltage}}

// TestLinalgUnitsNumPy: inv and det of matrices whose entries span 1e-24
// to 1e24 (units of very different sizes), against NumPy; the first case
// is issue 12's det([1 MΩ, 0; 0, 1 nS]) = 1e-3.
func TestLinalgUnitsNumPy(t *testing.T) {
	var ref refLinalgUnits
	loadJSON(t, "linalg_units_ref.json", &ref)
	if len(ref.Cases) < 10 {
		t.Fatalf("linalg_units_ref.json has %d cases", len(ref.Cases))
	}
	for k, c := range ref.Cases {
		a := toComplex(c.A)
		var b strings.Builder
		b.WriteByte('[')
		for i, row := range a {
			if i > 0 {
				b.WriteString("; ")
			}
			for j, z := range row {
				if j > 0 {
					b.WriteString(", ")
				}
				b.WriteString(zlit(z))
				if u := unitsOfRow[i%4].sym; u != "" {
					b.WriteString(" " + u)
				}
			}
		}
		b.WriteByte(']')
		lit := b.String()
		t.Run(fmt.Sprintf("case%d_n%d", k, c.N), func(t *testing.T) {
			det := evalScalar(t, "det("+lit+")")
			var wantDim Dim
			for i := 0; i < c.N; i++ {
				wantDim = wantDim.Mul(unitsOfRow[i%4].dim)
			}
			// source: numpy.linalg.det (A0 has cond < 100, so 1e-12 relative)
			if wd := complex(c.Det[0], c.Det[1]); !closeZ(det.Z, wd, 1e-12, 0) || det.Dim != wantDim {
				t.Errorf("det = %v %v, NumPy %v %v", det.Z, det.Dim, wd, wantDim)
			}
			inv := evalMatrix(t, "inv("+lit+")")
			want := toComplex(c.Inv)
			for i := 0; i < c.N; i++ {
				for j := 0; j < c.N; j++ {
					// source: numpy.linalg.inv. The scaled inverse is
					// accurate in norm; entry by entry, relative to the
					// largest entry of the same row and column scale:
					// |X_ij| ≤ max over that scaled block, so compare with
					// 1e-11 of sqrt(max_row_i · max_col_j).
					var ri, cj float64
					for l := 0; l < c.N; l++ {
						ri = math.Max(ri, cmplx.Abs(want[i][l]))
						cj = math.Max(cj, cmplx.Abs(want[l][j]))
					}
					tol := 1e-11 * math.Sqrt(ri*cj)
					got := inv.At(i, j)
					if cmplx.Abs(got.Z-want[i][j]) > tol {
						t.Errorf("inv(%d,%d) = %v, NumPy %v", i+1, j+1, got.Z, want[i][j])
					}
					if wd := (Dim{}).Div(unitsOfRow[j%4].dim); got.Dim != wd {
						t.Errorf("inv(%d,%d) unit %v, want %v", i+1, j+1, got.Dim, wd)
					}
				}
			}
			// hand derivation: A·A⁻¹ = I, so every off-diagonal entry the
			// arithmetic leaves is residue and is shown as 0, however the
			// rows are scaled; the diagonal is 1
			p := DisplayMatrix(evalMatrix(t, lit+" * inv("+lit+")"))
			for i := 0; i < c.N; i++ {
				for j := 0; j < c.N; j++ {
					z := p.At(i, j).Z
					if i != j && z != 0 || i == j && cmplx.Abs(z-1) > 1e-10 {
						t.Errorf("A·A⁻¹ (%d,%d) shown from %v", i+1, j+1, z)
					}
				}
			}
		})
	}
}

// Singular means singular after equilibration, said with a condition
// estimate; a badly scaled but regular matrix is not singular.
func TestSingularAfterEquilibration(t *testing.T) {
	cases := []struct {
		name, src string
		msg       string // "" for no error
	}{
		// hand derivation: det [1e6, 0; 0, 1e-9] = 1e-3 ≠ 0
		{"issue 12 diagonal", "inv([1 MΩ, 0; 0, 1 nS])", ""},
		// hand derivation: rows 2 = 2·row 1: exactly singular
		{"dependent rows", "inv([1, 2; 2, 4])", "condition estimate infinite"},
		// hand derivation: the same with the second row in other units is
		// singular after scaling, whatever the scale
		{"dependent rows, scaled", "inv([1 Ω, 2 Ω; 2e-9, 4e-9])", "singular"},
		// hand derivation: the scaled matrix is [0.5, 0.5; 0.5, 0.5(1+1e-15)]
		// (powers of two), whose second pivot is 0.5·1.11e-15 (1 + 1e-15
		// rounds to 1 + 5·2⁻⁵²): 5.55e-16 ≤ 1e-14·0.5, and the estimate is
		// 0.5/5.55e-16 ≈ 9e14
		{"nearly singular", "inv([1, 1; 1, 1 + 1e-15])", "condition estimate is 9"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := firstError(c.src)
			if c.msg == "" {
				if err != nil {
					t.Fatalf("%s: %v", c.src, err)
				}
				return
			}
			if err == nil || !strings.Contains(errMsg(err), "singular") || !strings.Contains(errMsg(err), c.msg) {
				t.Errorf("%s: %v, want singular with %q", c.src, err, c.msg)
			}
		})
	}
	// det of a singular matrix is 0 in its unit (hand derivation: 1·4 − 2·2)
	if d := evalScalar(t, "det([1 Ω, 2 Ω; 2 S, 4 S])"); d.Z != 0 || !d.Dim.IsZero() {
		t.Errorf("det of dependent rows = %v %v, want 0", d.Z, d.Dim)
	}
}

// A matrix entry is shown as 0 only when it is 0 or rounding residue of
// the arithmetic that produced it (the rule at DisplayMatrix).
func TestMatrixZeroOnlyWhenResidue(t *testing.T) {
	cases := []struct {
		name, src string
		shown     string
		why       string
	}{
		// issue 12: a genuine 100 nS beside 1 MS is shown
		{"literal small entry", "[1 MS, 100 nS; 100 nS, 1 MS]", "[1.000 MS, 100.0 nS; 100.0 nS, 1.000 MS]", "as written"},
		{"small entry through a product", "[1 MS, 100 nS; 100 nS, 1 MS] * [1, 0; 0, 1]", "[1.000 MS, 100.0 nS; 100.0 nS, 1.000 MS]",
			"hand derivation: G·I = G exactly"},
		{"small entry through a sum", "[1 MS, 0 S] + [0 S, 100 nS]", "[1.000 MS, 100.0 nS]", "hand derivation: exact sums"},
		// hand derivation: A·A⁻¹ = I; what the arithmetic leaves off the
		// diagonal is residue within the bound
		{"product with the inverse", "[1, 2; 3, 4] * inv([1, 2; 3, 4])", "[1.000, 0.000; 0.000, 1.000]", "hand derivation: A·A⁻¹ = I"},
		{"scaled product with the inverse", "[1 MΩ, 2 Ω; 3 Ω, 4 µΩ] * inv([1 MΩ, 2 Ω; 3 Ω, 4 µΩ])", "[1.000, 0.000; 0.000, 1.000]", "hand derivation: A·A⁻¹ = I"},
		// 0.1 + 0.2 − 0.3 is 5.55e-17 in binary64 (IEEE 754 rounding of the
		// three decimals), 0 in exact arithmetic: residue
		{"decimal residue", "[0.1, 0.2] * [1; 1] - [0.3]", "[0.000]", "hand derivation: 0.1 + 0.2 − 0.3 = 0"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v := evalLast(t, c.src)
			// source: c.why
			if got := FormatValue(v, nil, 4); got != c.shown {
				t.Errorf("%s shown %s, want %s (%s)", c.src, got, c.shown, c.why)
			}
		})
	}
	// the residue of 0.1 + 0.2 − 0.3 is really not 0: the rule, not luck
	m := evalMatrix(t, "[0.1, 0.2] * [1; 1] - [0.3]")
	if m.E[0].Z == 0 || m.Resid == nil || cmplx.Abs(m.E[0].Z) > m.Resid[0] {
		t.Errorf("0.1 + 0.2 − 0.3 = %v with bound %v: want a non-zero value within the bound", m.E[0].Z, m.Resid)
	}
}

// DisplayMatrix applies exactly the rule |part| ≤ Resid[i] (hand
// derivation: the bound is the most the arithmetic can miss 0 by).
func TestDisplayMatrixRule(t *testing.T) {
	m := &Matrix{Rows: 1, Cols: 4, E: []Scalar{{Z: 1e-20}, {Z: 1e-20 + 1i}, {Z: 2e-20}, {Z: 3}},
		Resid: []float64{1e-20, 1e-20, 1e-20, 0}}
	got := DisplayMatrix(m)
	want := []complex128{0, 1i, 2e-20, 3}
	for i, w := range want {
		if got.E[i].Z != w {
			t.Errorf("entry %d: %v, want %v", i, got.E[i].Z, w)
		}
	}
	if m.E[0].Z != 1e-20 {
		t.Errorf("DisplayMatrix changed the value itself")
	}
	exact := &Matrix{Rows: 1, Cols: 2, E: []Scalar{{Z: 1e-30}, {Z: 1e30}}}
	if g := DisplayMatrix(exact); g.E[0].Z != 1e-30 {
		t.Errorf("an entry with no residue bound was zeroed: %v", g.E[0].Z)
	}
}

// A check whose utilisation (a/b) would overflow still has its verdict,
// but no utilisation: 1e300/1e-10 = 1e310 > 1.798e308 (IEEE 754-2019 7.4).
func TestCheckUtilisationNeverInfinite(t *testing.T) {
	b := runBlock("check 1e300 < 1e-10")
	r := b.results[0]
	if r.Err != nil || r.Check == nil || r.Check.Pass {
		t.Fatalf("check 1e300 < 1e-10: %v %+v, want a verdict of not satisfied", r.Err, r.Check)
	}
	if r.Check.HasUtil {
		t.Errorf("utilisation %v shown", r.Check.Utilisation)
	}
}

// nonFinite names the operation and tells overflow (±∞, IEEE 754-2019
// section 7.4) from an invalid operation (NaN, section 7.2: 0·∞, ∞ − ∞,
// 0/0), for a scalar and for any entry of a matrix.
func TestNonFiniteKinds(t *testing.T) {
	at := PlaceAt("", 3, 7)
	bin := &Binary{Op: SUB, OpPos: at}
	nan := complex(math.NaN(), 0)
	inf := complex(0, math.Inf(-1))
	cases := []struct {
		name string
		n    Node
		v    Value
		msg  string // "" for no error
	}{
		{"finite", bin, &Scalar{Z: 1e308}, ""},
		{"subnormal is finite", bin, &Scalar{Z: 5e-324}, ""},
		{"NaN", bin, &Scalar{Z: nan}, "this difference is undefined"},
		{"infinite imaginary part", bin, &Scalar{Z: inf}, "this difference overflows"},
		{"NaN entry", bin, &Matrix{Rows: 1, Cols: 2, E: []Scalar{{Z: 1}, {Z: nan}}}, "this difference is undefined"},
		{"call", &Call{Fun: &Ident{Name: "sinh"}, span: span{P: at}}, &Scalar{Z: inf}, "sinh(...) overflows"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := nonFinite(c.n, c.v)
			if c.msg == "" {
				if err != nil {
					t.Errorf("%v", err)
				}
				return
			}
			if err == nil || errPos(err) != at || !strings.Contains(errMsg(err), c.msg) {
				t.Errorf("%v, want at %v containing %q", err, at, c.msg)
			}
		})
	}
}
