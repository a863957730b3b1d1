package build

import (
	"bytes"
	"path/filepath"
	"runtime"
	"sync"
	"sync/atomic"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// predrawBuild evaluates and draws every input under dir with EvaluateDraw
// on workers goroutines, each sheet with the blocks drawn early; it
// returns the sheets by path and how many documents had a drawing
// goroutine.
func predrawBuild(t *testing.T, dir string, workers int) (map[string][]byte, int) {
	t.Helper()
	inputs, err := Collect([]string{dir}, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	var mu sync.Mutex
	pages := map[string][]byte{}
	var with atomic.Int64
	EvaluateDraw(NewLoader(kind.Standard(), inputs), inputs, workers, func(i int, doc *calcdoc.Document, pre *Predraw) {
		if pre != nil {
			with.Add(1)
		}
		opt := Options{Version: "test", EmbedSource: true, Predrawn: pre}
		page, err := Sheet(doc, opt)
		if err != nil {
			t.Error(err)
		}
		mu.Lock()
		pages[inputs[i].Path] = page
		mu.Unlock()
	})
	return pages, int(with.Load())
}

// serialBuild is predrawBuild with Evaluate: every block drawn in the
// sheet's own pass.
func serialBuild(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	inputs, err := Collect([]string{dir}, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	pages := map[string][]byte{}
	for _, ev := range Evaluate(NewLoader(kind.Standard(), inputs), inputs, 1, nil) {
		page, err := Sheet(ev.Doc, Options{Version: "test", EmbedSource: true})
		if err != nil {
			t.Fatal(err)
		}
		pages[ev.Path] = page
	}
	return pages
}

// TestEvaluateDrawSameSheets: a folder build whose documents draw their
// blocks while they are evaluated writes the sheets of the serial build,
// byte for byte (the examples, with their uses and data files, and a
// generated folder of 40 sheets that use one another); with one worker on
// two cores each document gets a drawing goroutine, and on one core none
// (the goroutines evaluating and drawing never outnumber GOMAXPROCS).
func TestEvaluateDrawSameSheets(t *testing.T) {
	gen, _ := genFolder(t, 4, 10)
	for _, dir := range []string{filepath.Join("..", "..", "..", "examples"), gen} {
		serial := serialBuild(t, dir)
		for _, c := range []struct{ procs, workers int }{{2, 1}, {2, 2}, {1, 1}} {
			prev := runtime.GOMAXPROCS(c.procs)
			pages, with := predrawBuild(t, dir, c.workers)
			runtime.GOMAXPROCS(prev)
			if len(pages) != len(serial) {
				t.Fatalf("%s: %d sheets, serial build %d", dir, len(pages), len(serial))
			}
			for p, want := range serial {
				if !bytes.Equal(pages[p], want) {
					t.Errorf("%s (GOMAXPROCS %d, %d workers): the sheet differs from the serial build's", p, c.procs, c.workers)
				}
			}
			switch {
			case c.procs == 1 && with != 0:
				t.Errorf("%s: on one core %d documents got a drawing goroutine", dir, with)
			case c.procs == 2 && c.workers == 1 && with != len(serial):
				t.Errorf("%s: with one worker on two cores %d of %d documents got a drawing goroutine", dir, with, len(serial))
			}
		}
	}
}
