// Package network is the network block kind (LANGUAGE.md section 11): a
// circuit written as branches between nodes, whose equations calcdoc
// writes by modified nodal analysis (package mna), solves and shows on the
// sheet as a checker would follow them by hand.
package network

import (
	"calcdoc/calcdoc"
	"calcdoc/render/markup"
)

// Kind is the network block kind: it owns the word network, evaluates
// network blocks and draws them.
var Kind kind

type kind struct{}

// Words lists the info-string words of the kind.
func (kind) Words() []string { return []string{"network"} }

// Eval evaluates a network block.
func (kind) Eval(b *calcdoc.Block) { evalNetwork(b) }

// Draw draws an evaluated network block into the sheet.
func (kind) Draw(w *markup.Writer, b *calcdoc.Block) { drawNetwork(w, b) }

// PageBytesPerSourceByte (markup.PageBytes): a network's sheet (branch
// table, a KCL row for each node, the branch equations, the solution,
// currents, powers and the appendix) takes about 30 bytes a byte of its
// text (29.8 for the 500-node grid of the benchmark, 35 with the fixed
// part of the page for a 20-node one).
func (kind) PageBytesPerSourceByte() int { return 32 }
