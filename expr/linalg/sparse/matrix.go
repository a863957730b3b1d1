// Package sparse is a sparse complex LU factorisation for the large,
// sparse, square systems of network blocks (modified nodal analysis).
//
// A matrix is collected entry by entry with a Builder and frozen into a
// Matrix (compressed rows, duplicates summed). Factor equilibrates it by
// powers of two (row scales, then column scales, so that scaling is exact
// in floating point), then eliminates it with a Markowitz pivot order under
// threshold partial pivoting: at each step the pivot is an active entry
// whose modulus is at least Threshold times the largest modulus in its
// column, and among those (in the few sparsest columns and rows) the one
// with the smallest Markowitz cost (r−1)(c−1), r and c the active counts of
// its row and column. The factors give solutions (with iterative
// refinement against the original matrix), conjugate-transpose solutions
// and a 1-norm condition number estimate of the equilibrated matrix
// (Hager's method as refined by Higham, the estimator of LAPACK's zlacn2).
//
// Every function is deterministic: ties are broken by index.
package sparse

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
)

// Builder collects the entries of an n×n matrix. Adding to the same
// position twice sums the values.
type Builder struct {
	n   int
	ent map[[2]int]complex128
}

// NewBuilder returns a builder of an n×n matrix.
func NewBuilder(n int) *Builder { return &Builder{n: n, ent: map[[2]int]complex128{}} }

// Add adds v at row i, column j (from 0). It panics on an index outside
// the matrix: that is a programming error of the caller.
func (b *Builder) Add(i, j int, v complex128) {
	if i < 0 || i >= b.n || j < 0 || j >= b.n {
		panic(fmt.Sprintf("sparse: entry (%d, %d) outside a %d×%d matrix", i, j, b.n, b.n))
	}
	b.ent[[2]int{i, j}] += v
}

// Matrix freezes the entries into a Matrix. Entries that sum to exactly
// zero are kept out of it.
func (b *Builder) Matrix() *Matrix {
	m := &Matrix{N: b.n, Rows: make([][]Entry, b.n)}
	for k, v := range b.ent {
		if v != 0 {
			m.Rows[k[0]] = append(m.Rows[k[0]], Entry{Col: k[1], V: v})
		}
	}
	for i := range m.Rows {
		r := m.Rows[i]
		sort.Slice(r, func(a, c int) bool { return r[a].Col < r[c].Col })
	}
	return m
}

// Entry is one stored entry of a row.
type Entry struct {
	Col int
	V   complex128
}

// Matrix is a square sparse matrix stored by rows; each row's entries are
// sorted by column and none is zero.
type Matrix struct {
	N    int
	Rows [][]Entry
}

// NNZ is the number of stored entries.
func (m *Matrix) NNZ() int {
	n := 0
	for _, r := range m.Rows {
		n += len(r)
	}
	return n
}

// At returns the entry at (i, j) (0 where none is stored).
func (m *Matrix) At(i, j int) complex128 {
	r := m.Rows[i]
	k := sort.Search(len(r), func(k int) bool { return r[k].Col >= j })
	if k < len(r) && r[k].Col == j {
		return r[k].V
	}
	return 0
}

// MulVec returns A x.
func (m *Matrix) MulVec(x []complex128) []complex128 {
	y := make([]complex128, m.N)
	for i, r := range m.Rows {
		var s complex128
		for _, e := range r {
			s += e.V * x[e.Col]
		}
		y[i] = s
	}
	return y
}

// Norm1 is the 1-norm (largest column sum of moduli).
func (m *Matrix) Norm1() float64 {
	s := make([]float64, m.N)
	for _, r := range m.Rows {
		for _, e := range r {
			s[e.Col] += cmplx.Abs(e.V)
		}
	}
	big := 0.0
	for _, v := range s {
		big = math.Max(big, v)
	}
	return big
}

// BackwardError returns the componentwise (Oettli–Prager) backward error
// of x as a solution of A x = b, part by part as for the real form of the
// system: for row i, with r = b − A x,
//
//	ω_i = max( |Re r_i| / (Σ_j (|Re a_ij|+|Im a_ij|)|x_j| + |Re b_i|),
//	           |Im r_i| / (Σ_j (|Re a_ij|+|Im a_ij|)|x_j| + |Im b_i|) ),
//
// a part counting 0 where its residual is exactly 0. It returns the
// largest ω_i and the row where it occurs.
func (m *Matrix) BackwardError(x, b []complex128) (omega float64, row int) {
	res := make([]complex128, m.N)
	for i, r := range m.Rows {
		v := b[i]
		for _, e := range r {
			v -= e.V * x[e.Col]
		}
		res[i] = v
	}
	return m.BackwardOf(res, x, b)
}

// BackwardOf is BackwardError with the residual r_i of each row given
// (its sign does not matter): a residual evaluated otherwise than from A,
// such as the equations as written, which is what a network block's
// acceptance tests. It returns the largest ω_i (+Inf for a row whose
// residual is not a number), at the first row where it occurs (row 0 when
// every ω_i is 0).
func (m *Matrix) BackwardOf(res, x, b []complex128) (omega float64, row int) {
	for i, r := range m.Rows {
		d := 0.0
		for _, e := range r {
			d += (math.Abs(real(e.V)) + math.Abs(imag(e.V))) * cmplx.Abs(x[e.Col])
		}
		w := math.Max(part(real(res[i]), d+math.Abs(real(b[i]))), part(imag(res[i]), d+math.Abs(imag(b[i]))))
		if math.IsNaN(w) {
			w = math.Inf(1) // a residual that is not a number is no solution
		}
		if w > omega {
			omega, row = w, i
		}
	}
	return omega, row
}

// part is |r|/d, 0 for r = 0 and +Inf where d is 0 or infinite.
func part(r, d float64) float64 {
	switch {
	case r == 0:
		return 0
	case d > 0 && !math.IsInf(d, 0):
		return math.Abs(r) / d
	}
	return math.Inf(1)
}
