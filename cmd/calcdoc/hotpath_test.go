package main

import (
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
)

// BenchmarkParse2000 evaluates the generated 2,000-statement document
// (calcdoc.Parse: goldmark, scanning, parsing, evaluation).
func BenchmarkParse2000(b *testing.B) {
	src := []byte(GenerateDoc(2000))
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		calcdoc.Parse("big.md", src, kind.Standard())
	}
}

// BenchmarkRender2000 writes the sheet of the evaluated document.
func BenchmarkRender2000(b *testing.B) {
	src := []byte(GenerateDoc(2000))
	doc := calcdoc.Parse("big.md", src, kind.Standard())
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := render.Sheet(doc, render.Options{Version: "bench", EmbedSource: true}); err != nil {
			b.Fatal(err)
		}
	}
}
