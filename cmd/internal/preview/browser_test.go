//go:build unix

package preview

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"calcdoc/render/pdf/pdftest"
)

// browserDeadline bounds the waits on the browser, which takes a few
// seconds to start.
const browserDeadline = 60 * time.Second

// TestBrowserReloads opens a document's page in headless Chromium, saves
// the document, and checks that the browser brought the page up to date by
// itself: the server sees the browser's event stream open with the first
// page's version, then, after the save, a request for the patch, and no
// second GET of the page. Over the DevTools protocol (on a pipe) it scrolls
// the page down before the save, reads the scroll position after the
// patch, and compares the patched body with the new sheet's, as the
// browser reads both.
//
// Skipped when Chromium is missing, unless CALCDOC_REQUIRE_BROWSER=1.
func TestBrowserReloads(t *testing.T) {
	chrome := pdftest.Chromium(t)
	dir := t.TempDir()
	p := filepath.Join(dir, "a.md")
	// Long enough to scroll: 300 paragraphs after the calculation.
	long := "\n" + strings.Repeat("A paragraph of prose that makes the sheet long.\n\n", 300)
	write(t, p, docSrc(1)+long)

	var mu sync.Mutex
	gets, patches := 0, 0 // the browser's GETs of /a.html and of its patches
	var seen []string     // the versions its streams for /a.html were opened with
	wrap := func(next http.Handler) http.Handler {
		return http.HandlerFunc(func(rw http.ResponseWriter, r *http.Request) {
			if strings.Contains(r.UserAgent(), "Chrome") {
				mu.Lock()
				switch {
				case r.URL.Path == "/a.html" && r.Method == http.MethodGet:
					gets++
				case r.URL.Path == PatchPath && r.URL.Query().Get("doc") == "/a.html":
					patches++
				case r.URL.Path == EventsPath && r.URL.Query().Get("doc") == "/a.html":
					seen = append(seen, r.URL.Query().Get("v"))
				}
				mu.Unlock()
			}
			next.ServeHTTP(rw, r)
		})
	}
	h := startWrapped(t, Config{Paths: []string{dir}}, wrap)
	_, body := h.get("/a.html")
	v1, _ := pageVersion(t, body)

	profile := t.TempDir()
	logFile, err := os.Create(filepath.Join(profile, "chromium.log"))
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(chrome,
		"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir="+filepath.Join(profile, "user"),
		"--remote-debugging-pipe",
		h.base+"/a.html")
	cmd.Stdout, cmd.Stderr = logFile, logFile
	cmd.Env = append(os.Environ(),
		"XDG_CONFIG_HOME="+filepath.Join(profile, "config"),
		"XDG_CACHE_HOME="+filepath.Join(profile, "cache"))
	if len(profile) < 60 { // Chromium's socket path under TMPDIR must stay short
		cmd.Env = append(cmd.Env, "TMPDIR="+profile)
	}
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	// The DevTools pipe: Chromium reads commands on fd 3, answers on fd 4.
	cmdR, cmdW, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	ansR, ansW, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	cmd.ExtraFiles = []*os.File{cmdR, ansW}
	if err := cmd.Start(); err != nil {
		t.Fatalf("starting %s: %v", chrome, err)
	}
	cmdR.Close()
	ansW.Close()
	dt := newDevtools(cmdW, ansR)
	defer cmdW.Close()
	// Registered after TempDir, so it runs before the folder is removed.
	t.Cleanup(func() {
		syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
		cmd.Wait()
		logFile.Close()
		if t.Failed() {
			if b, err := os.ReadFile(logFile.Name()); err == nil {
				t.Logf("chromium said:\n%s", b)
			}
		}
	})

	waitBrowser := func(what string, ok func(gets int, seen []string) bool) {
		t.Helper()
		end := time.Now().Add(browserDeadline)
		for {
			mu.Lock()
			done := ok(gets, seen)
			g, s := gets, append([]string(nil), seen...)
			mu.Unlock()
			if done {
				return
			}
			if time.Now().After(end) {
				t.Fatalf("%s: not seen within %v (GETs of the page: %d; streams opened with %q)", what, browserDeadline, g, s)
			}
			time.Sleep(20 * time.Millisecond)
		}
	}
	has := func(seen []string, v string) bool {
		for _, s := range seen {
			if s == v {
				return true
			}
		}
		return false
	}
	waitBrowser("the browser loads the page and opens its stream", func(g int, s []string) bool {
		return g == 1 && has(s, v1)
	})
	session := dt.attachPage(t)
	const y = 1500
	if got := dt.eval(t, session, fmt.Sprintf("window.scrollTo(0, %d); window.scrollY", y)); got != y {
		t.Fatalf("scrolled to %v, want %d: is the page long enough?", got, y)
	}

	saveRenameOver(t, p, docSrc(2)+long)
	body = h.wait("/a.html", showsSave(2))
	v2, _ := pageVersion(t, body)
	_ = v2
	waitBrowser("the browser asks for what changed", func(g int, s []string) bool {
		return patches >= 1 // mu is held
	})
	end := time.Now().Add(browserDeadline)
	for {
		note := dt.evalString(t, session, `(document.querySelector(".desc") || {}).textContent + " " + document.readyState`)
		got := dt.eval(t, session, "window.scrollY")
		if note == "save-2 complete" && got == y {
			break
		}
		if time.Now().After(end) {
			t.Fatalf("after the patch: the page shows %q and is scrolled to %v, want save-2 at %d", note, got, y)
		}
		time.Sleep(20 * time.Millisecond)
	}
	// patched, not loaded again: the page's DOM is the new sheet's
	mu.Lock()
	g := gets
	mu.Unlock()
	if g != 1 {
		t.Errorf("the browser loaded the page %d times, want once (the save patched in)", g)
	}
	if got := dt.evalString(t, session, `document.querySelector('meta[name="calcdoc-live"]').getAttribute("content")`); got != v2 {
		t.Errorf("the patched page says it is version %q, want %q", got, v2)
	}
	want := dt.evalString(t, session, `(function () { var r = new XMLHttpRequest(); r.open("GET", location.href, false); r.send();
		var d = new DOMParser().parseFromString(r.responseText, "text/html"); return d.body.innerHTML.replace(/\s+/g, " "); })()`)
	if got := dt.evalString(t, session, `document.body.innerHTML.replace(/\s+/g, " ")`); got != want {
		t.Errorf("the patched page's body differs from the new sheet's:\n%.300s\n%.300s", got, want)
	}
}

// devtools speaks the DevTools protocol on Chromium's pipe: JSON messages
// ended by a NUL byte, answers matched to commands by id.
type devtools struct {
	mu      sync.Mutex
	w       io.Writer
	id      int
	waiting map[int]chan devtoolsAnswer
}

type devtoolsAnswer struct {
	Result json.RawMessage `json:"result"`
	Error  *struct {
		Message string `json:"message"`
	} `json:"error"`
}

func newDevtools(w io.Writer, r io.Reader) *devtools {
	d := &devtools{w: w, waiting: map[int]chan devtoolsAnswer{}}
	go func() {
		br := bufio.NewReader(r)
		for {
			msg, err := br.ReadBytes(0)
			if err != nil {
				return
			}
			var m struct {
				ID int `json:"id"`
				devtoolsAnswer
			}
			if json.Unmarshal(msg[:len(msg)-1], &m) != nil || m.ID == 0 {
				continue // an event
			}
			d.mu.Lock()
			ch := d.waiting[m.ID]
			delete(d.waiting, m.ID)
			d.mu.Unlock()
			if ch != nil {
				ch <- m.devtoolsAnswer
			}
		}
	}()
	return d
}

func (d *devtools) call(t *testing.T, session, method string, params any, result any) {
	t.Helper()
	d.mu.Lock()
	d.id++
	id := d.id
	ch := make(chan devtoolsAnswer, 1)
	d.waiting[id] = ch
	msg := map[string]any{"id": id, "method": method, "params": params}
	if session != "" {
		msg["sessionId"] = session
	}
	b, _ := json.Marshal(msg)
	_, err := d.w.Write(append(b, 0))
	d.mu.Unlock()
	if err != nil {
		t.Fatalf("devtools %s: %v", method, err)
	}
	select {
	case a := <-ch:
		if a.Error != nil {
			t.Fatalf("devtools %s: %s", method, a.Error.Message)
		}
		if result != nil {
			if err := json.Unmarshal(a.Result, result); err != nil {
				t.Fatalf("devtools %s: %v", method, err)
			}
		}
	case <-time.After(browserDeadline):
		t.Fatalf("devtools %s: no answer within %v", method, browserDeadline)
	}
}

// attachPage attaches to the browser's page and returns the session.
func (d *devtools) attachPage(t *testing.T) string {
	t.Helper()
	var targets struct {
		TargetInfos []struct {
			TargetID string `json:"targetId"`
			Type     string `json:"type"`
		} `json:"targetInfos"`
	}
	d.call(t, "", "Target.getTargets", map[string]any{}, &targets)
	for _, ti := range targets.TargetInfos {
		if ti.Type == "page" {
			var att struct {
				SessionID string `json:"sessionId"`
			}
			d.call(t, "", "Target.attachToTarget", map[string]any{"targetId": ti.TargetID, "flatten": true}, &att)
			return att.SessionID
		}
	}
	t.Fatalf("the browser has no page")
	return ""
}

type evalResult struct {
	Result struct {
		Value json.RawMessage `json:"value"`
	} `json:"result"`
}

// eval evaluates a number-valued expression in the page.
func (d *devtools) eval(t *testing.T, session, expr string) float64 {
	t.Helper()
	var r evalResult
	d.call(t, session, "Runtime.evaluate", map[string]any{"expression": expr, "returnByValue": true}, &r)
	var v float64
	if err := json.Unmarshal(r.Result.Value, &v); err != nil {
		t.Fatalf("%s gave %s, not a number", expr, r.Result.Value)
	}
	return v
}

// evalString evaluates a string-valued expression in the page.
func (d *devtools) evalString(t *testing.T, session, expr string) string {
	t.Helper()
	var r evalResult
	d.call(t, session, "Runtime.evaluate", map[string]any{"expression": expr, "returnByValue": true}, &r)
	var s string
	if err := json.Unmarshal(r.Result.Value, &s); err != nil {
		t.Fatalf("%s gave %s, not a string", expr, r.Result.Value)
	}
	return s
}
