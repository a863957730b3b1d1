package sweep

import (
	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// The pictures of phasors and sweep blocks are checked for drawability as
// the blocks are evaluated (calcdoc.DrawChecker), with the very
// inputs the sheet draws, so that a picture that cannot be drawn is an
// error of the document: the summary counts it, the exit status is 3 and
// the values JSON lists it. The sheet shows each such error once, where
// its picture would be.
// checkSweepDrawing reports each plot of a sweep that cannot be drawn.
func checkSweepDrawing(b *calcdoc.Block) []*expr.Error {
	sw, _ := b.Result.(*Sweep)
	if sw == nil || sw.X == nil {
		return nil
	}
	var errs []*expr.Error
	for _, l := range sw.Lines {
		if !l.OK() {
			continue
		}
		for _, f := range sweepFigs(sw, l) {
			if err := f.drawn().Check(); err != nil {
				errs = append(errs, f.drawErr(err))
			}
		}
	}
	return errs
}
