package expr

import (
	"fmt"
	"math"
	"math/cmplx"
)

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
			out.E[i] = Scalar{Z: z, Dim: d, Kind: k}
		}
		return out, nil
	case MUL:
		switch {
		case xIsM && yIsM:
			return matMul(n, xm, ym)
		case xIsM:
			return scale(xm, y.(*Scalar), false), nil
		default:
			return scale(ym, x.(*Scalar), false), nil
		}
	case DIV:
		if yIsM {
			return nil, Errorf(n.Y.Pos(), "cannot divide by %s: multiply by inv(...) instead", shapeWord(y))
		}
		s := y.(*Scalar)
		if s.Z == 0 {
			return nil, Errorf(n.Y.Pos(), "division by zero: the divisor is 0")
		}
		return scale(xm, s, true), nil
	}
	return nil, Errorf(n.P, "%s does not work on %s and %s", n.Op, shapeWord(x), shapeWord(y))
}

func scale(m *Matrix, s *Scalar, divide bool) *Matrix {
	out := NewMatrix(m.Rows, m.Cols)
	for i, e := range m.E {
		if divide {
			out.E[i] = Scalar{Z: e.Z / s.Z, Dim: e.Dim.Div(s.Dim), Kind: scaledKind(&e, s)}
		} else {
			out.E[i] = Scalar{Z: e.Z * s.Z, Dim: e.Dim.Mul(s.Dim), Kind: scaledKind(&e, s)}
		}
	}
	return out
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
			have := false
			for k := 0; k < a.Cols; k++ {
				x, y := a.At(i, k), b.At(k, j)
				sum += x.Z * y.Z
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
			out.Set(i, j, Scalar{Z: sum, Dim: d})
		}
	}
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

// luDecompose factors a copy of the n×n complex matrix a with partial
// pivoting. It returns the factors in place, the permutation sign and
// whether a pivot was zero (relative to the largest entry, 1e-14).
func luDecompose(a []complex128, n int) (perm []int, sign float64, singular bool) {
	perm = make([]int, n)
	for i := range perm {
		perm[i] = i
	}
	sign = 1
	var norm float64
	for _, z := range a {
		norm = math.Max(norm, cmplx.Abs(z))
	}
	for k := 0; k < n; k++ {
		p := k
		best := cmplx.Abs(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := cmplx.Abs(a[i*n+k]); v > best {
				p, best = i, v
			}
		}
		if best <= 1e-14*norm || best == 0 {
			return perm, sign, true
		}
		if p != k {
			for j := 0; j < n; j++ {
				a[k*n+j], a[p*n+j] = a[p*n+j], a[k*n+j]
			}
			perm[k], perm[p] = perm[p], perm[k]
			sign = -sign
		}
		for i := k + 1; i < n; i++ {
			f := a[i*n+k] / a[k*n+k]
			a[i*n+k] = f
			for j := k + 1; j < n; j++ {
				a[i*n+j] -= f * a[k*n+j]
			}
		}
	}
	return perm, sign, false
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
	perm, _, singular := luDecompose(a, n)
	if singular {
		return nil, fmt.Errorf("the matrix is singular: it has no inverse")
	}
	out := NewMatrix(n, n)
	col := make([]complex128, n)
	for j := 0; j < n; j++ {
		// solve A x = e_j: with P A = L U, x = U⁻¹ L⁻¹ P e_j
		for i := 0; i < n; i++ {
			if perm[i] == j {
				col[i] = 1
			} else {
				col[i] = 0
			}
		}
		for i := 0; i < n; i++ {
			for k := 0; k < i; k++ {
				col[i] -= a[i*n+k] * col[k]
			}
		}
		for i := n - 1; i >= 0; i-- {
			for k := i + 1; k < n; k++ {
				col[i] -= a[i*n+k] * col[k]
			}
			col[i] /= a[i*n+i]
		}
		for i := 0; i < n; i++ {
			// (A⁻¹)_ij has the dimension 1/(r_j·c_i)
			out.Set(i, j, Scalar{Z: col[i], Dim: Dim{}.Div(r[j].Mul(c[i]))})
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
	_, sign, singular := luDecompose(a, n)
	if singular {
		return &Scalar{Z: 0, Dim: d}, nil
	}
	z := complex(sign, 0)
	for i := 0; i < n; i++ {
		z *= a[i*n+i]
	}
	return &Scalar{Z: z, Dim: d}, nil
}

func matTranspose(args []Value) (Value, error) {
	m, err := oneMatrix(args, "a matrix or a vector")
	if err != nil {
		return nil, err
	}
	out := NewMatrix(m.Cols, m.Rows)
	for i := 0; i < m.Rows; i++ {
		for j := 0; j < m.Cols; j++ {
			out.Set(j, i, m.At(i, j))
		}
	}
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
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				if i == j {
					out.Set(i, j, m.E[i])
				} else {
					out.Set(i, j, Scalar{Dim: m.E[i].Dim})
				}
			}
		}
		return out, nil
	}
	if m.Rows != m.Cols {
		return nil, fmt.Errorf("needs a vector or a square matrix, not %s", shapeWord(m))
	}
	out := NewMatrix(m.Rows, 1)
	for i := 0; i < m.Rows; i++ {
		out.E[i] = m.At(i, i)
	}
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
