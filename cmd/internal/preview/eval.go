package preview

import (
	"bytes"
	"crypto/sha256"
	"fmt"
	"sync/atomic"
	"time"

	"calcdoc/calcdoc"
	blockkind "calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/build"
	"calcdoc/expr"
	"calcdoc/render"
)

// Each document is evaluated on a worker of its own, so that one whose
// evaluation takes seconds (within the document's work budget) never holds
// back the pages of the others. A document has at most one evaluation
// running; a newer save while it runs waits as the next one and supersedes
// any save that waited before it, and the result of the running one is
// dropped when a newer save waits (it would be out of date at once). While
// a newer save is being evaluated, the page served is the last one, with a
// banner that says so, and the listing says so too.

// beforeEval, when set, is called on the worker before each evaluation;
// the tests set it to hold a document's evaluation as long as they need.
var beforeEval atomic.Pointer[func(*evalJob)]

// evalJob is one save of a document to evaluate.
type evalJob struct {
	key, file, rel, display string
	root                    string          // the folder given on the command line (calcdoc.Inputs.Root)
	loader                  *calcdoc.Loader // the burst's, for the documents its use statements name
	src                     []byte
	at                      time.Time
}

// evalState is a document that is being evaluated; w.mu guards it.
type evalState struct {
	next    *evalJob     // the newest save waiting, or nil
	latest  []byte       // the source of the newest save asked for
	since   time.Time    // when the newest save was asked for
	dropped bool         // the document went away: drop the result
	budget  *expr.Budget // the running evaluation's, stopped by a newer save
	// the file evaluated for the address, and its path as shown
	file, display string
}

// sameAsLatest reports whether src is what the document's newest save,
// evaluated or being evaluated, holds. cur is the page served when the
// file was about to be read; an evaluation may have ended since, its page
// now served (for the same file): the newest then.
func (w *Watcher) sameAsLatest(key string, cur *page, src []byte) bool {
	w.mu.RLock()
	defer w.mu.RUnlock()
	if st := w.evals[key]; st != nil {
		return bytes.Equal(st.latest, src)
	}
	if p := w.docs[key]; p != nil && cur != nil && p.file == cur.file {
		cur = p
	}
	return cur != nil && cur.src != nil && bytes.Equal(cur.src, src)
}

// startEval asks for j to be evaluated: on a new worker, or as the next
// job of the one running for its document.
func (w *Watcher) startEval(j *evalJob) {
	w.mu.Lock()
	defer w.mu.Unlock()
	st := w.evals[j.key]
	if st != nil {
		st.next, st.latest, st.since, st.dropped = j, j.src, j.at, false
		st.file, st.display = j.file, j.display
		st.budget.Stop() // the running evaluation is no longer wanted
		return
	}
	st = &evalState{next: j, latest: j.src, since: j.at, file: j.file, display: j.display}
	w.evals[j.key] = st
	w.busyLocked()
	w.workers.Add(1)
	go w.evalWorker(j.key, st)
}

// base is what the next evaluation of a document starts from: its last
// evaluation, taken over where the new save is unchanged
// (calcdoc.Reevaluate), and the drawings of its last sheet
// (render.BlockCache). It belongs to the document's worker.
type base struct {
	file, root string
	doc        *calcdoc.Document
	cache      *render.BlockCache
}

// dropEval makes the running evaluation of key drop its result, and
// forgets what its next evaluation would start from; w.mu is held.
func (w *Watcher) dropEval(key string) {
	delete(w.bases, key)
	if st := w.evals[key]; st != nil {
		st.next, st.dropped = nil, true
		st.budget.Stop()
	}
}

// evaluating reports whether a newer save of key is being evaluated, and
// since when; w.mu is held (read).
func (w *Watcher) evaluating(key string) (time.Time, bool) {
	st := w.evals[key]
	if st == nil || st.dropped {
		return time.Time{}, false
	}
	return st.since, true
}

// evalWorker evaluates the saves of one document until none waits.
func (w *Watcher) evalWorker(key string, st *evalState) {
	defer w.workers.Done()
	for {
		w.mu.Lock()
		j := st.next
		st.next = nil
		if j == nil {
			delete(w.evals, key)
			w.wakeLocked() // the banner goes
			w.idleLocked()
			w.mu.Unlock()
			return
		}
		w.wakeLocked() // the banner comes
		budget := expr.NewBudget(expr.DefaultBudget)
		st.budget = budget
		b := w.bases[key]
		w.mu.Unlock()

		p, line, next := w.evaluate(j, budget, b)

		var shown *page // the page served now, when a patch can lead to it
		w.mu.Lock()
		st.budget = nil // done: a newer save stops none (and the base stays whole)
		if !st.dropped {
			w.bases[key] = next
		}
		switch {
		case st.dropped:
			line = ""
		case st.next != nil && budget.Stopped():
			line = fmt.Sprintf("%s: evaluation stopped after %s: a newer save is being evaluated", j.display, ms(p.took))
		case st.next != nil:
			line = fmt.Sprintf("%s: evaluated in %s, but not shown: a newer save is being evaluated", j.display, ms(p.took))
		default:
			if cur := w.docs[key]; cur == nil || cur.file == j.file {
				if cur != nil && cur.status == 200 && p.status == 200 {
					p.before = &page{version: cur.version, body: cur.body, lay: cur.lay}
					shown = p
				}
				w.docs[key] = p
				// the sheets that use this one are evaluated again when
				// its values moved (a cycle of uses settles: its values
				// stop moving)
				w.queueReads(j.file, p.dataFiles, cur == nil || p.fp == "" || cur.fp != p.fp)
			}
		}
		// With no newer save waiting, the evaluation ends in the same
		// critical section that published its page: the page just
		// published is never served as "a newer save is being evaluated".
		finished := st.next == nil
		if finished {
			delete(w.evals, key)
			w.wakeLocked() // the banner goes
			w.idleLocked()
		}
		w.mu.Unlock()
		if line != "" {
			w.logf("%s", line)
		}
		if shown != nil && shown.before.lay.known.Load() {
			// the patch an open page asks for next reads only the
			// part of the page that changed (layout.go)
			shown.layoutOf(shown.before)
		}
		if finished {
			return
		}
	}
}

// evaluate evaluates and draws one save, from the evaluation before (b,
// or nil) where the save is unchanged, writes the sheet when Out is set,
// and returns its page, the log line and what the next save starts from.
func (w *Watcher) evaluate(j *evalJob, budget *expr.Budget, b *base) (*page, string, *base) {
	if f := beforeEval.Load(); f != nil {
		(*f)(j)
	}
	in := calcdoc.Inputs{Root: j.root, Budget: budget}
	if j.loader != nil {
		in.Sheets = j.loader.Sheets(j.display)
	}
	next := &base{file: j.file, root: j.root, cache: &render.BlockCache{}}
	var prev *calcdoc.Document
	if b != nil && b.file == j.file && b.root == j.root {
		prev, next.cache = b.doc, b.cache
	}
	doc := calcdoc.Reevaluate(prev, j.display, j.src, blockkind.Standard(), in)
	next.doc = doc
	p := &page{key: j.key, file: j.file, display: j.display, src: j.src, status: 200, version: w.nextVersion(), at: j.at, lay: &layoutCell{},
		values: len(doc.Values), checks: len(doc.Checks), failed: doc.FailedChecks(),
		errors: len(doc.Errors), warning: len(doc.Warnings)}
	switch {
	case p.errors > 0:
		p.state = stErrors
	case p.failed > 0:
		p.state = stFail
	}
	body, err := build.Sheet(doc, build.Options{Version: w.cfg.Version, HeadExtra: liveHead("/"+j.key, p.version), Blocks: next.cache})
	if err != nil {
		p.state, p.problem, p.status = stUndrawn, err.Error(), 500
		body = problemPage(j.key, p.version, "Cannot draw "+j.display,
			"The document was evaluated, but its sheet could not be drawn: "+err.Error()+".")
	}
	p.body = body
	p.took = time.Since(j.at)
	p.usedFiles, p.uses = usedFiles(doc, j.file)
	p.dataFiles = doc.DataFiles
	if w.hasUsers(j.file) {
		// whether its values moved, for the sheets that use it (the
		// values JSON of a long sheet takes a while: only then)
		fp := sha256.Sum256(doc.MarshalValues())
		p.fp = string(fp[:])
	}
	line := fmt.Sprintf("%s: evaluated in %s; %d of %d checks not satisfied, %d error%s",
		j.display, ms(p.took), p.failed, p.checks, p.errors, plural(p.errors))
	if p.warning > 0 {
		line += fmt.Sprintf(", %d warning%s", p.warning, plural(p.warning))
	}
	if p.state == stUndrawn {
		line += "; cannot draw the sheet: " + p.problem
	}
	line += w.writeOut(doc, j.file, j.rel)
	return p, line, next
}

// hasUsers reports whether a page served uses the document in file.
func (w *Watcher) hasUsers(file string) bool {
	real := calcdoc.RealPath(file)
	w.mu.RLock()
	defer w.mu.RUnlock()
	for _, p := range w.docs {
		for _, u := range p.usedFiles {
			if u == real {
				return true
			}
		}
	}
	return false
}

// pendingVersion is the version of a page served while a newer save of
// it is being evaluated: the event stream tells an open page when the
// banner comes and when it goes.
func pendingVersion(v string) string { return v + "-evaluating" }

// withBanner returns body with the page's version marked as pending and a
// banner at the top of the body that says a newer save is being evaluated.
func withBanner(body []byte, version string, since time.Time) []byte {
	old := []byte(`<meta name="calcdoc-live" content="` + version + `"`)
	out := bytes.Replace(body, old, []byte(`<meta name="calcdoc-live" content="`+pendingVersion(version)+`"`), 1)
	i := bytes.Index(out, []byte("<body"))
	if i < 0 {
		return out
	}
	j := bytes.IndexByte(out[i:], '>')
	if j < 0 {
		return out
	}
	at := i + j + 1
	banner := fmt.Sprintf("\n<div class=\"calcdoc-pending\" role=\"status\">A newer save of this document (%s) is being evaluated: "+
		"this page shows the one before it, and reloads by itself when the new sheet is ready.</div>", since.Format("15:04:05"))
	return append(out[:at:at], append([]byte(banner), out[at:]...)...)
}
