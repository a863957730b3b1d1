package expr

import (
	"math"
	"math/cmplx"
)

// Value is the result of an expression: a *Scalar or a *Matrix. Callers
// switch on the concrete type; every value knows its shape.
type Value interface {
	// Shape is rows × columns: 1 × 1 for a scalar, n × 1 for a column vector.
	Shape() (rows, cols int)
	isValue()
}

// Scalar is one complex quantity: Z in coherent SI units and its
// dimension. Angle marks a dimensionless value that is a plane angle in
// radians (from an angle unit, arg, or an inverse trigonometric function),
// so that the sheet shows it in degrees. Sense is set on the value of
// powerfactor(S): it says how the sheet shows it ("0.9140 lagging"), never
// how it computes (powerfactor.go).
type Scalar struct {
	Z     complex128
	Dim   Dim
	Sense PFSense
	Angle bool
}

// Matrix is a rows × cols array of quantities, stored row by row. Each
// entry carries its own dimension. A column vector has Cols == 1.
type Matrix struct {
	Rows, Cols int
	E          []Scalar
	// Resid, when not nil, holds for each entry (row by row) a bound on
	// the magnitude of the rounding residue in it: the arithmetic that
	// produced the entry is exact to within Resid[i] in coherent SI units.
	// nil means every entry is exact (as written, or copied). The sheet
	// shows a part of an entry as 0 only when it is 0 or within this
	// bound (DisplayMatrix); see residue.go for how the bounds are kept.
	Resid []float64
}

func (*Scalar) isValue()                 {}
func (*Matrix) isValue()                 {}
func (*Scalar) Shape() (int, int)        { return 1, 1 }
func (m *Matrix) Shape() (int, int)      { return m.Rows, m.Cols }
func (m *Matrix) At(i, j int) Scalar     { return m.E[i*m.Cols+j] }
func (m *Matrix) Set(i, j int, s Scalar) { m.E[i*m.Cols+j] = s }

// NewMatrix returns a zero rows × cols matrix.
func NewMatrix(rows, cols int) *Matrix {
	return &Matrix{Rows: rows, Cols: cols, E: make([]Scalar, rows*cols)}
}

// Real returns a dimensionless real scalar.
func Real(x float64) *Scalar { return &Scalar{Z: complex(x, 0)} }

// Quantity returns a scalar z with dimension d.
func Quantity(z complex128, d Dim) *Scalar { return &Scalar{Z: z, Dim: d} }

// IsReal reports whether the imaginary part is negligible: zero, or at
// most 1e-12 of the magnitude (rounding in a chain of complex arithmetic).
func (s *Scalar) IsReal() bool { return isRealZ(s.Z) }

func isRealZ(z complex128) bool {
	im := math.Abs(imag(z))
	return im == 0 || im <= 1e-12*cmplx.Abs(z)
}

// canonZ replaces a negative zero in either part of z by +0. The engine's
// numbers are complex values, not signed zeros: -4 is the real number -4,
// so sqrt(-4) = j2, ln(-1) = jπ and arg(-1) = π (principal values, taken
// from above the branch cut on the negative real axis).
func canonZ(z complex128) complex128 {
	re, im := real(z), imag(z)
	if re == 0 {
		re = 0
	}
	if im == 0 {
		im = 0
	}
	return complex(re, im)
}

// IsFinite reports whether both parts are finite.
func (s *Scalar) IsFinite() bool {
	return !math.IsNaN(real(s.Z)) && !math.IsNaN(imag(s.Z)) && !math.IsInf(real(s.Z), 0) && !math.IsInf(imag(s.Z), 0)
}
