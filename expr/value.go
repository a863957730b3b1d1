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
// how it computes (powerfactor.go). AbsTemp marks an absolute temperature
// (a point on the scale, shown in °C) as against a temperature difference
// (shown in K): temperature.go.
type Scalar struct {
	Z       complex128
	Dim     Dim
	Sense   PFSense
	Angle   bool
	Kind    PowerKind // of a power (dimension of W): active, reactive, apparent or none
	AbsTemp bool
}

// PowerKind is the kind of a power, as IEEE Std 1459-2010 names them:
// active power P (W), reactive power Q (var) and apparent power S (VA).
// A complex power S = P + jQ is apparent. A power whose kind no rule
// fixes (a product such as sqrt(3)·V·I) has PowerNone.
type PowerKind uint8

// The power kinds.
const (
	PowerNone PowerKind = iota
	PowerActive
	PowerReactive
	PowerApparent
)

// Unit is the unit a power of kind k is shown in: W, var or VA ("W" for
// a power of no kind).
func (k PowerKind) Unit() string {
	switch k {
	case PowerReactive:
		return "var"
	case PowerApparent:
		return "VA"
	}
	return "W"
}

// String is the kind's word: "active", "reactive", "apparent" or "".
func (k PowerKind) String() string {
	switch k {
	case PowerActive:
		return "active"
	case PowerReactive:
		return "reactive"
	case PowerApparent:
		return "apparent"
	}
	return ""
}

// powerKindOfUnit is the kind a unit symbol (without prefix) names.
func powerKindOfUnit(sym string) PowerKind {
	switch sym {
	case "W":
		return PowerActive
	case "var":
		return PowerReactive
	case "VA":
		return PowerApparent
	}
	return PowerNone
}

// KindNotStated reports whether s is a real power of no kind: the sheet
// shows it in W with the words "kind not stated".
func (s *Scalar) KindNotStated() bool {
	return s.Dim == DimPower && s.Kind == PowerNone && s.IsReal()
}

// settleKind returns s with its power kind made consistent: no kind when
// s is not a power, apparent when it is a power that is not real (IEEE
// 1459: S = P + jQ). s itself is never changed (it may be a bound value).
func settleKind(s *Scalar) *Scalar {
	k := settledKind(s)
	if k == s.Kind {
		return s
	}
	c := *s
	c.Kind = k
	return &c
}

// settledKind is the power kind s settles to (settleKind).
func settledKind(s *Scalar) PowerKind {
	if s.Dim != DimPower {
		return PowerNone
	}
	if !s.IsReal() {
		return PowerApparent
	}
	return s.Kind
}

// settleKinds applies settleKind to a value, entry by entry for a matrix.
func settleKinds(v Value) Value {
	switch x := v.(type) {
	case *Scalar:
		return settleKind(x)
	case *Matrix:
		var out *Matrix
		for i := range x.E {
			if s := settleKind(&x.E[i]); s != &x.E[i] {
				if out == nil {
					out = &Matrix{Rows: x.Rows, Cols: x.Cols, E: append([]Scalar(nil), x.E...)}
				}
				out.E[i] = *s
			}
		}
		if out != nil {
			return out
		}
	}
	return v
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
