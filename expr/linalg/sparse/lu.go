package sparse

import (
	"fmt"
	"math"
	"math/cmplx"

	"calcdoc/expr/linalg"
)

// Threshold is the threshold of partial pivoting: a pivot's modulus is at
// least this fraction of the largest modulus in its column of the active
// (equilibrated) submatrix. 0.1 is the value usual in sparse direct
// solvers (common practice): it bounds the growth of each elimination step
// by 1 + 1/0.1 while leaving room for a sparse pivot order.
const Threshold = 0.1

// searchWidth is how many of the sparsest active columns, and of the
// sparsest active rows, are searched for the pivot of smallest Markowitz
// cost at each step.
const searchWidth = 4

// LU is the factorisation P·(R·A·C)·Q = L·U of a Matrix: R and C the
// diagonal power-of-two equilibration, P and Q the pivot order, L unit
// lower and U upper triangular.
type LU struct {
	n      int
	a      *Matrix
	rs, cs []float64 // row and column scales (powers of two)
	prow   []int     // prow[k]: the row pivoted at step k
	pcol   []int     // pcol[k]: the column pivoted at step k
	lcol   [][]Entry // lcol[k]: multipliers of step k, Col holding the row
	urow   [][]Entry // urow[k]: row k of U without its diagonal, by column
	diag   []complex128
	norm1  float64 // 1-norm of R·A·C
	fill   int     // entries of L and U (diagonal included)
	cond   float64 // Cond1, once computed
	// condGiven is Cond1Given, once computed
	condGiven float64
}

// SingularError reports a matrix without a usable pivot: at elimination
// step Step every active entry of the columns Cols (and of the rows Rows,
// when those have none left) is zero. Indices count from 0.
type SingularError struct {
	Step int
	Cols []int // columns with no non-zero active entry
	Rows []int // rows with no non-zero active entry
}

func (e *SingularError) Error() string {
	return fmt.Sprintf("sparse: singular matrix at elimination step %d (columns %v, rows %v without a non-zero entry)", e.Step, e.Cols, e.Rows)
}

// exp2Scale returns the power of two 2^−e with big·2^−e in [0.5, 1).
func exp2Scale(big float64) float64 {
	_, e := math.Frexp(big)
	return math.Ldexp(1, -e)
}

// Factor factorises a. A matrix with an empty row or column, or one whose
// elimination meets an active submatrix of zeros, gives a *SingularError.
func Factor(a *Matrix) (*LU, error) {
	n := a.N
	f := &LU{n: n, a: a, rs: make([]float64, n), cs: make([]float64, n)}
	// equilibration: rows first, then the columns of the row-scaled matrix
	var emptyRows, emptyCols []int
	for i, r := range a.Rows {
		big := 0.0
		for _, e := range r {
			big = math.Max(big, cmplx.Abs(e.V))
		}
		if big == 0 {
			emptyRows = append(emptyRows, i)
			f.rs[i] = 1
			continue
		}
		f.rs[i] = exp2Scale(big)
	}
	cbig := make([]float64, n)
	for i, r := range a.Rows {
		for _, e := range r {
			cbig[e.Col] = math.Max(cbig[e.Col], cmplx.Abs(e.V)*f.rs[i])
		}
	}
	for j, big := range cbig {
		if big == 0 {
			emptyCols = append(emptyCols, j)
			f.cs[j] = 1
			continue
		}
		f.cs[j] = exp2Scale(big)
	}
	if len(emptyRows) > 0 || len(emptyCols) > 0 {
		return nil, &SingularError{Step: 0, Cols: emptyCols, Rows: emptyRows}
	}

	rows := make([][]Entry, n)
	cols := make([][]int, n)
	colSum := make([]float64, n)
	for i, r := range a.Rows {
		rows[i] = make([]Entry, len(r))
		for k, e := range r {
			v := e.V * complex(f.rs[i]*f.cs[e.Col], 0)
			rows[i][k] = Entry{Col: e.Col, V: v}
			cols[e.Col] = append(cols[e.Col], i)
			colSum[e.Col] += cmplx.Abs(v)
		}
	}
	for _, s := range colSum {
		f.norm1 = math.Max(f.norm1, s)
	}
	f.prow, f.pcol = make([]int, n), make([]int, n)
	f.lcol, f.urow = make([][]Entry, n), make([][]Entry, n)
	f.diag = make([]complex128, n)
	rowDone, colDone := make([]bool, n), make([]bool, n)
	pos := make([]int, n)
	for j := range pos {
		pos[j] = -1
	}
	el := &elim{rows: rows, cols: cols, rowDone: rowDone, colDone: colDone, colMax: make([]float64, n), colStamp: make([]int, n)}

	for k := 0; k < n; k++ {
		p, q, ok := el.pivot()
		if !ok {
			return nil, el.singular(k)
		}
		piv := entryAt(rows[p], q)
		f.prow[k], f.pcol[k], f.diag[k] = p, q, piv
		rowDone[p], colDone[q] = true, true
		var u []Entry
		for _, e := range rows[p] {
			cols[e.Col] = removeInt(cols[e.Col], p)
			if e.Col != q {
				u = append(u, e)
			}
		}
		f.urow[k] = u
		rows[p] = nil
		var l []Entry
		for _, i := range cols[q] {
			r := rows[i]
			var aiq complex128
			for t, e := range r {
				if e.Col == q {
					aiq = e.V
					r[t] = r[len(r)-1]
					r = r[:len(r)-1]
					break
				}
			}
			if aiq == 0 {
				rows[i] = r
				continue
			}
			m := aiq / piv
			l = append(l, Entry{Col: i, V: m})
			for t, e := range r {
				pos[e.Col] = t
			}
			for _, e := range u {
				if t := pos[e.Col]; t >= 0 {
					r[t].V -= m * e.V
				} else {
					r = append(r, Entry{Col: e.Col, V: -m * e.V})
					cols[e.Col] = append(cols[e.Col], i)
				}
			}
			for _, e := range r {
				pos[e.Col] = -1
			}
			rows[i] = r
		}
		cols[q] = nil
		f.lcol[k] = l
		f.fill += 1 + len(l) + len(u)
	}
	return f, nil
}

// elim is the active submatrix during elimination.
type elim struct {
	rows             [][]Entry
	cols             [][]int
	rowDone, colDone []bool
	colMax           []float64 // largest squared modulus of each active column (colMaxOf)
	colStamp         []int     // the step at which colMax was found
	stamp            int       // the current step, counted by pivot
	cc, rr           []int     // pivot's candidate columns and rows, kept for their memory
}

func entryAt(r []Entry, j int) complex128 {
	for _, e := range r {
		if e.Col == j {
			return e.V
		}
	}
	return 0
}

// abs2 is |v|², enough to compare moduli (an entry of an equilibrated
// matrix is far from overflow).
func abs2(v complex128) float64 { return real(v)*real(v) + imag(v)*imag(v) }

func removeInt(s []int, v int) []int {
	for t, x := range s {
		if x == v {
			s[t] = s[len(s)-1]
			return s[:len(s)-1]
		}
	}
	return s
}

type cand struct {
	i, j int
	cost int
	rel  float64
}

func (c cand) better(d cand) bool {
	if c.cost != d.cost {
		return c.cost < d.cost
	}
	if c.rel != d.rel {
		return c.rel > d.rel
	}
	if c.j != d.j {
		return c.j < d.j
	}
	return c.i < d.i
}

// pivot chooses the pivot of the current step: among the entries of the
// searchWidth sparsest active columns and rows, one whose modulus is at
// least Threshold of the largest of its column, of smallest Markowitz
// cost. One pass over the active columns and rows finds the sparsest; the
// largest modulus of a column is found for the candidates' columns only
// (colMaxOf) while that is cheaper than one pass over every active entry,
// so that a step of a sparse elimination costs the order of the matrix
// plus the entries near the candidates.
func (el *elim) pivot() (p, q int, ok bool) {
	cc, rr := el.cc[:0], el.rr[:0]
	colCount := func(a int) int { return len(el.cols[a]) }
	rowCount := func(a int) int { return len(el.rows[a]) }
	last := 0 // the count of the last of searchWidth kept: a larger or equal one is not kept
	for j, done := range el.colDone {
		if c := len(el.cols[j]); !done && (len(cc) < searchWidth || c < last) {
			cc = insertSmall(cc, j, c, colCount)
			last = len(el.cols[cc[len(cc)-1]])
		}
	}
	last = 0
	active, nnz := 0, 0
	for i, done := range el.rowDone {
		if done {
			continue
		}
		c := len(el.rows[i])
		active++
		nnz += c
		if len(rr) < searchWidth || c < last {
			rr = insertSmall(rr, i, c, rowCount)
			last = len(el.rows[rr[len(rr)-1]])
		}
	}
	el.cc, el.rr = cc, rr
	el.stamp++
	// the largest entry of a candidate's column: found column by column
	// (each entry looked up in its row) while the candidates are few
	// against the active matrix's density, else in one pass over every
	// active entry, whichever costs less (an active column has about
	// nnz/active entries, and so has a row)
	cands := len(cc)
	for _, i := range rr {
		cands += len(el.rows[i])
	}
	if active > 0 && cands*nnz > active*active {
		for j, done := range el.colDone {
			if !done {
				el.colMax[j], el.colStamp[j] = 0, el.stamp
			}
		}
		for i, done := range el.rowDone {
			if done {
				continue
			}
			for _, e := range el.rows[i] {
				if m := abs2(e.V); m > el.colMax[e.Col] {
					el.colMax[e.Col] = m
				}
			}
		}
	}
	best := cand{i: -1}
	try := func(i, j int, v complex128) {
		if v == 0 {
			return
		}
		cost := (len(el.rows[i]) - 1) * (len(el.cols[j]) - 1)
		if best.i >= 0 && cost > best.cost {
			return
		}
		big := el.colMaxOf(j) // squared moduli
		m := abs2(v)
		if m < Threshold*Threshold*big {
			return
		}
		c := cand{i: i, j: j, cost: cost, rel: m / big}
		if best.i < 0 || c.better(best) {
			best = c
		}
	}
	for _, i := range rr {
		for _, e := range el.rows[i] {
			try(i, e.Col, e.V)
		}
	}
	for _, j := range cc {
		for _, i := range el.cols[j] {
			try(i, j, entryAt(el.rows[i], j))
		}
	}
	if best.i < 0 {
		// every searched entry is zero: search the whole active matrix
		for i, done := range el.rowDone {
			if done {
				continue
			}
			for _, e := range el.rows[i] {
				try(i, e.Col, e.V)
			}
		}
	}
	if best.i < 0 {
		return 0, 0, false
	}
	return best.i, best.j, true
}

// colMaxOf returns the largest squared modulus of the active entries of
// column j, computed once a step (el.stamp).
func (el *elim) colMaxOf(j int) float64 {
	if el.colStamp[j] == el.stamp {
		return el.colMax[j]
	}
	big := 0.0
	for _, i := range el.cols[j] {
		if m := abs2(entryAt(el.rows[i], j)); m > big {
			big = m
		}
	}
	el.colMax[j], el.colStamp[j] = big, el.stamp
	return big
}

// insertSmall keeps s as the searchWidth indices of smallest count (ties
// to the smaller index, which comes first in the scan); c is x's count.
func insertSmall(s []int, x, c int, count func(int) int) []int {
	if len(s) == searchWidth && count(s[searchWidth-1]) <= c {
		return s
	}
	t := len(s)
	for t > 0 && count(s[t-1]) > c {
		t--
	}
	if t >= searchWidth {
		return s
	}
	s = append(s, 0)
	copy(s[t+1:], s[t:])
	s[t] = x
	if len(s) > searchWidth {
		s = s[:searchWidth]
	}
	return s
}

func (el *elim) singular(k int) *SingularError {
	e := &SingularError{Step: k}
	for j, done := range el.colDone {
		if !done && el.colMaxOf(j) == 0 {
			e.Cols = append(e.Cols, j)
		}
	}
	for i, done := range el.rowDone {
		if done {
			continue
		}
		zero := true
		for _, x := range el.rows[i] {
			if x.V != 0 {
				zero = false
			}
		}
		if zero {
			e.Rows = append(e.Rows, i)
		}
	}
	return e
}

// N is the order of the factorised matrix.
func (f *LU) N() int { return f.n }

// Fill is the number of entries of L and U together (the diagonal of U
// counted once, the unit diagonal of L not at all).
func (f *LU) Fill() int { return f.fill }

// solveScaled solves (R·A·C) z = w in place of w's copy; w is indexed by
// row, the result by column.
func (f *LU) solveScaled(w []complex128) []complex128 {
	y := make([]complex128, f.n)
	for k := 0; k < f.n; k++ {
		yk := w[f.prow[k]]
		y[k] = yk
		if yk == 0 {
			continue
		}
		for _, e := range f.lcol[k] {
			w[e.Col] -= e.V * yk
		}
	}
	z := make([]complex128, f.n)
	for k := f.n - 1; k >= 0; k-- {
		s := y[k]
		for _, e := range f.urow[k] {
			s -= e.V * z[e.Col]
		}
		z[f.pcol[k]] = s / f.diag[k]
	}
	return z
}

// solveScaledH solves (R·A·C)ᴴ x = c; c is indexed by column, the result
// by row. c is overwritten.
func (f *LU) solveScaledH(c []complex128) []complex128 {
	s := make([]complex128, f.n)
	for k := 0; k < f.n; k++ {
		sk := c[f.pcol[k]] / cmplx.Conj(f.diag[k])
		s[k] = sk
		if sk == 0 {
			continue
		}
		for _, e := range f.urow[k] {
			c[e.Col] -= cmplx.Conj(e.V) * sk
		}
	}
	x := make([]complex128, f.n)
	for k := f.n - 1; k >= 0; k-- {
		v := s[k]
		for _, e := range f.lcol[k] {
			v -= cmplx.Conj(e.V) * x[e.Col]
		}
		x[f.prow[k]] = v
	}
	return x
}

// Solve returns x with A x = b from the factors alone.
func (f *LU) Solve(b []complex128) []complex128 {
	w := make([]complex128, f.n)
	for i, v := range b {
		w[i] = v * complex(f.rs[i], 0)
	}
	z := f.solveScaled(w)
	for j := range z {
		z[j] *= complex(f.cs[j], 0)
	}
	return z
}

// SolveH returns x with Aᴴ x = b.
func (f *LU) SolveH(b []complex128) []complex128 {
	c := make([]complex128, f.n)
	for j, v := range b {
		c[j] = v * complex(f.cs[j], 0)
	}
	x := f.solveScaledH(c)
	for i := range x {
		x[i] *= complex(f.rs[i], 0)
	}
	return x
}

// MaxRefine is the largest number of steps of iterative refinement
// SolveRefined takes.
const MaxRefine = 4

// RefineTol: refinement stops once the componentwise backward error is at
// most this (a few units of rounding).
const RefineTol = 4 * 0x1p-53

// SolveRefined solves A x = b and refines x against the original matrix
// (r = b − A x, x += A⁻¹r) while the componentwise backward error
// (Matrix.BackwardError) is above RefineTol and each step at least halves
// it, at most MaxRefine times. It returns x and its backward error.
func (f *LU) SolveRefined(b []complex128) (x []complex128, omega float64) {
	x = f.Solve(b)
	omega, _ = f.a.BackwardError(x, b)
	for it := 0; it < MaxRefine && omega > RefineTol; it++ {
		ax := f.a.MulVec(x)
		r := make([]complex128, f.n)
		for i := range r {
			r[i] = b[i] - ax[i]
		}
		d := f.Solve(r)
		xn := make([]complex128, f.n)
		for i := range xn {
			xn[i] = x[i] + d[i]
		}
		on, _ := f.a.BackwardError(xn, b)
		if !(on < omega) {
			break
		}
		better := on <= omega/2
		x, omega = xn, on
		if !better {
			break
		}
	}
	return x, omega
}

// Cond1 estimates the 1-norm condition number ‖Â‖₁‖Â⁻¹‖₁ of the
// equilibrated matrix Â = R·A·C, with ‖Â⁻¹‖₁ from Higham's refinement of
// Hager's estimator (N. J. Higham, "FORTRAN codes for estimating the
// one-norm of a real or complex matrix", ACM TOMS 14 (1988), algorithm
// 4.1, as in LAPACK zlacn2), never below the lower bound it finds. It
// takes at most 11 solves with the factors, each costing their number of
// entries (Fill), so it costs less than the factorisation. The result is
// kept.
func (f *LU) Cond1() float64 {
	if f.cond == 0 {
		f.cond = f.cond1()
	}
	return f.cond
}

func (f *LU) cond1() float64 {
	inv := f.invNorm1(func(w []complex128) []complex128 { return f.solveScaled(append([]complex128(nil), w...)) }, f.solveScaledH)
	return f.norm1 * inv
}

// Cond1Given estimates the 1-norm condition number ‖A‖₁‖A⁻¹‖₁ of the
// matrix A as given to Factor, before its equilibration, by the same
// estimator, its solves made with the factors through the scales (Solve
// and SolveH): for a caller that has scaled A itself and states the
// condition of its own scaled matrix, as a dense factorisation of it
// would. The result is kept.
func (f *LU) Cond1Given() float64 {
	if f.condGiven == 0 {
		f.condGiven = f.a.Norm1() * f.invNorm1(f.Solve, f.SolveH)
	}
	return f.condGiven
}

// invNorm1 estimates ‖M⁻¹‖₁ from solve (M⁻¹w, w kept) and solveH (M⁻ᴴc,
// c may be overwritten): Higham's algorithm 4.1 with the alternative
// estimate, as zlacn2.
func (f *LU) invNorm1(solve, solveH func([]complex128) []complex128) float64 {
	n := f.n
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(1/float64(n), 0)
	}
	est := 0.0
	last := -1
	for it := 0; it < 5; it++ {
		y := solve(x)
		s := norm1(y)
		if it > 0 && s <= est {
			break
		}
		est = s
		xi := make([]complex128, n)
		for i, v := range y {
			if a := cmplx.Abs(v); a > 0 {
				xi[i] = v / complex(a, 0)
			} else {
				xi[i] = 1
			}
		}
		z := solveH(xi)
		j, zj := 0, 0.0
		for i, v := range z {
			if a := cmplx.Abs(v); a > zj {
				j, zj = i, a
			}
		}
		var ztx float64
		for i := range z {
			ztx += real(cmplx.Conj(z[i]) * x[i])
		}
		if it > 0 && (zj <= ztx || j == last) {
			break
		}
		last = j
		for i := range x {
			x[i] = 0
		}
		x[j] = 1
	}
	// the alternative estimate, which catches the cases the iteration misses
	alt := make([]complex128, n)
	for i := range alt {
		sign := 1.0
		if i%2 == 1 {
			sign = -1
		}
		den := 1.0
		if n > 1 {
			den = float64(n - 1)
		}
		alt[i] = complex(sign*(1+float64(i)/den), 0)
	}
	if t := 2 * norm1(solve(alt)) / (3 * float64(n)); t > est {
		est = t
	}
	return est
}

// CheckCond returns a *linalg.IllConditioned when cond exceeds limit (or
// is NaN), and nil otherwise: the typed condition of the dense LU, so that
// a caller tells the two apart in one way. cond is Cond1 or Cond1Given.
func CheckCond(cond, limit float64) error {
	if !(cond <= limit) {
		return &linalg.IllConditioned{Cond: cond, Limit: limit}
	}
	return nil
}

func norm1(v []complex128) float64 {
	s := 0.0
	for _, z := range v {
		s += cmplx.Abs(z)
	}
	return s
}
