package data

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"calcdoc/expr"
)

// The look-ups (LANGUAGE.md section 9). A Table implements expr.Table:
// each look-up gives the value, the rows it took (counting from 0 in
// Rows) and an error with no position that names the problem and the fix
// (the engine adds the look-up's position).
var _ expr.Table = (*Table)(nil)

// Col is the index of the column named name (compared as names are,
// expr.NameKey), or an error that lists the columns.
func (t *Table) Col(name string) (int, error) {
	k := expr.NameKey(name)
	names := make([]string, len(t.Cols))
	for i, c := range t.Cols {
		if c.key == k {
			return i, nil
		}
		names[i] = c.Name
	}
	return 0, fmt.Errorf("the table %s has no column %s: its columns are %s", t.Name, name, strings.Join(names, ", "))
}

// same reports whether a and b count as one key: within expr.RelTol
// relative.
func same(a, b float64) bool {
	return math.Abs(a-b) <= expr.RelTol*math.Max(math.Abs(a), math.Abs(b))
}

// keyOf checks that x can be a key of t: a real value of the key's unit.
func (t *Table) keyOf(x *expr.Scalar) (float64, error) {
	key := t.Cols[0]
	var d expr.Dim
	if key.Unit != nil {
		d = key.Unit.Dim
	}
	if x.Dim != d && !(x.Z == 0 && x.Dim.IsZero()) {
		want := "a plain number"
		if key.Unit != nil {
			want = expr.DimWord(d) + " (its key " + key.Name + " is in " + key.Unit.Text + ")"
		}
		return 0, fmt.Errorf("the key %s is %s, but the table %s needs %s", expr.Describe(x), expr.DimWord(x.Dim), t.Name, want)
	}
	if !x.IsReal() {
		return 0, fmt.Errorf("the key %s is complex: look up a real value (abs, re or im of it)", expr.Describe(x))
	}
	if abs := key.Unit != nil && key.Unit.Offset != 0; d == expr.DimTemperature && abs != x.AbsTemp {
		if abs {
			return 0, fmt.Errorf("the key %s is a temperature difference, but the key %s of %s is a temperature in %s: look up a temperature, e.g. 20 %s", expr.Describe(x), key.Name, t.Name, key.Unit.Text, key.Unit.Text)
		}
		return 0, fmt.Errorf("the key %s is an absolute temperature, but the key %s of %s is a temperature difference in %s: look up a difference", expr.Describe(x), key.Name, t.Name, key.Unit.Text)
	}
	return real(x.Z), nil
}

// show writes v (coherent SI) in the unit of column c: "2.5 mm²".
func (c Column) show(v float64) string {
	if c.Unit != nil {
		v = (v - c.Unit.Offset) / c.Unit.Scale
	}
	return strconv.FormatFloat(v, 'g', 7, 64) + c.unitText()
}

// keyText is the key of row i as written, with its unit.
func (t *Table) keyText(i int) string {
	return t.Rows[i].Cells[0].Text + t.Cols[0].unitText()
}

// find is the row whose key is x within RelTol, or -1.
func (t *Table) find(x float64) int {
	for i, r := range t.Rows {
		if same(r.Cells[0].V, x) {
			return i
		}
	}
	return -1
}

// around is the index of the last row whose key is below x (-1 when none).
func (t *Table) around(x float64) int {
	i := -1
	for j, r := range t.Rows {
		if r.Cells[0].V < x {
			i = j
		}
	}
	return i
}

// cell is the value of row i in column j, or the error of a gap.
func (t *Table) cell(i, j int) (*expr.Scalar, error) {
	if v := t.Value(i, j); v != nil {
		return v, nil
	}
	return nil, fmt.Errorf("the row %s = %s (line %d) has a gap in column %s: the table gives no value there", t.Cols[0].Name, t.keyText(i), t.Rows[i].Line, t.Cols[j].Name)
}

// Lookup is NAME.COL(x): the value of column col in the row whose key is
// x within 1e-9 relative. No such row is an error naming the nearest
// keys.
func (t *Table) Lookup(col string, x *expr.Scalar) (*expr.Scalar, []int, error) {
	j, err := t.Col(col)
	if err != nil {
		return nil, nil, err
	}
	k, err := t.keyOf(x)
	if err != nil {
		return nil, nil, err
	}
	i := t.find(k)
	if i < 0 {
		return nil, nil, fmt.Errorf("no row of %s has the key %s = %s: the nearest keys are %s (interp(%s.%s, x) interpolates between rows, up(%s, x) gives the next key up)", t.Name, t.Cols[0].Name, t.Cols[0].show(k), t.nearest(k), t.Name, col, t.Name)
	}
	v, err := t.cell(i, j)
	if err != nil {
		return nil, nil, err
	}
	return v, []int{i}, nil
}

// nearest names the keys on either side of x: "2.5 mm² and 4 mm²", or
// the one key at an end of the table.
func (t *Table) nearest(x float64) string {
	i := t.around(x)
	switch {
	case i < 0:
		return t.keyText(0) + " (the smallest)"
	case i == len(t.Rows)-1:
		return t.keyText(i) + " (the largest)"
	}
	return t.keyText(i) + " and " + t.keyText(i+1)
}

// rangeText is the range of keys: "1.5 mm² to 240 mm²".
func (t *Table) rangeText() string {
	return t.keyText(0) + " to " + t.keyText(len(t.Rows)-1)
}

// Interp is interp(NAME.COL, x): linear interpolation in column col
// between the two rows whose keys lie around x (the one row whose key is
// x, within 1e-9 relative). Outside the range of keys, or where either
// row has a gap in col, it is an error.
func (t *Table) Interp(col string, x *expr.Scalar) (*expr.Scalar, []int, error) {
	j, err := t.Col(col)
	if err != nil {
		return nil, nil, err
	}
	if j == 0 {
		return nil, nil, fmt.Errorf("%s is the key of %s: interpolate another column, or use up(%s, x) or down(%s, x) for a key", col, t.Name, t.Name, t.Name)
	}
	k, err := t.keyOf(x)
	if err != nil {
		return nil, nil, err
	}
	if i := t.find(k); i >= 0 {
		v, err := t.cell(i, j)
		if err != nil {
			return nil, nil, err
		}
		return v, []int{i}, nil
	}
	i := t.around(k)
	if i < 0 || i == len(t.Rows)-1 {
		return nil, nil, fmt.Errorf("%s = %s is outside the range of keys of %s, %s: interp does not extrapolate", t.Cols[0].Name, t.Cols[0].show(k), t.Name, t.rangeText())
	}
	a, err := t.cell(i, j)
	if err != nil {
		return nil, nil, err
	}
	b, err := t.cell(i+1, j)
	if err != nil {
		return nil, nil, err
	}
	k0, k1 := t.Rows[i].Cells[0].V, t.Rows[i+1].Cells[0].V
	f := (k - k0) / (k1 - k0)
	v := *a
	v.Z = complex(real(a.Z)+f*(real(b.Z)-real(a.Z)), 0)
	return &v, []int{i, i + 1}, nil
}

// Up is up(NAME, x): the smallest key at or above x (within 1e-9
// relative counts as the key). None is an error naming the largest key.
func (t *Table) Up(x *expr.Scalar) (*expr.Scalar, []int, error) {
	k, err := t.keyOf(x)
	if err != nil {
		return nil, nil, err
	}
	for i, r := range t.Rows {
		if r.Cells[0].V >= k || same(r.Cells[0].V, k) {
			return t.Key(i), []int{i}, nil
		}
	}
	return nil, nil, fmt.Errorf("no key of %s is at or above %s: the largest is %s", t.Name, t.Cols[0].show(k), t.keyText(len(t.Rows)-1))
}

// Down is down(NAME, x): the largest key at or below x (within 1e-9
// relative counts as the key). None is an error naming the smallest key.
func (t *Table) Down(x *expr.Scalar) (*expr.Scalar, []int, error) {
	k, err := t.keyOf(x)
	if err != nil {
		return nil, nil, err
	}
	for i := len(t.Rows) - 1; i >= 0; i-- {
		if v := t.Rows[i].Cells[0].V; v <= k || same(v, k) {
			return t.Key(i), []int{i}, nil
		}
	}
	return nil, nil, fmt.Errorf("no key of %s is at or below %s: the smallest is %s", t.Name, t.Cols[0].show(k), t.keyText(0))
}
