package preview

import (
	"errors"
	"fmt"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestSaves follows each way of saving a document and checks that the
// served page shows the new evaluation, and only it, within the deadline.
func TestSaves(t *testing.T) {
	cases := []struct {
		name string
		run  func(t *testing.T, h *harness, dir string)
	}{
		{"save in place", func(t *testing.T, h *harness, dir string) {
			saveInPlace(t, filepath.Join(dir, "a.md"), docSrc(2))
			h.wait("/a.html", showsSave(2))
		}},
		{"rename over the original", func(t *testing.T, h *harness, dir string) {
			saveRenameOver(t, filepath.Join(dir, "a.md"), docSrc(2))
			h.wait("/a.html", showsSave(2))
			h.wait("/", listed("/a.html", "checks hold"))
		}},
		{"backup then write", func(t *testing.T, h *harness, dir string) {
			saveBackupThenWrite(t, filepath.Join(dir, "a.md"), docSrc(2))
			h.wait("/a.html", showsSave(2))
			// The backup a.md~ is not a document.
			h.wait("/", func(st int, body string) string {
				if rows := listing(body); len(rows) != 1 {
					return fmt.Sprintf("the listing has %v, want only /a.html", rows)
				}
				return ""
			})
		}},
		{"delete and re-create", func(t *testing.T, h *harness, dir string) {
			p := filepath.Join(dir, "a.md")
			if err := os.Remove(p); err != nil {
				t.Fatal(err)
			}
			h.wait("/a.html", isGone)
			h.wait("/", unlisted("/a.html"))
			write(t, p, docSrc(2))
			h.wait("/a.html", showsSave(2))
			h.wait("/", listed("/a.html", "checks hold"))
		}},
		{"a new file", func(t *testing.T, h *harness, dir string) {
			write(t, filepath.Join(dir, "b.md"), docSrc(4))
			h.wait("/b.html", showsSave(4))
			h.wait("/", listed("/b.html", "checks hold"))
			h.wait("/a.html", showsSave(1))
		}},
		{"a new file in a new folder", func(t *testing.T, h *harness, dir string) {
			// The folders are made and the file written at once: it may
			// exist before its folder is watched.
			write(t, filepath.Join(dir, "new", "deeper", "c.md"), docSrc(5))
			h.wait("/new/deeper/c.html", showsSave(5))
			saveRenameOver(t, filepath.Join(dir, "new", "deeper", "c.md"), docSrc(6))
			h.wait("/new/deeper/c.html", showsSave(6))
		}},
		{"a folder moved in, then out", func(t *testing.T, h *harness, dir string) {
			outside := t.TempDir()
			write(t, filepath.Join(outside, "moved", "d.md"), docSrc(7))
			if err := os.Rename(filepath.Join(outside, "moved"), filepath.Join(dir, "moved")); err != nil {
				t.Fatal(err)
			}
			h.wait("/moved/d.html", showsSave(7))
			saveInPlace(t, filepath.Join(dir, "moved", "d.md"), docSrc(8))
			h.wait("/moved/d.html", showsSave(8))
			if err := os.Rename(filepath.Join(dir, "moved"), filepath.Join(outside, "gone")); err != nil {
				t.Fatal(err)
			}
			h.wait("/moved/d.html", isGone)
			h.wait("/", unlisted("/moved/d.html"))
			// The folder moved away is no longer watched.
			saveInPlace(t, filepath.Join(outside, "gone", "d.md"), docSrc(9))
			saveInPlace(t, filepath.Join(dir, "a.md"), docSrc(3))
			h.wait("/a.html", showsSave(3))
			h.wait("/moved/d.html", isGone)
		}},
		{"a burst of 30 saves", func(t *testing.T, h *harness, dir string) {
			p := filepath.Join(dir, "a.md")
			began := time.Now()
			for k := 1; k <= 30; k++ {
				if k%2 == 0 {
					saveInPlace(t, p, docSrc(k))
				} else {
					saveRenameOver(t, p, docSrc(k))
				}
				// one save every 4 ms: 30 saves in about 120 ms
				if d := time.Until(began.Add(time.Duration(k) * 4 * time.Millisecond)); d > 0 {
					time.Sleep(d)
				}
			}
			t.Logf("30 saves in %v", time.Since(began))
			h.wait("/a.html", showsSave(30))
			// The last save stays: no later rebuild brings back an
			// earlier one.
			time.Sleep(3 * MaxDelay)
			if why := showsSave(30)(h.get("/a.html")); why != "" {
				t.Fatalf("after the burst had settled: %s", why)
			}
			h.wait("/", listed("/a.html", "a check fails"))
		}},
		{"a syntax error, then a fix", func(t *testing.T, h *harness, dir string) {
			p := filepath.Join(dir, "a.md")
			saveInPlace(t, p, "# Feeder check\n\n```calc\nx = 47 V   # save-broken\ny[V] = 2 * x +\ncheck y <= 60 V\n```\n")
			body := h.wait("/a.html", func(st int, body string) string {
				if st != http.StatusOK {
					return fmt.Sprintf("status %d", st)
				}
				if !strings.Contains(body, `<div class="desc">save-broken</div>`) {
					return "the broken save is not shown"
				}
				return ""
			})
			if !strings.Contains(body, `class="err"`) {
				t.Errorf("the broken save's page shows no error in place")
			}
			// Save 1 showed y = 22.00 V; nothing of it may remain.
			if strings.Contains(body, "save-1<") || strings.Contains(body, "<mn>22.00</mn>") {
				t.Errorf("the broken save's page still shows values of the save before")
			}
			h.wait("/", listed("/a.html", "errors"))
			saveInPlace(t, p, docSrc(3))
			h.wait("/a.html", showsSave(3))
			h.wait("/", listed("/a.html", "checks hold"))
		}},
		{"no longer a document", func(t *testing.T, h *harness, dir string) {
			// A folder's .md file without an evaluated block is not a
			// document.
			saveInPlace(t, filepath.Join(dir, "a.md"), "# Feeder check\n\nNothing evaluated here.\n")
			h.wait("/a.html", isGone)
			h.wait("/", unlisted("/a.html"))
			saveInPlace(t, filepath.Join(dir, "a.md"), docSrc(2))
			h.wait("/a.html", showsSave(2))
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			write(t, filepath.Join(dir, "a.md"), docSrc(1))
			h := start(t, Config{Paths: []string{dir}})
			h.wait("/a.html", showsSave(1))
			c.run(t, h, dir)
		})
	}
}

// TestListing checks the states the listing shows, and which files it
// leaves out.
func TestListing(t *testing.T) {
	dir := t.TempDir()
	write(t, filepath.Join(dir, "hold.md"), docSrc(1))  // y = 22 V <= 60 V
	write(t, filepath.Join(dir, "fail.md"), docSrc(25)) // y = 70 V > 60 V
	write(t, filepath.Join(dir, "broken.md"), "```calc\nx = 2 *\n```\n")
	write(t, filepath.Join(dir, "sub", "plain.md"), "# Prose only\n")
	write(t, filepath.Join(dir, "notes.txt"), docSrc(1))
	write(t, filepath.Join(dir, ".git", "x.md"), docSrc(1))
	write(t, filepath.Join(dir, "node_modules", "y.md"), docSrc(1))
	h := start(t, Config{Paths: []string{dir}})
	_, body := h.get("/")
	rows := listing(body)
	want := map[string]string{
		"/broken.html": "errors (1)",
		"/fail.html":   "a check fails (1 of 1 not satisfied)",
		"/hold.html":   "checks hold (1 of 1)",
	}
	if fmt.Sprint(rows) != fmt.Sprint(want) {
		t.Errorf("listing rows = %v, want %v", rows, want)
	}
	for _, p := range []string{"/sub/plain.html", "/notes.html", "/.git/x.html", "/node_modules/y.html"} {
		if st, _ := h.get(p); st != http.StatusNotFound {
			t.Errorf("GET %s: status %d, want 404", p, st)
		}
	}
	// A new .git folder is not watched either.
	write(t, filepath.Join(dir, "sub", ".git", "z.md"), docSrc(2))
	write(t, filepath.Join(dir, "sub", "late.md"), docSrc(2))
	h.wait("/sub/late.html", showsSave(2))
	if st, _ := h.get("/sub/.git/z.html"); st != http.StatusNotFound {
		t.Errorf("GET /sub/.git/z.html: status %d, want 404", st)
	}
}

// TestSingleFile: a file PATH is served alone, though its folder is
// watched; a file PATH is served even without a calc block.
func TestSingleFile(t *testing.T) {
	dir := t.TempDir()
	write(t, filepath.Join(dir, "a.md"), docSrc(1))
	write(t, filepath.Join(dir, "other.md"), docSrc(2))
	h := start(t, Config{Paths: []string{filepath.Join(dir, "a.md")}})
	h.wait("/a.html", showsSave(1))
	saveBackupThenWrite(t, filepath.Join(dir, "a.md"), docSrc(3))
	h.wait("/a.html", showsSave(3))
	write(t, filepath.Join(dir, "new.md"), docSrc(4))
	saveRenameOver(t, filepath.Join(dir, "a.md"), docSrc(5))
	h.wait("/a.html", showsSave(5))
	for _, p := range []string{"/other.html", "/new.html"} {
		if st, _ := h.get(p); st != http.StatusNotFound {
			t.Errorf("GET %s: status %d, want 404", p, st)
		}
	}
	_, body := h.get("/")
	if rows := listing(body); len(rows) != 1 {
		t.Errorf("listing = %v, want only /a.html", rows)
	}
	saveInPlace(t, filepath.Join(dir, "a.md"), "# Feeder check\n\nProse only.\n")
	h.wait("/a.html", func(st int, body string) string {
		if st != http.StatusOK || !strings.Contains(body, "Prose only.") {
			return fmt.Sprintf("status %d; the prose-only save is not shown", st)
		}
		return ""
	})
}

// TestSameAddress: of two files with the same address the one from the
// earlier PATH is served; the other takes the address when it is freed.
func TestSameAddress(t *testing.T) {
	one, two := t.TempDir(), t.TempDir()
	write(t, filepath.Join(one, "a.md"), docSrc(1))
	write(t, filepath.Join(two, "a.md"), docSrc(2))
	h := start(t, Config{Paths: []string{one, two}})
	h.wait("/a.html", showsSave(1))
	_, body := h.get("/")
	if !strings.Contains(body, filepath.Join(two, "a.md")+" (/a.html)") {
		t.Errorf("the listing does not name the file kept from /a.html")
	}
	if err := os.Remove(filepath.Join(one, "a.md")); err != nil {
		t.Fatal(err)
	}
	h.wait("/a.html", showsSave(2))
	write(t, filepath.Join(one, "a.md"), docSrc(3))
	time.Sleep(3 * MaxDelay)
	h.wait("/a.html", showsSave(2))
}

// TestUnreadable: a file that cannot be read is served as a page saying
// so, never as the sheet of the save before.
func TestUnreadable(t *testing.T) {
	old := maxSize
	maxSize = 4096
	t.Cleanup(func() { maxSize = old })
	dir := t.TempDir()
	p := filepath.Join(dir, "a.md")
	write(t, p, docSrc(1))
	h := start(t, Config{Paths: []string{dir}})
	h.wait("/a.html", showsSave(1))
	cantRead := func(st int, body string) string {
		if st != http.StatusInternalServerError {
			return fmt.Sprintf("status %d, want 500", st)
		}
		if !strings.Contains(body, "Cannot read") || saveNote.MatchString(body) {
			return "the page does not say that the file cannot be read, or shows values"
		}
		return ""
	}
	saveInPlace(t, p, docSrc(2)+strings.Repeat("padding line\n", 400))
	h.wait("/a.html", cantRead)
	h.wait("/", listed("/a.html", "cannot be read"))
	if os.Geteuid() != 0 { // root reads a file whatever its mode
		saveInPlace(t, p, docSrc(3))
		h.wait("/a.html", showsSave(3))
		if err := os.Chmod(p, 0); err != nil {
			t.Fatal(err)
		}
		h.wait("/a.html", cantRead)
		os.Chmod(p, 0o644)
	}
	saveInPlace(t, p, docSrc(4))
	h.wait("/a.html", showsSave(4))
}

// TestOutput: with Out, every evaluation is also written, atomically and
// without the live script; the served page keeps the script.
func TestOutput(t *testing.T) {
	cases := []struct {
		name   string
		single bool
	}{
		{"into a folder", false},
		{"into one file", true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir, out := t.TempDir(), t.TempDir()
			write(t, filepath.Join(dir, "sub", "a.md"), docSrc(1))
			cfg := Config{Paths: []string{dir}, Out: out}
			target := filepath.Join(out, "sub", "a.html")
			if c.single {
				target = filepath.Join(out, "sheet.html")
				cfg = Config{Paths: []string{filepath.Join(dir, "sub", "a.md")}, Out: target}
			}
			h := start(t, cfg)
			addr := "/sub/a.html"
			if c.single {
				addr = "/a.html"
			}
			h.wait(addr, showsSave(1))
			saveRenameOver(t, filepath.Join(dir, "sub", "a.md"), docSrc(2))
			h.wait(addr, showsSave(2))
			end := time.Now().Add(deadline)
			for {
				b, err := os.ReadFile(target)
				built := string(b)
				if err == nil && strings.Contains(built, `<div class="desc">save-2</div>`) {
					if strings.Contains(built, "<script") || strings.Contains(built, "calcdoc-live") {
						t.Errorf("the built file carries the live script")
					}
					break
				}
				if time.Now().After(end) {
					t.Fatalf("%s does not show save 2 after %v (err %v)", target, deadline, err)
				}
				time.Sleep(10 * time.Millisecond)
			}
			// Nothing but the sheet is left in the output folder (no
			// temporary file of the atomic write).
			var files []string
			filepath.WalkDir(out, func(p string, d os.DirEntry, err error) error {
				if err == nil && !d.IsDir() {
					files = append(files, p)
				}
				return nil
			})
			if len(files) != 1 || files[0] != target {
				t.Errorf("output files = %v, want only %s", files, target)
			}
		})
	}
}

// TestConfigErrors: bad configurations are ConfigErrors, each naming the
// problem.
func TestConfigErrors(t *testing.T) {
	dir := t.TempDir()
	write(t, filepath.Join(dir, "a.md"), docSrc(1))
	write(t, filepath.Join(dir, "b.txt"), "x")
	cases := []struct {
		name string
		cfg  Config
		want string
	}{
		{"no PATH", Config{}, "at least one PATH"},
		{"a missing PATH", Config{Paths: []string{filepath.Join(dir, "none")}}, "no such file or folder"},
		{"not a .md file", Config{Paths: []string{filepath.Join(dir, "b.txt")}}, "not a Markdown document"},
		{"one output file for a folder", Config{Paths: []string{dir}, Out: filepath.Join(dir, "x.html")}, "names one file"},
		{"an output folder that is a file", Config{Paths: []string{dir}, Out: filepath.Join(dir, "b.txt")}, "not a folder"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w, err := New(c.cfg)
			if err == nil {
				w.Close()
				t.Fatalf("New succeeded, want an error containing %q", c.want)
			}
			var ce *ConfigError
			if !errors.As(err, &ce) || !strings.Contains(err.Error(), c.want) {
				t.Errorf("New: %v (%T), want a ConfigError containing %q", err, err, c.want)
			}
		})
	}
}

// TestLog: one line per rebuild, naming the file, the time taken, the
// checks not satisfied and the errors.
func TestLog(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.md")
	write(t, p, docSrc(25))
	h := start(t, Config{Paths: []string{dir}})
	saveRenameOver(t, p, "```calc\nx = 2 *\ny = 3 +\n```\n")
	h.wait("/", listed("/a.html", "errors"))
	lines := strings.Split(strings.TrimSpace(h.log.String()), "\n")
	if len(lines) != 2 {
		t.Fatalf("log = %q, want two lines", lines)
	}
	for i, want := range []string{"1 of 1 checks not satisfied, 0 errors", "0 of 0 checks not satisfied, 2 errors"} {
		if !strings.Contains(lines[i], p+": evaluated in ") || !strings.Contains(lines[i], " ms; "+want) {
			t.Errorf("log line %d = %q, want the file, the time and %q", i+1, lines[i], want)
		}
	}
}
