package sweep

import (
	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/markup"
)

// Kind is the sweep block kind: it owns the word sweep, evaluates sweep blocks
// and draws them.
var Kind kind

type kind struct{}

// Words lists the info-string words of the kind.
func (kind) Words() []string { return []string{"sweep"} }

// Eval evaluates a sweep block.
func (kind) Eval(b *calcdoc.Block) { evalSweep(b) }

// Draw draws an evaluated sweep block into the sheet.
func (kind) Draw(w *markup.Writer, b *calcdoc.Block) { renderSweep(w, b) }

// DrawCheck reports the block's pictures that cannot be drawn.
func (kind) DrawCheck(b *calcdoc.Block) []*expr.Error { return checkSweepDrawing(b) }
