package solve

import (
	"calcdoc/calcdoc"
	"calcdoc/render/markup"
)

// Kind is the solve block kind: it owns the word solve, evaluates solve blocks
// and draws them.
var Kind kind

type kind struct{}

// Words lists the info-string words of the kind.
func (kind) Words() []string { return []string{"solve"} }

// Eval evaluates a solve block.
func (kind) Eval(b *calcdoc.Block) { evalSolve(b) }

// Draw draws an evaluated solve block into the sheet.
func (kind) Draw(w *markup.Writer, b *calcdoc.Block) { renderSolve(w, b) }
