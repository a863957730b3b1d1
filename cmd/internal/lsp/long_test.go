package lsp

import (
	"fmt"
	"math"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"testing"
	"time"
)

// heapAfterGC is the live heap after two collections.
func heapAfterGC() uint64 {
	runtime.GC()
	runtime.GC()
	var m runtime.MemStats
	runtime.ReadMemStats(&m)
	return m.HeapAlloc
}

// TestMemoryFlat types 5,000 edits (a character typed into a comment,
// then taken away, and so on) and checks that the live heap after the
// last is within 8 MiB of the heap after the first 500: what a session
// keeps is the open text and its last evaluation, not its history.
func TestMemoryFlat(t *testing.T) {
	if testing.Short() {
		t.Skip("5,000 edits")
	}
	cl := newClient(t, time.Millisecond)
	cl.initialize("")
	uri := pathURI(filepath.Join(t.TempDir(), "feeder.md"))
	cl.open(uri, feeder, 1)
	cl.diagnostics(uri, 1)
	// line 8 is "R = 115 Ω   # load resistance": type at its end
	end := len([]rune("R = 115 Ω   # load resistance")) // all in the BMP: UTF-16 units = runes
	var base uint64
	for v := 2; v <= 5001; v++ {
		if v%2 == 0 {
			cl.change(uri, v, Range{at(8, end), at(8, end)}, "ω")
		} else {
			cl.change(uri, v, Range{at(8, end), at(8, end+1)}, "")
		}
		if v%10 == 1 {
			cl.diagnostics(uri, v) // let it evaluate now and then
		}
		if v == 501 {
			base = heapAfterGC()
		}
	}
	// (the loop waited for version 5001's diagnostics)
	after := heapAfterGC()
	t.Logf("live heap after 500 edits %d KiB, after 5,000 edits %d KiB", base>>10, after>>10)
	if after > base+8<<20 {
		t.Errorf("the live heap grew from %d KiB to %d KiB over 4,500 edits", base>>10, after>>10)
	}
	var hv struct{ Contents struct{ Value string } }
	cl.call("textDocument/hover", docParams(uri, at(8, 0)), &hv)
	if !strings.Contains(hv.Contents.Value, "load resistance") || strings.Contains(hv.Contents.Value, "ω") {
		t.Errorf("after the edits, hover on R: %q", hv.Contents.Value)
	}
	cl.shutdownExit()
}

// bigDoc is a document of 1,000 statements in ten calc blocks with prose
// between them (a feeder of our own invention: resistances, reactances,
// impedances, currents, a check closing each block).
func bigDoc() string {
	var b strings.Builder
	b.WriteString("---\ntitle: A long feeder schedule\n---\n\n")
	n := 0
	for blk := 0; blk < 10; blk++ {
		fmt.Fprintf(&b, "## Group %d\n\nThe circuits of group %d.\n\n```calc\n", blk+1, blk+1)
		for i := 0; i < 100; i++ {
			switch j := (i - 1) % 4; {
			case i == 0:
				fmt.Fprintf(&b, "U_%d = 400 V   # group %d supply\n", n, blk+1)
			case i == 99:
				fmt.Fprintf(&b, "check |I_%d| <= 80 kA   # within the breaking capacity\n", n-3)
			case j == 0:
				fmt.Fprintf(&b, "R_%d = (0.2 + 0.002*%d) Ω\n", n, n)
			case j == 1:
				fmt.Fprintf(&b, "X_%d = j*2*pi*50 Hz * 0.5 mH * (1 + %d/500)\n", n, n)
			case j == 2:
				fmt.Fprintf(&b, "Z_%d = R_%d + X_%d\n", n, n-2, n-1)
			default:
				fmt.Fprintf(&b, "I_%d = 400 V / Z_%d\n", n, n-1)
			}
			n++
		}
		b.WriteString("```\n\n")
	}
	return b.String()
}

// BenchmarkEditToDiagnostics measures, on a document of 1,000 statements,
// the time from the end of the debounce after an edit in its last block
// to the client's receipt of the diagnostics of that edit. Each iteration
// is one edit, made once the one before has its diagnostics; p50 and p95
// (nearest rank, common practice) are reported in ms.
//
//	go test -run '^$' -bench EditToDiagnostics -benchtime 100x ./cmd/internal/lsp/
func BenchmarkEditToDiagnostics(b *testing.B) {
	doc := bigDoc()
	lines := strings.Split(doc, "\n")
	// the last R_ line of the last block: its number is edited
	line := -1
	for i, l := range lines {
		if strings.HasPrefix(l, "R_") {
			line = i
		}
	}
	col := strings.Index(lines[line], "0.2")
	cl := newClient(b, 20*time.Millisecond)
	ends := make(chan time.Time, 16)
	cl.srv.debounced = func(string) { ends <- time.Now() }
	cl.initialize("")
	uri := pathURI(filepath.Join(b.TempDir(), "big.md"))
	cl.open(uri, doc, 1)
	if ds := cl.diagnostics(uri, 1); len(ds) != 0 {
		b.Fatalf("the benchmark's document: %+v", ds[0])
	}
	<-ends
	var took []time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		v := i + 2
		digit := fmt.Sprint(2 + i%7)
		cl.change(uri, v, Range{at(line, col+2), at(line, col+3)}, digit) // 0.2 → 0.d
		ds := cl.diagnostics(uri, v)
		got := time.Now()
		start := <-ends
		took = append(took, got.Sub(start))
		if len(ds) != 0 {
			b.Fatalf("edit %d: %+v", i, ds[0])
		}
	}
	b.StopTimer()
	sort.Slice(took, func(i, j int) bool { return took[i] < took[j] })
	rank := func(p float64) time.Duration {
		i := int(math.Ceil(p/100*float64(len(took)))) - 1
		return took[max(0, min(i, len(took)-1))]
	}
	b.ReportMetric(float64(rank(50).Microseconds())/1000, "p50-ms")
	b.ReportMetric(float64(rank(95).Microseconds())/1000, "p95-ms")
	cl.shutdownExit()
}
