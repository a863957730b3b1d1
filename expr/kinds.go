package expr

import "math/cmplx"

// The power kinds through the operations (IEEE Std 1459-2010; LANGUAGE.md
// section 4). Any power that is not real is apparent (settleKind); the
// rules here say what a real result keeps.

// absKind is the kind of |s|: a real power keeps its kind, the magnitude of
// a complex power is the apparent power S = |P + jQ|.
func absKind(s *Scalar) PowerKind {
	if s.Dim != DimPower {
		return PowerNone
	}
	if s.IsReal() {
		return s.Kind
	}
	return PowerApparent
}

// reKind is the kind of re(s): the real part of a complex power is the
// active power P; a real power keeps its kind.
func reKind(s *Scalar) PowerKind {
	if s.Dim != DimPower {
		return PowerNone
	}
	if s.IsReal() {
		return s.Kind
	}
	return PowerActive
}

// imKind is the kind of im(s): the imaginary part of a complex power is the
// reactive power Q. Of a real power it is no kind (any other operation).
func imKind(s *Scalar) PowerKind {
	if s.Dim != DimPower || s.IsReal() {
		return PowerNone
	}
	return PowerReactive
}

// scaledKind is the kind of p scaled by f (p·f, f·p or p/f): a real power
// scaled by a real plain number keeps its kind.
func scaledKind(p, f *Scalar) PowerKind {
	if p.Dim != DimPower || !f.Dim.IsZero() || f.Angle || !f.IsReal() || !p.IsReal() {
		return PowerNone
	}
	return p.Kind
}

// sumKind is the kind of x ± y: two real powers keep their common kind; two
// different known kinds are an error (an active and a reactive power make
// a complex power, P + jQ, not a sum).
func sumKind(n *Binary, x, y *Scalar) (PowerKind, error) {
	if x.Dim != DimPower || y.Dim != DimPower || !x.IsReal() || !y.IsReal() {
		return PowerNone, nil
	}
	if x.Kind == y.Kind {
		return x.Kind, nil
	}
	if x.Kind != PowerNone && y.Kind != PowerNone {
		return PowerNone, Errorf(n.OpPos, "cannot %s %s (%s power) and %s (%s power): powers of different kinds do not add; for a complex power write P + j*Q", opName(n.Op), Describe(x), x.Kind, Describe(y), y.Kind)
	}
	return PowerNone, nil
}

// reScalar, imScalar and absScalar are re, im and abs of one entry, with
// the power kind each gives.
func reScalar(s Scalar) Scalar {
	return Scalar{Z: complex(real(s.Z), 0), Dim: s.Dim, Kind: reKind(&s)}
}

func imScalar(s Scalar) Scalar {
	return Scalar{Z: complex(imag(s.Z), 0), Dim: s.Dim, Kind: imKind(&s)}
}

func absScalar(s Scalar) Scalar {
	return Scalar{Z: complex(cmplx.Abs(s.Z), 0), Dim: s.Dim, Kind: absKind(&s)}
}
