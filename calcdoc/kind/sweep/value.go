package sweep

import (
	"math/cmplx"

	"calcdoc/expr"
)

// At returns the line's value at point i as a scalar, with the sense of a
// power factor where it has one; nil at a gap.
func (l *SweepLine) At(i int) *expr.Scalar {
	z := l.Z[i]
	if cmplx.IsNaN(z) {
		return nil
	}
	s := &expr.Scalar{Z: z, Dim: l.Dim, Angle: l.Angle, Kind: l.Kind, AbsTemp: l.AbsTemp}
	if l.Sense != nil {
		s.Sense = l.Sense[i]
	}
	return s
}

// setSense records the sense of the power factor at point i.
func (l *SweepLine) setSense(i int, s expr.PFSense) {
	if l.Sense == nil {
		l.Sense = make([]expr.PFSense, len(l.Z))
	}
	l.Sense[i] = s
}
