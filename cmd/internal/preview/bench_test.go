package preview

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"net/url"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/build"
	"calcdoc/expr"
)

// bigDoc is a document of exactly 1,000 statements in ten calc blocks with
// prose between them: resistances, reactances, impedances, currents and a
// check closing each block. Its first statement carries the note save-k.
func bigDoc(k int) string { return longDoc(k, 10, false) }

// longDoc is a document of blocks·100 statements in calc blocks of 100
// with prose between them: resistances, reactances, impedances, currents
// and a check closing each block. The statement seed = k V, with the note
// save-k, opens the first block, or the last when last is set.
func longDoc(k, blocks int, last bool) string {
	var b strings.Builder
	b.WriteString("---\ntitle: Latency test feeder\n---\n\n# A long sheet\n\n")
	n := 0
	seedBlk := 0
	if last {
		seedBlk = blocks - 1
	}
	for blk := 0; blk < blocks; blk++ {
		fmt.Fprintf(&b, "## Section %d\n\nThe branches of section %d.\n\n```calc\n", blk+1, blk+1)
		for i := 0; i < 100; i++ {
			switch j := (i - 1) % 4; {
			case i == 0 && blk == seedBlk:
				fmt.Fprintf(&b, "seed = %d V   # save-%d\n", k, k)
			case i == 0:
				fmt.Fprintf(&b, "U_%d = 230 V   # source of section %d\n", n, blk+1)
			case i == 99:
				fmt.Fprintf(&b, "check |I_%d| <= 50 kA   # within the breaking capacity\n", n-3)
			case j == 0:
				fmt.Fprintf(&b, "R_%d = (0.1 + 0.001*%d) Ω\n", n, n)
			case j == 1:
				fmt.Fprintf(&b, "X_%d = j*2*pi*50 Hz * 1 mH * (1 + %d/1000)\n", n, n)
			case j == 2:
				fmt.Fprintf(&b, "Z_%d = R_%d + X_%d   # branch impedance\n", n, n-2, n-1)
			default:
				fmt.Fprintf(&b, "I_%d = 230 V / Z_%d\n", n, n-1)
			}
			n++
		}
		b.WriteString("```\n\n")
	}
	return b.String()
}

// TestBigDoc checks the benchmark's document: 1,000 statements (one
// value or check each), no error.
func TestBigDoc(t *testing.T) {
	doc := calcdoc.Parse("big.md", []byte(bigDoc(1)), kind.Standard())
	if len(doc.Errors) > 0 {
		t.Fatalf("the benchmark document has errors: %v", doc.Errors[0])
	}
	if n := len(doc.Values) + len(doc.Checks); n != 1000 {
		t.Errorf("the benchmark document has %d values and checks, want 1000", n)
	}
	for _, blocks := range []int{10, 100} {
		doc := calcdoc.Parse("long.md", []byte(longDoc(1, blocks, true)), kind.Standard())
		if len(doc.Errors) > 0 {
			t.Fatalf("the %d-block benchmark document has errors: %v", blocks, doc.Errors[0])
		}
		if n, want := len(doc.Values)+len(doc.Checks), 100*blocks; n != want {
			t.Errorf("the %d-block benchmark document has %d values and checks, want %d", blocks, n, want)
		}
		if last := doc.Blocks[len(doc.Blocks)-1]; !strings.HasPrefix(last.Lines[0], "seed = 1 V") {
			t.Errorf("the %d-block benchmark document's last block starts %q, want the seed", blocks, last.Lines[0])
		}
	}
}

// nearestRank is the p-th percentile of sorted samples by the
// nearest-rank method: the ceil(p/100·n)-th smallest (common practice).
func nearestRank(sorted []time.Duration, p float64) time.Duration {
	i := int(math.Ceil(p/100*float64(len(sorted)))) - 1
	return sorted[max(0, min(i, len(sorted)-1))]
}

// BenchmarkSaveToPage measures save-to-page latency on documents of
// 1,000 and 10,000 statements (calc blocks of 100) whose last block is
// edited (a number changed): from the start of a save (written in place)
// to the moment the patch that the page's script fetches when its event
// stream announces the new version (PatchPath, from the version the page
// shows) holds the save. Waiting for the editor to finish writing is
// included. The watcher collects when idle, as the command's does. Each
// iteration is one save, made once the one before has settled; p50 and
// p95 (nearest rank) are reported in ms.
//
//	go test -run '^$' -bench SaveToPage -benchtime 50x ./cmd/internal/preview/
func BenchmarkSaveToPage(b *testing.B) {
	for _, blocks := range []int{10, 100} {
		b.Run(fmt.Sprintf("statements=%d", blocks*100), func(b *testing.B) {
			saveToPage(b, func(k int) string { return longDoc(k, blocks, true) })
		})
	}
}

func saveToPage(b *testing.B, gen func(k int) string) {
	dir := b.TempDir()
	p := filepath.Join(dir, "big.md")
	if err := os.WriteFile(p, []byte(gen(0)), 0o644); err != nil {
		b.Fatal(err)
	}
	h := start(b, Config{Paths: []string{dir}, CollectWhenIdle: true})
	lat := make([]time.Duration, 0, b.N)
	_, body := h.get("/big.html")
	shown, _ := pageVersion(b, body)
	b.ResetTimer()
	for k := 1; k <= b.N; k++ {
		b.StopTimer()
		ch, stop := h.stream("/big.html", shown)
		src := []byte(gen(k))
		want := fmt.Sprintf(`<div class="desc">save-%d</div>`, k)
		b.StartTimer()
		began := time.Now()
		if err := os.WriteFile(p, src, 0o644); err != nil {
			b.Fatal(err)
		}
		for done := false; !done; {
			select {
			case v, ok := <-ch:
				if !ok {
					b.Fatalf("save %d: the event stream ended", k)
				}
				if strings.HasSuffix(v, "-evaluating") || v == shown {
					continue // the banner comes: the live script fetches nothing
				}
			case <-time.After(deadline):
				b.Fatalf("save %d: not shown within %v", k, deadline)
			}
			st, js := h.get(PatchPath + "?doc=" + url.QueryEscape("/big.html") + "&from=" + url.QueryEscape(shown))
			if st != 200 {
				b.Fatalf("save %d: the patch from %s: status %d", k, shown, st)
			}
			var pt patch
			if err := json.Unmarshal([]byte(js), &pt); err != nil {
				b.Fatal(err)
			}
			shown = pt.V
			for _, op := range pt.Ops {
				done = done || strings.Contains(op.HTML, want)
			}
		}
		lat = append(lat, time.Since(began))
		b.StopTimer()
		stop()
		time.Sleep(Quiet + MaxDelay + IdleGC) // let the save settle
		b.StartTimer()
	}
	b.StopTimer()
	sort.Slice(lat, func(i, j int) bool { return lat[i] < lat[j] })
	b.ReportMetric(float64(nearestRank(lat, 50))/1e6, "p50-ms")
	b.ReportMetric(float64(nearestRank(lat, 95))/1e6, "p95-ms")
	b.ReportMetric(float64(lat[len(lat)-1])/1e6, "max-ms")
}

// BenchmarkEvaluate1000 is the part of the latency that is evaluation and
// drawing: calcdoc.Parse and build.Sheet of the 1,000-statement document.
func BenchmarkEvaluate1000(b *testing.B) {
	src := []byte(bigDoc(1))
	for i := 0; i < b.N; i++ {
		doc := calcdoc.Parse("big.md", src, kind.Standard())
		if _, err := build.Sheet(doc, build.Options{Version: "bench", HeadExtra: liveHead("/big.html", "1")}); err != nil {
			b.Fatal(err)
		}
	}
}

// getSized fetches a path of the preview into a buffer of the length the
// response gives, as a browser does.
func (h *harness) getSized(path string) (int, []byte) {
	h.t.Helper()
	resp, err := client.Get(h.base + path)
	if err != nil {
		h.t.Fatalf("GET %s: %v", path, err)
	}
	defer resp.Body.Close()
	buf := bytes.NewBuffer(make([]byte, 0, max(0, resp.ContentLength)+512))
	if _, err := io.Copy(buf, resp.Body); err != nil {
		h.t.Fatalf("GET %s: reading the body: %v", path, err)
	}
	return resp.StatusCode, buf.Bytes()
}

// BenchmarkRebuild is the preview's work for one save of a
// 10,000-statement document whose last block changed, without the file
// system and HTTP: calcdoc.Reevaluate from the save before, the sheet
// with the drawings of the blocks taken over, and the patch from the page
// before.
//
//	go test -run '^$' -bench Rebuild -cpuprofile cpu.out ./cmd/internal/preview/
func BenchmarkRebuild(b *testing.B) { rebuild(b, true) }

// BenchmarkRebuildFirst is BenchmarkRebuild with the edit in the first
// block: every block below it is evaluated again, and the drawing of
// those that read nothing the edit changed is copied from the sheet
// before (calcdoc.Block.DrawnLike).
func BenchmarkRebuildFirst(b *testing.B) { rebuild(b, false) }

func rebuild(b *testing.B, last bool) {
	w := &Watcher{boot: "bench"}
	j := &evalJob{key: "big.html", file: "/bench/big.md", rel: "big.md", display: "big.md", src: []byte(longDoc(0, 100, last))}
	p, _, next := w.evaluate(j, expr.NewBudget(expr.DefaultBudget), nil)
	b.ResetTimer()
	for k := 1; k <= b.N; k++ {
		j := &evalJob{key: j.key, file: j.file, rel: j.rel, display: j.display, src: []byte(longDoc(k, 100, last))}
		q, _, nb := w.evaluate(j, expr.NewBudget(expr.DefaultBudget), next)
		q.before = &page{version: p.version, body: p.body, lay: p.lay}
		if q.before.patchTo(q) == nil {
			b.Fatal("no patch")
		}
		p, next = q, nb
	}
}
