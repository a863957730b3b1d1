package render

import (
	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/markup"
)

// unit joins a kind's evaluation, its drawing and its draw check.
type unit struct {
	calcdoc.Kind
	draw  func(w *markup.Writer, b *calcdoc.Block)
	check func(b *calcdoc.Block) []*expr.Error
}

// Draw draws the block.
func (u unit) Draw(w *markup.Writer, b *calcdoc.Block) { u.draw(w, b) }

// DrawCheck reports the block's pictures that cannot be drawn.
func (u unit) DrawCheck(b *calcdoc.Block) []*expr.Error {
	if u.check == nil {
		return nil
	}
	return u.check(b)
}

var standard = calcdoc.NewRegistry(
	unit{calcdoc.CalcKind, renderCalc, nil},
	unit{calcdoc.SolveKind, renderSolve, nil},
	unit{calcdoc.PhasorsKind, renderPhasors, checkPhasorsDrawing},
	unit{calcdoc.SweepKind, renderSweep, checkSweepDrawing},
)

// Standard returns the registry of the shipped block kinds.
func Standard() *calcdoc.Registry { return standard }
