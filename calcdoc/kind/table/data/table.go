// Package data holds a table of data with its source (LANGUAGE.md
// section 9): reading it from a table block's text or from a CSV file's
// bytes, checking it, and the look-ups the engine makes through the
// expr.Table interface. It knows nothing of documents or sheets: the
// table block kind (calcdoc/kind/table) reads the block, resolves a
// file's path (ResolveInside), defines the table into the Env
// (expr.Env.DefineTable) and draws it.
package data

import (
	"calcdoc/expr"
)

// Table is a table of data: a key column and further columns, each with
// a name and a unit, and rows whose keys rise strictly.
type Table struct {
	Name   string   // the name the block gives it
	Source string   // the text of the source: line
	Notes  []string // the block's # notes, without the #
	// Path is the file's path as the block writes it (from PATH), and
	// SHA256 the hex SHA-256 of the file's bytes; both "" for a table
	// held in the block.
	Path, SHA256 string
	Cols         []Column // Cols[0] is the key
	Rows         []Row
}

// Column is one column: its name as written and its unit (nil: plain
// numbers).
type Column struct {
	Name string
	Unit *expr.Unit
	key  string // expr.NameKey(Name)
}

// Header writes the column's header as the block writes it: "S [mm²]".
func (c Column) Header() string {
	if c.Unit == nil {
		return c.Name
	}
	return c.Name + " [" + c.Unit.Text + "]"
}

// Row is one row of data: a cell per column, and the line it is written
// on (in the document for a table held in a block, in the file for a
// CSV file).
type Row struct {
	Cells []Cell
	Line  int
}

// Cell is one number as written, and its value in coherent SI units; a
// Gap has no value.
type Cell struct {
	Text string
	V    float64
	Gap  bool
}

// scalar is a cell of column c as a value of the engine: in the column's
// unit, with the marks that unit gives (a power kind, an angle, an
// absolute temperature).
func (c Column) scalar(v float64) *expr.Scalar {
	s := &expr.Scalar{Z: complex(v, 0)}
	if u := c.Unit; u != nil {
		s.Dim = u.Dim
		s.Kind = u.Kind
		s.Angle = u.Angle
		s.AbsTemp = u.Offset != 0
	}
	return s
}

// Key is the key of row i as a value of the engine.
func (t *Table) Key(i int) *expr.Scalar { return t.Cols[0].scalar(t.Rows[i].Cells[0].V) }

// Value is the cell of row i in column j as a value of the engine, or nil
// for a gap.
func (t *Table) Value(i, j int) *expr.Scalar {
	c := t.Rows[i].Cells[j]
	if c.Gap {
		return nil
	}
	return t.Cols[j].scalar(c.V)
}

// unitText is the unit of column c for a message: " mm²", or "".
func (c Column) unitText() string {
	if c.Unit == nil {
		return ""
	}
	if c.Unit.Text == "°" || c.Unit.Text == "%" {
		return c.Unit.Text
	}
	return " " + c.Unit.Text
}
