package solve

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
)

// Entry is one non-zero coefficient of a row of the affine model: A_ik
// at column Col.
type Entry struct {
	Col int
	V   float64
}

// linearizeBlocks is linearize for a problem with Blocks (see Linearize).
func (e *evaluator) linearizeBlocks() (lin *Linear, ok bool, err error) {
	n, m := e.n, e.p.M
	bl := e.p.Blocks
	x0 := e.x0
	r0 := make([]float64, m)
	if err := e.evalBlocks(x0, r0); err != nil {
		return nil, false, err
	}
	colBlocks := make([][]int, n)
	for b, cols := range bl.Cols {
		for _, k := range cols {
			colBlocks[k] = append(colBlocks[k], b)
		}
	}

	rows := make([][]Entry, m)
	x := append([]float64(nil), x0...)
	r := make([]float64, m)
	for k := 0; k < n; k++ {
		h := math.Max(e.scale[k], math.Abs(x0[k])*0x1p-26)
		x[k] = x0[k] + h
		h = x[k] - x0[k]
		for _, b := range colBlocks[k] {
			if err := e.evalBlock(b, x, r); err != nil {
				return nil, false, nil
			}
			for _, i := range bl.Rows[b] {
				if v := (r[i] - r0[i]) / h; v != 0 {
					rows[i] = append(rows[i], Entry{Col: k, V: v})
				}
			}
		}
		x[k] = x0[k]
	}

	b := make([]float64, m)
	for i := 0; i < m; i++ {
		s := 0.0
		for _, t := range rows[i] {
			s += t.V * x0[t.Col]
		}
		b[i] = s - r0[i]
	}

	// the probes: the same points as the dense construction, every block
	// evaluated at each
	rng := rand.New(rand.NewPCG(probeSeed1, probeSeed2))
	d := make([]float64, n)
	maxDev := 0.0
	for j := 0; j < LinearProbes; j++ {
		probePoint(rng, j == 0, x0, e.scale, x, d)
		if err := e.evalBlocks(x, r); err != nil {
			return nil, false, nil
		}
		for i := 0; i < m; i++ {
			pred, size := r0[i], e.rscale[i]+math.Abs(r0[i])
			for _, t := range rows[i] {
				v := t.V * d[t.Col]
				pred += v
				size += math.Abs(v)
			}
			dev := math.Abs(r[i]-pred) / size
			if !(dev <= LinearTol) {
				return nil, false, nil
			}
			maxDev = math.Max(maxDev, dev)
		}
	}

	return &Linear{
		N: n, M: m, Rows: rows, B: b,
		XScale:       append([]float64(nil), e.scale...),
		RScale:       append([]float64(nil), e.rscale...),
		Complex:      append([]int(nil), e.p.Complex...),
		ComplexRows:  append([]int(nil), e.p.ComplexRows...),
		MaxDeviation: maxDev,
	}, true, nil
}

// Dims returns the number of rows and columns of A.
func (lin *Linear) Dims() (m, n int) {
	if lin.A != nil {
		return lin.A.Dims()
	}
	m, n = lin.M, lin.N
	if m == 0 {
		m = len(lin.Rows)
	}
	return m, n
}

// Dense returns A as a dense matrix: A itself, or one built from Rows (and
// kept in A).
func (lin *Linear) Dense() *mat.Dense {
	if lin.A != nil || lin.Rows == nil {
		return lin.A
	}
	m, n := lin.Dims()
	if m == 0 || n == 0 {
		return nil
	}
	a := mat.NewDense(m, n, nil)
	raw := a.RawMatrix()
	for i, row := range lin.Rows {
		for _, t := range row {
			raw.Data[i*raw.Stride+t.Col] = t.V
		}
	}
	lin.A = a
	return a
}

// RowEntries returns the non-zero entries of row i of A, by column.
func (lin *Linear) RowEntries(i int) []Entry {
	if lin.Rows != nil {
		return lin.Rows[i]
	}
	row := lin.A.RawRowView(i)
	var out []Entry
	for k, v := range row {
		if v != 0 {
			out = append(out, Entry{Col: k, V: v})
		}
	}
	return out
}

// NNZ is the number of non-zero entries of A.
func (lin *Linear) NNZ() int {
	m, _ := lin.Dims()
	nnz := 0
	for i := 0; i < m; i++ {
		if lin.Rows != nil {
			nnz += len(lin.Rows[i])
			continue
		}
		for _, v := range lin.A.RawRowView(i) {
			if v != 0 {
				nnz++
			}
		}
	}
	return nnz
}
