// Package netlist reads the text of a network block (LANGUAGE.md section
// 11) into a netlist, and checks its topology.
//
// One line is one of
//
//	NAME: FROM -> TO Z expression
//	NAME: FROM -> TO Y expression
//	NAME: FROM -> TO source expression[, Z expression]
//	NAME: FROM -> TO current expression
//	NAME: FROM -> TO ratio expression to FROM2 -> TO2
//	couple NAME_A, NAME_B Z expression
//	ground NODE
//	# a note
//
// and any line may end with a "# note". Expressions are parsed by the
// engine (package expr) and kept as trees with their positions in the
// document; nothing is evaluated here. The block's tag (the word after
// "network" on the opening line) is passed to Parse and appended, after
// "_", to every name the block defines.
package netlist

import (
	"calcdoc/expr"
)

// Element is what a branch is, from its element word.
type Element int

// The elements.
const (
	Impedance  Element = iota // Z
	Admittance                // Y
	Source                    // source: an ideal voltage source, optionally with series Z
	Current                   // current: an ideal current source
	Ratio                     // ratio: an ideal transformer
)

// Word is the element word as written in a block.
func (e Element) Word() string {
	return [...]string{"Z", "Y", "source", "current", "ratio"}[e]
}

// Noun names the element in messages and on the sheet.
func (e Element) Noun() string {
	return [...]string{"impedance", "admittance", "voltage source", "current source", "ideal transformer"}[e]
}

// Node is a node name with the position where it is written.
type Node struct {
	Name string // as written
	Key  string // the form under which node names are compared (expr.NameKey)
	Pos  expr.Pos
}

// Branch is one branch line.
type Branch struct {
	Name    string // as written
	Key     string // expr.NameKey(Name)
	NamePos expr.Pos
	From    Node
	To      Node
	Element Element
	ElemPos expr.Pos // where the element word is written
	// Value is the element's expression: the impedance, admittance,
	// source voltage, source current or transformer ratio.
	Value expr.Node
	// SeriesZ is a source's series impedance, or nil.
	SeriesZ expr.Node
	// From2, To2 are a transformer's second winding.
	From2, To2 Node
	Comment    string   // the note after "#" on the line
	Pos        expr.Pos // the start of the line
}

// Couple is a "couple A, B Z z_m" line.
type Couple struct {
	A, B       string // branch names as written
	AKey, BKey string
	APos, BPos expr.Pos
	Value      expr.Node // the mutual impedance
	Comment    string
	Pos        expr.Pos
}

// Ground is a "ground NODE" line.
type Ground struct {
	Node    Node
	Comment string
	Pos     expr.Pos
}

// Note is a line that holds only a "# note".
type Note struct {
	Text string
	Pos  expr.Pos
}

// Netlist is a parsed network block.
type Netlist struct {
	Tag      string // "" when the block has none
	TagPos   expr.Pos
	Grounds  []*Ground
	Branches []*Branch
	Couples  []*Couple
	Notes    []*Note
	// Lines lists every line's item in the order of the block: a
	// *Ground, *Branch, *Couple or *Note.
	Lines []any
}

// Suffix is what the tag appends to a name: "_TAG", or "".
func (n *Netlist) Suffix() string {
	if n.Tag == "" {
		return ""
	}
	return "_" + n.Tag
}

// VoltageName is the name the block defines for a node's voltage, V_NODE
// (with the tag).
func (n *Netlist) VoltageName(node string) string { return "V_" + node + n.Suffix() }

// CurrentName is the name of a branch's current, I_NAME (with the tag).
func (n *Netlist) CurrentName(branch string) string { return "I_" + branch + n.Suffix() }

// PowerName is the name of a branch's complex power, S_NAME (with the tag).
func (n *Netlist) PowerName(branch string) string { return "S_" + branch + n.Suffix() }

// Branch returns the branch of a name (compared by key), or nil.
func (n *Netlist) Branch(name string) *Branch {
	k := expr.NameKey(name)
	for _, b := range n.Branches {
		if b.Key == k {
			return b
		}
	}
	return nil
}
