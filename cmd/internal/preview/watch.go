// Package preview is calcdoc's live preview (calcdoc watch). It watches the folders of the
// documents it is given with fsnotify, re-evaluates a document when its
// file changes, keeps the sheet of each document in memory and serves it
// over HTTP; a small script in each served page reloads it when its
// document changes. Files are written only when an output is configured,
// atomically, and without the script.
//
// Folders are watched, not files, so that every way an editor saves is
// seen: writing the file in place, writing a temporary file and renaming
// it over the original, or moving the original to a backup and writing a
// new file. Events are gathered into bursts: a rebuild starts once no
// event has come for Quiet, and at the latest MaxDelay after the first
// event of the burst. Only the files named by the burst's events are read
// again, and a file whose bytes did not change is not re-evaluated.
//
// The page served for a document is always its latest evaluation: a save
// that does not evaluate shows its errors in place, and a file that cannot
// be read is served as a page saying so, never as the sheet of an earlier
// save.
package preview

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/cmd/internal/build"

	"github.com/fsnotify/fsnotify"
)

// DefaultAddr is where the preview is served unless told otherwise: the
// loopback interface only.
const DefaultAddr = "127.0.0.1:8080"

// The debounce window: a rebuild starts Quiet after the last event of a
// burst, and never later than MaxDelay after its first event.
const (
	Quiet    = 25 * time.Millisecond
	MaxDelay = 100 * time.Millisecond
)

// Retry is how often the folder of a PATH that went away (deleted, or
// moved elsewhere) is looked for again. Once it is back it is watched
// again and its documents are read, as at the start.
const Retry = 250 * time.Millisecond

// MaxSize is the largest document read; a larger file is reported as one
// that cannot be read.
const MaxSize = 32 << 20

// maxSize is MaxSize; the tests lower it.
var maxSize int64 = MaxSize

// Config says what to watch and where the sheets go.
type Config struct {
	// Paths are the PATHs of the command line: a folder means every .md
	// file below it holding an evaluated block (a word of the kind registry), now or later; a file
	// (which must end in .md) is served whatever it holds.
	Paths []string
	// Out, when not "", is where each sheet is also written on every
	// evaluation: a folder (keeping the paths relative to the PATH given),
	// or a .html file when Paths is one file.
	Out string
	// Version is calcdoc's version, printed on the served sheets.
	Version string
	// Built gives the options of the sheets written under Out (stamp,
	// embedded source); nil means Version only. The live script is never
	// added to them.
	Built func(doc *calcdoc.Document) build.Options
	// Log receives one line per rebuild; nil discards them.
	Log io.Writer
	// AllowHosts are the host names (or addresses) a request may name in
	// its Host header besides localhost and the loopback addresses, which
	// are always answered: the bound address when it is not loopback, and
	// each --allow-host. Any other name gets 403, which keeps a web page
	// from reading the sheets through a host name that it points at this
	// machine (DNS rebinding), on loopback and on the network alike.
	AllowHosts []string
	// CollectWhenIdle makes the watcher collect garbage once every
	// evaluation is done and it has been idle for IdleGC (idlegc.go), so
	// that the collector runs between saves rather than during one.
	CollectWhenIdle bool
}

// ConfigError is a bad Config: a missing PATH, a file that is not .md, an
// output that does not fit the PATHs. It is the user's to fix.
type ConfigError struct{ Msg string }

func (e *ConfigError) Error() string { return e.Msg }

func configErr(format string, args ...any) error {
	return &ConfigError{Msg: fmt.Sprintf(format, args...)}
}

// root is one PATH of the command line.
type root struct {
	given string // as given
	dir   string // the folder watched: absolute, symbolic links resolved
	file  string // a file PATH: its file's name in dir; "" for a folder
	lost  bool   // dir went away; looked for every Retry
}

// Watcher watches the PATHs of a Config and holds the served pages.
type Watcher struct {
	cfg     Config
	log     io.Writer
	roots   []*root
	outFile bool // Out names one .html file
	fsw     *fsnotify.Watcher
	cw      *closeWatch // files closed after writing, where the system says (closewrite_linux.go)
	boot    string      // distinguishes the versions of this run from an earlier one's

	// Owned by the goroutine that runs New and then Run.
	watched  map[string]bool            // folders being watched
	cannot   map[string]string          // folders that could not be watched: the error said
	pending  map[string]bool            // files to read again at the next rebuild
	newDirs  map[string]bool            // folders to start watching at the next rebuild
	shadow   map[string]map[string]bool // address → files kept from it by another file
	shadowed bool                       // shadow changed since the last publish
	reads    map[string]map[string]bool // data file read (a table's CSV) → documents that read it
	stale    map[string]bool            // documents to evaluate again though their bytes are the same
	readMu   sync.Mutex                 // guards readQ
	readQ    []readNote                 // the data files of evaluations done, for the loop (reads.go)
	poke     chan struct{}              // wakes the loop to take readQ
	seq      atomic.Int64               // the last version number given
	loader   *calcdoc.Loader            // of the current burst (uses.go)

	mu         sync.RWMutex
	docs       map[string]*page      // by address (the path after "/")
	evals      map[string]*evalState // by address: a document being evaluated
	bases      map[string]*base      // by address: what its next evaluation starts from (eval.go)
	workers    sync.WaitGroup        // the evaluation workers running
	shadowList map[string][]string   // a copy of shadow, for the listing
	listVer    string                // version of the listing
	tick       chan struct{}         // closed and replaced on every change
	gcTimer    *time.Timer           // the idle collection (idlegc.go)
	gcAllocs   atomic.Uint64         // the bytes allocated at the last idle collection
	idleGCs    atomic.Int64          // the idle collections made
	done       chan struct{}         // closed by Close
	once       sync.Once
}

// page is what is served for one document: its latest evaluation.
type page struct {
	key     string      // address, e.g. "sub/feeder.html"
	file    string      // absolute path of the file
	display string      // the path shown: the PATH given joined with the file's path below it
	src     []byte      // the bytes evaluated; nil when the file could not be read
	body    []byte      // the HTML served
	before  *page       // the page before it (version, body and layout only), for patches (patch.go)
	lay     *layoutCell // its elements, for patches (layout.go); nil for a page no patch says

	patchOnce sync.Once // of a page before: the patch to the page after it, made once
	patch     []byte
	status    int // HTTP status of body
	version   string
	at        time.Time
	took      time.Duration

	usedFiles []string            // real paths of the documents it uses
	dataFiles []*calcdoc.DataFile // the data files its blocks read (a table's CSV)
	fp        string              // SHA-256 of its values JSON: whether a new evaluation moved them
	uses      []string            // the same as its use statements write them

	state                                   state
	problem                                 string // why it cannot be read or drawn
	values, checks, failed, errors, warning int
}

type state int

const (
	stHold       state = iota // evaluated, no error, no check fails
	stFail                    // a check is not satisfied
	stErrors                  // the document has errors
	stUnreadable              // the file cannot be read
	stUndrawn                 // the sheet could not be drawn
)

// New checks cfg, starts watching every folder under each PATH and
// evaluates every document once, logging a line for each. Run it with Run;
// if Run is never called, call Close.
func New(cfg Config) (*Watcher, error) {
	if len(cfg.Paths) == 0 {
		return nil, configErr("watch needs at least one PATH")
	}
	w := &Watcher{
		cfg:     cfg,
		log:     cfg.Log,
		boot:    strconv.FormatInt(time.Now().UnixNano(), 36),
		watched: map[string]bool{},
		cannot:  map[string]string{},
		pending: map[string]bool{},
		newDirs: map[string]bool{},
		shadow:  map[string]map[string]bool{},
		reads:   map[string]map[string]bool{},
		stale:   map[string]bool{},
		poke:    make(chan struct{}, 1),
		docs:    map[string]*page{},
		evals:   map[string]*evalState{},
		bases:   map[string]*base{},
		tick:    make(chan struct{}),
		done:    make(chan struct{}),
	}
	if w.log == nil {
		w.log = io.Discard
	}
	files := 0
	for _, p := range cfg.Paths {
		info, err := os.Stat(p)
		if err != nil {
			return nil, configErr("%s: no such file or folder", p)
		}
		abs, err := filepath.Abs(p)
		if err == nil {
			abs, err = filepath.EvalSymlinks(abs)
		}
		if err != nil {
			return nil, configErr("%s: %v", p, err)
		}
		r := &root{given: p, dir: abs}
		if !info.IsDir() {
			if filepath.Ext(p) != ".md" {
				return nil, configErr("%s: not a Markdown document (the name must end in .md)", p)
			}
			if !info.Mode().IsRegular() {
				return nil, configErr("%s: not a regular file", p)
			}
			r.dir, r.file = filepath.Split(abs)
			r.dir = filepath.Clean(r.dir)
			files++
		}
		w.roots = append(w.roots, r)
	}
	if cfg.Out != "" {
		w.outFile = build.OutIsFile(cfg.Out)
		if w.outFile && (len(w.roots) != 1 || files != 1) {
			return nil, configErr("-o %s names one file, but a folder or several PATHs can hold several documents: give a folder", cfg.Out)
		}
		if fi, err := os.Stat(cfg.Out); err == nil && !w.outFile && !fi.IsDir() {
			return nil, configErr("-o %s: not a folder", cfg.Out)
		}
	}
	fsw, err := fsnotify.NewWatcher()
	if err != nil {
		return nil, fmt.Errorf("cannot watch for changes: %v", err)
	}
	w.fsw = fsw
	w.cw = newCloseWatch()
	// Watch first, then read: a save made meanwhile is then seen twice,
	// never missed.
	w.watchRoots()
	for _, r := range w.roots {
		r.lost = !w.watched[r.dir] // gone meanwhile, or cannot be watched: tried again every Retry
	}
	w.flush()
	w.workers.Wait() // the first evaluation of every document is done
	return w, nil
}

// Close stops watching and ends every event stream. It may be called more
// than once.
func (w *Watcher) Close() error {
	var err error
	w.once.Do(func() {
		close(w.done)
		w.mu.Lock()
		w.busyLocked() // no idle collection after the end
		w.mu.Unlock()
		err = w.fsw.Close()
		w.cw.close()
		w.workers.Wait()
	})
	return err
}

// Run handles file-system events until ctx ends or Close is called, then
// closes the watcher. A burst of events is handled once it has been quiet
// for Quiet, or MaxDelay after its first event, whichever comes first, or
// at once when a file it names is closed after writing or renamed into
// place (Linux).
func (w *Watcher) Run(ctx context.Context) error {
	defer w.Close()
	timer := time.NewTimer(time.Hour)
	timer.Stop()
	retry := time.NewTicker(Retry)
	defer retry.Stop()
	var first time.Time
	if len(w.pending) > 0 {
		timer.Reset(Quiet)
	}
	for {
		select {
		case <-retry.C:
			if w.recover() && first.IsZero() {
				first = time.Now()
				timer.Reset(Quiet)
			}
		case <-ctx.Done():
			return nil
		case <-w.done:
			return nil
		case ev, ok := <-w.fsw.Events:
			if !ok {
				return nil
			}
			if !w.event(ev) {
				continue
			}
			now := time.Now()
			if first.IsZero() {
				first = now
			}
			timer.Reset(max(0, min(Quiet, MaxDelay-now.Sub(first))))
		case ev := <-w.cw.closed():
			if w.cw.current(ev) && w.closeWritten(ev.name) {
				timer.Reset(0) // the save is complete: no need to wait
			}
		case err, ok := <-w.fsw.Errors:
			if !ok {
				return nil
			}
			if errors.Is(err, fsnotify.ErrEventOverflow) {
				w.logf("too many changes at once (%v): reading every document again", err)
				w.rescan()
				if w.flush() {
					timer.Reset(Quiet)
				}
				continue
			}
			w.logf("watching: %v", err)
		case <-w.poke:
			if w.takeReads() {
				if first.IsZero() {
					first = time.Now()
				}
				timer.Reset(Quiet)
			}
		case <-timer.C:
			first = time.Time{}
			if w.flush() {
				first = time.Now()
				timer.Reset(Quiet)
			}
		}
	}
}

// event notes what an event asks to be done at the next rebuild, and
// reports whether it asks anything.
func (w *Watcher) event(ev fsnotify.Event) bool {
	name := filepath.Clean(ev.Name)
	queued := false
	if ev.Has(fsnotify.Remove) || ev.Has(fsnotify.Rename) {
		// A folder that went away takes its watches and its documents.
		for d := range w.watched {
			if d == name || within(d, name) {
				_ = w.fsw.Remove(d)
				w.cw.remove(d)
				delete(w.watched, d)
				queued = true
			}
		}
		for _, r := range w.roots {
			if !r.lost && !w.watched[r.dir] && (r.dir == name || within(r.dir, name)) {
				r.lost = true
				w.logf("%s: its folder is gone; watching for it to come back", r.given)
			}
		}
		for _, f := range w.filesUnder(name) {
			w.pending[f] = true
			queued = true
		}
	}
	if ev.Has(fsnotify.Create) {
		if fi, err := os.Lstat(name); err == nil && fi.IsDir() && w.wantsDir(name) {
			// Watched at the rebuild, once the kernel's events for a
			// folder moved here have all been handled.
			w.newDirs[name] = true
			queued = true
		}
	}
	// A name of a document is read again whatever it now is: a folder or
	// a named pipe in place of a document is reported as such.
	if filepath.Ext(name) == ".md" {
		if _, _, ok := w.claim(name); ok {
			w.pending[name] = true
			queued = true
		}
	}
	return w.dataSaved(name) || queued
}

// filesUnder lists the documents (served or kept from their address) whose
// file is name or lies below it.
func (w *Watcher) filesUnder(name string) []string {
	var out []string
	w.mu.RLock()
	for _, p := range w.docs {
		if p.file == name || within(p.file, name) {
			out = append(out, p.file)
		}
	}
	w.mu.RUnlock()
	for _, fs := range w.shadow {
		for f := range fs {
			if f == name || within(f, name) {
				out = append(out, f)
			}
		}
	}
	return out
}

// within reports whether path lies below the folder dir.
func within(path, dir string) bool {
	return strings.HasPrefix(path, dir) && len(path) > len(dir) && os.IsPathSeparator(path[len(dir)])
}

// skipDir reports whether a folder is never looked into, as in
// build.Collect.
func skipDir(name string) bool { return build.SkipDir(name) }

// wantsDir reports whether a folder lies under a folder PATH, not inside a
// skipped folder.
func (w *Watcher) wantsDir(d string) bool {
	for _, r := range w.roots {
		if r.holdsDir(d) {
			return true
		}
	}
	return false
}

// holdsDir reports whether r is a folder PATH and d is that folder or a
// folder below it, not inside a skipped folder.
func (r *root) holdsDir(d string) bool {
	if r.file != "" || (d != r.dir && !within(d, r.dir)) {
		return false
	}
	rel, err := filepath.Rel(r.dir, d)
	if err != nil {
		return false
	}
	if rel == "." {
		return true
	}
	for _, part := range strings.Split(rel, string(filepath.Separator)) {
		if skipDir(part) {
			return false
		}
	}
	return true
}

// claim finds the PATH a file belongs to (the first on the command line
// that holds it) and the file's path relative to it, as build counts it.
func (w *Watcher) claim(file string) (*root, string, bool) {
	if !build.IsMarkdown(file) {
		return nil, "", false
	}
	for _, r := range w.roots {
		if r.file != "" {
			if file == filepath.Join(r.dir, r.file) {
				return r, filepath.Base(r.given), true
			}
			continue
		}
		if !r.holdsDir(filepath.Dir(file)) {
			continue
		}
		rel, err := filepath.Rel(r.dir, file)
		if err == nil {
			return r, rel, true
		}
	}
	return nil, "", false
}

// flush does what the events since the last rebuild asked: it watches the
// new folders and reads again each file named, in lexical order. It
// reports whether a file is left to read again (one replaced while it was
// being opened).
func (w *Watcher) flush() bool {
	dirs := sortedKeys(w.newDirs)
	w.newDirs = map[string]bool{}
	for _, d := range dirs {
		w.addTree(d)
	}
	files := sortedKeys(w.pending)
	w.pending = map[string]bool{}
	w.loader = nil // a new burst reads every document afresh
	changed := false
	for _, f := range files {
		if w.rebuild(f) {
			changed = true
		}
	}
	// the sheets that use a document are evaluated again once its new
	// evaluation is done and its values moved (reads.go, uses.go)
	if changed || w.shadowed {
		w.publish()
	}
	return len(w.pending) > 0
}

func sortedKeys(m map[string]bool) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// rebuild reads a file again and updates its page; it reports whether
// anything served changed.
func (w *Watcher) rebuild(file string) bool {
	r, rel, ok := w.claim(file)
	if !ok {
		return false
	}
	key := keyOf(rel)
	display := r.given
	if r.file == "" {
		display = filepath.Join(r.given, rel)
	}
	w.mu.RLock()
	cur := w.docs[key]
	if st := w.evals[key]; cur == nil && st != nil && !st.dropped {
		// its first evaluation is running: the address is that file's
		cur = &page{key: key, file: st.file, display: st.display}
	}
	w.mu.RUnlock()
	start := time.Now()
	src, kind, why := w.read(r, file)
	if kind == readRaced {
		w.pending[file] = true
		return false
	}
	if kind == readIrregular {
		// A document replaced by a folder, a named pipe or a link, or a
		// file PATH that is one, cannot be read; anything else that is
		// not a regular file is no document.
		kind = readAbsent
		if r.file != "" || (cur != nil && cur.file == file) {
			kind = readFailed
		}
	}
	if cur != nil && cur.file != file {
		// Another file, from an earlier PATH, already has this address.
		if kind == readAbsent {
			w.unshadow(key, file)
			return false
		}
		if w.shadow[key] == nil {
			w.shadow[key] = map[string]bool{}
		}
		if !w.shadow[key][file] {
			w.shadow[key][file] = true
			w.shadowed = true
			w.logf("%s: not served: its address /%s is %s's", display, key, cur.display)
			return true
		}
		return false
	}
	switch kind {
	case readAbsent:
		w.unshadow(key, file)
		if cur == nil {
			return false
		}
		w.mu.Lock()
		delete(w.docs, key)
		w.dropEval(key)
		w.mu.Unlock()
		w.logf("%s: %s; no longer served", display, why)
		w.promote(key)
		return true
	case readFailed:
		if cur != nil && cur.state == stUnreadable && cur.problem == why {
			return false
		}
		p := &page{key: key, file: file, display: display, status: 500, state: stUnreadable, problem: why,
			version: w.nextVersion(), at: start}
		p.body = problemPage(key, p.version, "Cannot read "+display,
			"calcdoc watch cannot read this document's file, so there is no current sheet to show: "+why+".")
		p.took = time.Since(start)
		w.mu.Lock()
		w.dropEval(key)
		w.docs[key] = p
		w.mu.Unlock()
		w.logf("%s: cannot be read: %s", display, why)
		return true
	}
	force := w.stale[file]
	delete(w.stale, file)
	if !force && w.sameAsLatest(key, cur, src) {
		return false // saved without a change
	}
	// evaluated on the document's own worker, so that a slow document
	// never holds the others back (eval.go)
	w.startEval(&evalJob{key: key, file: file, rel: rel, display: display, src: src, at: start, root: r.dir, loader: w.loaderFor()})
	return true
}

// unshadow forgets that file was kept from an address.
func (w *Watcher) unshadow(key, file string) {
	if s := w.shadow[key]; s != nil && s[file] {
		delete(s, file)
		w.shadowed = true
		if len(s) == 0 {
			delete(w.shadow, key)
		}
	}
}

// promote gives a freed address to a file that was kept from it.
func (w *Watcher) promote(key string) {
	files := sortedKeys(w.shadow[key])
	if len(files) > 0 {
		delete(w.shadow, key)
		w.shadowed = true
	}
	for _, f := range files {
		w.rebuild(f)
	}
}

// writeOut writes the built sheet when Out is set and says where.
func (w *Watcher) writeOut(doc *calcdoc.Document, file, rel string) string {
	if w.cfg.Out == "" {
		return ""
	}
	target := build.Target(w.cfg.Out, file, rel)
	opt := build.Options{Version: w.cfg.Version}
	if w.cfg.Built != nil {
		opt = w.cfg.Built(doc)
	}
	opt.HeadExtra = ""
	switch err := build.Write(doc, opt, file, target, createTemp); {
	case errors.Is(err, build.ErrOverSource):
		return "; not written: " + target + " is the source itself"
	case err != nil:
		return "; cannot write " + target + " (any earlier one is left as it was): " + err.Error()
	}
	return " -> " + target
}

// tempFile is the temporary file a sheet is written to before it is
// renamed into place.
type tempFile = build.TempFile

// createTemp makes the temporary file of a write; it is os.CreateTemp, and
// the tests replace it to write to a disk that fills up.
var createTemp = func(dir, pattern string) (tempFile, error) { return os.CreateTemp(dir, pattern) }

func (w *Watcher) nextVersion() string {
	return w.boot + "-" + strconv.FormatInt(w.seq.Add(1), 10)
}

// publish makes a new listing version and wakes every event stream.
func (w *Watcher) publish() {
	list := map[string][]string{}
	for key, fs := range w.shadow {
		list[key] = sortedKeys(fs)
	}
	w.shadowed = false
	w.mu.Lock()
	w.shadowList = list
	w.wakeLocked()
	w.mu.Unlock()
}

// wakeLocked makes a new listing version and wakes every event stream;
// w.mu is held.
func (w *Watcher) wakeLocked() {
	w.listVer = w.nextVersion()
	close(w.tick)
	w.tick = make(chan struct{})
}

func (w *Watcher) logf(format string, args ...any) {
	fmt.Fprintf(w.log, "%s %s\n", time.Now().Format("15:04:05"), fmt.Sprintf(format, args...))
}

// ms formats a duration in milliseconds, with one decimal below 10 ms.
func ms(d time.Duration) string {
	m := float64(d) / float64(time.Millisecond)
	if m < 10 {
		return strconv.FormatFloat(m, 'f', 1, 64) + " ms"
	}
	return strconv.FormatFloat(m, 'f', 0, 64) + " ms"
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}
