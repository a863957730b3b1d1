// Package linalg is calcdoc's one dense LU factorisation: equilibration,
// partial pivoting, solution, determinant, inverse and a 1-norm condition
// estimate, for complex matrices (the engine's inv and det, complex-linear
// solve blocks) and real ones (the real form of a solve block whose
// equations involve conj, re or im of an unknown, and Newton's Jacobian).
//
// It imports only the standard library and, for the real elimination,
// gonum's LAPACK (lapack/gonum.Dgetrf). Numeric conditions are typed
// values: *Singular, *IllConditioned, *NotSquare, *BadScale, *NotFinite,
// to be told apart with errors.As. Nothing here panics on a singular
// matrix.
package linalg

import (
	"math"

	"gonum.org/v1/gonum/lapack/gonum"
)

// Scalar is the element type of a matrix: real or complex.
type Scalar interface {
	float64 | complex128
}

// PivotTol is the threshold of the pivot test after equilibration: a step
// whose largest candidate pivot is at most PivotTol times the largest
// entry of the scaled matrix B stops the factorisation with a *Singular.
// For a matrix equilibrated so that every row and column has its largest
// entry in [0.5, 1), this says that B's condition number is at least 1e14.
const PivotTol = 1e-14

// UnitRoundoff is u = 2⁻⁵³, the relative rounding error of one binary64
// operation (IEEE 754-2019, round to nearest).
const UnitRoundoff = 0x1p-53

// Options chooses the equilibration. With both scale lists nil the scales
// are powers of two chosen from the matrix (exact: they change exponents
// only): row i is scaled so that its largest entry lies in [0.5, 1), then
// column j likewise (the row-then-column equilibration of LAPACK's xGEEQU,
// rounded to powers of two). Otherwise the scaled matrix is
//
//	B_ij = A_ij · ColScale_j / RowScale_i,
//
// RowScale_i being the typical size of equation (row) i and ColScale_j that
// of unknown (column) j; a nil list means ones. Given scales are not
// rounded, so the scaling may round. Use ones for both to factor A as it
// is.
type Options struct {
	RowScale, ColScale []float64
}

// LU is the factorisation P·B = L·U, with partial pivoting, of the scaled
// matrix B of a square matrix A (see Options). L is unit lower triangular,
// stored below the diagonal, and U upper triangular.
type LU[T Scalar] struct {
	n      int
	lu     []T   // L and U of P·B, row by row
	b      []T   // B, row by row
	perm   []int // row k of P·B is row perm[k] of B
	sign   float64
	auto   bool
	re, ce []int     // automatic scales: B_ij = A_ij·2^(re_i+ce_j)
	rq, cs []float64 // given scales: B_ij = A_ij·cs_j/rq_i
	norm1  float64   // ‖B‖₁, the largest column sum of |B_ij|
	sing   *Singular
	cond   float64 // cached estimate; 0 until computed
}

// Factorize scales the n×n matrix a (row by row; not modified) as opt says
// (nil: automatic powers of two) and factors it. A matrix that is singular
// after scaling gives a non-nil *LU together with a *Singular error: its
// Det is 0 and its Cond the Singular's estimate. Invalid input gives a nil
// *LU and a *NotSquare, *BadScale or *NotFinite error.
func Factorize[T Scalar](n int, a []T, opt *Options) (*LU[T], error) {
	if n < 1 || len(a) != n*n {
		return nil, &NotSquare{N: n, Len: len(a)}
	}
	for i, v := range a {
		if !finiteT(v) {
			return nil, &NotFinite{Row: i / n, Col: i % n}
		}
	}
	f := &LU[T]{n: n, sign: 1, b: make([]T, n*n)}
	if err := f.scale(a, opt); err != nil {
		return nil, err
	}
	for j := 0; j < n; j++ {
		s := 0.0
		for i := 0; i < n; i++ {
			s += absT(f.b[i*n+j])
		}
		f.norm1 = math.Max(f.norm1, s)
	}
	f.factor()
	if f.sing != nil {
		return f, f.sing
	}
	return f, nil
}

// Scale returns the scaled matrix B of the n×n matrix a (row by row) as
// opt says (nil: automatic powers of two), without factoring it: what a
// diagnosis of a singular matrix (such as its singular value decomposition)
// should look at. Errors are those of Factorize for invalid input.
func Scale[T Scalar](n int, a []T, opt *Options) ([]T, error) {
	if n < 1 || len(a) != n*n {
		return nil, &NotSquare{N: n, Len: len(a)}
	}
	for i, v := range a {
		if !finiteT(v) {
			return nil, &NotFinite{Row: i / n, Col: i % n}
		}
	}
	f := &LU[T]{n: n, b: make([]T, n*n)}
	if err := f.scale(a, opt); err != nil {
		return nil, err
	}
	return f.b, nil
}

func (f *LU[T]) scale(a []T, opt *Options) error {
	if opt == nil || (opt.RowScale == nil && opt.ColScale == nil) {
		f.autoScale(a)
		return nil
	}
	return f.givenScale(a, opt)
}

// scaleExp is the power of two e with 2^e·x in [0.5, 1) for x > 0, else 0.
func scaleExp(x float64) int {
	if x == 0 || math.IsInf(x, 0) || math.IsNaN(x) {
		return 0
	}
	_, e := math.Frexp(x)
	return -e
}

func (f *LU[T]) autoScale(a []T) {
	n := f.n
	f.auto = true
	f.re, f.ce = make([]int, n), make([]int, n)
	for i := 0; i < n; i++ {
		m := 0.0
		for j := 0; j < n; j++ {
			m = math.Max(m, absT(a[i*n+j]))
		}
		f.re[i] = scaleExp(m)
	}
	for j := 0; j < n; j++ {
		m := 0.0
		for i := 0; i < n; i++ {
			m = math.Max(m, absT(ldexpT(a[i*n+j], f.re[i])))
		}
		f.ce[j] = scaleExp(m)
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			f.b[i*n+j] = ldexpT(a[i*n+j], f.re[i]+f.ce[j])
		}
	}
}

func checkScales(v []float64, n int, which string) ([]float64, error) {
	out := make([]float64, n)
	if v == nil {
		for i := range out {
			out[i] = 1
		}
		return out, nil
	}
	if len(v) != n {
		return nil, &BadScale{Which: which, Index: -1}
	}
	for i, x := range v {
		if !(x > 0) || math.IsInf(x, 0) {
			return nil, &BadScale{Which: which, Index: i, Value: x}
		}
		out[i] = x
	}
	return out, nil
}

func (f *LU[T]) givenScale(a []T, opt *Options) error {
	n := f.n
	var err error
	if f.rq, err = checkScales(opt.RowScale, n, "row"); err != nil {
		return err
	}
	if f.cs, err = checkScales(opt.ColScale, n, "column"); err != nil {
		return err
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := divF(mulF(a[i*n+j], f.cs[j]), f.rq[i])
			if !finiteT(v) {
				return &NotFinite{Row: i, Col: j}
			}
			f.b[i*n+j] = v
		}
	}
	return nil
}

// blockSize is the number of pivot steps whose updates of the trailing
// matrix are applied together (see factor).
var blockSize = 32

// factor runs Gaussian elimination with partial pivoting on a copy of B.
//
// A real B is factored by factorReal. A complex B here; the elimination
// is blocked: the pivots of blockSize columns are found on that panel
// alone (each panel column fully updated before its pivot is chosen), then
// the rows of U to the right of the panel, then the trailing rows, each
// row by all the panel's multipliers while it is in cache. Every entry
// receives the same updates, l_ip·u_pj for ascending p, as in the unblocked
// algorithm, so the factors are identical to it bit for bit; only the
// order in which entries are visited differs, which reads the trailing
// matrix once per panel instead of once per pivot.
func (f *LU[T]) factor() {
	n := f.n
	f.lu = append([]T(nil), f.b...)
	f.perm = make([]int, n)
	for i := range f.perm {
		f.perm[i] = i
	}
	big := 0.0
	for _, v := range f.b {
		big = math.Max(big, absT(v))
	}
	if g, ok := any(f).(*LU[float64]); ok {
		factorReal(g, big)
		return
	}
	lu := f.lu
	for k0 := 0; k0 < n; k0 += blockSize {
		kend := min(k0+blockSize, n)
		// the panel: columns k0..kend-1, all rows from the pivot down
		for k := k0; k < kend; k++ {
			p, best := k, absT(lu[k*n+k])
			for i := k + 1; i < n; i++ {
				if v := absT(lu[i*n+k]); v > best {
					p, best = i, v
				}
			}
			if best == 0 || best <= PivotTol*big {
				c := math.Inf(1)
				if best > 0 {
					c = big / best
				}
				f.sing = &Singular{Pivot: k, Cond: c}
				f.cond = c
				return
			}
			if p != k {
				rk, rp := lu[k*n:(k+1)*n], lu[p*n:(p+1)*n]
				for j := range rk {
					rk[j], rp[j] = rp[j], rk[j]
				}
				f.perm[k], f.perm[p] = f.perm[p], f.perm[k]
				f.sign = -f.sign
			}
			piv := lu[k*n+k]
			rk := lu[k*n+k+1 : k*n+kend]
			for i := k + 1; i < n; i++ {
				q := lu[i*n+k] / piv
				lu[i*n+k] = q
				if q == 0 {
					continue
				}
				axpy(lu[i*n+k+1:i*n+kend], rk, q)
			}
		}
		if kend == n {
			break
		}
		// U to the right of the panel: rows k0..kend-1
		for r := k0 + 1; r < kend; r++ {
			rr := lu[r*n+kend : (r+1)*n]
			for p := k0; p < r; p++ {
				if l := lu[r*n+p]; l != 0 {
					axpy(rr, lu[p*n+kend:(p+1)*n], l)
				}
			}
		}
		// the trailing rows
		for i := kend; i < n; i++ {
			ri := lu[i*n+kend : (i+1)*n]
			for p := k0; p < kend; p++ {
				if l := lu[i*n+p]; l != 0 {
					axpy(ri, lu[p*n+kend:(p+1)*n], l)
				}
			}
		}
	}
}

// factorReal factors a real B with gonum's Dgetrf (row-major LAPACK,
// blocked, with assembly kernels): the same partial pivoting, by the
// largest |entry| of the column, so |U_kk| is the largest candidate pivot
// of step k and the pivot test is made on the diagonal afterwards (Dgetrf
// skips the division at a zero pivot, so no NaN precedes the first failing
// step). Its row interchanges (row k with row ipiv[k], in turn) become perm.
func factorReal(f *LU[float64], big float64) {
	n := f.n
	ipiv := make([]int, n)
	gonum.Implementation{}.Dgetrf(n, n, f.lu, n, ipiv)
	for k, p := range ipiv {
		if p != k {
			f.perm[k], f.perm[p] = f.perm[p], f.perm[k]
			f.sign = -f.sign
		}
	}
	for k := 0; k < n; k++ {
		best := math.Abs(f.lu[k*n+k])
		if best == 0 || best <= PivotTol*big || math.IsNaN(best) {
			c := math.Inf(1)
			if best > 0 {
				c = big / best
			}
			f.sing = &Singular{Pivot: k, Cond: c}
			f.cond = c
			return
		}
	}
}

// axpy is y_j −= q·x_j.
func axpy[T Scalar](y, x []T, q T) {
	y = y[:len(x)]
	for j, v := range x {
		y[j] -= q * v
	}
}

// N is the order of the matrix.
func (f *LU[T]) N() int { return f.n }

// Err is the *Singular of a singular matrix, else nil.
func (f *LU[T]) Err() error {
	if f.sing != nil {
		return f.sing
	}
	return nil
}

// Scaled returns a copy of the scaled matrix B, row by row.
func (f *LU[T]) Scaled() []T { return append([]T(nil), f.b...) }

// Norm1 is ‖B‖₁, the largest column sum of |B_ij|.
func (f *LU[T]) Norm1() float64 { return f.norm1 }

// rowIn scales a right-hand side entry of row i into B's rows: b_i/RowScale_i.
func (f *LU[T]) rowIn(v T, i int) T {
	if f.auto {
		return ldexpT(v, f.re[i])
	}
	return divF(v, f.rq[i])
}

// colOut turns entry j of a solution of B y = b̂ back into x_j = ColScale_j·y_j.
func (f *LU[T]) colOut(v T, j int) T {
	if f.auto {
		return ldexpT(v, f.ce[j])
	}
	return mulF(v, f.cs[j])
}

// solveB overwrites y (in the row space of B) with B⁻¹y.
func (f *LU[T]) solveB(y []T) {
	n, lu := f.n, f.lu
	tmp := make([]T, n)
	for k := 0; k < n; k++ {
		tmp[k] = y[f.perm[k]]
	}
	for i := 0; i < n; i++ {
		s := tmp[i]
		row := lu[i*n : i*n+i]
		for k, v := range row {
			s -= v * tmp[k]
		}
		tmp[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := tmp[i]
		row := lu[i*n+i+1 : (i+1)*n]
		for k, v := range row {
			s -= v * tmp[i+1+k]
		}
		tmp[i] = s / lu[i*n+i]
	}
	copy(y, tmp)
}

// solveBH overwrites z with B⁻ᴴz (B⁻ᵀz for a real matrix). With
// P·B = L·U, Bᴴ = Uᴴ·Lᴴ·P: solve Uᴴw = z (forward), Lᴴv = w (backward),
// then z = Pᵀv.
func (f *LU[T]) solveBH(z []T) {
	n, lu := f.n, f.lu
	w := append([]T(nil), z...)
	for i := 0; i < n; i++ {
		s := w[i]
		for k := 0; k < i; k++ {
			s -= conjT(lu[k*n+i]) * w[k]
		}
		w[i] = s / conjT(lu[i*n+i])
	}
	for i := n - 1; i >= 0; i-- {
		s := w[i]
		for k := i + 1; k < n; k++ {
			s -= conjT(lu[k*n+i]) * w[k]
		}
		w[i] = s
	}
	for k := 0; k < n; k++ {
		z[f.perm[k]] = w[k]
	}
}

// Solve returns x with A x = b (b is not modified): x = diag(ColScale)·
// B⁻¹·diag(1/RowScale)·b. A singular matrix gives its *Singular; an entry
// of x that overflows gives a *NotFinite (Col −1, Row the entry).
func (f *LU[T]) Solve(b []T) ([]T, error) {
	if f.sing != nil {
		return nil, f.sing
	}
	if len(b) != f.n {
		return nil, &NotSquare{N: f.n, Len: len(b)}
	}
	y := make([]T, f.n)
	for i, v := range b {
		y[i] = f.rowIn(v, i)
	}
	f.solveB(y)
	for j := range y {
		y[j] = f.colOut(y[j], j)
		if !finiteT(y[j]) {
			return nil, &NotFinite{Row: j, Col: -1}
		}
	}
	return y, nil
}

// Inverse returns A⁻¹ row by row: (A⁻¹)_ij = ColScale_i·(B⁻¹)_ij/RowScale_j,
// column j of B⁻¹ being B⁻¹e_j. A singular matrix gives its *Singular.
func (f *LU[T]) Inverse() ([]T, error) {
	if f.sing != nil {
		return nil, f.sing
	}
	n := f.n
	x := make([]T, n*n)
	col := make([]T, n)
	for j := 0; j < n; j++ {
		for i := range col {
			col[i] = 0
		}
		col[j] = fromF[T](1)
		f.solveB(col)
		for i := 0; i < n; i++ {
			if f.auto {
				// one exact scaling by 2^(ce_i + re_j)
				x[i*n+j] = ldexpT(col[i], f.ce[i]+f.re[j])
			} else {
				x[i*n+j] = divF(mulF(col[i], f.cs[i]), f.rq[j])
			}
		}
	}
	return x, nil
}

// Det returns det A = m·2^e with max(|Re m|, |Im m|) in [0.5, 1), or m = 0
// for a singular matrix. det A = det(P)·Π U_kk / Π(scale of row i)·Π(scale
// of column j), the scales being those that multiply A into B; the running
// product is renormalised after each factor, so nothing overflows or
// underflows however large n is.
func (f *LU[T]) Det() (m T, e int) {
	if f.sing != nil {
		return 0, 0
	}
	n := f.n
	m = fromF[T](f.sign)
	norm := func() {
		_, x := math.Frexp(maxPart(m))
		m, e = ldexpT(m, -x), e+x
	}
	for k := 0; k < n; k++ {
		m *= f.lu[k*n+k]
		norm()
	}
	for k := 0; k < n; k++ {
		if f.auto {
			e -= f.re[k] + f.ce[k]
			continue
		}
		// ÷ (cs_k / rq_k) = × rq_k/cs_k, as fraction and exponent
		fr, xr := math.Frexp(f.rq[k])
		fc, xc := math.Frexp(f.cs[k])
		m = mulF(m, fr/fc)
		e += xr - xc
		norm()
	}
	return m, e
}

// DetValue is det A as one number. ok is false when the determinant is not
// zero but underflows binary64 (the result is then 0), or overflows it
// (the result is then infinite).
func (f *LU[T]) DetValue() (z T, ok bool) {
	m, e := f.Det()
	if m == 0 {
		return 0, true
	}
	z = ldexpT(m, e)
	return z, z != 0 && finiteT(z)
}
