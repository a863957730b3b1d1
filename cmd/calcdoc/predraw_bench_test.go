package main

import (
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
)

// BenchmarkEvalRender2000 evaluates the generated 2,000-statement document
// and writes its sheet in one process, as a build does: serial (every
// block drawn by the sheet after evaluation) and predraw (calc blocks
// drawn on a second goroutine while the document is evaluated,
// render.Predraw). The sheets are the same bytes (render's
// TestPredrawSameBytes); with two cores free predraw takes less time.
func BenchmarkEvalRender2000(b *testing.B) {
	src := []byte(GenerateDoc(2000))
	for _, mode := range []string{"serial", "predraw"} {
		b.Run(mode, func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				l := calcdoc.NewLoader(kind.Standard())
				opt := render.Options{Version: "bench", EmbedSource: true}
				var doc *calcdoc.Document
				if mode == "predraw" {
					pre := render.NewPredraw()
					doc = l.ParseAfter("big.md", src, pre.Block)
					opt.Predrawn = pre
				} else {
					doc = l.Parse("big.md", src)
				}
				if _, err := render.Sheet(doc, opt); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
