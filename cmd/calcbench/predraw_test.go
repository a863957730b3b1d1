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
// does) and when the sheet draws every block itself.
func TestPredrawGeneratedSameBytes(t *testing.T) {
	dir := t.TempDir()
	for _, p := range []Params{{Statements: 2000, Nodes: 60}, {Statements: 600, Nodes: 0}, {Statements: 1200, Nodes: 20, Mesh: true}} {
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
		pre := render.NewPredraw()
		pre.DrawAllEarly() // every block drawn early, however the goroutines are scheduled
		d := calcdoc.NewLoader(kind.Standard()).ParseAfter(path, []byte(doc), pre.Block)
		opt.Predrawn = pre
		got, err := render.Sheet(d, opt)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, serial) {
			t.Errorf("%+v: the sheet with blocks drawn early differs from the serial sheet", p)
		}
		if pre.Copied == 0 {
			t.Errorf("%+v: no block copied from the early drawing (%d drawn in the sheet's pass)", p, pre.Drawn)
		}
		t.Logf("%+v: %d blocks copied, %d drawn in the sheet's pass", p, pre.Copied, pre.Drawn)
	}
}
