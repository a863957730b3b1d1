package solve

import "math"

// ComplexTol is the relative tolerance of the complex-linear test (see
// Linear.ComplexLinear): the two copies of each real and each imaginary
// part of a coefficient, which come from separate finite differences, may
// differ by this much of the largest scaled coefficient of their
// equation. Rounding in the residual function makes them differ by a few
// units of 1e-16 of the terms; a set whose real form is not complex-linear
// (conj, re or im of an unknown) differs by order one.
const ComplexTol = 1e-12

// complexSystem is the complex form of a complex-linear Linear.
type complexSystem struct {
	n          int
	a, b       []complex128 // C row by row, and the complex right-hand side
	s, q       []float64    // scales of the complex unknowns and equations
	cols, rows []int        // the Problem's pairs (Complex, ComplexRows)
}

// ComplexLinear reports whether the real form A x = b is the real form of
// a complex system C z = d: every unknown is a part of a complex unknown
// (Complex), every residual a part of a complex equation (ComplexRows),
// the two parts of each pair share their scale, and for complex equation
// i (rows r, r′) and complex unknown k (columns c, c′) the 2×2 block is
//
//	[A_rc  A_rc′ ]   [Re C_ik  −Im C_ik]
//	[A_r′c A_r′c′] = [Im C_ik   Re C_ik],
//
// each equality within ComplexTol·max_k |A_·k|·s_k of the row pair (the
// Cauchy–Riemann equations of a map that is linear over the complex
// numbers). C_ik is then the mean of the two copies of each part.
func (lin *Linear) ComplexLinear() bool { return lin.complexForm() != nil }

func (lin *Linear) complexForm() *complexSystem {
	n, m := lin.A.Dims()
	if n != m || n%2 != 0 || len(lin.Complex) != n || len(lin.ComplexRows) != m {
		return nil
	}
	s, err := scales(lin.XScale, n, "XScale")
	if err != nil {
		return nil
	}
	q, err := scales(lin.RScale, m, "RScale")
	if err != nil {
		return nil
	}
	nc := n / 2
	cs := &complexSystem{
		n: nc, a: make([]complex128, nc*nc), b: make([]complex128, nc),
		s: make([]float64, nc), q: make([]float64, nc),
		cols: lin.Complex, rows: lin.ComplexRows,
	}
	for k := 0; k < nc; k++ {
		c, c2 := lin.Complex[2*k], lin.Complex[2*k+1]
		if s[c] != s[c2] {
			return nil
		}
		cs.s[k] = s[c]
	}
	for i := 0; i < nc; i++ {
		r, r2 := lin.ComplexRows[2*i], lin.ComplexRows[2*i+1]
		if q[r] != q[r2] {
			return nil
		}
		cs.q[i] = q[r]
		big := 0.0
		for k := 0; k < n; k++ {
			big = math.Max(big, math.Max(math.Abs(lin.A.At(r, k)), math.Abs(lin.A.At(r2, k)))*s[k])
		}
		tol := ComplexTol * big
		for k := 0; k < nc; k++ {
			c, c2 := lin.Complex[2*k], lin.Complex[2*k+1]
			re1, re2 := lin.A.At(r, c), lin.A.At(r2, c2)
			im1, im2 := lin.A.At(r2, c), -lin.A.At(r, c2)
			if !(math.Abs(re1-re2)*s[c] <= tol) || !(math.Abs(im1-im2)*s[c] <= tol) {
				return nil
			}
			cs.a[i*nc+k] = complex((re1+re2)/2, (im1+im2)/2)
		}
		cs.b[i] = complex(lin.B[r], lin.B[r2])
	}
	return cs
}

// unpack writes the complex solution z back into the real unknowns.
func (cs *complexSystem) unpack(z []complex128, n int) []float64 {
	x := make([]float64, n)
	for k, v := range z {
		x[cs.cols[2*k]], x[cs.cols[2*k+1]] = real(v), imag(v)
	}
	return x
}
