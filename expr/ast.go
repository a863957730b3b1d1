package expr

// Node is a node of an expression tree. Every node knows its span: Pos is
// its first character, End the position just after its last.
type Node interface {
	Pos() Pos
	End() Pos
}

type span struct{ P, E Pos }

func (s span) Pos() Pos { return s.P }
func (s span) End() Pos { return s.E }

// Number is a numeric literal; Imag marks an imaginary literal (j4).
type Number struct {
	span
	Text  string
	Value float64
	Imag  bool
}

// Ident is a name: Name as written, Key the form under which it is
// compared (NameKey). A column of a table, "cu.R_20", is one Ident whose
// Dot is the byte offset of the "." in Name (0 for a plain name); its Key
// is the keys of the two parts joined by ".".
type Ident struct {
	span
	Name string
	Key  string
	Dot  int
}

// Column splits a column of a table, "cu.R_20", into the table's name and
// the column's, as written; ok is false for a plain name.
func (n *Ident) Column() (table, col string, ok bool) {
	if n.Dot <= 0 {
		return "", "", false
	}
	return n.Name[:n.Dot], n.Name[n.Dot+1:], true
}

// WithUnit is an operand followed by a unit: "230 V", "(0.12 + j0.08) Ω", "30°".
type WithUnit struct {
	span
	X    Node
	Unit *Unit
	UPos Pos // where the unit is written
}

// Unary is a prefix operator: "-" or "+".
type Unary struct {
	span
	Op Kind
	X  Node
}

// Binary is an infix operator: + - * / ^ ∥ ∠. OpPos is where the
// operator is written.
type Binary struct {
	span
	Op    Kind
	OpPos Pos
	X, Y  Node
}

// Paren is an expression in parentheses.
type Paren struct {
	span
	X Node
}

// Abs is |x|.
type Abs struct {
	span
	X Node
}

// Call is f(a, b): a built-in or user function, or an entry of a matrix
// value M(i, j).
type Call struct {
	span
	Fun  *Ident
	Args []Node
}

// MatrixLit is [a, b; c, d]: Rows[i][j] is the entry in row i, column j.
type MatrixLit struct {
	span
	Rows [][]Node
}

// Compare is a comparison chain: X[0] Ops[0] X[1] Ops[1] X[2] ...
type Compare struct {
	span
	Ops []Kind
	X   []Node
}

// BadExpr stands where an expression could not be parsed.
type BadExpr struct{ span }

// Form is how a complex value is shown.
type Form int

// The display forms.
const (
	FormAuto  Form = iota // by dimension: voltages and currents polar, the rest rectangular
	FormPolar             // magnitude∠angle
	FormRect              // re + j im
)

// Display is the bracket after a name being defined: "[kA polar]".
type Display struct {
	span
	Text string
	Unit *Unit // nil: the default unit for the dimension
	Form Form
}

// Stmt is one statement of a calc block.
type Stmt interface {
	Node
	// Desc is the description written after "#" on the statement's line.
	Desc() string
}

type desc struct{ Comment string }

func (d desc) Desc() string { return d.Comment }

// Note is a line that starts with "#": shown on the sheet as text.
type Note struct {
	span
	desc
	Text string
}

// Assign is "name = x", "name[unit form] = x", or "a, b, c = x" (Names
// holds more than one name).
type Assign struct {
	span
	desc
	Names   []*Ident
	Display *Display
	X       Node
}

// FuncDef is "f(a, b) = body".
type FuncDef struct {
	span
	desc
	Name   *Ident
	Params []*Ident
	Body   Node
}

// Check is "check a <= b", or "check in max, min: a <= b" for a check
// that applies to the cases named only (In; nil is every case).
type Check struct {
	span
	desc
	Cmp *Compare
	In  []*Ident
}

// CaseLit is {max: a, min: b}: a value for each case of the document
// (LANGUAGE.md section 10). Names[i] labels X[i]; the labels are case
// names, in their own namespace.
type CaseLit struct {
	span
	Names []*Ident
	X     []Node
}

// ExprStmt is a bare expression: shown, not named. Display is optional: a
// bare expression may end with "[unit form]" too.
type ExprStmt struct {
	span
	desc
	X       Node
	Display *Display
}

// BadStmt is a statement that could not be parsed; its errors are in the
// parser's list. Names holds the names it appears to define (the names
// before a top-level "="), so that they can be marked unavailable.
type BadStmt struct {
	span
	desc
	Names []*Ident
}

// Unparen returns n without the parentheses written around it.
func Unparen(n Node) Node {
	for {
		p, ok := n.(*Paren)
		if !ok {
			return n
		}
		n = p.X
	}
}
