package expr

import (
	"fmt"
	"math"
	"math/cmplx"
)

// unitRoundoff is u = 2⁻⁵³, the relative rounding error of one binary64
// operation (IEEE 754-2019, round to nearest).
const unitRoundoff = 0x1p-53

// singularPivot is the threshold of the pivot test after equilibration:
// a pivot at most 1e-14 of the largest entry of the scaled matrix (whose
// rows and columns have their largest entries in [0.5, 1)) counts as
// zero, that is the scaled matrix's condition estimate exceeds 1e14.
const singularPivot = 1e-14

// equilibrated is the LU factorisation, with partial pivoting, of the
// scaled matrix B = diag(2^re) · A · diag(2^ce) of a square complex matrix
// A. The scales are powers of two, so scaling is exact (it only changes
// exponents): row i is scaled so that its largest entry lies in [0.5, 1),
// then column j likewise (the row-then-column equilibration of LAPACK's
// xGEEQU, rounded to powers of two). A matrix whose entries carry units,
// such as [1 MΩ, 0; 0, 1 nS], has entries of very different magnitudes in
// SI units; the pivot test on A itself would take 1e-9 beside 1e6 for
// zero, while on B both pivots are of order 1. Singular means singular
// after equilibration.
type equilibrated struct {
	n      int
	lu     []complex128 // L (unit lower, below the diagonal) and U of P·B
	perm   []int        // row k of P·B is row perm[k] of B
	sign   float64      // det P
	re, ce []int        // row and column scale exponents
	b      []complex128 // B itself, row by row
	// singular is set when a pivot is at most singularPivot times the
	// largest entry of B; cond is then the estimate max|B_ij| / |pivot|
	// (+Inf for a pivot that is exactly zero).
	singular bool
	cond     float64
}

// scaleExp is the power of two e with 2^e·x in [0.5, 1) for x > 0, else 0.
func scaleExp(x float64) int {
	if x == 0 || math.IsInf(x, 0) || math.IsNaN(x) {
		return 0
	}
	_, e := math.Frexp(x)
	return -e
}

func ldexpZ(z complex128, e int) complex128 {
	return complex(math.Ldexp(real(z), e), math.Ldexp(imag(z), e))
}

// factor equilibrates the n×n matrix a (row by row) and factors it.
func factor(a []complex128, n int) *equilibrated {
	f := &equilibrated{n: n, re: make([]int, n), ce: make([]int, n), sign: 1}
	for i := 0; i < n; i++ {
		var m float64
		for j := 0; j < n; j++ {
			m = math.Max(m, cmplx.Abs(a[i*n+j]))
		}
		f.re[i] = scaleExp(m)
	}
	for j := 0; j < n; j++ {
		var m float64
		for i := 0; i < n; i++ {
			m = math.Max(m, cmplx.Abs(ldexpZ(a[i*n+j], f.re[i])))
		}
		f.ce[j] = scaleExp(m)
	}
	f.b = make([]complex128, n*n)
	var norm float64
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			f.b[i*n+j] = ldexpZ(a[i*n+j], f.re[i]+f.ce[j])
			norm = math.Max(norm, cmplx.Abs(f.b[i*n+j]))
		}
	}
	f.lu = append([]complex128(nil), f.b...)
	f.perm = make([]int, n)
	for i := range f.perm {
		f.perm[i] = i
	}
	lu := f.lu
	for k := 0; k < n; k++ {
		p := k
		best := cmplx.Abs(lu[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := cmplx.Abs(lu[i*n+k]); v > best {
				p, best = i, v
			}
		}
		if best == 0 || best <= singularPivot*norm {
			f.singular = true
			f.cond = math.Inf(1)
			if best > 0 {
				f.cond = norm / best
			}
			return f
		}
		if p != k {
			for j := 0; j < n; j++ {
				lu[k*n+j], lu[p*n+j] = lu[p*n+j], lu[k*n+j]
			}
			f.perm[k], f.perm[p] = f.perm[p], f.perm[k]
			f.sign = -f.sign
		}
		for i := k + 1; i < n; i++ {
			q := lu[i*n+k] / lu[k*n+k]
			lu[i*n+k] = q
			for j := k + 1; j < n; j++ {
				lu[i*n+j] -= q * lu[k*n+j]
			}
		}
	}
	return f
}

// singularError says that the matrix is singular, with the condition
// estimate of its equilibrated form.
func (f *equilibrated) singularError() error {
	if math.IsInf(f.cond, 1) {
		return fmt.Errorf("the matrix is singular: it has no inverse (after scaling its rows and columns a pivot is exactly 0: condition estimate infinite)")
	}
	return fmt.Errorf("the matrix is singular: it has no inverse (after scaling its rows and columns its condition estimate is %.2g; above %g counts as singular)", f.cond, 1/singularPivot)
}

// det is det A = det(P)·Π U_kk / (2^Σre · 2^Σce), with the running product
// kept as a mantissa and a binary exponent so that no intermediate
// overflows or underflows. ok is false when the determinant, though not
// zero, is too small for binary64 (it would underflow to 0).
func (f *equilibrated) det() (z complex128, ok bool) {
	if f.singular {
		return 0, true
	}
	n := f.n
	m, e := complex(f.sign, 0), 0
	for k := 0; k < n; k++ {
		m *= f.lu[k*n+k]
		_, x := math.Frexp(math.Max(math.Abs(real(m)), math.Abs(imag(m))))
		m, e = ldexpZ(m, -x), e+x
	}
	for k := 0; k < n; k++ {
		e -= f.re[k] + f.ce[k]
	}
	z = ldexpZ(m, e)
	return z, z != 0
}

// inverse returns A⁻¹ = diag(2^ce) · B⁻¹ · diag(2^re), row by row, and
// for each entry the bound on its rounding residue described at Resid:
// 8n·u·(|X||A||X|)_ij + (|X||R_A||X|)_ij, X the computed inverse, R_A the
// residue bound of A (nil: none). The first term is the first-order bound
// of the error of an inverse computed from an LU factorisation with
// partial pivoting (Higham, Accuracy and Stability of Numerical
// Algorithms, 2nd ed., section 14.3, with the growth of |L||U| over |A|
// taken into the constant 8n); the second carries the residue already in
// A (δX = −X·δA·X to first order).
func (f *equilibrated) inverse(a []complex128, ra []float64) (x []complex128, res []float64) {
	n := f.n
	lu := f.lu
	x = make([]complex128, n*n)
	col := make([]complex128, n)
	for j := 0; j < n; j++ {
		// solve B y = e_j: with P B = L U, y = U⁻¹ L⁻¹ P e_j
		for i := 0; i < n; i++ {
			if f.perm[i] == j {
				col[i] = 1
			} else {
				col[i] = 0
			}
		}
		for i := 0; i < n; i++ {
			for k := 0; k < i; k++ {
				col[i] -= lu[i*n+k] * col[k]
			}
		}
		for i := n - 1; i >= 0; i-- {
			for k := i + 1; k < n; k++ {
				col[i] -= lu[i*n+k] * col[k]
			}
			col[i] /= lu[i*n+i]
		}
		for i := 0; i < n; i++ {
			// (A⁻¹)_ij = 2^ce_i · (B⁻¹)_ij · 2^re_j
			x[i*n+j] = ldexpZ(col[i], f.ce[i]+f.re[j])
		}
	}
	// |X||A| then (|X||A|)|X|, and likewise with R_A
	ax := make([]float64, n*n)
	rx := make([]float64, n*n)
	for i := 0; i < n; i++ {
		for k := 0; k < n; k++ {
			xa := cmplx.Abs(x[i*n+k])
			if xa == 0 {
				continue
			}
			for l := 0; l < n; l++ {
				ax[i*n+l] += xa * cmplx.Abs(a[k*n+l])
				if ra != nil {
					rx[i*n+l] += xa * ra[k*n+l]
				}
			}
		}
	}
	res = make([]float64, n*n)
	c := 8 * float64(n) * unitRoundoff
	for i := 0; i < n; i++ {
		for l := 0; l < n; l++ {
			if ax[i*n+l] == 0 && rx[i*n+l] == 0 {
				continue
			}
			for j := 0; j < n; j++ {
				xl := cmplx.Abs(x[l*n+j])
				res[i*n+j] += (c*ax[i*n+l] + rx[i*n+l]) * xl
			}
		}
	}
	return x, res
}
