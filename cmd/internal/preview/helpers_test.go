package preview

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"
)

// deadline bounds every wait for the preview to follow a save. It is a
// failure bound, not a timing target: the latency is measured by
// BenchmarkSaveToPage.
const deadline = 5 * time.Second

// syncBuffer collects the log lines of a watcher.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

// harness is a watcher serving on a loopback port of its own.
type harness struct {
	t    testing.TB
	w    *Watcher
	base string // http://127.0.0.1:PORT
	log  *syncBuffer
}

// start serves cfg with Serve on 127.0.0.1:0 until the test ends.
func start(t testing.TB, cfg Config) *harness {
	t.Helper()
	return startWrapped(t, cfg, nil)
}

// startWrapped is start with the handler wrapped by wrap; with a wrap the
// test runs its own http.Server around the watcher instead of Serve.
func startWrapped(t testing.TB, cfg Config, wrap func(http.Handler) http.Handler) *harness {
	t.Helper()
	log := &syncBuffer{}
	cfg.Log = log
	if cfg.Version == "" {
		cfg.Version = "test"
	}
	w, err := New(cfg)
	if err != nil {
		t.Fatalf("New: %v", err)
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		w.Close()
		t.Fatalf("listen: %v", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	if wrap == nil {
		go func() { done <- Serve(ctx, ln, w) }()
	} else {
		srv := &http.Server{Handler: wrap(w.Handler())}
		go func() {
			go srv.Serve(ln)
			w.Run(ctx)
			sctx, c := context.WithTimeout(context.Background(), deadline)
			defer c()
			done <- srv.Shutdown(sctx)
		}()
	}
	t.Cleanup(func() {
		cancel()
		select {
		case err := <-done:
			if err != nil {
				t.Errorf("serve: %v", err)
			}
		case <-time.After(2 * deadline):
			t.Errorf("the server did not shut down within %v", 2*deadline)
		}
		if t.Failed() {
			t.Logf("watch log:\n%s", log.String())
		}
	})
	return &harness{t: t, w: w, base: "http://" + ln.Addr().String(), log: log}
}

var client = &http.Client{Timeout: deadline}

// get fetches a path of the preview.
func (h *harness) get(path string) (int, string) {
	h.t.Helper()
	resp, err := client.Get(h.base + path)
	if err != nil {
		h.t.Fatalf("GET %s: %v", path, err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		h.t.Fatalf("GET %s: reading the body: %v", path, err)
	}
	return resp.StatusCode, string(b)
}

// wait polls path until check returns "" (what it wants is there), and
// fails the test with check's last complaint when the deadline passes.
func (h *harness) wait(path string, check func(status int, body string) string) string {
	h.t.Helper()
	end := time.Now().Add(deadline)
	for {
		st, body := h.get(path)
		why := check(st, body)
		if why == "" {
			return body
		}
		if time.Now().After(end) {
			h.t.Fatalf("GET %s: after %v: %s", path, deadline, why)
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// raw sends one request line as it is, with Host, and returns the status
// and body: the Go client would clean some of the paths the tests send.
func (h *harness) raw(method, target, host string) (int, string, http.Header) {
	h.t.Helper()
	addr := strings.TrimPrefix(h.base, "http://")
	conn, err := net.DialTimeout("tcp", addr, deadline)
	if err != nil {
		h.t.Fatalf("dial: %v", err)
	}
	defer conn.Close()
	conn.SetDeadline(time.Now().Add(deadline))
	if host == "" {
		host = addr
	}
	fmt.Fprintf(conn, "%s %s HTTP/1.1\r\nHost: %s\r\nConnection: close\r\nContent-Length: 0\r\n\r\n", method, target, host)
	req, _ := http.NewRequest(method, "http://"+addr, nil)
	resp, err := http.ReadResponse(bufio.NewReader(conn), req)
	if err != nil {
		h.t.Fatalf("%s %s: %v", method, target, err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp.StatusCode, string(b), resp.Header
}

// docSrc is save number k of the test document: x = (10+k) V, y = 2x, and
// a check y <= 60 V that holds for k <= 20. Its note "save-k" names the
// save on the sheet.
func docSrc(k int) string {
	return fmt.Sprintf("# Feeder check\n\nSave number %d.\n\n```calc\nx = %d V   # save-%d\ny[V] = 2 * x\ncheck y <= 60 V\n```\n", k, 10+k, k)
}

var saveNote = regexp.MustCompile(`<div class="desc">save-[^<]*</div>`)

// showsSave checks that a page is the sheet of save k and of nothing else:
// its note, y = 2(10+k) V shown with four significant figures (the
// default, LANGUAGE.md section 1) and the verdict of y <= 60 V.
func showsSave(k int) func(int, string) string {
	return func(st int, body string) string {
		if st != http.StatusOK {
			return fmt.Sprintf("status %d, want 200", st)
		}
		notes := saveNote.FindAllString(body, -1)
		want := fmt.Sprintf(`<div class="desc">save-%d</div>`, k)
		if len(notes) != 1 || notes[0] != want {
			return fmt.Sprintf("the page shows the notes %q, want only %q", notes, want)
		}
		y := 20 + 2*k // 2·x, x = 10+k
		if !strings.Contains(body, fmt.Sprintf("<mn>%d.00</mn>", y)) {
			return fmt.Sprintf("the page does not show y = %d.00 V", y)
		}
		verdict := `class="verdict pass"`
		if y > 60 {
			verdict = `class="verdict fail"`
		}
		if !strings.Contains(body, verdict) {
			return fmt.Sprintf("the page lacks the verdict %s of y = %d V <= 60 V", verdict, y)
		}
		if !strings.Contains(body, `<meta name="calcdoc-live"`) {
			return "the served page lacks the live script"
		}
		return ""
	}
}

// isGone checks for the page of an address without a document.
func isGone(st int, body string) string {
	if st != http.StatusNotFound {
		return fmt.Sprintf("status %d, want 404", st)
	}
	if saveNote.MatchString(body) {
		return "the 404 page shows a sheet's values"
	}
	return ""
}

var listRow = regexp.MustCompile(`<tr><td><a href="([^"]*)">([^<]*)</a></td><td>([^<]*)</td>`)

// listing returns the rows of the listing: address → state.
func listing(body string) map[string]string {
	out := map[string]string{}
	for _, m := range listRow.FindAllStringSubmatch(body, -1) {
		out[m[1]] = m[3]
	}
	return out
}

// listed checks that the listing has the address with a state starting
// with state ("" for any).
func listed(href, state string) func(int, string) string {
	return func(st int, body string) string {
		if st != http.StatusOK {
			return fmt.Sprintf("status %d", st)
		}
		rows := listing(body)
		got, ok := rows[href]
		if !ok {
			return fmt.Sprintf("the listing lacks %s: %v", href, rows)
		}
		if !strings.HasPrefix(got, state) {
			return fmt.Sprintf("the listing says %s is %q, want %q", href, got, state)
		}
		return ""
	}
}

// unlisted checks that the listing does not have the address.
func unlisted(href string) func(int, string) string {
	return func(st int, body string) string {
		if st != http.StatusOK {
			return fmt.Sprintf("status %d", st)
		}
		if _, ok := listing(body)[href]; ok {
			return fmt.Sprintf("the listing still has %s", href)
		}
		return ""
	}
}

func write(t *testing.T, path, src string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
}

// The ways editors save, as system calls.

// saveInPlace truncates the file and writes it again.
func saveInPlace(t *testing.T, path, src string) { t.Helper(); write(t, path, src) }

// saveRenameOver writes a temporary file beside the original and renames
// it over the original.
func saveRenameOver(t *testing.T, path, src string) {
	t.Helper()
	tmp := filepath.Join(filepath.Dir(path), "."+filepath.Base(path)+".swp")
	write(t, tmp, src)
	if err := os.Rename(tmp, path); err != nil {
		t.Fatal(err)
	}
}

// saveBackupThenWrite moves the original to a backup and writes a new
// file.
func saveBackupThenWrite(t *testing.T, path, src string) {
	t.Helper()
	if err := os.Rename(path, path+"~"); err != nil {
		t.Fatal(err)
	}
	write(t, path, src)
}
