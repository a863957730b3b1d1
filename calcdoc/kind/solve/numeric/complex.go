package solve

import (
	"math"
	"sort"
)

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
	n           int
	rows        [][]cEntry   // the non-zero entries of C row by row, by column
	b           []complex128 // the complex right-hand side
	s, q        []float64    // scales of the complex unknowns and equations
	cols, rows2 []int        // the Problem's pairs (Complex, ComplexRows)
}

// cEntry is a non-zero entry of a row of C.
type cEntry struct {
	col int
	v   complex128
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
	if !lin.cfDone {
		lin.cf, lin.cfDone = lin.makeComplexForm(), true
	}
	return lin.cf
}

func (lin *Linear) makeComplexForm() *complexSystem {
	m, n := lin.Dims()
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
		n: nc, rows: make([][]cEntry, nc), b: make([]complex128, nc),
		s: make([]float64, nc), q: make([]float64, nc),
		cols: lin.Complex, rows2: lin.ComplexRows,
	}
	// which complex unknown, and which part of it, each column is
	cu := make([]int, n)
	imPart := make([]bool, n)
	for k := 0; k < nc; k++ {
		c, c2 := lin.Complex[2*k], lin.Complex[2*k+1]
		if s[c] != s[c2] {
			return nil
		}
		cs.s[k] = s[c]
		cu[c], cu[c2], imPart[c2] = k, k, true
	}
	// the four real entries of each block touched by a row pair:
	// A_rc, A_r′c′, A_r′c and −A_rc′
	type block struct{ re1, re2, im1, im2 float64 }
	blk := make([]block, nc)
	touched := make([]bool, nc)
	var list []int
	for i := 0; i < nc; i++ {
		r, r2 := lin.ComplexRows[2*i], lin.ComplexRows[2*i+1]
		if q[r] != q[r2] {
			return nil
		}
		cs.q[i] = q[r]
		big := 0.0
		list = list[:0]
		for pass, row := range [2][]Entry{lin.RowEntries(r), lin.RowEntries(r2)} {
			for _, t := range row {
				big = math.Max(big, math.Abs(t.V)*s[t.Col])
				k := cu[t.Col]
				if !touched[k] {
					touched[k] = true
					blk[k] = block{}
					list = append(list, k)
				}
				switch {
				case pass == 0 && !imPart[t.Col]:
					blk[k].re1 = t.V
				case pass == 0:
					blk[k].im2 = -t.V
				case !imPart[t.Col]:
					blk[k].im1 = t.V
				default:
					blk[k].re2 = t.V
				}
			}
		}
		tol := ComplexTol * big
		sort.Ints(list)
		for _, k := range list {
			touched[k] = false
		}
		for _, k := range list {
			c := blk[k]
			if !(math.Abs(c.re1-c.re2)*cs.s[k] <= tol) || !(math.Abs(c.im1-c.im2)*cs.s[k] <= tol) {
				return nil
			}
			if v := complex((c.re1+c.re2)/2, (c.im1+c.im2)/2); v != 0 {
				cs.rows[i] = append(cs.rows[i], cEntry{col: k, v: v})
			}
		}
		cs.b[i] = complex(lin.B[r], lin.B[r2])
	}
	return cs
}

// nnz is the number of non-zero entries of C.
func (cs *complexSystem) nnz() int {
	nnz := 0
	for _, r := range cs.rows {
		nnz += len(r)
	}
	return nnz
}

// dense returns C row by row as a dense matrix.
func (cs *complexSystem) dense() []complex128 {
	a := make([]complex128, cs.n*cs.n)
	for i, r := range cs.rows {
		for _, t := range r {
			a[i*cs.n+t.col] = t.v
		}
	}
	return a
}

// unpack writes the complex solution z back into the real unknowns.
func (cs *complexSystem) unpack(z []complex128, n int) []float64 {
	x := make([]float64, n)
	for k, v := range z {
		x[cs.cols[2*k]], x[cs.cols[2*k+1]] = real(v), imag(v)
	}
	return x
}
