package preview

import (
	"calcdoc/cmd/internal/build"
	"context"
	"fmt"
	"html"
	"io"
	"log"
	"net"
	"net/http"
	"net/url"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"
)

// EventsPath is the address of the event streams that served pages listen
// on: /_events?doc=ADDRESS&v=VERSION, where ADDRESS is "/" for the listing
// or a document's address, and VERSION the version the page shows. The
// stream sends an event "change" whose data is the new version as soon as
// the current version differs from VERSION.
const EventsPath = "/_events"

// absentVersion is the version of an address that has no document; a
// document's version is never this.
const absentVersion = "0"

// pingEvery is how often an idle event stream sends a comment, so that a
// connection that went away is noticed.
const pingEvery = 25 * time.Second

// Handler serves the preview:
//
//   - "/" lists the documents and their state;
//   - each document's sheet at its address, its path relative to the
//     PATH it was found under with .md replaced by .html;
//   - EventsPath, the event streams of the reload script;
//   - PatchPath, what changed between a page and the one before it.
//
// Everything is served from memory: no request reads a file, so no path
// can reach one. Any other path, and every path with an empty, "." or ".."
// segment, a backslash or a NUL, gets 404. Only GET and HEAD are answered
// (others get 405); nothing writes. A request whose Host is not
// localhost, a loopback address or one of Config.AllowHosts gets 403.
func (w *Watcher) Handler() http.Handler { return http.HandlerFunc(w.serveHTTP) }

func (w *Watcher) serveHTTP(rw http.ResponseWriter, r *http.Request) {
	h := rw.Header()
	h.Set("Cache-Control", "no-store")
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Referrer-Policy", "no-referrer")
	if r.Method != http.MethodGet && r.Method != http.MethodHead {
		h.Set("Allow", "GET, HEAD")
		http.Error(rw, "405 method not allowed: the preview only answers GET and HEAD", http.StatusMethodNotAllowed)
		return
	}
	if !loopbackHost(r.Host) && !allowedHost(r.Host, w.cfg.AllowHosts) {
		http.Error(rw, "403 forbidden: the preview answers only requests for localhost, a loopback address or a name given with --allow-host", http.StatusForbidden)
		return
	}
	switch p := r.URL.Path; p {
	case "/":
		w.serveListing(rw)
	case EventsPath:
		w.serveEvents(rw, r)
	case PatchPath:
		w.servePatch(rw, r)
	default:
		key, ok := docKey(p)
		if !ok {
			http.Error(rw, "404 not found", http.StatusNotFound)
			return
		}
		w.serveDoc(rw, key)
	}
}

// keyOf is the address of a document: its path relative to the PATH it
// was found under, with .md replaced by .html and the system's separator
// by "/" (a URL's), so that on Windows sub\a.md is served as sub/a.html.
func keyOf(rel string) string { return keyWith(rel, filepath.Separator) }

// keyWith is keyOf on a system whose path separator is sep.
func keyWith(rel string, sep byte) string {
	if sep != '/' {
		rel = strings.ReplaceAll(rel, string(sep), "/")
	}
	return build.TrimExt(rel) + ".html"
}

// docKey returns the address of a document path, or false when the path
// cannot be one.
func docKey(p string) (string, bool) {
	k, ok := strings.CutPrefix(p, "/")
	if !ok || !strings.HasSuffix(k, ".html") || !utf8.ValidString(k) || strings.ContainsAny(k, "\\\x00") {
		return "", false
	}
	for _, seg := range strings.Split(k, "/") {
		if seg == "" || seg == "." || seg == ".." {
			return "", false
		}
	}
	return k, true
}

// loopbackHost reports whether a Host header names this machine by its
// loopback name or address.
func loopbackHost(host string) bool {
	if h, _, err := net.SplitHostPort(host); err == nil {
		host = h
	}
	host = strings.TrimSuffix(strings.TrimPrefix(host, "["), "]")
	if strings.EqualFold(host, "localhost") {
		return true
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback()
}

// hostOnly is the host of a Host header, without its port and brackets.
func hostOnly(host string) string {
	if h, _, err := net.SplitHostPort(host); err == nil {
		host = h
	}
	return strings.TrimSuffix(strings.TrimPrefix(host, "["), "]")
}

// allowedHost reports whether a Host header names one of allow (compared
// without port and brackets, names without regard to case, addresses by
// value).
func allowedHost(host string, allow []string) bool {
	h := hostOnly(host)
	if h == "" {
		return false
	}
	ip := net.ParseIP(h)
	for _, a := range allow {
		a = hostOnly(a)
		if strings.EqualFold(strings.TrimSuffix(a, "."), strings.TrimSuffix(h, ".")) {
			return true
		}
		if aip := net.ParseIP(a); ip != nil && aip != nil && aip.Equal(ip) {
			return true
		}
	}
	return false
}

// IsLoopback reports whether a listener's address is on the loopback
// interface only.
func IsLoopback(a net.Addr) bool {
	if t, ok := a.(*net.TCPAddr); ok {
		return t.IP.IsLoopback()
	}
	host, _, err := net.SplitHostPort(a.String())
	if err != nil {
		return false
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback()
}

func writeHTML(rw http.ResponseWriter, status int, body []byte) {
	h := rw.Header()
	h.Set("Content-Type", "text/html; charset=utf-8")
	h.Set("Content-Security-Policy", csp)
	h.Set("Content-Length", strconv.Itoa(len(body)))
	rw.WriteHeader(status)
	rw.Write(body)
}

func (w *Watcher) serveDoc(rw http.ResponseWriter, key string) {
	w.mu.RLock()
	p := w.docs[key]
	since, busy := w.evaluating(key)
	w.mu.RUnlock()
	if p != nil && busy {
		writeHTML(rw, p.status, withBanner(p.body, p.version, since))
		return
	}
	if p == nil {
		// The page waits for the document to appear (deleted, then
		// written again).
		writeHTML(rw, http.StatusNotFound, problemPage(key, absentVersion, "No document at /"+key,
			"There is no document at this address. Its file may have been deleted or renamed, "+
				"or it may hold no evaluated block (calc, solve, ...). This page reloads by itself when one appears."))
		return
	}
	writeHTML(rw, p.status, p.body)
}

// pageCSS is the style of the listing and of the pages that stand in for a
// sheet.
const pageCSS = `body { font: 10pt/1.4 "DejaVu Sans", "Liberation Sans", Arial, sans-serif; color: #111;
  max-width: 200mm; margin: 6mm auto; padding: 0 6mm; }
h1 { font-size: 13pt; border-bottom: 0.6pt solid #222; padding-bottom: 2pt; }
table { border-collapse: collapse; width: 100%; }
th, td { border: 0.4pt solid #888; padding: 2pt 5pt; text-align: left; vertical-align: top; }
td.n { text-align: right; }
p.problem { border: 0.8pt dashed #111; padding: 3pt 6pt; font-weight: bold; }`

// problemPage is the page that stands in for a sheet that cannot be shown.
func problemPage(key, version, title, text string) []byte {
	var b strings.Builder
	b.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
	fmt.Fprintf(&b, "<title>%s</title>\n<style>\n%s\n</style>\n", html.EscapeString(title), pageCSS)
	b.WriteString(liveHead("/"+key, version))
	fmt.Fprintf(&b, "</head>\n<body>\n<h1>%s</h1>\n<p class=\"problem\" role=\"alert\">%s</p>\n",
		html.EscapeString(title), html.EscapeString(text))
	b.WriteString("<p><a href=\"/\">All documents</a></p>\n</body>\n</html>\n")
	return []byte(b.String())
}

// stateText says in words how a document stands, for the listing.
func (p *page) stateText() string {
	switch p.state {
	case stUnreadable:
		return "cannot be read: " + p.problem
	case stUndrawn:
		return "cannot be drawn: " + p.problem
	case stErrors:
		s := fmt.Sprintf("errors (%d)", p.errors)
		if p.failed > 0 {
			s += fmt.Sprintf("; %d of %d checks not satisfied", p.failed, p.checks)
		}
		return s
	case stFail:
		return fmt.Sprintf("a check fails (%d of %d not satisfied)", p.failed, p.checks)
	}
	if p.checks == 0 {
		return "no errors, no checks"
	}
	return fmt.Sprintf("checks hold (%d of %d)", p.checks, p.checks)
}

func (w *Watcher) serveListing(rw http.ResponseWriter) {
	w.mu.RLock()
	pages := make([]*page, 0, len(w.docs))
	busy := map[string]time.Time{}
	for _, p := range w.docs {
		pages = append(pages, p)
		if since, ok := w.evaluating(p.key); ok {
			busy[p.key] = since
		}
	}
	version := w.listVer
	w.mu.RUnlock()
	sort.Slice(pages, func(i, j int) bool { return pages[i].key < pages[j].key })

	var b strings.Builder
	b.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
	fmt.Fprintf(&b, "<title>calcdoc watch: %d document%s</title>\n<style>\n%s\n</style>\n", len(pages), plural(len(pages)), pageCSS)
	b.WriteString(liveHead("/", version))
	b.WriteString("</head>\n<body>\n<h1>Documents</h1>\n<p>Watching ")
	for i, r := range w.roots {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "<code>%s</code>", html.EscapeString(r.given))
	}
	b.WriteString(". Each sheet is evaluated again when its file is saved; an open page reloads by itself.</p>\n")
	if len(pages) == 0 {
		b.WriteString("<p>No document yet. A .md file with an evaluated block (calc, solve, ...) appears here once it is saved.</p>\n")
	} else {
		b.WriteString("<table>\n<thead><tr><th>Document</th><th>State</th><th>Values</th><th>Checks</th>" +
			"<th>Not satisfied</th><th>Errors</th><th>Evaluated</th></tr></thead>\n<tbody>\n")
		for _, p := range pages {
			u := (&url.URL{Path: "/" + p.key}).EscapedPath()
			state := p.stateText()
			if since, ok := busy[p.key]; ok {
				state = "evaluating a newer save (" + since.Format("15:04:05") + "); shown: " + state
			}
			fmt.Fprintf(&b, "<tr><td><a href=\"%s\">%s</a></td><td>%s</td>", html.EscapeString(u),
				html.EscapeString(p.display), html.EscapeString(state))
			if p.state == stUnreadable {
				b.WriteString("<td></td><td></td><td></td><td></td>")
			} else {
				fmt.Fprintf(&b, "<td class=\"n\">%d</td><td class=\"n\">%d</td><td class=\"n\">%d</td><td class=\"n\">%d</td>",
					p.values, p.checks, p.failed, p.errors)
			}
			fmt.Fprintf(&b, "<td>%s, in %s</td></tr>\n", p.at.Format("15:04:05"), ms(p.took))
		}
		b.WriteString("</tbody>\n</table>\n")
		usesListing(&b, pages)
	}
	if kept := w.keptFiles(); len(kept) > 0 {
		b.WriteString("<p>Not served, because a file from an earlier PATH has the same address:</p>\n<ul>\n")
		for _, k := range kept {
			fmt.Fprintf(&b, "<li><code>%s</code></li>\n", html.EscapeString(k))
		}
		b.WriteString("</ul>\n")
	}
	b.WriteString("</body>\n</html>\n")
	writeHTML(rw, http.StatusOK, []byte(b.String()))
}

// keptFiles lists the files kept from their address, with the address.
func (w *Watcher) keptFiles() []string {
	w.mu.RLock()
	defer w.mu.RUnlock()
	var out []string
	for key, fs := range w.shadowList {
		for _, f := range fs {
			out = append(out, f+" (/"+key+")")
		}
	}
	sort.Strings(out)
	return out
}

// version returns the current version of an address ("" for the
// listing).
func (w *Watcher) version(key string) string {
	if key == "" {
		return w.listVer
	}
	if p := w.docs[key]; p != nil {
		if _, busy := w.evaluating(key); busy {
			return pendingVersion(p.version)
		}
		return p.version
	}
	return absentVersion
}

func (w *Watcher) serveEvents(rw http.ResponseWriter, r *http.Request) {
	q := r.URL.Query()
	doc, seen := q.Get("doc"), q.Get("v")
	key := ""
	if doc != "/" {
		k, ok := docKey(doc)
		if !ok {
			http.Error(rw, "404 not found", http.StatusNotFound)
			return
		}
		key = k
	}
	fl, ok := rw.(http.Flusher)
	if !ok {
		http.Error(rw, "500 event streams are not supported here", http.StatusInternalServerError)
		return
	}
	select {
	case <-w.done:
		http.Error(rw, "503 the preview is shutting down", http.StatusServiceUnavailable)
		return
	default:
	}
	rw.Header().Set("Content-Type", "text/event-stream")
	rw.WriteHeader(http.StatusOK)
	if r.Method == http.MethodHead {
		return
	}
	if _, err := io.WriteString(rw, "retry: 1000\n\n"); err != nil {
		return
	}
	fl.Flush()
	ping := time.NewTicker(pingEvery)
	defer ping.Stop()
	for {
		w.mu.RLock()
		cur, tick := w.version(key), w.tick
		w.mu.RUnlock()
		if cur != seen {
			if _, err := fmt.Fprintf(rw, "event: change\ndata: %s\n\n", cur); err != nil {
				return
			}
			fl.Flush()
			seen = cur
		}
		select {
		case <-tick:
		case <-ping.C:
			if _, err := io.WriteString(rw, ": ping\n\n"); err != nil {
				return
			}
			fl.Flush()
		case <-r.Context().Done():
			return
		case <-w.done:
			return
		}
	}
}

// ShutdownTimeout bounds how long Serve waits for requests in flight when
// it stops.
const ShutdownTimeout = 5 * time.Second

// Serve serves w's pages on ln and runs w until ctx ends (or the server
// fails), then ends the event streams, closes the watcher and shuts the
// server down, waiting at most ShutdownTimeout for requests in flight.
// It returns nil after a shutdown asked for by ctx.
func Serve(ctx context.Context, ln net.Listener, w *Watcher) error {
	srv := &http.Server{
		Handler:           w.Handler(),
		ReadHeaderTimeout: 10 * time.Second,
		IdleTimeout:       2 * time.Minute,
		ErrorLog:          log.New(io.Discard, "", 0),
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	ran := make(chan struct{})
	go func() {
		w.Run(ctx)
		close(ran)
	}()
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	var err error
	select {
	case <-ctx.Done():
	case err = <-served:
		cancel()
	}
	<-ran // the event streams have ended
	sctx, scancel := context.WithTimeout(context.Background(), ShutdownTimeout)
	defer scancel()
	if e := srv.Shutdown(sctx); e != nil && err == nil {
		err = e
	}
	if err == http.ErrServerClosed {
		err = nil
	}
	return err
}
