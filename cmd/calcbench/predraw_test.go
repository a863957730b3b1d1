package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
)

// TestPredrawGeneratedSameBytes: the benchmark's generated documents (the
// feeder schedule with the ladder or the meshed feeder) give the same
// sheet, byte for byte, when their calc blocks are drawn on a second
// goroutine while they are evaluated (render.Predraw, as calcdoc build
// does) and when the sheet draws every block itself. At 6,000 statements
// the drawings pass the limit of what is drawn during evaluation
// (render.Predraw's most): the blocks are drawn after evaluation, every
// second one on the goroutine, and that sheet is compared both with every
// block drawn on the goroutine and with the goroutine and the sheet
// sharing them as a build does.
func TestPredrawGeneratedSameBytes(t *testing.T) {
	dir := t.TempDir()
	for _, p := range []Params{{Statements: 2000, Nodes: 60}, {Statements: 600, Nodes: 0}, {Statements: 1200, Nodes: 20, Mesh: true}, {Statements: 6000, Nodes: 0}} {
		doc, _, err := Generate(p)
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dir, fmt.Sprintf("gen-%d-%d-%v.md", p.Statements, p.Nodes, p.Mesh))
		if err := os.WriteFile(path, []byte(doc), 0o644); err != nil {
			t.Fatal(err)
		}
		opt := render.Options{Version: "test", EmbedSource: true}
		serial, err := render.Sheet(calcdoc.NewLoader(kind.Standard()).Parse(path, []byte(doc)), opt)
		if err != nil {
			t.Fatal(err)
		}
		waits := []bool{true}
		if p.Statements >= 6000 {
			waits = append(waits, false)
		}
		for _, all := range waits {
			pre := render.NewPredraw()
			if all {
				pre.DrawAllEarly() // every block drawn on the goroutine, however the goroutines are scheduled
			}
			d := calcdoc.NewLoader(kind.Standard()).ParseAfter(path, []byte(doc), pre.Block)
			opt.Predrawn = pre
			got, err := render.Sheet(d, opt)
			pre.Wait()
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got, serial) {
				t.Errorf("%+v (all on the goroutine %v): the sheet with blocks drawn on the goroutine differs from the serial sheet", p, all)
			}
			if all && pre.Copied == 0 {
				t.Errorf("%+v: no block copied from the goroutine's drawing (%d drawn in the sheet's pass)", p, pre.Drawn)
			}
			t.Logf("%+v (all %v): %d blocks copied, %d drawn in the sheet's pass", p, all, pre.Copied, pre.Drawn)
		}
	}
}
