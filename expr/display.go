package expr

import "fmt"

// Preferred holds a document's preferred display units (the front matter
// key units:, LANGUAGE.md section 1): at most one unit for each dimension
// and, for a power, each kind.
type Preferred struct {
	units []*Unit
}

// NewPreferred reads the list of preferred units. A symbol that is not a
// unit, a plain number or angle unit, or two units for one dimension and
// kind are errors; the error says which entry (by index) is at fault.
func NewPreferred(list []string) (*Preferred, int, error) {
	p := &Preferred{}
	for i, text := range list {
		u, err := ParseUnit(text)
		if err != nil {
			return nil, i, err
		}
		if u.Dim.IsZero() {
			return nil, i, fmt.Errorf("%q is not a unit of a physical quantity: a preferred unit needs a dimension (e.g. kA, kV, mΩ)", text)
		}
		if u.Dim == DimPower && u.Kind == PowerNone {
			return nil, i, fmt.Errorf("%q is a power unit of no kind: give W, var or VA with a prefix (e.g. kW, kvar, kVA)", text)
		}
		for _, q := range p.units {
			if q.Dim == u.Dim && q.Kind == u.Kind {
				what := dimWord(u.Dim)
				if u.Kind != PowerNone {
					what = "a " + u.Kind.String() + " power"
				}
				return nil, i, fmt.Errorf("%q and %q are both given for %s: give one unit for each dimension and kind", q.Text, u.Text, what)
			}
		}
		p.units = append(p.units, u)
	}
	return p, -1, nil
}

// For is the preferred unit of a value of dimension d and power kind k, or
// nil. A power of no kind is shown in W, so it takes the preferred unit of
// active power.
func (p *Preferred) For(d Dim, k PowerKind) *Unit {
	if p == nil {
		return nil
	}
	if d == DimPower && k == PowerNone {
		k = PowerActive
	}
	for _, u := range p.units {
		if u.Dim == d && u.Kind == k {
			return u
		}
	}
	return nil
}

// ChooseDisplay is the one decision of the unit a named value is shown in
// (LANGUAGE.md section 4), in this order: the unit its line names (the
// bracket); the unit the literal it is written as is written in; the
// document's preferred unit for its dimension and kind; else nil, the
// default unit of its dimension (a power by its kind) with an SI prefix
// (FormatScalar). The form a bracket asks for is kept.
func (e *Env) ChooseDisplay(v Value, bracket *Display, x Node) *Display {
	if bracket != nil && bracket.Unit != nil {
		return bracket
	}
	form := FormAuto
	if bracket != nil {
		form = bracket.Form
	}
	if u := LiteralUnit(x); u != nil {
		return e.display(u, form)
	}
	if s, ok := v.(*Scalar); ok {
		if u := e.Preferred.For(s.Dim, s.Kind); u != nil {
			return e.display(u, form)
		}
	}
	return bracket
}

// display is the Display of unit u in form, one for each pair in an
// environment: the statements written in one unit share it (a Display
// made here is never changed).
func (e *Env) display(u *Unit, form Form) *Display {
	m := e.memory()
	k := displayKey{u, form}
	if d := m.displays[k]; d != nil {
		return d
	}
	if m.displays == nil {
		m.displays = map[displayKey]*Display{}
	}
	d := &Display{Text: u.Text, Unit: u, Form: form}
	m.displays[k] = d
	return d
}

type displayKey struct {
	u    *Unit
	form Form
}

// bracketKind applies a display bracket to a power (IEEE 1459 kinds): on
// a computed real power a bracket in W, var or VA sets the kind; a bracket
// that relabels a bare name or literal of another kind is an error, and so
// is a complex power shown in W or var. It returns v, or a copy of v with
// the kind the bracket sets.
func bracketKind(v Value, x Node, d *Display) (Value, error) {
	s, ok := v.(*Scalar)
	if !ok || s == nil || d == nil || d.Unit == nil || d.Unit.Kind == PowerNone || s.Dim != DimPower {
		return v, nil
	}
	k := d.Unit.Kind
	if !s.IsReal() {
		if k != PowerApparent {
			return nil, Errorf(d.P, "%s is a complex power (apparent power, S = P + jQ) and cannot be shown in %s: show it in VA, or take re(...) for the active power in W or im(...) for the reactive power in var", Describe(s), d.Unit.Text)
		}
		return v, nil
	}
	if s.Kind == k {
		return v, nil
	}
	if s.Kind != PowerNone && isBare(x) {
		return nil, Errorf(d.P, "%s is %s power and cannot be relabelled as %s power by showing it in %s: a bracket sets the kind only of a computed power (show it in %s)", Describe(s), article(s.Kind), k, d.Unit.Text, s.Kind.Unit())
	}
	c := *s
	c.Kind = k
	return &c, nil
}

// BracketKind is bracketKind for the blocks outside the calc engine (a
// sweep line, a solve unknown): v with the kind a display bracket in W,
// var or VA sets, or the error of a bracket that may not set it.
func BracketKind(v Value, x Node, d *Display) (Value, error) { return bracketKind(v, x, d) }

func article(k PowerKind) string {
	if k == PowerActive || k == PowerApparent {
		return "an " + k.String()
	}
	return "a " + k.String()
}

// isBare reports whether x is a bare name or a literal (in parentheses or
// with a sign at most).
func isBare(x Node) bool {
	switch n := x.(type) {
	case *Paren:
		return isBare(n.X)
	case *Unary:
		return isBare(n.X)
	case *Ident:
		return true
	}
	return isNumeric(x)
}
