package linalg

import (
	"math"
	"math/cmplx"
)

// The helpers below give float64 and complex128 the operations that Go's
// arithmetic operators do not share. Each is a type switch on a value that
// does not escape, so it costs no allocation; none is used in the O(n³)
// elimination loop.

func absT[T Scalar](x T) float64 {
	switch v := any(x).(type) {
	case float64:
		return math.Abs(v)
	case complex128:
		return cmplx.Abs(v)
	}
	panic("unreachable")
}

// maxPart is max(|Re x|, |Im x|).
func maxPart[T Scalar](x T) float64 {
	switch v := any(x).(type) {
	case float64:
		return math.Abs(v)
	case complex128:
		return math.Max(math.Abs(real(v)), math.Abs(imag(v)))
	}
	panic("unreachable")
}

func finiteT[T Scalar](x T) bool {
	switch v := any(x).(type) {
	case float64:
		return !math.IsInf(v, 0) && !math.IsNaN(v)
	case complex128:
		return !math.IsInf(real(v), 0) && !math.IsNaN(real(v)) && !math.IsInf(imag(v), 0) && !math.IsNaN(imag(v))
	}
	panic("unreachable")
}

// ldexpT is x·2^e, exact unless the result leaves the normal range.
func ldexpT[T Scalar](x T, e int) T {
	switch v := any(x).(type) {
	case float64:
		return any(math.Ldexp(v, e)).(T)
	case complex128:
		return any(complex(math.Ldexp(real(v), e), math.Ldexp(imag(v), e))).(T)
	}
	panic("unreachable")
}

func mulF[T Scalar](x T, s float64) T {
	switch v := any(x).(type) {
	case float64:
		return any(v * s).(T)
	case complex128:
		return any(complex(real(v)*s, imag(v)*s)).(T)
	}
	panic("unreachable")
}

func divF[T Scalar](x T, s float64) T {
	switch v := any(x).(type) {
	case float64:
		return any(v / s).(T)
	case complex128:
		return any(complex(real(v)/s, imag(v)/s)).(T)
	}
	panic("unreachable")
}

func fromF[T Scalar](s float64) T {
	var z T
	switch any(z).(type) {
	case float64:
		return any(s).(T)
	case complex128:
		return any(complex(s, 0)).(T)
	}
	panic("unreachable")
}

func conjT[T Scalar](x T) T {
	switch v := any(x).(type) {
	case complex128:
		return any(cmplx.Conj(v)).(T)
	}
	return x
}

func realT[T Scalar](x T) float64 {
	switch v := any(x).(type) {
	case float64:
		return v
	case complex128:
		return real(v)
	}
	panic("unreachable")
}

// signT is x/|x| (1 for x = 0): ±1 for a real x, a point of the unit circle
// for a complex one.
func signT[T Scalar](x T) T {
	a := absT(x)
	if a == 0 {
		return fromF[T](1)
	}
	return divF(x, a)
}
