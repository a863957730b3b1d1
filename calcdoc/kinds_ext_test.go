package calcdoc_test

import (
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/calcdoc/kind/sweep"
)

// kinds are the shipped kinds, which this package's external tests use.
var kinds = kind.Standard()

// swSweep is the document's first sweep.
func swSweep(t *testing.T, d *calcdoc.Document) *sweep.Sweep {
	t.Helper()
	for _, b := range d.Blocks {
		if b.Kind == "sweep" {
			return b.Result.(*sweep.Sweep)
		}
	}
	t.Fatal("no sweep block")
	return nil
}
