package expr

import (
	"fmt"
	"math"
)

// Rounding to a step (LANGUAGE.md section 3): round(x, step), ceil(x,
// step) and floor(x, step) give a multiple of step, which has the unit of
// x; without step, x must be a plain number and the result is a whole
// number. An x within RelTol (relative) of a multiple counts as that
// multiple, so that ceil(1.1 * 100 A, 10 A) is 110 A although 1.1 * 100
// is 110.00000000000001 in binary floating point. round rounds half away
// from zero. The result keeps the marks of x: the power kind of a real
// power, the angle mark, and the absolute-temperature mark (an absolute
// temperature is rounded on the Celsius scale, so that round(theta, 5 K)
// of 71.3 °C is 70 °C).

// RelTol is the relative tolerance at which two values count as one: a
// multiple of a rounding step, a key of a table (LANGUAGE.md sections 3
// and 9), the == of a check.
const RelTol = 1e-9

// roundMode is how a quotient that is not a whole number is rounded.
type roundMode int

const (
	roundHalfAway roundMode = iota
	roundUp
	roundDown
)

// roundQuotient rounds q = x/step to a whole number by mode, taking q as
// the whole number n when x is within RelTol of n·step (|q - n| <=
// RelTol·|q|).
func roundQuotient(q float64, mode roundMode) float64 {
	if n := math.Round(q); math.Abs(q-n) <= RelTol*math.Abs(q) {
		return n
	}
	switch mode {
	case roundUp:
		return math.Ceil(q)
	case roundDown:
		return math.Floor(q)
	}
	return math.Round(q) // half away from zero
}

func roundFn(mode roundMode) func([]Value) (Value, error) {
	return func(a []Value) (Value, error) {
		x, ok := a[0].(*Scalar)
		if !ok {
			return nil, fmt.Errorf("rounds a single value, not %s", Describe(a[0]))
		}
		if !x.IsReal() {
			return nil, fmt.Errorf("cannot round the complex value %s: round abs, re or im of it", Describe(x))
		}
		if len(a) == 1 {
			if !x.Dim.IsZero() || x.Angle {
				return nil, fmt.Errorf("%s has a unit: give the step in its unit, e.g. %s", Describe(x), stepExample(x))
			}
			r := *x
			r.Z = complex(roundQuotient(real(x.Z), mode), 0)
			r.Sense = 0
			return &r, nil
		}
		step, ok := a[1].(*Scalar)
		if !ok {
			return nil, fmt.Errorf("the step must be a single value, not %s", Describe(a[1]))
		}
		if step.AbsTemp {
			return nil, fmt.Errorf("the step %s is an absolute temperature: give the step as a difference in K, e.g. 5 K", Describe(step))
		}
		if step.Dim != x.Dim && !(x.Z == 0 && x.Dim.IsZero()) {
			return nil, fmt.Errorf("the step %s is %s, but %s is %s: give the step in the unit of the value, e.g. %s", Describe(step), dimWord(step.Dim), Describe(x), dimWord(x.Dim), stepExample(x))
		}
		if x.Dim == DimPower && x.IsReal() && x.Kind != PowerNone && step.Kind != PowerNone && step.Kind != x.Kind {
			return nil, fmt.Errorf("the step %s is %s power, but %s is %s power: give the step in %s", Describe(step), article(step.Kind), Describe(x), article(x.Kind), x.Kind.Unit())
		}
		if !step.IsReal() || !(real(step.Z) > 0) {
			return nil, fmt.Errorf("the step must be a positive real value, not %s", Describe(step))
		}
		s := real(step.Z)
		v := real(x.Z)
		if x.AbsTemp {
			v -= CelsiusZero // an absolute temperature is rounded in °C
		}
		n := roundQuotient(v/s, mode)
		z := n * s
		if x.AbsTemp {
			z += CelsiusZero
		}
		if math.IsInf(z, 0) || math.IsNaN(z) {
			return nil, fmt.Errorf("the result is not finite")
		}
		r := *x
		r.Z = complex(z, 0)
		r.Sense = 0
		return &r, nil
	}
}

// stepExample is a step written in the unit x is shown in: "5 A", "1°".
func stepExample(x *Scalar) string {
	if x.Angle {
		return "1°"
	}
	u, _ := DisplayUnit(x, nil, 4)
	if u == "" {
		return "1"
	}
	return "1 " + u
}
