package render

import (
	"bytes"
	"io"
	"slices"
	"sync"
	"sync/atomic"

	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/markup"
)

// Predraw draws the blocks of a document on a goroutine of its own while
// the document is still being evaluated, so that a build uses a second
// core: its Block method is the document's per-block hook
// (calcdoc.Inputs.AfterBlock, calcdoc.Loader.ParseAfter), and the sheet
// (Options.Predrawn) copies each drawing that is the one the serial pass
// would write. The sheet's bytes are those of the serial pass.
//
// What it draws: blocks of a LocalDrawer kind (calc), whose drawing reads
// nothing but the block, its evaluation, the front matter and the
// document's final names for the names its text mentions
// (calcdoc.Block.Mentions) or its evaluation looked up (the tables of its
// look-ups), and writes nothing but the block in its place. Every other
// kind is drawn in the serial pass: a solve block writes into the
// appendix, whose order is the sheet's, and no other kind is proven to
// read only its own names.
//
// Why the drawing is the serial one: the document's names are defined
// once and never removed or replaced (expr.Env.Define), so a name the
// block's drawing looks up that is defined when the block has been
// evaluated has its final definition then. The hook, on the evaluating
// goroutine, looks each name the drawing may read up in the document's
// names and hands the definitions found to the drawing goroutine, which
// keeps its own copy of the names (an expr.Env only it touches, so the
// two goroutines never share a map); it remembers the names not found.
// When the sheet is written (evaluation done) a drawing is copied only if
// none of those names has been defined since (checked in the final
// names); otherwise, and for a block whose drawing failed or wrote into
// the appendix, the serial pass draws the block itself. The drawing
// goroutine writes with a markup.Writer of its own: the writer's caches
// (typeset values, check displays) give the same bytes whichever blocks
// filled them.
//
// After evaluation the sheet and the drawing goroutine share what is
// left: the sheet goes on from the first block it has not got, drawing
// each the goroutine has not started itself, and the goroutine from the
// last block back. A document whose drawings would take more than
// predrawMost has nothing drawn while it is evaluated (its drawings, held
// until the sheet, would raise the build's memory): the sheet then starts
// the goroutine (startAfter), which draws every second block just ahead
// of the sheet with the document's final names, holding at most
// predrawHeldAfter. While the document is evaluated at most predrawHeld
// of drawings wait to be copied (memory).
// Call Wait once the sheet is written (or not to be written). A Predraw
// serves one document once; it is safe for the hook and the sheet to run
// on different goroutines one after the other.
type Predraw struct {
	mu     sync.Mutex
	closed bool              // Close was called: no more blocks
	doc    *calcdoc.Document // the document the hook was called for
	jobs   map[*calcdoc.Block]*preJob
	// names are the keys each block's text may mention, by its index
	// among the document's blocks, made ahead by the drawing goroutine
	// (nil where it has not yet come); index finds a block's.
	names   []atomic.Pointer[map[string]bool]
	index   map[*calcdoc.Block]int
	queue   chan *preJob
	closing sync.Once
	done    chan struct{}   // closed when the drawing goroutine ends
	room    *sync.Cond      // on mu: held went down, or finished
	held    int             // the bytes the drawings not yet copied hold (their lengths: a buffer's room beyond is not touched, markup.Room)
	free    []*bytes.Buffer // buffers handed back by the sheet
	// freeDefs are lists of definitions (preJob.defs) the drawing
	// goroutine has added to its names, handed back for the next hook
	freeDefs [][]preDef
	last     *bytes.Buffer // the buffer copyTo wrote from last
	finished bool          // the sheet is written: hold no drawing back
	limit    int           // predrawHeld; tests make it small
	most     int           // predrawMost
	// after: the document's drawings would pass most, so none is drawn
	// while it is evaluated; the sheet starts the drawing goroutine
	// (startAfter), which draws every other block ahead of the sheet
	// with the document's own names, holding at most predrawHeldAfter.
	after     bool
	afterOnce sync.Once // the goroutine of after started, or done closed
	// Copied and Drawn count the blocks of the sheet copied from the
	// drawing goroutine and drawn by the serial pass (of LocalDrawer
	// kinds) after the sheet is written.
	Copied, Drawn int
	// isolate (tests) draws each block with a writer and names of its
	// own, holding only the definitions its hook found: a drawing equal
	// to the serial one then shows that it reads no other name.
	isolate bool
	// wait (tests) makes the sheet wait for every queued block to be
	// drawn early instead of drawing those not started itself.
	wait bool
}

// preJob is one block to draw early.
type preJob struct {
	b      *calcdoc.Block
	d      markup.Drawer
	defs   []preDef // definitions to add to the drawing goroutine's names first
	absent []string // keys of names the drawing may read, not defined at the hook
	counts [3]int   // expr.Env.Counts at the hook
	state  atomic.Int32
	ready  chan struct{} // closed when the drawing is done (state preDone)
	buf    *bytes.Buffer // the drawing; nil when it cannot be used
	held   bool          // buf counts in Predraw.held
}

// job states
const (
	preQueued int32 = iota
	preDrawing
	preDone
	preSerial // taken by the sheet's serial pass
)

// preDef is one definition found at the hook: a value, a function or a
// table.
type preDef struct {
	key string
	v   *expr.Binding
	f   *expr.Func
	t   expr.Table
}

// NewPredraw makes a Predraw for one document.
func NewPredraw() *Predraw {
	p := &Predraw{jobs: map[*calcdoc.Block]*preJob{}, done: make(chan struct{}), limit: predrawHeld, most: predrawMost}
	p.room = sync.NewCond(&p.mu)
	return p
}

// Block is the per-block hook (calcdoc.Inputs.AfterBlock): it queues the
// block for drawing when its kind is a LocalDrawer, with what the drawing
// may read of the document's names. It runs on the evaluating goroutine.
func (p *Predraw) Block(b *calcdoc.Block) {
	d, local := b.KindOf().(LocalDrawer)
	if !local {
		return
	}
	doc := b.Doc()
	p.mu.Lock()
	defer p.mu.Unlock()
	switch {
	case p.closed:
		return
	case p.doc == nil:
		if drawingSize(doc) > p.most {
			// a large document: its drawings, held until the sheet, would
			// raise the build's memory more than the second core saves;
			// they are shared with the sheet after evaluation (startAfter)
			p.closed, p.doc, p.after = true, doc, true
			return
		}
		p.start(doc)
	case p.doc != doc:
		return
	}
	var ms map[string]bool
	if k, ok := p.index[b]; ok {
		if m := p.names[k].Load(); m != nil {
			ms = *m // made ahead by the drawing goroutine
		}
	}
	if ms == nil {
		if ms = b.Mentions(); ms == nil {
			return
		}
	}
	env := doc.Env
	j := &preJob{b: b, d: d, ready: make(chan struct{})}
	j.counts[0], j.counts[1], j.counts[2] = env.Counts()
	look := func(k string) {
		if v := env.Lookup(k); v != nil {
			j.defs = append(j.defs, preDef{key: k, v: v})
		} else if f := env.LookupFunc(k); f != nil {
			j.defs = append(j.defs, preDef{key: k, f: f})
		} else if t := env.LookupTable(k); t != nil {
			j.defs = append(j.defs, preDef{key: k, t: t})
		} else {
			j.absent = append(j.absent, k)
		}
	}
	if n := len(p.freeDefs); n > 0 {
		j.defs, p.freeDefs = p.freeDefs[n-1], p.freeDefs[:n-1]
	}
	j.defs = slices.Grow(j.defs, len(ms))
	for k := range ms {
		look(k)
	}
	// the tables its statements looked up (a look-up inside a function
	// defined elsewhere names a table the block's text may not)
	if stmts, ok := b.Result.([]*calcdoc.Stmt); ok {
		for _, st := range stmts {
			if st.Res == nil {
				continue
			}
			for _, l := range st.Res.Trace.Lookups() {
				look(expr.NameKey(l.Table))
			}
		}
	}
	p.jobs[b] = j
	p.queue <- j
}

// start starts the drawing goroutine for doc, on the evaluating goroutine
// at the first block: what it copies of the document (front matter, text,
// file) is final before evaluation.
func (p *Predraw) start(doc *calcdoc.Document) {
	p.doc = doc
	p.queue = make(chan *preJob, len(doc.Blocks))
	view := *doc // the drawing's document: its own names, the rest as read
	view.Env = expr.NewEnv()
	view.Env.Reserve(doc.NamesAbout()) // made once, not grown name by name
	view.Env.Preferred, view.Env.Cases = doc.Env.Preferred, doc.Env.Cases
	p.names = make([]atomic.Pointer[map[string]bool], len(doc.Blocks))
	p.index = make(map[*calcdoc.Block]int, len(doc.Blocks))
	for k, b := range doc.Blocks {
		p.index[b] = k
	}
	go p.run(&view, p.queue)
}

// drawsEarly reports whether p draws doc's blocks of LocalDrawer kinds
// while doc is evaluated: the sheet then copies most of them and
// typesets few values itself.
func (p *Predraw) drawsEarly(doc *calcdoc.Document) bool {
	if p == nil {
		return false
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.doc == doc && !p.after
}

// predrawHeld is the most the drawings made early and not yet copied into
// the sheet may hold, in bytes: while the document is evaluated the
// drawing goroutine stops there, and the sheet then hands each drawing's
// buffer back as it copies it. The drawings of the 2,000-statement
// document of cmd/calcbench take about 1.6 MB, so the whole of it is
// drawn while it is evaluated; at 20,000 statements (16 MB) the limit
// keeps the peak memory of a build close to that of a serial one.
const predrawHeld = 6 << 20

// predrawMost is the likely size of the drawings (drawingSize) above which
// a document is drawn by the sheet alone: about 5,000 statements of the
// benchmark's document. Measured (cmd/calcbench, whole process) at 20,000
// statements, drawing early took more time than it saved and raised the
// peak memory by 14 MB: every drawing is held until the sheet copies it,
// and the collector, off below 64 MiB (cmd/calcdoc/gc.go), then runs.
const predrawMost = 4 << 20

// predrawHeldAfter is the most the drawings made ahead of the sheet of a
// document above predrawMost may hold (startAfter).
const predrawHeldAfter = 1 << 20

// startAfter starts, for a document above predrawMost once it is
// evaluated, the goroutine that draws with the sheet: the sheet and it go
// through the blocks of LocalDrawer kinds in order, it drawing every
// second one (the sheet copies it) and the sheet the others, so that the
// drawing takes both cores while at most predrawHeldAfter of drawings
// wait to be copied. The names are final: the goroutine draws with the
// document's own, which nothing writes any more, and with a writer of its
// own. A block the goroutine has not started when the sheet comes to it
// is drawn by the sheet.
func (p *Predraw) startAfter(doc *calcdoc.Document) {
	if p == nil {
		return
	}
	p.mu.Lock()
	start := p.after && p.doc == doc
	p.mu.Unlock()
	if !start {
		return
	}
	p.afterOnce.Do(func() {
		var jobs []*preJob
		v, f, t := doc.Env.Counts()
		for _, b := range doc.Blocks {
			if d, ok := b.KindOf().(LocalDrawer); ok {
				j := &preJob{b: b, d: d, ready: make(chan struct{}), counts: [3]int{v, f, t}}
				jobs = append(jobs, j)
			}
		}
		p.mu.Lock()
		for _, j := range jobs {
			p.jobs[j.b] = j
		}
		p.limit = min(p.limit, predrawHeldAfter)
		p.mu.Unlock()
		go p.runAfter(doc, jobs)
	})
}

// runAfter draws the jobs of startAfter: every second one, or every one
// when the sheet waits for all (DrawAllEarly).
func (p *Predraw) runAfter(doc *calcdoc.Document, jobs []*preJob) {
	defer close(p.done)
	w := markup.NewWriter(doc)
	for k, j := range jobs {
		if k%2 == 0 && !p.wait {
			continue // the sheet's
		}
		p.mu.Lock()
		for p.held >= p.limit && !p.finished {
			p.room.Wait()
		}
		finished := p.finished
		p.mu.Unlock()
		if finished {
			return
		}
		w = p.drawJob(doc, w, j, true)
	}
}

// run draws the queued blocks in order, each into a buffer of its own
// (one the sheet has handed back, when there is one), after adding the
// definitions its hook found to its names. Once the document is evaluated
// (Close) the sheet draws from the first block it has not got and this
// goroutine from the last one queued, back to where they meet, so that
// the two share what is left instead of one waiting on the other.
func (p *Predraw) run(view *calcdoc.Document, queue <-chan *preJob) {
	defer close(p.done)
	// the names each block's text may mention, ahead of the hook, which
	// then only looks them up (Block.TextMentions: the block's text alone)
	for k, b := range view.Blocks {
		if _, ok := b.KindOf().(LocalDrawer); ok && k > 0 {
			m := b.TextMentions()
			p.names[k].Store(&m)
		}
	}
	// the typeset values' cache made once for the names the document
	// will define (view.Values is still empty), not grown through its sizes
	shared := markup.NewWriterFor(view, view.NamesAbout())
	var left []*preJob // received after Close: drawn from the last
	for j := range queue {
		for _, def := range j.defs {
			define(view.Env, def)
		}
		p.mu.Lock()
		for p.held >= p.limit && !p.finished && !p.closed {
			p.room.Wait()
		}
		closed := p.closed
		p.mu.Unlock()
		if closed && !p.wait {
			left = append(left, j)
			continue
		}
		shared = p.drawJob(view, shared, j, true)
		p.putBackDefs(j)
	}
	for k := len(left) - 1; k >= 0; k-- {
		if left[k].state.Load() != preQueued {
			break // the sheet has come to it
		}
		shared = p.drawJob(view, shared, left[k], false)
	}
}

// drawJob draws j with the writer w (or, isolated, a writer and names of
// its own) unless the sheet has taken it, and returns the writer for the
// next; held says whether the drawing counts against the limit of
// drawings held.
func (p *Predraw) drawJob(view *calcdoc.Document, w *markup.Writer, j *preJob, held bool) *markup.Writer {
	p.mu.Lock()
	var buf *bytes.Buffer
	if n := len(p.free); n > 0 {
		buf, p.free = p.free[n-1], p.free[:n-1]
	}
	p.mu.Unlock()
	if !j.state.CompareAndSwap(preQueued, preDrawing) {
		p.putBack(buf)
		return w // the sheet draws it
	}
	dw := w
	if p.isolate && !p.after {
		own := *view
		own.Env = expr.NewEnv()
		own.Env.Preferred, own.Env.Cases = view.Env.Preferred, view.Env.Cases
		for _, def := range j.defs {
			define(own.Env, def)
		}
		dw = markup.NewWriter(&own)
	}
	if buf == nil {
		// room for a drawing larger than its likely size, so that it is
		// not grown (a copy, and the room of both touched): the room is
		// touched only as far as the drawing goes
		size := blockSize(j.b)
		buf = markup.Room(size + size/2)
	} else {
		buf.Grow(blockSize(j.b))
	}
	if drawOne(dw, j, buf) {
		j.buf = buf
		if held {
			p.mu.Lock()
			p.held += buf.Len()
			p.mu.Unlock()
		}
		j.held = held
	} else {
		p.putBack(buf)
		w = markup.NewWriter(view) // a drawing that failed may leave the writer in a row
	}
	j.state.Store(preDone)
	close(j.ready)
	return w
}

// drawingSize is the likely size of the drawings of doc's blocks of
// LocalDrawer kinds (blockSize).
func drawingSize(doc *calcdoc.Document) int {
	n := 0
	for _, b := range doc.Blocks {
		if _, ok := b.KindOf().(LocalDrawer); ok {
			n += blockSize(b)
		}
	}
	return n
}

// blockSize is the room the drawing of b is likely to take: 17 bytes a
// byte of its text (pageSize counts 16 for the whole sheet, whose
// embedded source and prose take less than a statement's rows).
func blockSize(b *calcdoc.Block) int {
	n := 0
	for _, l := range b.Lines {
		n += len(l) + 1
	}
	return 17*n + 512
}

// drawOne draws j's block into buf; false when the drawing wrote into the
// appendix or panicked (the serial pass then draws it, and fails there as
// it would have).
func drawOne(w *markup.Writer, j *preJob, buf *bytes.Buffer) (ok bool) {
	defer func() {
		if recover() != nil {
			ok = false
		}
		w.SetOutput(nil)
	}()
	w.SetOutput(buf)
	j.d.Draw(w, j.b)
	if w.Appendix.Len() > 0 {
		w.Appendix.Reset()
		return false
	}
	return true
}

// putBack hands a drawing's buffer back for the next.
func (p *Predraw) putBack(buf *bytes.Buffer) {
	if buf == nil {
		return
	}
	buf.Reset()
	p.mu.Lock()
	p.free = append(p.free, buf)
	p.mu.Unlock()
}

// putBackDefs hands j's list of definitions, added to the drawing
// goroutine's names and drawn with, back for the next hook to fill (the
// hook makes one for every word of its block's text, most of them no
// name: made anew for each block they would be memory touched once and
// dropped). Not when the tests draw each block in isolation: its drawing
// reads the list.
func (p *Predraw) putBackDefs(j *preJob) {
	if p.isolate || j.defs == nil {
		return
	}
	defs := j.defs[:0]
	clear(j.defs) // no pointer kept alive by a list waiting to be filled
	j.defs = nil
	p.mu.Lock()
	p.freeDefs = append(p.freeDefs, defs)
	p.mu.Unlock()
}

// define adds a definition found at a hook to the drawing's names, once.
func define(env *expr.Env, def preDef) {
	switch {
	case def.v != nil:
		if env.Lookup(def.key) == nil {
			env.Define(def.v)
		}
	case def.f != nil:
		if env.LookupFunc(def.key) == nil {
			f := *def.f // DefineFunc sets fields of its function: a copy of its own
			env.DefineFunc(&f)
		}
	case def.t != nil:
		if env.LookupTable(def.key) == nil {
			env.DefineTable(def.key, expr.Pos{}, def.t)
		}
	}
}

// DrawAllEarly makes the sheet wait for the drawing goroutine to draw
// every block queued instead of drawing those not started itself: tests
// that compare the early drawings with the serial ones use it, so that the
// comparison does not depend on how the goroutines were scheduled. Call it
// before the document is evaluated.
func (p *Predraw) DrawAllEarly() { p.wait = true }

// Close ends the drawing goroutine once it has drawn what is queued: the
// document is evaluated. The sheet closes it; a caller that writes no
// sheet closes it itself. Close may be called more than once.
func (p *Predraw) Close() {
	if p == nil {
		return
	}
	p.closing.Do(func() {
		p.mu.Lock()
		q := p.queue
		p.queue, p.closed = nil, true
		p.mu.Unlock()
		p.room.Broadcast() // a drawing held back goes on: the sheet is begun
		if q != nil {
			close(q)
		} else if !p.after {
			close(p.done) // no drawing goroutine was started
		}
	})
}

// Wait closes p and waits for its drawing goroutine to end: after the
// sheet, at once (the sheet has taken every block queued), so that the
// build knows the core free again.
func (p *Predraw) Wait() {
	if p == nil {
		return
	}
	p.Close()
	p.finish()
	p.mu.Lock()
	after := p.after
	p.mu.Unlock()
	if after {
		p.afterOnce.Do(func() { close(p.done) }) // no sheet started it
	}
	<-p.done
	p.mu.Lock()
	p.jobs, p.free, p.last, p.freeDefs = nil, nil, nil, nil // the drawings' buffers go with the sheet
	p.mu.Unlock()
}

// finish lets the drawing goroutine draw what is left without holding
// back: the sheet has taken every block.
func (p *Predraw) finish() {
	if p == nil {
		return
	}
	p.mu.Lock()
	p.finished = true
	p.mu.Unlock()
	p.room.Broadcast()
}

// copyTo writes the early drawing of block b of doc to out and reports
// true when it is the serial one (and returns its bytes, valid until the
// next call: keep a copy); false when the serial pass must draw b (not
// queued, not started, failed, or a name its drawing may read was
// defined after it).
func (p *Predraw) copyTo(out io.Writer, doc *calcdoc.Document, b *calcdoc.Block) ([]byte, bool) {
	if p == nil {
		return nil, false
	}
	p.mu.Lock()
	j := p.jobs[b]
	if p.doc != doc {
		j = nil
	}
	if p.last != nil { // the caller is done with the bytes of the last call
		p.last.Reset()
		p.free = append(p.free, p.last)
		p.last = nil
	}
	p.mu.Unlock()
	if j == nil {
		return nil, false
	}
	if !p.wait && j.state.CompareAndSwap(preQueued, preSerial) {
		p.Drawn++
		return nil, false
	}
	<-j.ready
	buf := j.buf
	if buf == nil {
		p.Drawn++
		return nil, false
	}
	j.buf = nil
	var bs []byte
	ok := j.stillValid(doc.Env)
	if ok {
		bs = buf.Bytes()
		out.Write(bs)
		p.Copied++
	} else {
		p.Drawn++
	}
	p.mu.Lock()
	if j.held {
		p.held -= buf.Len()
	}
	if ok {
		p.last = buf // handed back at the next call
	} else {
		buf.Reset()
		p.free = append(p.free, buf)
	}
	p.mu.Unlock()
	p.room.Signal()
	return bs, ok
}

// stillValid reports whether no name the drawing may read, undefined at
// the hook, is defined in the final names env.
func (j *preJob) stillValid(env *expr.Env) bool {
	if v, f, t := env.Counts(); v == j.counts[0] && f == j.counts[1] && t == j.counts[2] {
		return true // nothing defined since
	}
	for _, k := range j.absent {
		if env.Lookup(k) != nil || env.LookupFunc(k) != nil || env.LookupTable(k) != nil {
			return false
		}
	}
	return true
}
