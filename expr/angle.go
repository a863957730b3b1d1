package expr

import (
	"fmt"
	"strings"
)

// The angle rule (LANGUAGE.md section 3). A value is an angle when it is
// a literal in °, deg or rad; the result of arg, atan2, or asin, acos or
// atan of a real; −a; a ± b of two angles; a·k or a/k with k a plain
// number that is not an angle; or a name, parameter or sweep variable
// that holds one. Scalar.Angle carries the mark: the unit sets it, the
// operators and functions pass it on by these rules and nothing else
// does. The operand right of ∠ and the second argument of polar must be
// angles, so that a bare number is never silently read as radians.

// isPlainFactor reports whether k may scale an angle: a plain number
// (no unit) that is not itself an angle.
func isPlainFactor(k *Scalar) bool { return k.Dim.IsZero() && !k.Angle }

// checkAngle returns the error for a value x, written as n, standing
// where an angle is required (what names the place, "the angle after ∠").
func checkAngle(n Node, x *Scalar, what string) error {
	if x.Angle {
		return nil
	}
	if !x.Dim.IsZero() {
		return Errorf(n.Pos(), "%s must be an angle (e.g. 30° or 0.5 rad), not %s", what, Describe(x))
	}
	text := nodeText(n)
	if isNumeric(n) && !hasUnit(n) {
		// "230 V∠-120": the number as written, with the two ways to say it
		return Errorf(n.Pos(), "the angle %s has no unit: write %s° (degrees) or %s rad", text, bracketed(n, text), bracketed(n, text))
	}
	inner := text
	if p, ok := n.(*Paren); ok {
		inner = nodeText(p.X)
	}
	return Errorf(n.Pos(), "%s, %s, is the plain number %s, not an angle (pi is not one either): write it with an angle unit, e.g. (%s) rad, or use a name that holds an angle", what, text, Describe(x), inner)
}

// bracketed puts the text of a compound operand in parentheses, so that
// a unit written after it applies to all of it: "(120 - 30)°".
func bracketed(n Node, text string) string {
	switch m := n.(type) {
	case *Number, *Paren:
		return text
	case *Unary:
		if _, ok := m.X.(*Number); ok {
			return text
		}
	}
	return "(" + text + ")"
}

// hasUnit reports whether a unit is written anywhere in n.
func hasUnit(n Node) bool {
	found := false
	Walk(n, func(n Node) bool {
		if _, ok := n.(*WithUnit); ok {
			found = true
		}
		return !found
	})
	return found
}

// nodeText writes an expression back in the document's notation, for
// error messages.
func nodeText(n Node) string {
	var b strings.Builder
	writeNode(&b, n)
	return b.String()
}

func writeNode(b *strings.Builder, n Node) {
	switch n := n.(type) {
	case *Number:
		b.WriteString(n.Text)
	case *Ident:
		b.WriteString(n.Name)
	case *Paren:
		b.WriteByte('(')
		writeNode(b, n.X)
		b.WriteByte(')')
	case *Abs:
		b.WriteByte('|')
		writeNode(b, n.X)
		b.WriteByte('|')
	case *CaseLit:
		b.WriteByte('{')
		for i, x := range n.X {
			if i > 0 {
				b.WriteString(", ")
			}
			b.WriteString(n.Names[i].Name + ": ")
			writeNode(b, x)
		}
		b.WriteByte('}')
	case *Unary:
		b.WriteString(n.Op.String())
		writeNode(b, n.X)
	case *WithUnit:
		writeNode(b, n.X)
		if n.Unit.Text != "°" {
			b.WriteByte(' ')
		}
		b.WriteString(n.Unit.Text)
	case *Binary:
		writeNode(b, n.X)
		switch n.Op {
		case POW:
			b.WriteString("^")
		case ANGLE:
			b.WriteString("∠")
		default:
			fmt.Fprintf(b, " %s ", n.Op)
		}
		writeNode(b, n.Y)
	case *Call:
		b.WriteString(n.Fun.Name)
		b.WriteByte('(')
		for i, a := range n.Args {
			if i > 0 {
				b.WriteString(", ")
			}
			writeNode(b, a)
		}
		b.WriteByte(')')
	default:
		b.WriteString("…")
	}
}
