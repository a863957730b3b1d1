package preview

import (
	"bufio"
	"context"
	"net"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

// traversalSetup makes a watched folder docs with two documents, and
// beside it, outside, a document and a sheet that must never be served,
// with symbolic links to them from inside docs.
func traversalSetup(t *testing.T) (base, docs string) {
	base = t.TempDir()
	docs = filepath.Join(base, "docs")
	write(t, filepath.Join(docs, "a.md"), docSrc(1))
	write(t, filepath.Join(docs, "sub", "b.md"), docSrc(2))
	write(t, filepath.Join(docs, "notes.txt"), "notes")
	secret := strings.Replace(docSrc(3), "save-3", "TOP-SECRET", 1)
	write(t, filepath.Join(base, "secret.md"), secret)
	write(t, filepath.Join(base, "secret.html"), "TOP-SECRET")
	for link, target := range map[string]string{
		filepath.Join(docs, "link.md"):       filepath.Join(base, "secret.md"),
		filepath.Join(docs, "sub", "up.md"):  filepath.Join("..", "..", "secret.md"),
		filepath.Join(docs, "linkdir"):       base,
		filepath.Join(docs, "sub", "uplink"): filepath.Join("..", ".."),
	} {
		if err := os.Symlink(target, link); err != nil {
			t.Skipf("cannot make symbolic links here: %v", err)
		}
	}
	return base, docs
}

// TestTraversal: only the documents under the watched folder are served;
// every way out of it gets 404 and never the outside file's content.
func TestTraversal(t *testing.T) {
	base, docs := traversalSetup(t)
	h := start(t, Config{Paths: []string{docs}})
	cases := []struct {
		name, target string
		status       int
	}{
		{"a document", "/a.html", 200},
		{"a document in a folder", "/sub/b.html", 200},
		{"a percent-encoded letter", "/sub/%62.html", 200},
		{"dot-dot", "/../secret.html", 404},
		{"dot-dot from a folder", "/sub/../../secret.html", 404},
		{"dot-dot inside", "/sub/../a.html", 404},
		{"encoded dot-dot", "/%2e%2e/secret.html", 404},
		{"encoded dot-dot, upper case", "/%2E%2E/secret.html", 404},
		{"half-encoded dot-dot", "/.%2e/secret.html", 404},
		{"encoded dot-dot from a folder", "/sub/%2e%2e/%2e%2e/secret.html", 404},
		{"encoded slash", "/..%2fsecret.html", 404},
		{"encoded backslash", "/..%5csecret.html", 404},
		{"dot segment", "/./a.html", 404},
		{"empty segment", "//a.html", 404},
		{"absolute path", "/" + filepath.ToSlash(filepath.Join(base, "secret.html")), 404},
		{"absolute path, doubled slash", "/" + "/" + filepath.ToSlash(filepath.Join(base, "secret.html")), 404},
		{"absolute-form request", "http://127.0.0.1/../secret.html", 404},
		{"symbolic link to a file outside", "/link.html", 404},
		{"relative symbolic link out", "/sub/up.html", 404},
		{"symbolic link to a folder outside", "/linkdir/secret.html", 404},
		{"relative symbolic link to a folder outside", "/sub/uplink/secret.html", 404},
		{"the source", "/a.md", 404},
		{"another file", "/notes.txt", 404},
		{"a folder", "/sub/", 404},
		{"a NUL", "/a%00.html", 404},
		{"events for a path out", "/_events?doc=/../secret.html&v=0", 404},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st, body, _ := h.raw("GET", c.target, "")
			if st != c.status {
				t.Errorf("GET %s: status %d, want %d", c.target, st, c.status)
			}
			if strings.Contains(body, "TOP-SECRET") {
				t.Errorf("GET %s served the file outside the watched folder", c.target)
			}
		})
	}
	_, body := h.get("/")
	if rows := listing(body); len(rows) != 2 {
		t.Errorf("listing = %v, want /a.html and /sub/b.html only", rows)
	}
	// A folder of the watched tree replaced by a link to the outside.
	if err := os.RemoveAll(filepath.Join(docs, "sub")); err != nil {
		t.Fatal(err)
	}
	h.wait("/sub/b.html", isGone)
	if err := os.Symlink(base, filepath.Join(docs, "sub")); err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(base, "b.md"), docSrc(4))
	saveInPlace(t, filepath.Join(docs, "a.md"), docSrc(5))
	h.wait("/a.html", showsSave(5))
	for _, p := range []string{"/sub/b.html", "/sub/secret.html"} {
		if st, body, _ := h.raw("GET", p, ""); st != 404 || strings.Contains(body, "TOP-SECRET") || saveNote.MatchString(body) {
			t.Errorf("GET %s through a folder link: status %d, want 404 and no sheet", p, st)
		}
	}
}

// TestMethods: only GET and HEAD are answered; nothing writes.
func TestMethods(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.md")
	write(t, p, docSrc(1))
	h := start(t, Config{Paths: []string{dir}})
	for _, m := range []string{"POST", "PUT", "DELETE", "PATCH", "OPTIONS", "TRACE"} {
		for _, target := range []string{"/a.html", "/", "/_events?doc=/a.html&v=0", "/a.md"} {
			st, _, hdr := h.raw(m, target, "")
			if st != http.StatusMethodNotAllowed || hdr.Get("Allow") != "GET, HEAD" {
				t.Errorf("%s %s: status %d, Allow %q; want 405 and GET, HEAD", m, target, st, hdr.Get("Allow"))
			}
		}
	}
	if b, err := os.ReadFile(p); err != nil || string(b) != docSrc(1) {
		t.Errorf("the source changed: %v", err)
	}
	st, body, hdr := h.raw("HEAD", "/a.html", "")
	if st != 200 || body != "" || !strings.HasPrefix(hdr.Get("Content-Type"), "text/html") {
		t.Errorf("HEAD /a.html: status %d, %d body bytes, type %q", st, len(body), hdr.Get("Content-Type"))
	}
	if hdr.Get("Cache-Control") != "no-store" || hdr.Get("Content-Security-Policy") == "" {
		t.Errorf("HEAD /a.html: Cache-Control %q, CSP %q", hdr.Get("Cache-Control"), hdr.Get("Content-Security-Policy"))
	}
}

// TestHost: only requests naming this machine by a loopback name or
// address, or by a name in AllowHosts, are answered (a page elsewhere
// cannot read the sheets by pointing a name at this machine: DNS
// rebinding), whatever address the preview is bound to.
func TestHost(t *testing.T) {
	dir := t.TempDir()
	write(t, filepath.Join(dir, "a.md"), docSrc(1))
	cases := []struct {
		name   string
		allow  []string
		host   string
		status int
	}{
		{"the address", nil, "", 200},
		{"localhost", nil, "localhost:8080", 200},
		{"LOCALHOST", nil, "LOCALHOST", 200},
		{"IPv6 loopback", nil, "[::1]:8080", 200},
		{"another loopback address", nil, "127.0.0.2", 200},
		{"another name", nil, "sheets.example:8080", 403},
		{"a name ending in localhost", nil, "evil-localhost", 403},
		{"a private address", nil, "192.168.1.20:8080", 403},
		{"an allowed name", []string{"sheets.example"}, "sheets.example:8080", 200},
		{"an allowed name, other case, final dot", []string{"sheets.example"}, "Sheets.Example.", 200},
		{"an allowed address", []string{"192.168.1.20"}, "192.168.1.20:8080", 200},
		{"an allowed IPv6 address", []string{"[fd00::20]"}, "[fd00::20]:8080", 200},
		{"a name not allowed beside an allowed one", []string{"sheets.example"}, "rebind.example", 403},
		{"a name that contains an allowed one", []string{"sheets.example"}, "sheets.example.evil", 403},
		{"loopback still answered with an allow list", []string{"0.0.0.0"}, "127.0.0.1:8080", 200},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h := start(t, Config{Paths: []string{dir}, AllowHosts: c.allow})
			st, body, _ := h.raw("GET", "/a.html", c.host)
			if st != c.status {
				t.Errorf("Host %q: status %d, want %d", c.host, st, c.status)
			}
			if c.status != 200 && saveNote.MatchString(body) {
				t.Errorf("Host %q: the sheet was served", c.host)
			}
		})
	}
}

var metaVersion = regexp.MustCompile(`<meta name="calcdoc-live" content="([^"]*)" data-doc="([^"]*)">`)

// pageVersion returns the version and address a served page carries.
func pageVersion(t testing.TB, body string) (string, string) {
	t.Helper()
	m := metaVersion.FindStringSubmatch(body)
	if m == nil {
		t.Fatalf("the page carries no calcdoc-live meta element")
	}
	return m[1], m[2]
}

// stream opens an event stream and returns its "change" events' data.
func (h *harness) stream(doc, v string) (<-chan string, func()) {
	h.t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	req, _ := http.NewRequestWithContext(ctx, "GET", h.base+EventsPath+"?doc="+url.QueryEscape(doc)+"&v="+url.QueryEscape(v), nil)
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		cancel()
		h.t.Fatalf("event stream: %v", err)
	}
	if resp.StatusCode != 200 || resp.Header.Get("Content-Type") != "text/event-stream" {
		cancel()
		h.t.Fatalf("event stream: status %d, type %q", resp.StatusCode, resp.Header.Get("Content-Type"))
	}
	ch := make(chan string, 16)
	go func() {
		defer close(ch)
		defer resp.Body.Close()
		sc := bufio.NewScanner(resp.Body)
		event := ""
		for sc.Scan() {
			line := sc.Text()
			switch {
			case strings.HasPrefix(line, "event: "):
				event = strings.TrimPrefix(line, "event: ")
			case strings.HasPrefix(line, "data: ") && event == "change":
				ch <- strings.TrimPrefix(line, "data: ")
				event = ""
			}
		}
	}()
	return ch, cancel
}

func next(t *testing.T, ch <-chan string, what string) string {
	t.Helper()
	select {
	case v, ok := <-ch:
		if !ok {
			t.Fatalf("%s: the stream ended", what)
		}
		return v
	case <-time.After(deadline):
		t.Fatalf("%s: no change event within %v", what, deadline)
	}
	return ""
}

// settled returns the next change event that is not the one that puts up
// the banner of a save being evaluated (eval.go).
func settled(t *testing.T, ch <-chan string, what string) string {
	t.Helper()
	for {
		if v := next(t, ch, what); !strings.HasSuffix(v, "-evaluating") {
			return v
		}
	}
}

// TestEvents: a stream tells a page that its document changed, at once if
// it changed before the stream was opened.
func TestEvents(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.md")
	write(t, p, docSrc(1))
	h := start(t, Config{Paths: []string{dir}})
	_, body := h.get("/a.html")
	v1, doc := pageVersion(t, body)
	if doc != "/a.html" {
		t.Errorf("data-doc = %q, want /a.html", doc)
	}

	// A stream opened with the current version waits for the save.
	ch, stop := h.stream("/a.html", v1)
	defer stop()
	select {
	case v := <-ch:
		t.Fatalf("a change event (%s) before any save", v)
	case <-time.After(3 * MaxDelay):
	}
	saveRenameOver(t, p, docSrc(2))
	v2 := settled(t, ch, "after the save")
	_, body = h.get("/a.html")
	if got, _ := pageVersion(t, body); got != v2 || v2 == v1 {
		t.Errorf("the event said %s, the page is %s (was %s)", v2, got, v1)
	}
	if why := showsSave(2)(200, body); why != "" {
		t.Errorf("the page after the event: %s", why)
	}

	// A page that missed a save hears of it as soon as it connects.
	late, stopLate := h.stream("/a.html", v1)
	defer stopLate()
	if v := settled(t, late, "a stream opened with an old version"); v != v2 {
		t.Errorf("the late stream says %s, want %s", v, v2)
	}

	// The listing's stream hears of a new document; the page of a
	// deleted document hears of its return.
	_, list := h.get("/")
	lv, ldoc := pageVersion(t, list)
	if ldoc != "/" {
		t.Errorf("the listing's data-doc = %q, want /", ldoc)
	}
	lch, stopList := h.stream("/", lv)
	defer stopList()
	gone, stopGone := h.stream("/b.html", absentVersion)
	defer stopGone()
	write(t, filepath.Join(dir, "b.md"), docSrc(3))
	next(t, lch, "the listing, after a new document")
	next(t, gone, "an absent document's page, after it appeared")
	h.wait("/b.html", showsSave(3))

	if st, _, _ := h.raw("GET", EventsPath+"?doc=a.md&v=0", ""); st != 404 {
		t.Errorf("a stream for a non-document: status %d, want 404", st)
	}
}

// TestShutdown: Serve ends the open event streams and returns once its
// context ends.
func TestShutdown(t *testing.T) {
	dir := t.TempDir()
	write(t, filepath.Join(dir, "a.md"), docSrc(1))
	w, err := New(Config{Paths: []string{dir}})
	if err != nil {
		t.Fatal(err)
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	done := make(chan error, 1)
	go func() { done <- Serve(ctx, ln, w) }()
	h := &harness{t: t, w: w, base: "http://" + ln.Addr().String()}
	ch, stop := h.stream("/a.html", "an old version")
	defer stop()
	next(t, ch, "a stream opened with an old version")
	cancel()
	select {
	case err := <-done:
		if err != nil {
			t.Errorf("Serve: %v", err)
		}
	case <-time.After(2 * deadline):
		t.Fatalf("Serve did not return within %v", 2*deadline)
	}
	select {
	case _, ok := <-ch:
		if ok {
			t.Errorf("an event after the shutdown")
		}
	case <-time.After(deadline):
		t.Errorf("the event stream was not ended")
	}
	if _, err := net.DialTimeout("tcp", ln.Addr().String(), time.Second); err == nil {
		t.Errorf("the listener still accepts connections")
	}
}

// TestIsLoopback: the loopback addresses are 127.0.0.0/8 (RFC 1122,
// 3.2.1.3) and ::1 (RFC 4291, 2.5.3); the unspecified address listens on
// every interface.
func TestIsLoopback(t *testing.T) {
	cases := []struct {
		name string
		ip   string
		want bool
	}{
		{"127.0.0.1", "127.0.0.1", true},
		{"elsewhere in 127/8", "127.1.2.3", true},
		{"::1", "::1", true},
		{"IPv4-mapped loopback", "::ffff:127.0.0.1", true},
		{"unspecified IPv4", "0.0.0.0", false},
		{"unspecified IPv6", "::", false},
		{"a private address", "192.168.1.20", false},
		{"a link-local address", "fe80::1", false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a := &net.TCPAddr{IP: net.ParseIP(c.ip), Port: 8080}
			if got := IsLoopback(a); got != c.want {
				t.Errorf("IsLoopback(%s) = %v, want %v", a, got, c.want)
			}
		})
	}
}

// TestKeyWith: a document's address uses "/" whatever the system's
// separator (a URL path's separator, RFC 3986 section 3.3), and an address
// made on any system is one that docKey accepts.
func TestKeyWith(t *testing.T) {
	for _, tc := range []struct {
		rel  string
		sep  byte
		want string
	}{
		{`sub\a.md`, '\\', "sub/a.html"},
		{`a\b\c.md`, '\\', "a/b/c.html"},
		{`top.md`, '\\', "top.html"},
		{"sub/a.md", '/', "sub/a.html"},
		{"top.md", '/', "top.html"},
	} {
		got := keyWith(tc.rel, tc.sep)
		if got != tc.want {
			t.Errorf("keyWith(%q, %q) = %q, want %q", tc.rel, tc.sep, got, tc.want)
		}
		if k, ok := docKey("/" + got); !ok || k != got {
			t.Errorf("docKey refuses the address %q made from %q", got, tc.rel)
		}
	}
	// On this system: a path joined with its own separator.
	if got := keyOf(filepath.Join("sub", "deeper", "a.md")); got != "sub/deeper/a.html" {
		t.Errorf("keyOf = %q, want sub/deeper/a.html", got)
	}
}
