package build

import (
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"testing"
	"time"
)

func put(t *testing.T, path, data string, age time.Duration) {
	t.Helper()
	if err := os.WriteFile(path, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
	when := runStart.Add(-age)
	if err := os.Chtimes(path, when, when); err != nil {
		t.Fatal(err)
	}
}

func read(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// TestRemoveStale: the temporary files of earlier, interrupted writes of
// an output are removed by the next write of it; files of another output,
// files newer than this run, files of a process that still runs and other
// names are kept.
func TestRemoveStale(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "a.html")
	stale := []string{".a.html.tmp-999999999-123", ".a.html.tmp-999999999-124.html", ".a.html.tmp-4242424", ".a.html.87654.tmp", "..a.html.tmp-999999999-5.678.tmp", "..a.html.tmp-999999999-5.html.678.tmp"}
	for _, n := range stale {
		put(t, filepath.Join(dir, n), "x", time.Hour)
	}
	kept := []string{
		".b.html.tmp-999999999-1",     // another output
		"a.html.tmp-999999999-1",      // not hidden: not ours
		".a.html.tmp-999999999-1.bak", // another name
		".a.html.tmp-999999999-1.pdf", // another extension
		".a.htmlx.tmp-999999999-1",    // another output
	}
	if processRuns(os.Getppid()) { // where the system can tell
		kept = append(kept, ".a.html.tmp-"+strconv.Itoa(os.Getppid())+"-7") // a process that runs
	}
	for _, n := range kept {
		put(t, filepath.Join(dir, n), "x", time.Hour)
	}
	put(t, filepath.Join(dir, ".a.html.tmp-999999999-9"), "x", -time.Hour) // newer than this run
	kept = append(kept, ".a.html.tmp-999999999-9")
	if err := WriteFileAtomic(out, []byte("new")); err != nil {
		t.Fatal(err)
	}
	for _, n := range stale {
		if _, err := os.Stat(filepath.Join(dir, n)); err == nil {
			t.Errorf("%s was not removed", n)
		}
	}
	for _, n := range kept {
		if _, err := os.Stat(filepath.Join(dir, n)); err != nil {
			t.Errorf("%s was removed", n)
		}
	}
	if read(t, out) != "new" {
		t.Errorf("the output was not written")
	}
}

// TestPairRecover: a journal left between the two renames is completed by
// the next NewPair; after a Commit or an Abort nothing but the targets is
// left.
func TestPairRecover(t *testing.T) {
	dir := t.TempDir()
	html, pdf := filepath.Join(dir, "p.html"), filepath.Join(dir, "p.pdf")
	put(t, html, "html 2", 0) // renamed already by the killed run
	put(t, pdf, "pdf 1", 0)   // still the old one
	tmp := filepath.Join(dir, ".p.pdf.tmp-999999999-1")
	put(t, tmp, "pdf 2", 0)
	rec := `{"HTML":"` + html + `","PDF":"` + pdf + `","TmpHTML":"` + filepath.Join(dir, ".p.html.tmp-999999999-1") + `","TmpPDF":"` + tmp + `"}`
	put(t, JournalPath(html), rec, 0)
	p, recovered, err := NewPair(html, pdf)
	if err != nil || !recovered {
		t.Fatalf("NewPair: recovered %v, %v", recovered, err)
	}
	if read(t, html) != "html 2" || read(t, pdf) != "pdf 2" {
		t.Errorf("after recovery: %q and %q, want html 2 and pdf 2", read(t, html), read(t, pdf))
	}
	os.WriteFile(p.TmpHTML, []byte("html 3"), 0o600)
	os.WriteFile(p.TmpPDF, []byte("pdf 3"), 0o600)
	if err := p.Commit(); err != nil {
		t.Fatal(err)
	}
	if read(t, html) != "html 3" || read(t, pdf) != "pdf 3" {
		t.Errorf("after commit: %q and %q", read(t, html), read(t, pdf))
	}
	p, _, err = NewPair(html, pdf)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(p.TmpHTML, []byte("html 4"), 0o600)
	p.Abort()
	es, _ := os.ReadDir(dir)
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	if !slices.Equal(names, []string{"p.html", "p.pdf"}) || read(t, html) != "html 3" {
		t.Errorf("after abort: %v, html %q", names, read(t, html))
	}
	// a journal of another pair is not acted on
	put(t, JournalPath(html), `{"HTML":"/elsewhere.html","PDF":"/elsewhere.pdf"}`, 0)
	if _, _, err := NewPair(html, pdf); err == nil {
		t.Errorf("a journal of another pair was not reported")
	}
}
