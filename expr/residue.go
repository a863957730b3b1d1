package expr

import "math/cmplx"

// Rounding residue of matrix arithmetic.
//
// Every matrix operation keeps, for each entry x̂ it computes, a bound R
// with |x̂ − x| ≤ R, where x is the entry that exact arithmetic on the
// operands' computed values would give, plus the residue the operands
// already carried. With u = 2⁻⁵³ the unit roundoff of binary64 (IEEE
// 754-2019, round to nearest), the standard model fl(a op b) = (a op b)(1+δ),
// |δ| ≤ u for a real operation and |δ| ≤ 2√2·u < 4u for a complex product
// (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
// sections 2.2 and 3.6), gives to first order:
//
//	a ± b (entry by entry):  R = R_a + R_b + 2u·(|a| + |b|)
//	s·a, a/s (s a scalar):   R = R_a·|s| + 4u·|a||s|     (R_a/|s|, 4u·|a|/|s|)
//	A·B:                     R_ij = Σ_k (R_A,ik·|B_kj| + |A_ik|·R_B,kj)
//	                               + γ·Σ_k |A_ik||B_kj|,  γ = 4(n+2)u
//	inv(A):                  see equilibrated.inverse
//
// where n is the length of the inner sum (a sum of n complex products is
// exact to within (n+2)·4u times the sum of magnitudes of its terms:
// Higham, section 3.1, with complex products). Entries as written, and
// copies (transpose, diag, re, im, conj, negation), add no residue.
// An entry that exact arithmetic would make 0 is computed as a number of
// magnitude at most R; so a part (real or imaginary) of magnitude at most
// R is indistinguishable from 0 and is shown as 0, and every other part,
// however small beside its neighbours, is shown as computed. (A genuine
// part below R lies below c·u times the sum of the magnitudes of the terms
// that produced it, past their 15th significant digit: the arithmetic
// cannot tell it from 0, and it is also invisible beside them.) The bounds
// are for the complex magnitude of each entry, so they hold for each of
// its parts.
//
// A scalar's residue is not tracked: an entry picked from a matrix, or a
// scalar result, is shown as computed.
//
// seq and abc keep their own rule (clean in matrix.go): parts below 1e-13
// of the largest input are set to 0 in the value itself, which a balanced
// set needs for an exact zero-sequence component.

func residAt(m *Matrix, i int) float64 {
	if m.Resid == nil {
		return 0
	}
	return m.Resid[i]
}

// residSum is the residue bound of out = x ± y, entry by entry.
func residSum(x, y *Matrix) []float64 {
	r := make([]float64, len(x.E))
	for i := range r {
		r[i] = residAt(x, i) + residAt(y, i) + 2*unitRoundoff*(cmplx.Abs(x.E[i].Z)+cmplx.Abs(y.E[i].Z))
	}
	return r
}

// residScale is the residue bound of m·s (divide false) or m/s.
func residScale(m *Matrix, s complex128, divide bool) []float64 {
	f := cmplx.Abs(s)
	if divide {
		f = 1 / f
	}
	r := make([]float64, len(m.E))
	for i := range r {
		r[i] = (residAt(m, i) + 4*unitRoundoff*cmplx.Abs(m.E[i].Z)) * f
	}
	return r
}

// residProduct is the residue bound of the product a·b.
func residProduct(a, b *Matrix) []float64 {
	g := 4 * float64(a.Cols+2) * unitRoundoff
	r := make([]float64, a.Rows*b.Cols)
	for i := 0; i < a.Rows; i++ {
		for j := 0; j < b.Cols; j++ {
			var sum float64
			for k := 0; k < a.Cols; k++ {
				x, y := cmplx.Abs(a.E[i*a.Cols+k].Z), cmplx.Abs(b.E[k*b.Cols+j].Z)
				sum += residAt(a, i*a.Cols+k)*y + x*residAt(b, k*b.Cols+j) + g*x*y
			}
			r[i*b.Cols+j] = sum
		}
	}
	return r
}

// copyResid is the residue of a copy of m's entries in the order idx
// (idx[k] is the entry of m that becomes entry k), or nil.
func copyResid(m *Matrix, idx []int) []float64 {
	if m.Resid == nil {
		return nil
	}
	r := make([]float64, len(idx))
	for k, i := range idx {
		if i >= 0 {
			r[k] = m.Resid[i]
		}
	}
	return r
}
