package main

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"time"
)

// Figure 4 drives the real `calcdoc watch` as a child process, as an
// editor and a browser would: it saves the document (atomically, a new
// file renamed over the old one, or in place) and times each save until
// the page's event stream has announced the new version and the patch the
// page's script then fetches (/_patch) shows the edited value. A GET of
// the whole page after each save is timed apart, for information.

// watchDoc is a document of n statements for the watch figure: the feeder
// schedule alone (Generate with no network), whose last calc block holds
// the last feeder's route length L_k. edit(v) returns the document with
// that length set to v metres.
type watchDoc struct {
	src       string
	name      string // the edited value's name, L_k
	at, end   int    // the byte range of its number in src
	statement int
}

var lastLength = regexp.MustCompile(`(?m)^(L_\d+) = (\d+) m`)

func newWatchDoc(n int) (*watchDoc, error) {
	src, _, err := Generate(Params{Statements: n})
	if err != nil {
		return nil, err
	}
	ms := lastLength.FindAllStringSubmatchIndex(src, -1)
	if len(ms) == 0 {
		return nil, fmt.Errorf("a %d-statement document has no route length to edit (it needs at least %d statements)", n, headerStatements+1)
	}
	m := ms[len(ms)-1]
	return &watchDoc{src: src, name: src[m[2]:m[3]], at: m[4], end: m[5], statement: n}, nil
}

// edit returns the source with the edited value set to v.
func (d *watchDoc) edit(v int) string {
	return d.src[:d.at] + strconv.Itoa(v) + d.src[d.end:]
}

// shows reports whether a page shows the edited value as v: the first
// number in the text of its result cell (the element marked
// data-value="NAME", up to its end) is v.
func (d *watchDoc) shows(page string, v int) bool {
	i := strings.Index(page, `data-value="`+d.name+`"`)
	if i < 0 {
		return false
	}
	cell := page[i:]
	if j := strings.Index(cell, "</div>"); j >= 0 {
		cell = cell[:j]
	}
	if j := strings.IndexByte(cell, '>'); j >= 0 {
		cell = cell[j+1:]
	}
	text := tags.ReplaceAllString(cell, "")
	m := firstNumber.FindString(text)
	if m == "" {
		return false
	}
	x, err := strconv.ParseFloat(m, 64)
	return err == nil && x == float64(v)
}

var (
	tags        = regexp.MustCompile(`<[^>]*>`)
	firstNumber = regexp.MustCompile(`[0-9]+(\.[0-9]+)?`)
)

// editValue is the route length of save s: 20 to 99 m, never the same
// twice running.
func editValue(s int) int { return 20 + s%80 }

// watchChild is a running `calcdoc watch`.
type watchChild struct {
	cmd    *exec.Cmd
	base   string // http://HOST:PORT
	done   chan struct{}
	mu     sync.Mutex
	output []string // the last lines it printed
}

var servingLine = regexp.MustCompile(`serving the preview at (http://[^/\s]+)/`)

// startWatch starts `calcdoc watch --addr 127.0.0.1:0 dir` and waits for
// the address it prints.
func startWatch(calcdoc, dir string, timeout time.Duration) (*watchChild, error) {
	w := &watchChild{cmd: exec.Command(calcdoc, "watch", "--addr", "127.0.0.1:0", dir), done: make(chan struct{})}
	out, err := w.cmd.StdoutPipe()
	if err != nil {
		return nil, err
	}
	w.cmd.Stderr = w.cmd.Stdout
	if err := w.cmd.Start(); err != nil {
		return nil, fmt.Errorf("calcdoc watch: %v", err)
	}
	addr := make(chan string, 1)
	go func() {
		// read every line, so that the child never blocks on a full pipe
		sc := bufio.NewScanner(out)
		sc.Buffer(make([]byte, 64<<10), 1<<20)
		for sc.Scan() {
			line := sc.Text()
			w.mu.Lock()
			w.output = append(w.output, line)
			if len(w.output) > 20 {
				w.output = w.output[1:]
			}
			w.mu.Unlock()
			if m := servingLine.FindStringSubmatch(line); m != nil {
				select {
				case addr <- m[1]:
				default:
				}
			}
		}
		io.Copy(io.Discard, out)
		w.cmd.Wait()
		close(w.done)
	}()
	select {
	case w.base = <-addr:
		return w, nil
	case <-w.done:
		return nil, fmt.Errorf("calcdoc watch %s ended before serving:\n%s", dir, w.lastOutput())
	case <-time.After(timeout):
		w.stop()
		return nil, fmt.Errorf("calcdoc watch %s printed no address within %v:\n%s", dir, timeout, w.lastOutput())
	}
}

func (w *watchChild) lastOutput() string {
	w.mu.Lock()
	defer w.mu.Unlock()
	return strings.Join(w.output, "\n")
}

// stop interrupts the child (kills it where interrupting fails or takes
// longer than 5 s) and waits for it.
func (w *watchChild) stop() {
	if err := w.cmd.Process.Signal(os.Interrupt); err != nil {
		w.cmd.Process.Kill()
	}
	select {
	case <-w.done:
	case <-time.After(5 * time.Second):
		w.cmd.Process.Kill()
		<-w.done
	}
}

var liveMeta = regexp.MustCompile(`<meta name="calcdoc-live" content="([^"]*)"`)

// get fetches one page, within timeout.
func (w *watchChild) get(ctx context.Context, path string, timeout time.Duration) (int, string, error) {
	ctx, cancel := context.WithTimeout(ctx, timeout)
	defer cancel()
	req, err := http.NewRequestWithContext(ctx, http.MethodGet, w.base+path, nil)
	if err != nil {
		return 0, "", err
	}
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		return 0, "", err
	}
	defer resp.Body.Close()
	body, err := io.ReadAll(resp.Body)
	return resp.StatusCode, string(body), err
}

// events opens the page's event stream and sends the data of each
// "change" event on the channel it returns, until ctx ends.
func (w *watchChild) events(ctx context.Context, doc, version string) (<-chan string, error) {
	u := w.base + "/_events?doc=" + url.QueryEscape(doc) + "&v=" + url.QueryEscape(version)
	req, err := http.NewRequestWithContext(ctx, http.MethodGet, u, nil)
	if err != nil {
		return nil, err
	}
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		return nil, err
	}
	if resp.StatusCode != http.StatusOK {
		resp.Body.Close()
		return nil, fmt.Errorf("%s: status %s", u, resp.Status)
	}
	ch := make(chan string, 64)
	go func() {
		defer resp.Body.Close()
		defer close(ch)
		ev := ""
		sc := bufio.NewScanner(resp.Body)
		for sc.Scan() {
			line := sc.Text()
			switch {
			case strings.HasPrefix(line, "event:"):
				ev = strings.TrimSpace(strings.TrimPrefix(line, "event:"))
			case strings.HasPrefix(line, "data:") && ev == "change":
				select {
				case ch <- strings.TrimSpace(strings.TrimPrefix(line, "data:")):
				case <-ctx.Done():
					return
				}
			case line == "":
				ev = ""
			}
		}
	}()
	return ch, nil
}

// watchResult is what figure 4 measured at one size.
type watchResult struct {
	statements         int
	lat                []float64 // seconds, one a timed save: from the save to the patch showing it
	events             int       // "change" events to a new version received during the timed saves
	pending            int       // "change" events that a newer save is being evaluated (no fetch)
	reloads            int       // timed saves whose patch was refused, so that the page was fetched whole
	late               int       // new versions announced after the one that showed a timed save
	full               []float64 // seconds, one a timed save: a GET of the whole page after it, for information
	writes             []float64 // seconds, one a timed save: writing the file (part of lat), for information
	pageBytes          int       // the size of the page, at the last save
	loadStart, loadEnd string
}

// watchWarmups are the untimed saves before the timed ones.
const watchWarmups = 3

// settle is the pause after each save, so that the next save starts with
// the watcher idle (its debounce is 25 ms quiet, 100 ms at most).
const settle = 250 * time.Millisecond

// watchFigure measures save-to-page latency at n statements: saves
// timed saves after watchWarmups untimed ones.
func (b *bench) watchFigure(n, saves int) (*watchResult, error) {
	d, err := newWatchDoc(n)
	if err != nil {
		return nil, err
	}
	dir := filepath.Join(b.work, fmt.Sprintf("watch-%d", n))
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	return runWatch(b.calcdoc, dir, d, saves, b.o.watchWrite, b.o.timeout)
}

// pendingSuffix ends the data of a "change" event that says a newer save
// is being evaluated (the page's script then shows a banner and fetches
// nothing): cmd/internal/preview's pendingVersion.
const pendingSuffix = "-evaluating"

// livePatch is the answer of /_patch: the version it leads to and the
// elements it replaces (cmd/internal/preview's patch).
type livePatch struct {
	V   string `json:"v"`
	Ops []struct {
		In   string `json:"in"`
		At   int    `json:"at"`
		Del  int    `json:"del"`
		HTML string `json:"html"`
	} `json:"ops"`
}

// patch asks for the patch from the version a page shows, as the page's
// script does on a "change" event: the patch, or nil when the server
// refuses it (409: the script then reloads the page).
func (w *watchChild) patch(ctx context.Context, doc, from string, timeout time.Duration) (*livePatch, error) {
	st, body, err := w.get(ctx, "/_patch?doc="+url.QueryEscape(doc)+"&from="+url.QueryEscape(from), timeout)
	if err != nil {
		return nil, err
	}
	switch st {
	case http.StatusOK:
		var p livePatch
		if err := json.Unmarshal([]byte(body), &p); err != nil {
			return nil, fmt.Errorf("the patch from %s: %v", from, err)
		}
		return &p, nil
	case http.StatusConflict:
		return nil, nil
	}
	return nil, fmt.Errorf("the patch from %s: status %d: %s", from, st, body)
}

// runWatch writes d into dir, starts `calcdoc watch` on dir and times
// saves saves (after watchWarmups untimed ones), each written the way
// write says ("atomic" or "inplace"). Each save is followed as the page's
// script follows it: a "change" event whose data marks a newer save being
// evaluated is passed over; on one to a new version the patch from the
// version shown is fetched, and the clock stops once a patch shows the
// edited value (where the server refuses the patch, the script reloads:
// the page is fetched whole and must show it). After each save the whole
// page is fetched once more, and that GET timed on its own.
func runWatch(calcdoc, dir string, d *watchDoc, saves int, write string, timeout time.Duration) (*watchResult, error) {
	path := filepath.Join(dir, "doc.md")
	if err := os.WriteFile(path, []byte(d.edit(editValue(0))), 0o644); err != nil {
		return nil, err
	}
	w, err := startWatch(calcdoc, dir, timeout)
	if err != nil {
		return nil, err
	}
	defer w.stop()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	st, page, err := w.get(ctx, "/doc.html", timeout)
	if err != nil {
		return nil, err
	}
	m := liveMeta.FindStringSubmatch(page)
	if st != http.StatusOK || m == nil || !d.shows(page, editValue(0)) {
		return nil, fmt.Errorf("calcdoc watch does not serve the document at /doc.html (status %d):\n%s", st, w.lastOutput())
	}
	version := m[1] // the version the page shows
	ch, err := w.events(ctx, "/doc.html", version)
	if err != nil {
		return nil, err
	}
	res := &watchResult{statements: d.statement, loadStart: loadAverage()}
	for s := 1; s <= watchWarmups+saves; s++ {
		v := editValue(s)
		src := []byte(d.edit(v))
		began := time.Now()
		if err := saveFile(path, src, write); err != nil {
			return nil, err
		}
		wrote := time.Since(began)
		events, pending, reloaded := 0, 0, false
		for shown := false; !shown; {
			var to string
			select {
			case ev, ok := <-ch:
				if !ok {
					return nil, fmt.Errorf("save %d: the event stream ended:\n%s", s, w.lastOutput())
				}
				to = ev
			case <-time.After(timeout):
				return nil, fmt.Errorf("save %d: no change event within %v:\n%s", s, timeout, w.lastOutput())
			}
			if strings.HasSuffix(to, pendingSuffix) {
				pending++
				continue
			}
			events++
			if to == version {
				continue
			}
			p, err := w.patch(ctx, "/doc.html", version, timeout)
			if err != nil {
				return nil, err
			}
			if p == nil { // refused: reload, as the script does
				reloaded = true
				st, page, err := w.get(ctx, "/doc.html", timeout)
				if err != nil {
					return nil, err
				}
				if m := liveMeta.FindStringSubmatch(page); st == http.StatusOK && m != nil {
					version = m[1]
					shown = d.shows(page, v)
				}
				continue
			}
			version = p.V
			for _, op := range p.Ops {
				if d.shows(op.HTML, v) {
					shown = true
				}
			}
		}
		took := time.Since(began)
		// the whole page, for information, as a reload would fetch it
		t0 := time.Now()
		st, page, err := w.get(ctx, "/doc.html", timeout)
		if err != nil {
			return nil, err
		}
		full := time.Since(t0)
		if st != http.StatusOK || !d.shows(page, v) {
			return nil, fmt.Errorf("save %d: its patch shows %s = %d m, but the page does not (status %d)", s, d.name, v, st)
		}
		if s > watchWarmups {
			res.lat = append(res.lat, took.Seconds())
			res.full = append(res.full, full.Seconds())
			res.writes = append(res.writes, wrote.Seconds())
			res.events += events
			res.pending += pending
			res.pageBytes = len(page)
			if reloaded {
				res.reloads++
			}
		}
		time.Sleep(settle)
		for drained := false; !drained; { // late events of this save: followed, untimed
			select {
			case ev := <-ch:
				if strings.HasSuffix(ev, pendingSuffix) || ev == version {
					continue
				}
				if s > watchWarmups {
					res.late++
				}
				p, err := w.patch(ctx, "/doc.html", version, timeout)
				if err != nil {
					return nil, err
				}
				if p != nil {
					version = p.V
				} else if st, page, err := w.get(ctx, "/doc.html", timeout); err == nil && st == http.StatusOK {
					if m := liveMeta.FindStringSubmatch(page); m != nil {
						version = m[1]
					}
				}
			default:
				drained = true
			}
		}
	}
	res.loadEnd = loadAverage()
	return res, nil
}

// saveFile writes a file as an editor saves it: "atomic" writes a new
// file beside it and renames it over the old one; "inplace" truncates and
// writes the old file.
func saveFile(path string, data []byte, how string) error {
	switch how {
	case "inplace":
		return os.WriteFile(path, data, 0o644)
	case "atomic":
		tmp := filepath.Join(filepath.Dir(path), "."+filepath.Base(path)+".calcbench-save")
		if err := os.WriteFile(tmp, data, 0o644); err != nil {
			return err
		}
		return os.Rename(tmp, path)
	}
	return errors.New("unknown save method " + how)
}
