package expr

import (
	"fmt"
	"math"
)

// PFSense is the sense of a power factor, the value powerfactor(S) gives
// (LANGUAGE.md section 3). It is display metadata only: the value itself is
// an ordinary plain real number, and arithmetic on it gives values with no
// sense. The zero PFSense marks a value that is not a power factor.
//
// The four-quadrant convention of IEEE Std 1459-2010 (S = P + jQ): the
// power factor is lagging when P·Q > 0 (quadrants I and III) and leading
// when P·Q < 0 (quadrants II and IV); with Q = 0 it has no sense word; and
// when P < 0 (active power sent out, quadrants II and III) the word
// "export" is added.
type PFSense uint8

// The bits of a PFSense. A power factor has exactly one of PFInPhase,
// PFLagging and PFLeading, and PFExport when P < 0.
const (
	PFInPhase PFSense = 1 << iota // Q = 0: no sense word
	PFLagging                     // P·Q > 0
	PFLeading                     // P·Q < 0
	PFExport                      // P < 0
)

// IsPF reports whether the value carrying s is a power factor.
func (s PFSense) IsPF() bool { return s != 0 }

// Word is "lagging", "leading" or "" (no sense: Q = 0, or not a power
// factor).
func (s PFSense) Word() string {
	switch {
	case s&PFLagging != 0:
		return "lagging"
	case s&PFLeading != 0:
		return "leading"
	}
	return ""
}

// Export reports whether the power factor is of active power sent out
// (P < 0).
func (s PFSense) Export() bool { return s&PFExport != 0 }

// String is what the sheet writes after the number: "lagging",
// "leading", "lagging, export", "export" (Q = 0, P < 0) or "".
func (s PFSense) String() string {
	w := s.Word()
	if s.Export() {
		if w != "" {
			return w + ", export"
		}
		return "export"
	}
	return w
}

// PowerFactor returns the power factor |P|/|S| of the complex power
// s = P + jQ (IEEE Std 1459-2010, the power factor as the ratio of active
// to apparent power) and its sense. A reactive part at most 1e-12 of |S|
// is rounding residue and counts as Q = 0 (the same rule as a value shown
// as real). With P = 0 (a purely reactive power) the power factor is 0
// and its sense is taken as for a consumed power (P = +0): Q > 0 lagging,
// Q < 0 leading, as a reactor is said to run at "zero power factor
// lagging" (common practice). s must not be zero.
func PowerFactor(s complex128) (float64, PFSense) {
	p, q := real(s), imag(s)
	mag := math.Hypot(p, q)
	pf := math.Abs(p) / mag
	var sense PFSense
	switch {
	case q == 0 || math.Abs(q) <= 1e-12*mag:
		sense, pf = PFInPhase, 1
	case p >= 0 && q > 0 || p < 0 && q < 0:
		sense = PFLagging
	default:
		sense = PFLeading
	}
	if p < 0 {
		sense |= PFExport
	}
	return pf, sense
}

// powerFactorFn is the built-in powerfactor(S).
func powerFactorFn(a []Value) (Value, error) {
	s, err := oneScalar(a)
	if err != nil {
		return nil, err
	}
	if s.Dim != DimPower {
		return nil, fmt.Errorf("needs a power (W, var or VA; a complex power S = P + jQ), not %s", Describe(s))
	}
	if s.Z == 0 {
		return nil, fmt.Errorf("the power factor of zero power is undefined (P = Q = 0)")
	}
	pf, sense := PowerFactor(s.Z)
	return &Scalar{Z: complex(pf, 0), Sense: sense}, nil
}

// WithoutSense returns v without the sense of a power factor: a copy
// when v is a power factor, else v itself.
func WithoutSense(v Value) Value {
	if s, ok := v.(*Scalar); ok && s.Sense != 0 {
		t := *s
		t.Sense = 0
		return &t
	}
	return v
}

// Suffix is what follows the number of a power factor in text: " lagging",
// " leading, export", ... or "".
func (s PFSense) Suffix() string {
	if w := s.String(); w != "" {
		return " " + w
	}
	return ""
}
