package build

import (
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"
	"sync/atomic"

	"calcdoc/calcdoc"
	"calcdoc/render"
)

// Evaluated is one input of a build, evaluated: its document, or the error
// that kept it from being read.
type Evaluated struct {
	Input
	Doc *calcdoc.Document
	Err error
}

// node is one document of the use graph: an input, or a document an
// input uses.
type node struct {
	real, shown string
	src         []byte
	err         error
	inputs      []int // the inputs that are this document
	users       []*node
	pending     int // the documents it uses not yet evaluated
	done        bool
	order       int // first seen, for a fixed order of the leftovers
}

// Evaluate evaluates every input with the loader l, each document once, in
// an order where a document comes after every document it uses, on
// workers goroutines (0: one a core). Documents that an input uses but
// that are not inputs are evaluated too (for their users). fn, when not
// nil, is called for each input right after it is evaluated, on the
// worker that evaluated it (to draw and write its sheet). Documents on a
// cycle of uses are evaluated last, one after another, in the order
// first met. The result is in the order of inputs and does not depend on
// workers: a sheet is a function of its document and the documents it
// uses, which the loader evaluates once.
func Evaluate(l *calcdoc.Loader, inputs []Input, workers int, fn func(i int, doc *calcdoc.Document)) []Evaluated {
	var draw func(int, *calcdoc.Document, *render.Predraw)
	if fn != nil {
		draw = func(i int, doc *calcdoc.Document, _ *render.Predraw) { fn(i, doc) }
	}
	return evaluate(l, inputs, workers, draw, false)
}

// EvaluateDraw is Evaluate for a build that draws each input's sheet in
// fn: while an input is evaluated, a goroutine of its own draws its
// blocks (render.Predraw), when a core is free for it, and fn gets it
// (pre, nil when there was none) to give the sheet (Options.Predrawn), so
// that one document uses two cores. At most GOMAXPROCS goroutines
// evaluate or draw at once: the workers evaluating and the drawing
// goroutines alive count together, and a document gets a drawing
// goroutine only when fewer than GOMAXPROCS are busy (a folder of many
// documents already keeps every core busy with one a document). The
// sheets are those of Evaluate: the drawing goroutine changes no byte.
// After fn returns, EvaluateDraw closes pre and waits for its goroutine
// to end (at once once the sheet is drawn), whether or not fn drew it.
func EvaluateDraw(l *calcdoc.Loader, inputs []Input, workers int, fn func(i int, doc *calcdoc.Document, pre *render.Predraw)) []Evaluated {
	return evaluate(l, inputs, workers, fn, true)
}

func evaluate(l *calcdoc.Loader, inputs []Input, workers int, fn func(i int, doc *calcdoc.Document, pre *render.Predraw), predraw bool) []Evaluated {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	cores := int64(runtime.GOMAXPROCS(0))
	var busy atomic.Int64 // workers evaluating and drawing goroutines alive
	out := make([]Evaluated, len(inputs))
	byReal := map[string]*node{}
	var nodes []*node
	var add func(path, real string) *node
	add = func(path, real string) *node {
		if n := byReal[real]; n != nil {
			return n
		}
		n := &node{real: real, shown: path, order: len(nodes)}
		byReal[real] = n
		nodes = append(nodes, n)
		n.src, n.err = os.ReadFile(path)
		if n.err != nil {
			return n
		}
		for _, u := range l.UsesOf(path, n.src) {
			dep := add(u.Path, u.Real)
			if dep.err == nil && dep != n {
				dep.users = append(dep.users, n)
				n.pending++
			}
		}
		return n
	}
	for i, in := range inputs {
		out[i].Input = in
		n := add(in.Path, calcdoc.RealPath(in.Path))
		n.inputs = append(n.inputs, i)
	}
	eval := func(n *node) {
		busy.Add(1)
		defer busy.Add(-1)
		var pre *render.Predraw
		var first *calcdoc.Document // the document evaluated here, under n.shown
		if n.err == nil {
			if predraw && fn != nil && len(n.inputs) > 0 {
				if busy.Add(1) <= cores {
					pre = render.NewPredraw()
					defer busy.Add(-1) // after pre.Wait below
				} else {
					busy.Add(-1)
				}
			}
			if pre != nil {
				first = l.ParseAfter(n.shown, n.src, pre.Block)
			} else {
				first = l.Parse(n.shown, n.src)
			}
		}
		for _, i := range n.inputs {
			if n.err != nil {
				out[i].Err = n.err
				continue
			}
			if inputs[i].Path == n.shown {
				// what the loader would give again for the same path
				// and bytes (without resolving the path and hashing the
				// bytes once more)
				out[i].Doc = first
			} else {
				out[i].Doc = l.Parse(inputs[i].Path, n.src)
			}
			if fn != nil {
				fn(i, out[i].Doc, pre)
			}
			pre.Wait()
			pre = nil // it drew the first input's blocks; a sheet ignores it for another document
		}
		pre.Wait()
	}
	var mu sync.Mutex
	ready := make(chan *node, len(nodes))
	inflight := 0
	for _, n := range nodes {
		if n.pending == 0 {
			ready <- n
			inflight++
		}
	}
	if inflight == 0 {
		close(ready)
	}
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for n := range ready {
				eval(n)
				mu.Lock()
				n.done = true
				for _, u := range n.users {
					u.pending--
					if u.pending == 0 {
						ready <- u
						inflight++
					}
				}
				inflight--
				if inflight == 0 {
					close(ready)
				}
				mu.Unlock()
			}
		}()
	}
	wg.Wait()
	// what is left is on a cycle, or uses what is: one after another
	var left []*node
	for _, n := range nodes {
		if !n.done {
			left = append(left, n)
		}
	}
	sort.SliceStable(left, func(a, b int) bool { return left[a].order < left[b].order })
	for _, n := range left {
		eval(n)
	}
	return out
}

// Roots are the PATHs of the command line that inputs came from (each
// input's path less its relative part): outside git, uses stay inside them.
func Roots(inputs []Input) []string {
	var out []string
	seen := map[string]bool{}
	for _, in := range inputs {
		root := filepath.Dir(in.Path)
		p, r := filepath.ToSlash(in.Path), filepath.ToSlash(in.Rel)
		if strings.HasSuffix(p, "/"+r) {
			root = filepath.FromSlash(strings.TrimSuffix(p, "/"+r))
		} else if p == r {
			root = "."
		}
		if !seen[root] {
			seen[root] = true
			out = append(out, root)
		}
	}
	return out
}

// NewLoader is the loader of a build of inputs with the kinds of reg.
func NewLoader(reg *calcdoc.Registry, inputs []Input) *calcdoc.Loader {
	return calcdoc.NewLoader(reg, Roots(inputs)...)
}
