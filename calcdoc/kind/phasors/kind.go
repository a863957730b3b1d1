package phasors

import (
	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/markup"
)

// Kind is the phasors block kind: it owns the word phasors, evaluates phasors blocks
// and draws them.
var Kind kind

type kind struct{}

// Words lists the info-string words of the kind.
func (kind) Words() []string { return []string{"phasors"} }

// Eval evaluates a phasors block.
func (kind) Eval(b *calcdoc.Block) { evalPhasors(b) }

// Draw draws an evaluated phasors block into the sheet.
func (kind) Draw(w *markup.Writer, b *calcdoc.Block) { renderPhasors(w, b) }

// DrawCheck reports the block's pictures that cannot be drawn.
func (kind) DrawCheck(b *calcdoc.Block) []*expr.Error { return checkPhasorsDrawing(b) }
