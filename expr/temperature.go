package expr

import "fmt"

// Temperatures (LANGUAGE.md section 4). °C (ASCII degC) is a unit of
// temperature with an offset: 70 °C is 343.15 K. Scalar.AbsTemp marks an
// absolute temperature, a point on the temperature scale; a temperature
// without the mark is a difference. The rules, like the power kinds'
// (kinds.go), say what each operation gives:
//
//   - a °C literal is absolute; a K literal is a difference;
//   - absolute ± difference, and difference + absolute, are absolute;
//   - absolute − absolute is a difference;
//   - absolute + absolute, difference − absolute and −absolute are errors;
//   - in a product, quotient, power, parallel combination or function an
//     absolute temperature enters as its value in K, and the result has
//     no mark (the trace then holds it without the mark, so that its
//     substitution on the sheet shows it in K: alpha_0 * theta cannot pass
//     for a Celsius formula unnoticed); round, ceil, floor, min and max of
//     absolute temperatures keep the mark.
//
// An absolute temperature is shown in °C, a difference in K; showing a
// difference in °C is an error (CheckDisplay).

// CelsiusZero is 0 °C in kelvins (SI Brochure, 9th edition, 2.3.1: t/°C
// = T/K − 273.15).
const CelsiusZero = 273.15

// sumTemp is the absolute-temperature mark of x ± y, or the error of a
// sum the rules refuse. op is ADD or SUB; at is where the operator is.
func sumTemp(op Kind, at Pos, x, y *Scalar) (bool, error) {
	if !x.AbsTemp && !y.AbsTemp {
		return false, nil
	}
	switch {
	case op == ADD && x.AbsTemp && y.AbsTemp:
		return false, Errorf(at, "cannot add two absolute temperatures (%s and %s): add a difference in K to a temperature, e.g. theta + 10 K", Describe(x), Describe(y))
	case op == SUB && x.AbsTemp && y.AbsTemp:
		return false, nil // a difference
	case op == SUB && y.AbsTemp:
		return false, Errorf(at, "cannot subtract the absolute temperature %s from the difference %s: subtract a difference from a temperature (theta - 10 K), or two temperatures from each other (theta_1 - theta_2)", Describe(y), Describe(x))
	}
	return true, nil
}

// negTemp is the error of −x for an absolute temperature x.
func negTemp(at Pos, x Value) error {
	return Errorf(at, "cannot negate the absolute temperature %s: negate a difference, e.g. -(theta_1 - theta_2), or write a negative temperature as -20 °C", Describe(x))
}

// withoutTemp returns v with the absolute-temperature mark taken off, as
// it enters a product, quotient, power or function: its value in K.
func withoutTemp(v Value) Value {
	switch x := v.(type) {
	case *Scalar:
		if x.AbsTemp {
			c := *x
			c.AbsTemp = false
			return &c
		}
	case *Matrix:
		for i := range x.E {
			if x.E[i].AbsTemp {
				out := &Matrix{Rows: x.Rows, Cols: x.Cols, E: append([]Scalar(nil), x.E...), Resid: x.Resid}
				for j := range out.E {
					out.E[j].AbsTemp = false
				}
				return out
			}
		}
	}
	return v
}

// hasTemp reports whether v is, or holds, an absolute temperature.
func hasTemp(v Value) bool {
	switch x := v.(type) {
	case *Scalar:
		return x.AbsTemp
	case *Matrix:
		for i := range x.E {
			if x.E[i].AbsTemp {
				return true
			}
		}
	}
	return false
}

// inKelvin records that the value of operand n entered a product,
// quotient, power or function as its value in K: the trace's entry for n
// (a name, or an entry picked from a matrix, in parentheses or not) loses
// the absolute-temperature mark, so that the sheet substitutes it in K.
func (ev *evaluator) inKelvin(n Node, v val) val {
	if !v.hasTemp() {
		return v
	}
	for {
		p, ok := n.(*Paren)
		if !ok {
			break
		}
		n = p.X
	}
	k := v.withoutTemp()
	if ev.trace != nil {
		for i := len(ev.trace.entries) - 1; i >= 0; i-- {
			if ev.trace.entries[i].n == n {
				ev.trace.entries[i].v = k.value()
				break
			}
		}
	}
	return k
}

// offsetScalar is the single value s written in n's unit with an offset
// (°C): s must be a real plain number; the result is an absolute
// temperature. neg is set for "-20 °C", read as (-20) °C.
func offsetScalar(n *WithUnit, s Scalar, neg bool) (Scalar, error) {
	if !s.Dim.IsZero() || s.Angle || !isRealZ(s.Z) {
		return Scalar{}, Errorf(n.UPos, "%s is a temperature scale: it follows a real plain number (70 %s), not %s", n.Unit.Text, n.Unit.Text, describeScalar(s))
	}
	v := real(s.Z)
	if neg {
		v = -v
	}
	t := v*n.Unit.Scale + n.Unit.Offset
	if t < 0 {
		return Scalar{}, Errorf(n.UPos, "%s %s is below absolute zero (%.2f %s)", fmtNum(v, 6), n.Unit.Text, -n.Unit.Offset/n.Unit.Scale, n.Unit.Text)
	}
	return Scalar{Z: complex(t, 0), Dim: n.Unit.Dim, AbsTemp: true}, nil
}

// withOffsetUnit is x written in a unit with an offset (°C): x must be a
// real plain number (or a matrix of them); the result is an absolute
// temperature. neg is set for "-20 °C", read as (-20) °C.
func (ev *evaluator) withOffsetUnit(n *WithUnit, x val, neg bool) (val, error) {
	if x.m == nil {
		s, err := offsetScalar(n, x.s, neg)
		return val{s: s}, err
	}
	out := NewMatrix(x.m.Rows, x.m.Cols)
	for i, e := range x.m.E {
		r, err := offsetScalar(n, e, neg)
		if err != nil {
			return val{}, err
		}
		out.E[i] = r
	}
	return val{m: out}, nil
}

// checkTempDisplay is the error of showing s in u: a temperature
// difference cannot be shown in °C.
func checkTempDisplay(s *Scalar, u *Unit) error {
	if u.Offset != 0 && !s.AbsTemp && s.Dim == u.Dim {
		return fmt.Errorf("%s is a temperature difference and cannot be shown in %s (a point on the scale): show it in K", Describe(s), u.Text)
	}
	return nil
}

// keepsTemp names the built-in functions whose result keeps the
// absolute-temperature mark of their arguments.
var keepsTemp = map[string]bool{"round": true, "ceil": true, "floor": true, "min": true, "max": true}

// compareTemp is the error of comparing an absolute temperature with a
// temperature difference (theta <= 363 K): compare two temperatures, or
// two differences.
func compareTemp(at Pos, a, b *Scalar) error {
	if a.AbsTemp == b.AbsTemp || a.Dim != DimTemperature || b.Dim != DimTemperature {
		return nil
	}
	t, d := a, b
	if b.AbsTemp {
		t, d = b, a
	}
	return Errorf(at, "cannot compare the absolute temperature %s with the temperature difference %s: write the limit in °C (e.g. 90 °C), or compare differences (theta - 20 °C <= 50 K)", Describe(t), Describe(d))
}
