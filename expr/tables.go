package expr

import (
	"fmt"
	"sort"
	"strings"
)

// Tables of data (LANGUAGE.md section 9). The engine knows a table only
// through the Table interface: the table block kind reads a table and
// defines it into the Env with DefineTable; the engine parses and
// evaluates the look-ups
//
//	NAME.COL(x)          the value of column COL in the row whose key is x
//	interp(NAME.COL, x)  linear interpolation between the rows around x
//	up(NAME, x)          the smallest key at or above x
//	down(NAME, x)        the largest key at or below x
//
// and records each in the Trace (Lookups), so that the sheet can show a
// row that names the table, the key and the rows taken.

// Table is a table of data that look-ups read. x has been checked to be a
// single value; the table checks its unit against the key column's. Each
// look-up returns the value, the rows it took (counting from 0 in the
// table's rows of data: one row, or the two rows of an interpolation) and
// an error that names the problem and the fix, with no position (the
// engine adds the look-up's).
type Table interface {
	// Lookup is NAME.COL(x): the row whose key is x within RelTol.
	Lookup(col string, x *Scalar) (*Scalar, []int, error)
	// Interp is interp(NAME.COL, x).
	Interp(col string, x *Scalar) (*Scalar, []int, error)
	// Up is up(NAME, x) and Down down(NAME, x): a key of the table.
	Up(x *Scalar) (*Scalar, []int, error)
	Down(x *Scalar) (*Scalar, []int, error)
}

// Lookup is the record of one look-up in an evaluation.
type Lookup struct {
	Node  *Call   // the look-up as written
	Table string  // the table's name as defined
	Func  string  // "col" (NAME.COL(x)), "interp", "up" or "down"
	Col   string  // the column as written; "" for up and down
	X     *Scalar // the key looked up
	Rows  []int   // the rows taken, counting from 0 in the table's data
	Value *Scalar // the value the look-up gives
}

type tableBinding struct {
	name string
	t    Table
	pos  Pos
}

// DefineTable defines a table under name: a name of the document like
// any other (defined once, not a built-in).
func (e *Env) DefineTable(name string, pos Pos, t Table) *Error {
	if err := e.CanDefine(name, pos); err != nil {
		return err
	}
	if e.tables == nil {
		e.tables = map[string]*tableBinding{}
	}
	e.tables[NameKey(name)] = &tableBinding{name: name, t: t, pos: pos}
	return nil
}

// LookupTable returns the table defined under name, or nil.
func (e *Env) LookupTable(name string) Table {
	if b := e.tables[NameKey(name)]; b != nil {
		return b.t
	}
	return nil
}

// tableFuncs are the built-ins whose first argument names a table or a
// column of one, not a value.
var tableFuncs = map[string]bool{"interp": true, "up": true, "down": true}

// Lookups returns the table look-ups recorded, in the order of
// evaluation.
func (t *Trace) Lookups() []Lookup {
	if t == nil {
		return nil
	}
	if t.more == nil {
		return nil
	}
	return append([]Lookup(nil), t.more.lookups...)
}

// tableRef is the error of a table or a column of one written where a
// value is wanted, or nil when n names neither.
func (ev *evaluator) tableRef(n *Ident) error {
	if tab, col, ok := n.Column(); ok {
		return Errorf(n.P, "%s is the column %s of the table %s: look a value up with %s(x), or interp(%s, x) between rows", n.Name, col, tab, n.Name, n.Name)
	}
	if b := ev.env.tables[n.key()]; b != nil {
		return Errorf(n.P, "%s is a table (defined at line %d): look a value up with %s.COLUMN(x), interp(%s.COLUMN, x), up(%s, x) or down(%s, x)", n.Name, b.pos.Line(), n.Name, n.Name, n.Name, n.Name)
	}
	return nil
}

// table finds the table named in a look-up.
func (ev *evaluator) table(at Pos, name string) (*tableBinding, error) {
	if b := ev.env.tables[NameKey(name)]; b != nil {
		return b, nil
	}
	if ev.env.vars[NameKey(name)] != nil || ev.isLocal(NameKey(name)) {
		return nil, Errorf(at, "%s is a value, not a table: a look-up reads a table defined by a table block above", name)
	}
	var names []string
	for _, b := range ev.env.tables {
		names = append(names, b.name)
	}
	sort.Strings(names)
	if len(names) == 0 {
		return nil, Errorf(at, "unknown table %q: define it above with a table block (```table %s)", name, name)
	}
	return nil, Errorf(at, "unknown table %q (the tables defined above: %s)", name, strings.Join(names, ", "))
}

// lookupArg evaluates the key argument of a look-up: a single value.
func (ev *evaluator) lookupArg(a Node) (*Scalar, error) {
	v, err := ev.eval(a)
	if err != nil {
		return nil, err
	}
	if v.m != nil {
		return nil, Errorf(a.Pos(), "a key to look up must be a single value, not %s", Describe(v.m))
	}
	return v.value().(*Scalar), nil
}

// lookup evaluates a look-up: NAME.COL(x) (fn "col", col set), or a call
// of interp, up or down.
func (ev *evaluator) lookup(n *Call) (val, error) {
	rec := Lookup{Node: n}
	var tabName string
	var xNode Node
	if tab, col, ok := n.Fun.Column(); ok {
		if len(n.Args) != 1 {
			return val{}, Errorf(n.P, "%s(x) takes one key, not %d", n.Fun.Name, len(n.Args))
		}
		rec.Func, rec.Col, tabName, xNode = "col", col, tab, n.Args[0]
	} else {
		rec.Func = n.Fun.key()
		if len(n.Args) != 2 {
			return val{}, Errorf(n.P, "%s takes 2 arguments, %s, not %d", n.Fun.Name, tableFuncUsage(rec.Func), len(n.Args))
		}
		id, ok := n.Args[0].(*Ident)
		if !ok {
			return val{}, Errorf(n.Args[0].Pos(), "the first argument of %s names %s: %s", n.Fun.Name, tableFuncWhat(rec.Func), tableFuncUsage(rec.Func))
		}
		tab, col, isCol := id.Column()
		switch {
		case rec.Func == "interp" && !isCol:
			return val{}, Errorf(id.P, "interp reads a column of a table: write interp(%s.COLUMN, x)", id.Name)
		case rec.Func != "interp" && isCol:
			return val{}, Errorf(id.P, "%s gives a key of a table, not of a column: write %s(%s, x)", rec.Func, rec.Func, tab)
		case isCol:
			tabName, rec.Col = tab, col
		default:
			tabName = id.Name
		}
		xNode = n.Args[1]
	}
	b, err := ev.table(n.Fun.P, tabName)
	if err != nil {
		return val{}, err
	}
	rec.Table = b.name
	x, err := ev.lookupArg(xNode)
	if err != nil {
		return val{}, err
	}
	rec.X = x
	var v *Scalar
	var rows []int
	switch rec.Func {
	case "col":
		v, rows, err = b.t.Lookup(rec.Col, x)
	case "interp":
		v, rows, err = b.t.Interp(rec.Col, x)
	case "up":
		v, rows, err = b.t.Up(x)
	default:
		v, rows, err = b.t.Down(x)
	}
	if err != nil {
		return val{}, Errorf(n.P, "%s: %s", lookupText(&rec), err.Error())
	}
	rec.Rows, rec.Value = rows, v
	if ev.trace != nil {
		m := ev.trace.extra()
		m.lookups = append(m.lookups, rec)
	}
	return unbox(v), nil
}

// lookupText writes a look-up for a message: "cu.R_20(x)", "up(cu, x)".
func lookupText(r *Lookup) string {
	switch r.Func {
	case "col":
		return fmt.Sprintf("%s.%s(%s)", r.Table, r.Col, Describe(r.X))
	case "interp":
		return fmt.Sprintf("interp(%s.%s, %s)", r.Table, r.Col, Describe(r.X))
	}
	return fmt.Sprintf("%s(%s, %s)", r.Func, r.Table, Describe(r.X))
}

func tableFuncUsage(fn string) string {
	if fn == "interp" {
		return "interp(TABLE.COLUMN, x)"
	}
	return fn + "(TABLE, x)"
}

func tableFuncWhat(fn string) string {
	if fn == "interp" {
		return "a column of a table"
	}
	return "a table"
}

// noTableCall is the built-in of interp, up and down: the evaluator
// handles their calls (lookup) before any argument is evaluated, so this
// runs only if that is bypassed.
func noTableCall(fn string) func([]Value) (Value, error) {
	return func([]Value) (Value, error) {
		return nil, fmt.Errorf("%s reads a table: write %s", fn, tableFuncUsage(fn))
	}
}
