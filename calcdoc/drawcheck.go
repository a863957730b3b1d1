package calcdoc

import (
	"fmt"

	"calcdoc/expr"
)

// A DrawCheck reports the pictures of an evaluated block that cannot be
// drawn (a plot value beyond what a drawing can hold, say), each as an
// error at the position the sheet shows it. The package that draws the
// pictures registers one per block kind, so that a picture that cannot be
// drawn is an error of the document: counted in the summary, in the exit
// status and in the values JSON, not only shown in the sheet's body.
type DrawCheck func(b *Block) []*expr.Error

var drawChecks = map[string]DrawCheck{}

// RegisterDrawCheck makes blocks of kind word run fn after they are
// evaluated. It panics if word already has one: registration happens in
// init.
func RegisterDrawCheck(word string, fn DrawCheck) {
	if _, dup := drawChecks[word]; dup {
		panic(fmt.Sprintf("calcdoc: draw check for %q registered twice", word))
	}
	drawChecks[word] = fn
}

// checkDrawing runs the block's draw check, if its kind has one, and
// records what it finds among the block's errors and in DrawErrors.
func (b *Block) checkDrawing() {
	fn := drawChecks[b.Kind]
	if fn == nil {
		return
	}
	b.DrawErrors = fn(b)
	b.Errors = append(b.Errors, b.DrawErrors...)
}
