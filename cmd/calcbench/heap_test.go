package main

import (
	"runtime"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// BenchmarkRetained20000 parses and evaluates the 20,000-statement
// document of the statement scaling (the same document as
// `calcbench -scaling 20000`, with the 60-node ladder) and reports the
// heap the evaluated document keeps: runtime.ReadMemStats after
// runtime.GC with the document still held, less the heap before it was
// parsed. This is the live heap a build carries into rendering; the
// process's peak RSS adds the garbage of evaluation and the page.
func BenchmarkRetained20000(b *testing.B) {
	doc, _, err := Generate(Params{Statements: 20000, Nodes: 60})
	if err != nil {
		b.Fatal(err)
	}
	src := []byte(doc)
	reg := kind.Standard()
	var retained, allocated, mallocs uint64
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		var before, after, done runtime.MemStats
		b.StopTimer()
		runtime.GC()
		runtime.ReadMemStats(&before)
		b.StartTimer()
		d := calcdoc.Parse("doc.md", src, reg)
		b.StopTimer()
		runtime.ReadMemStats(&done)
		runtime.GC()
		runtime.ReadMemStats(&after)
		if n := len(d.Errors); n > 0 {
			b.Fatalf("%d errors, the first %v", n, d.Errors[0])
		}
		runtime.KeepAlive(d)
		retained += after.HeapAlloc - before.HeapAlloc
		allocated += done.TotalAlloc - before.TotalAlloc
		mallocs += done.Mallocs - before.Mallocs
		b.StartTimer()
	}
	b.ReportMetric(float64(retained)/float64(b.N)/1e6, "retained-MB")
	b.ReportMetric(float64(allocated)/float64(b.N)/1e6, "alloc-MB")
	b.ReportMetric(float64(mallocs)/float64(b.N)/20000, "allocs/stmt")
}
