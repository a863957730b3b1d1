package expr

import (
	"fmt"
	"math"
	"math/cmplx"
)

type builtin struct {
	min, max int // argument count; max < 0: any number
	fn       func(args []Value) (Value, error)
	// one, when not nil, is the function of one single value, the same
	// as fn of that value alone: the evaluator calls it with the value
	// held inline, with no argument list and no box (val.go)
	one func(s Scalar) (Scalar, error)
}

var builtins map[string]builtin

func init() {
	builtins = map[string]builtin{
		// re, abs and conj do not pass the angle mark on: only the
		// operations of the angle rule do (LANGUAGE.md section 3)
		"re":   each(reScalar),
		"im":   each(imScalar),
		"abs":  each(absScalar),
		"conj": each(func(s Scalar) Scalar { return Scalar{Z: canonZ(cmplx.Conj(s.Z)), Dim: s.Dim} }),
		"arg": single(func(s Scalar) (Scalar, error) {
			if s.Z == 0 {
				return Scalar{}, fmt.Errorf("the angle of zero is undefined")
			}
			return Scalar{Z: complex(cmplx.Phase(canonZ(s.Z)), 0), Angle: true}, nil
		}),
		"sqrt": single(func(s Scalar) (Scalar, error) {
			var d Dim
			for i, e := range s.Dim {
				if e%2 != 0 {
					return Scalar{}, fmt.Errorf("the square root of %s has no unit (the exponents of %s are not all even)", dimWord(s.Dim), s.Dim.SI())
				}
				d[i] = e / 2
			}
			if imag(s.Z) == 0 && real(s.Z) >= 0 {
				return Scalar{Z: complex(math.Sqrt(real(s.Z)), 0), Dim: d}, nil
			}
			return Scalar{Z: cmplx.Sqrt(canonZ(s.Z)), Dim: d}, nil
		}),
		"exp":   single(nonZero(plain(cmplx.Exp, false))),
		"ln":    single(plainChecked(cmplx.Log, "the logarithm of zero is -∞")),
		"log10": single(plainChecked(cmplx.Log10, "the logarithm of zero is -∞")),
		"sin":   single(plain(cmplx.Sin, false)),
		"cos":   single(plain(cmplx.Cos, false)),
		"tan":   single(plain(cmplx.Tan, false)),
		"asin":  single(plain(cmplx.Asin, true)),
		"acos":  single(plain(cmplx.Acos, true)),
		"atan":  single(plain(cmplx.Atan, true)),
		"sinh":  single(plain(cmplx.Sinh, false)),
		"cosh":  single(plain(cmplx.Cosh, false)),
		"tanh":  single(plain(cmplx.Tanh, false)),
		"atan2": {2, 2, func(a []Value) (Value, error) {
			y, x, err := twoScalars(a)
			if err != nil {
				return nil, err
			}
			if !sameDim(y, x) {
				return nil, fmt.Errorf("both arguments need the same unit (%s and %s)", dimWord(y.Dim), dimWord(x.Dim))
			}
			if !y.IsReal() || !x.IsReal() {
				return nil, fmt.Errorf("both arguments must be real")
			}
			return &Scalar{Z: complex(math.Atan2(real(y.Z), real(x.Z)), 0), Angle: true}, nil
		}, nil},
		"polar": {2, 2, func(a []Value) (Value, error) {
			m, ang, err := twoScalars(a)
			if err != nil {
				return nil, err
			}
			if !ang.Dim.IsZero() || !ang.IsReal() {
				return nil, fmt.Errorf("the second argument must be a real angle (e.g. 30° or 0.5 rad), not %s", Describe(ang))
			}
			if !m.IsReal() {
				return nil, fmt.Errorf("the magnitude must be real, not %s (use abs() for a magnitude)", Describe(m))
			}
			return &Scalar{Z: complex(real(m.Z), 0) * cmplx.Rect(1, real(ang.Z)), Dim: m.Dim}, nil
		}, nil},
		"min": {1, -1, minMax(false), nil},
		"max": {1, -1, minMax(true), nil},
		// vectors and matrices
		"inv":       {1, 1, matInv, nil},
		"det":       {1, 1, matDet, nil},
		"transpose": {1, 1, matTranspose, nil},
		"diag":      {1, 1, matDiag, nil},
		"seq":       {1, 3, seqFn, nil},
		"abc":       {1, 3, abcFn, nil},
		// power
		"powerfactor": {1, 1, powerFactorFn, nil},
		// rounding to a step (rounding.go)
		"round": {1, 2, roundFn(roundHalfAway), nil},
		"ceil":  {1, 2, roundFn(roundUp), nil},
		"floor": {1, 2, roundFn(roundDown), nil},
		// look-ups in tables of data (tables.go)
		"interp": {2, 2, noTableCall("interp"), nil},
		"up":     {2, 2, noTableCall("up"), nil},
		"down":   {2, 2, noTableCall("down"), nil},
	}
}

func sameDim(a, b *Scalar) bool {
	return a.Dim == b.Dim || isPlainZero(a) || isPlainZero(b)
}

// isPlainZero reports whether s is a dimensionless exact zero, which matches
// any unit in a sum or a comparison ("check I > 0").
func isPlainZero(s *Scalar) bool { return s.Z == 0 && s.Dim.IsZero() }

func oneScalar(a []Value) (*Scalar, error) {
	s, ok := a[0].(*Scalar)
	if !ok {
		return nil, fmt.Errorf("needs a single value, not %s", Describe(a[0]))
	}
	return s, nil
}

func twoScalars(a []Value) (*Scalar, *Scalar, error) {
	x, ok1 := a[0].(*Scalar)
	y, ok2 := a[1].(*Scalar)
	if !ok1 || !ok2 {
		return nil, nil, fmt.Errorf("needs single values, not vectors or matrices")
	}
	return x, y, nil
}

func scalarFn(f func(Scalar) (Scalar, error)) func([]Value) (Value, error) {
	return func(a []Value) (Value, error) {
		s, err := oneScalar(a)
		if err != nil {
			return nil, err
		}
		r, err := f(*s)
		if err != nil {
			return nil, err
		}
		return &r, nil
	}
}

// single is a built-in of one single value (a matrix is refused).
func single(f func(Scalar) (Scalar, error)) builtin {
	return builtin{1, 1, scalarFn(f), f}
}

// each is a built-in of one value applied entry by entry to a matrix.
func each(f func(Scalar) Scalar) builtin {
	return builtin{1, 1, elementwise(f), func(s Scalar) (Scalar, error) { return f(s), nil }}
}

func elementwise(f func(Scalar) Scalar) func([]Value) (Value, error) {
	return func(a []Value) (Value, error) {
		switch x := a[0].(type) {
		case *Scalar:
			r := f(*x)
			return &r, nil
		case *Matrix:
			out := NewMatrix(x.Rows, x.Cols)
			// re, im, abs and conj of an entry add no residue to it
			out.Resid = x.Resid
			for i, e := range x.E {
				out.E[i] = f(e)
			}
			return out, nil
		}
		return nil, fmt.Errorf("bad argument")
	}
}

// plain wraps a complex function of a dimensionless argument. angle marks
// the inverse trigonometric functions, whose results for a real argument
// (within their domain, so that the result is real too) are angles.
func plain(f func(complex128) complex128, angle bool) func(Scalar) (Scalar, error) {
	return func(s Scalar) (Scalar, error) {
		if !s.Dim.IsZero() {
			return Scalar{}, fmt.Errorf("needs a plain number or an angle, not %s (divide by a unit first, e.g. x / (1 V))", describeScalar(s))
		}
		z := f(canonZ(s.Z))
		if cmplx.IsNaN(z) || cmplx.IsInf(z) {
			return Scalar{}, fmt.Errorf("the result is not finite for %s", describeScalar(s))
		}
		r := Scalar{Z: z}
		r.Angle = angle && isRealZ(s.Z) && isRealZ(r.Z)
		return r, nil
	}
}

// nonZero wraps a function whose true value is never zero (exp): a zero
// result is underflow (LANGUAGE.md section 4), not a value.
func nonZero(f func(Scalar) (Scalar, error)) func(Scalar) (Scalar, error) {
	return func(s Scalar) (Scalar, error) {
		r, err := f(s)
		if err == nil && r.Z == 0 {
			return Scalar{}, fmt.Errorf("the result underflows: it is not zero, but below %.2g, the smallest number calcdoc can hold", math.SmallestNonzeroFloat64)
		}
		return r, err
	}
}

func plainChecked(f func(complex128) complex128, zeroMsg string) func(Scalar) (Scalar, error) {
	g := plain(f, false)
	return func(s Scalar) (Scalar, error) {
		if s.Z == 0 && s.Dim.IsZero() {
			return Scalar{}, fmt.Errorf("%s", zeroMsg)
		}
		return g(s)
	}
}

func minMax(isMax bool) func([]Value) (Value, error) {
	return func(a []Value) (Value, error) {
		var vals []*Scalar
		for _, v := range a {
			switch x := v.(type) {
			case *Scalar:
				vals = append(vals, x)
			case *Matrix:
				for i := range x.E {
					vals = append(vals, &x.E[i])
				}
			}
		}
		var best *Scalar
		for _, s := range vals {
			if s.AbsTemp != vals[0].AbsTemp && s.Dim == vals[0].Dim {
				return nil, fmt.Errorf("cannot compare the absolute temperature and the temperature difference among the arguments: give all as temperatures (°C) or all as differences (K)")
			}
			if !s.IsReal() {
				return nil, fmt.Errorf("cannot order complex values such as %s: compare abs, re or im", Describe(s))
			}
			if best == nil {
				best = s
				continue
			}
			if !sameDim(best, s) {
				return nil, fmt.Errorf("all arguments need the same unit (%s and %s)", dimWord(best.Dim), dimWord(s.Dim))
			}
			if (isMax && real(s.Z) > real(best.Z)) || (!isMax && real(s.Z) < real(best.Z)) {
				best = s
			}
		}
		r := *best
		r.Z = complex(real(r.Z), 0)
		r.Kind = PowerNone // not among the operations that keep a power's kind
		r.Angle = false    // not an operation of the angle rule
		// the mark of absolute temperatures is kept (temperature.go)
		return &r, nil
	}
}
