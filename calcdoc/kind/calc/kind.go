package calc

import (
	"calcdoc/calcdoc"
	"calcdoc/render/markup"
)

// Kind is the calc block kind: it owns the word calc, evaluates calc blocks
// and draws them.
var Kind kind

type kind struct{}

// Words lists the info-string words of the kind.
func (kind) Words() []string { return []string{"calc"} }

// Eval evaluates a calc block.
func (kind) Eval(b *calcdoc.Block) { evalCalc(b) }

// Draw draws an evaluated calc block into the sheet.
func (kind) Draw(w *markup.Writer, b *calcdoc.Block) { renderCalc(w, b) }

// LocalDrawing says that a calc block's drawing reads only the block, its
// evaluation, the front matter and the definitions of the names its text
// mentions, and writes only in its place (render.LocalDrawer): the live
// preview copies it from the sheet before while none of these changed.
func (kind) LocalDrawing() {}
