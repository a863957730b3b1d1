package data

import (
	"fmt"
	"strings"

	"calcdoc/expr"
)

// LookupText says in one line what a look-up of the table took, for the
// sheet's row under the statement: the table, the key and the row (for
// an interpolation both rows), counting rows from 1 as the sheet's table
// shows them, with values in the columns' units to digits significant
// figures:
//
//	cu: S = 95 mm² → R_20 = 0.193 Ω/km (row 12)
func (t *Table) LookupText(l expr.Lookup, digits int) string {
	return unitSigns.Replace(t.lookupText(l, digits))
}

// unitSigns writes units as the sheet does (render/markup.UnitText):
// "mm^2" as "mm²", "K^-1" as "K⁻¹", "*" as "·". Names and numbers hold
// neither ^ nor *.
var unitSigns = strings.NewReplacer("^2", "²", "^3", "³", "^-1", "⁻¹", "^-2", "⁻²", "^-3", "⁻³", "*", "·")

func (t *Table) lookupText(l expr.Lookup, digits int) string {
	key := t.Cols[0]
	switch l.Func {
	case "col":
		if len(l.Rows) != 1 {
			break
		}
		i := l.Rows[0]
		j, err := t.Col(l.Col)
		if err != nil {
			break
		}
		return fmt.Sprintf("%s: %s = %s → %s = %s (row %d)", shownName(t.Name), shownName(key.Name), t.keyText(i), shownName(t.Cols[j].Name), t.cellText(i, j), i+1)
	case "interp":
		if len(l.Rows) != 2 {
			break
		}
		j, err := t.Col(l.Col)
		if err != nil {
			break
		}
		a, b := l.Rows[0], l.Rows[1]
		return fmt.Sprintf("%s: %s = %s, between rows %d (%s = %s, %s = %s) and %d (%s = %s, %s = %s) → %s = %s (linear)",
			shownName(t.Name), shownName(key.Name), key.format(l.X, digits),
			a+1, shownName(key.Name), t.keyText(a), shownName(t.Cols[j].Name), t.cellText(a, j),
			b+1, shownName(key.Name), t.keyText(b), shownName(t.Cols[j].Name), t.cellText(b, j),
			shownName(t.Cols[j].Name), t.Cols[j].format(l.Value, digits))
	case "up", "down":
		if len(l.Rows) != 1 {
			break
		}
		i := l.Rows[0]
		dir := "at or above"
		if l.Func == "down" {
			dir = "at or below"
		}
		return fmt.Sprintf("%s: the first %s %s %s → %s = %s (row %d)", shownName(t.Name), shownName(key.Name), dir, key.format(l.X, digits), shownName(key.Name), t.keyText(i), i+1)
	}
	return shownName(t.Name) + ": " + l.Func
}

// cellText is the cell of row i, column j as written, with its unit.
func (t *Table) cellText(i, j int) string {
	c := t.Rows[i].Cells[j]
	if c.Gap {
		return "(gap)"
	}
	return c.Text + t.Cols[j].unitText()
}

// format shows v in the column's unit to digits significant figures.
func (c Column) format(v *expr.Scalar, digits int) string {
	if v == nil {
		return "—"
	}
	var d *expr.Display
	if c.Unit != nil {
		d = &expr.Display{Text: c.Unit.Text, Unit: c.Unit}
	}
	return expr.FormatScalar(v, d, digits).String()
}

// shownName is a table's or column's name as the look-up line writes it:
// each "_"-separated part that is a spelled Greek name as its letter
// ("theta_0" is "θ_0"), as the sheet typesets names (LANGUAGE.md section 3).
func shownName(name string) string {
	parts := strings.Split(name, "_")
	for i, p := range parts {
		if g, ok := expr.GreekLetter(p); ok {
			parts[i] = g
		}
	}
	return strings.Join(parts, "_")
}
