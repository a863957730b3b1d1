package expr

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"calcdoc/expr/linalg"
)

// unitRoundoff is u = 2⁻⁵³, the relative rounding error of one binary64
// operation (IEEE 754-2019, round to nearest).
const unitRoundoff = linalg.UnitRoundoff

// MaxMatrixEntries bounds the entries of a matrix that a product or diag
// makes (a 100×100 matrix), so that no expression of a short line takes
// minutes: the product of two such matrices is 10⁶ multiplications.
const MaxMatrixEntries = 10000

// sumDim is the dimension of a sum of a and b, where a plain zero takes
// the other's dimension; ok is false when the units differ.
func sumDim(a, b *Scalar) (Dim, bool) {
	switch {
	case a.Dim == b.Dim:
		return a.Dim, true
	case isPlainZero(a):
		return b.Dim, true
	case isPlainZero(b):
		return a.Dim, true
	}
	return Dim{}, false
}

func shapeWord(v Value) string {
	r, c := v.Shape()
	if _, ok := v.(*Scalar); ok {
		return "a single value"
	}
	if c == 1 {
		return fmt.Sprintf("a vector of %d entries", r)
	}
	return fmt.Sprintf("a %d×%d matrix", r, c)
}

func entryName(m *Matrix, i, j int) string {
	if m.Cols == 1 {
		return fmt.Sprintf("entry %d", i+1)
	}
	return fmt.Sprintf("entry (%d, %d)", i+1, j+1)
}

// matrixOp applies a binary operator where at least one side is a matrix.
// + and - work entry by entry on equal shapes; * is the matrix product
// (or scales by a scalar); / divides by a scalar.
func matrixOp(n *Binary, x, y Value) (Value, error) {
	xm, xIsM := x.(*Matrix)
	ym, yIsM := y.(*Matrix)
	switch n.Op {
	case ADD, SUB:
		if !xIsM || !yIsM {
			return nil, Errorf(n.P, "cannot %s %s and %s", opName(n.Op), shapeWord(x), shapeWord(y))
		}
		if xm.Rows != ym.Rows || xm.Cols != ym.Cols {
			return nil, Errorf(n.OpPos, "cannot %s %s and %s: the shapes differ", opName(n.Op), shapeWord(x), shapeWord(y))
		}
		out := NewMatrix(xm.Rows, xm.Cols)
		for i := range xm.E {
			a, b := &xm.E[i], &ym.E[i]
			d, ok := sumDim(a, b)
			if !ok {
				return nil, Errorf(n.OpPos, "cannot %s %s: %s is %s, the other %s (the units differ)", opName(n.Op), entryName(xm, i/xm.Cols, i%xm.Cols), Describe(a), dimWord(a.Dim), dimWord(b.Dim))
			}
			z := a.Z + b.Z
			if n.Op == SUB {
				z = a.Z - b.Z
			}
			k, err := sumKind(n, a, b)
			if err != nil {
				return nil, err
			}
			t, err := sumTemp(n.Op, n.OpPos, a, b)
			if err != nil {
				return nil, err
			}
			out.E[i] = Scalar{Z: z, Dim: d, Kind: k, AbsTemp: t}
		}
		out.Resid = residSum(xm, ym)
		return out, nil
	case MUL:
		switch {
		case xIsM && yIsM:
			return matMul(n, xm, ym)
		case xIsM:
			return scale(n, xm, y.(*Scalar), false)
		default:
			return scale(n, ym, x.(*Scalar), false)
		}
	case DIV:
		if yIsM {
			return nil, Errorf(n.Y.Pos(), "cannot divide by %s: multiply by inv(...) instead", shapeWord(y))
		}
		s := y.(*Scalar)
		if s.Z == 0 {
			return nil, Errorf(n.Y.Pos(), "division by zero: the divisor is 0")
		}
		return scale(n, xm, s, true)
	}
	return nil, Errorf(n.P, "%s does not work on %s and %s", n.Op, shapeWord(x), shapeWord(y))
}

// scale multiplies (or divides) every entry of m by s. An entry that is
// not zero and becomes zero has underflowed: an error at the operator.
func scale(n *Binary, m *Matrix, s *Scalar, divide bool) (*Matrix, error) {
	out := NewMatrix(m.Rows, m.Cols)
	out.Resid = residScale(m, s.Z, divide)
	for i, e := range m.E {
		if divide {
			out.E[i] = Scalar{Z: e.Z / s.Z, Dim: e.Dim.Div(s.Dim), Kind: scaledKind(&e, s)}
		} else {
			out.E[i] = Scalar{Z: e.Z * s.Z, Dim: e.Dim.Mul(s.Dim), Kind: scaledKind(&e, s)}
		}
		if out.E[i].Z == 0 && e.Z != 0 && s.Z != 0 {
			return nil, underflow(n.OpPos, map[bool]string{false: "product", true: "quotient"}[divide])
		}
	}
	return out, nil
}

// matMul is the matrix product C = A·B, C_ij = Σ_k A_ik·B_kj. Every term of
// a sum must have the same dimension (a plain zero matches any).
func matMul(n *Binary, a, b *Matrix) (Value, error) {
	if a.Cols != b.Rows {
		return nil, Errorf(n.OpPos, "cannot multiply %s by %s: the first needs as many columns (%d) as the second has rows (%d)", shapeWord(a), shapeWord(b), a.Cols, b.Rows)
	}
	if a.Rows*b.Cols > MaxMatrixEntries {
		return nil, Errorf(n.OpPos, "the product would be a %d×%d matrix: at most %d entries are allowed", a.Rows, b.Cols, MaxMatrixEntries)
	}
	out := NewMatrix(a.Rows, b.Cols)
	for i := 0; i < a.Rows; i++ {
		for j := 0; j < b.Cols; j++ {
			var sum complex128
			var d Dim
			have, lost := false, false
			for k := 0; k < a.Cols; k++ {
				x, y := a.At(i, k), b.At(k, j)
				t := x.Z * y.Z
				lost = lost || t == 0 && x.Z != 0 && y.Z != 0
				sum += t
				if x.Z == 0 && x.Dim.IsZero() || y.Z == 0 && y.Dim.IsZero() {
					continue
				}
				td := x.Dim.Mul(y.Dim)
				if !have {
					d, have = td, true
				} else if td != d {
					return nil, Errorf(n.OpPos, "in the product, %s of the result sums terms of different units: term %d is %s, an earlier one %s", entryName(out, i, j), k+1, dimWord(td), dimWord(d))
				}
			}
			if sum == 0 && lost {
				// a term underflowed and nothing else is left: the true
				// entry is not 0 but too small to hold
				return nil, underflow(n.OpPos, "product")
			}
			out.Set(i, j, Scalar{Z: sum, Dim: d})
		}
	}
	out.Resid = residProduct(a, b)
	return out, nil
}

func oneMatrix(a []Value, what string) (*Matrix, error) {
	m, ok := a[0].(*Matrix)
	if !ok {
		return nil, fmt.Errorf("needs %s, not a single value", what)
	}
	return m, nil
}

// consistentDims finds row and column dimensions r_i, c_j with
// dim(A_ij) = r_i·c_j for every entry (plain zeros match anything): the
// condition under which inv and det have units. It walks the bipartite
// graph of rows and columns joined by non-zero entries.
func consistentDims(m *Matrix) (r, c []Dim, ok bool) {
	r = make([]Dim, m.Rows)
	c = make([]Dim, m.Cols)
	rk := make([]bool, m.Rows)
	ck := make([]bool, m.Cols)
	nonzero := func(i, j int) (Scalar, bool) {
		e := m.At(i, j)
		return e, !isPlainZero(&e)
	}
	type node struct {
		row bool
		k   int
	}
	for start := 0; start < m.Rows; start++ {
		if rk[start] {
			continue
		}
		rk[start] = true
		queue := []node{{true, start}}
		for len(queue) > 0 {
			nd := queue[0]
			queue = queue[1:]
			if nd.row {
				for j := 0; j < m.Cols; j++ {
					if e, nz := nonzero(nd.k, j); nz && !ck[j] {
						c[j], ck[j] = e.Dim.Div(r[nd.k]), true
						queue = append(queue, node{false, j})
					}
				}
			} else {
				for i := 0; i < m.Rows; i++ {
					if e, nz := nonzero(i, nd.k); nz && !rk[i] {
						r[i], rk[i] = e.Dim.Div(c[nd.k]), true
						queue = append(queue, node{true, i})
					}
				}
			}
		}
	}
	for i := 0; i < m.Rows; i++ {
		for j := 0; j < m.Cols; j++ {
			if e, nz := nonzero(i, j); nz && e.Dim != r[i].Mul(c[j]) {
				return nil, nil, false
			}
		}
	}
	return r, c, true
}

// singularError words a condition of linalg.Factorize for inv and det: a
// matrix singular after scaling its rows and columns (by powers of two),
// with the condition estimate of the scaled matrix.
func singularError(err error) error {
	var s *linalg.Singular
	if !errors.As(err, &s) {
		return err
	}
	if s.Exact() {
		return fmt.Errorf("the matrix is singular: it has no inverse (after scaling its rows and columns a pivot is exactly 0: condition estimate infinite)")
	}
	return fmt.Errorf("the matrix is singular: it has no inverse (after scaling its rows and columns its condition estimate is %.2g; above %g counts as singular)", s.Cond, 1/linalg.PivotTol)
}

// inverseResid is, for each entry of the computed inverse X of the n×n
// matrix A (both row by row), the bound on its rounding residue described
// at Resid: 8n·u·(|X||A||X|)_ij + (|X||R_A||X|)_ij, R_A the residue bound
// of A (nil: none). The first term is the first-order bound of the error
// of an inverse computed from an LU factorisation with partial pivoting
// (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
// section 14.3, with the growth of |L||U| over |A| taken into the constant
// 8n); the second carries the residue already in A (δX = −X·δA·X to first
// order).
func inverseResid(x, a []complex128, ra []float64, n int) []float64 {
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
	res := make([]float64, n*n)
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
	return res
}

func matInv(args []Value) (Value, error) {
	m, err := oneMatrix(args, "a square matrix")
	if err != nil {
		return nil, err
	}
	if m.Rows != m.Cols {
		return nil, fmt.Errorf("needs a square matrix, not %s", shapeWord(m))
	}
	r, c, ok := consistentDims(m)
	if !ok {
		return nil, fmt.Errorf("the units of the entries do not make an invertible set (each entry's unit must be a row unit times a column unit)")
	}
	n := m.Rows
	a := make([]complex128, n*n)
	for i, e := range m.E {
		a[i] = e.Z
	}
	f, err := linalg.Factorize(n, a, nil)
	if err != nil {
		return nil, singularError(err)
	}
	x, err := f.Inverse()
	if err != nil {
		return nil, singularError(err)
	}
	res := inverseResid(x, a, m.Resid, n)
	out := NewMatrix(n, n)
	out.Resid = res
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			// (A⁻¹)_ij has the dimension 1/(r_j·c_i)
			out.Set(i, j, Scalar{Z: x[i*n+j], Dim: Dim{}.Div(r[j].Mul(c[i]))})
		}
	}
	return out, nil
}

func matDet(args []Value) (Value, error) {
	m, err := oneMatrix(args, "a square matrix")
	if err != nil {
		return nil, err
	}
	if m.Rows != m.Cols {
		return nil, fmt.Errorf("needs a square matrix, not %s", shapeWord(m))
	}
	r, c, ok := consistentDims(m)
	if !ok {
		return nil, fmt.Errorf("the units of the entries do not give the determinant a unit (each entry's unit must be a row unit times a column unit)")
	}
	n := m.Rows
	a := make([]complex128, n*n)
	for i, e := range m.E {
		a[i] = e.Z
	}
	var acc [7]int
	for i := 0; i < n; i++ {
		for k := range acc {
			acc[k] += int(r[i][k]) + int(c[i][k])
		}
	}
	var d Dim
	for k, x := range acc {
		if x > MaxExponent || x < -MaxExponent {
			return nil, fmt.Errorf("the determinant's unit would have an exponent of %d: beyond ±%d", x, MaxExponent)
		}
		d[k] = int8(x)
	}
	// singular after equilibration: the determinant is 0 (its computed
	// value would be rounding residue)
	f, err := linalg.Factorize(n, a, nil)
	var ls *linalg.Singular
	if err != nil && !errors.As(err, &ls) {
		return nil, err
	}
	z, ok := f.DetValue()
	if !ok && z == 0 {
		return nil, fmt.Errorf("the determinant underflows: it is not zero, but below %.2g in coherent SI units, the smallest number calcdoc can hold", math.SmallestNonzeroFloat64)
	}
	return &Scalar{Z: z, Dim: d}, nil
}

func matTranspose(args []Value) (Value, error) {
	m, err := oneMatrix(args, "a matrix or a vector")
	if err != nil {
		return nil, err
	}
	out := NewMatrix(m.Cols, m.Rows)
	idx := make([]int, len(m.E))
	for i := 0; i < m.Rows; i++ {
		for j := 0; j < m.Cols; j++ {
			out.Set(j, i, m.At(i, j))
			idx[j*m.Rows+i] = i*m.Cols + j
		}
	}
	out.Resid = copyResid(m, idx)
	return out, nil
}

// matDiag builds a diagonal matrix from a vector, or takes the diagonal of
// a square matrix as a column vector.
func matDiag(args []Value) (Value, error) {
	m, err := oneMatrix(args, "a vector or a square matrix")
	if err != nil {
		return nil, err
	}
	if m.Cols == 1 || m.Rows == 1 {
		n := len(m.E)
		if n*n > MaxMatrixEntries {
			return nil, fmt.Errorf("the diagonal matrix would be %d×%d: at most %d entries are allowed", n, n, MaxMatrixEntries)
		}
		out := NewMatrix(n, n)
		idx := make([]int, n*n)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				idx[i*n+j] = -1
				if i == j {
					out.Set(i, j, m.E[i])
					idx[i*n+j] = i
				} else {
					out.Set(i, j, Scalar{Dim: m.E[i].Dim})
				}
			}
		}
		out.Resid = copyResid(m, idx)
		return out, nil
	}
	if m.Rows != m.Cols {
		return nil, fmt.Errorf("needs a vector or a square matrix, not %s", shapeWord(m))
	}
	out := NewMatrix(m.Rows, 1)
	idx := make([]int, m.Rows)
	for i := 0; i < m.Rows; i++ {
		out.E[i] = m.At(i, i)
		idx[i] = i*m.Cols + i
	}
	out.Resid = copyResid(m, idx)
	return out, nil
}

// opA is the operator a = 1∠120° of Fortescue's transformation.
var opA = cmplx.Rect(1, 2*math.Pi/3)

func three(args []Value) ([3]Scalar, error) {
	var x [3]Scalar
	if len(args) == 1 {
		m, ok := args[0].(*Matrix)
		if !ok || len(m.E) != 3 || (m.Cols != 1 && m.Rows != 1) {
			return x, fmt.Errorf("needs three values or a vector of three entries, not %s", shapeWord(args[0]))
		}
		copy(x[:], m.E)
	} else if len(args) == 3 {
		for i, a := range args {
			s, ok := a.(*Scalar)
			if !ok {
				return x, fmt.Errorf("argument %d must be a single value, not %s", i+1, shapeWord(a))
			}
			x[i] = *s
		}
	} else {
		return x, fmt.Errorf("needs three values (or one vector of three), not %d", len(args))
	}
	d, ok := sumDim(&x[0], &x[1])
	if ok {
		d, ok = sumDim(&Scalar{Z: 1, Dim: d}, &x[2])
	}
	if !ok {
		return x, fmt.Errorf("the three values need the same unit")
	}
	for i := range x {
		x[i].Dim = d
	}
	return x, nil
}

// seqFn gives the symmetrical components [x_0; x_1; x_2] of phase values
// (Fortescue): x_0 = (x_a + x_b + x_c)/3, x_1 = (x_a + a·x_b + a²·x_c)/3,
// x_2 = (x_a + a²·x_b + a·x_c)/3, with a = 1∠120°.
func seqFn(args []Value) (Value, error) {
	x, err := three(args)
	if err != nil {
		return nil, err
	}
	a, a2 := opA, opA*opA
	out := NewMatrix(3, 1)
	d := x[0].Dim
	out.E[0] = Scalar{Z: (x[0].Z + x[1].Z + x[2].Z) / 3, Dim: d}
	out.E[1] = Scalar{Z: (x[0].Z + a*x[1].Z + a2*x[2].Z) / 3, Dim: d}
	out.E[2] = Scalar{Z: (x[0].Z + a2*x[1].Z + a*x[2].Z) / 3, Dim: d}
	clean(out, x)
	return out, nil
}

// abcFn turns sequence components back into phase values:
// x_a = x_0 + x_1 + x_2, x_b = x_0 + a²·x_1 + a·x_2, x_c = x_0 + a·x_1 + a²·x_2.
func abcFn(args []Value) (Value, error) {
	x, err := three(args)
	if err != nil {
		return nil, err
	}
	a, a2 := opA, opA*opA
	out := NewMatrix(3, 1)
	d := x[0].Dim
	out.E[0] = Scalar{Z: x[0].Z + x[1].Z + x[2].Z, Dim: d}
	out.E[1] = Scalar{Z: x[0].Z + a2*x[1].Z + a*x[2].Z, Dim: d}
	out.E[2] = Scalar{Z: x[0].Z + a*x[1].Z + a2*x[2].Z, Dim: d}
	clean(out, x)
	return out, nil
}

// clean sets to zero the parts of the transformed values that are rounding
// residue: below 1e-13 of the largest input magnitude (the operator a is
// not exact in binary floating point, so a balanced set leaves ~1e-14).
func clean(out *Matrix, in [3]Scalar) {
	var big float64
	for _, s := range in {
		big = math.Max(big, cmplx.Abs(s.Z))
	}
	tol := 1e-13 * big
	for i, e := range out.E {
		re, im := real(e.Z), imag(e.Z)
		if math.Abs(re) <= tol {
			re = 0
		}
		if math.Abs(im) <= tol {
			im = 0
		}
		out.E[i].Z = complex(re, im)
	}
}
