package calcdoc

import (
	"bytes"
	"math"
	"os"
	"reflect"
	"strings"
	"sync"
	"sync/atomic"
	"unicode/utf8"

	"calcdoc/expr"

	"github.com/yuin/goldmark/ast"
)

// An incremental evaluation (Reevaluate) evaluates a new save of a
// document again from its first block or inline value that changed,
// taking over the evaluation of every one above it from the save before.
// Names are defined once and each item (block or inline value) defines
// its names at positions inside itself, so the names above item k are the
// final names of the save before less those defined at or after item k
// (expr.Env.Fork). What else an item leaves behind is kept item by item in
// a trail: the errors, values, checks, data files and use statements it
// added, the work it spent and the case state after it.

// trail is what the evaluation of a document's items (Document.order)
// added, item by item.
type trail struct {
	marks []evalMark // marks[j]: the state before item j; the last: after every item
	base  int        // the errors the document had before evaluation (reading)
	wbase int        // the warnings likewise
	errs  []*expr.Error
	warns []*expr.Error
}

// evalMark is the state of an evaluation before one item.
type evalMark struct {
	errs, warns, values, checks, dataFiles, uses int
	vars, funcs, tables                          int
	spent                                        int64
	over                                         bool
	caseIdx                                      int
	caseDep                                      bool
}

func newTrail(d *Document) *trail { return &trail{base: len(d.Errors), wbase: len(d.Warnings)} }

// mark is the state of d's evaluation now.
func (d *Document) mark(t *trail) evalMark {
	v, f, tb := d.Env.Counts()
	return evalMark{errs: len(d.Errors) - t.base, warns: len(d.Warnings) - t.wbase, values: len(d.Values), checks: len(d.Checks),
		dataFiles: len(d.DataFiles), uses: len(d.Uses), vars: v, funcs: f, tables: tb,
		spent: d.Env.Budget.Spent(), over: d.Env.Budget.Over() != nil, caseIdx: d.Env.Case(), caseDep: d.Env.CaseDep()}
}

// evalFrom evaluates the items of d from item k on, recording each in t
// (which holds the marks of the items before k), then sorts the errors.
func (d *Document) evalFrom(k int, t *trail) {
	for _, it := range d.order[k:] {
		t.marks = append(t.marks, d.mark(t))
		switch it := it.(type) {
		case *Block:
			it.memo = &blockMemo{id: evalIDs.Add(1)}
			d.evalBlock(it)
			if d.inputs.AfterBlock != nil {
				d.inputs.AfterBlock(it)
			}
		case *Inline:
			d.evalInline(it)
		}
	}
	t.marks = append(t.marks, d.mark(t))
	t.errs = append([]*expr.Error(nil), d.Errors[t.base:]...)
	t.warns = append([]*expr.Error(nil), d.Warnings[t.wbase:]...)
	d.trail = t
	d.Errors.Sort()
	d.Warnings.Sort()
}

// evalIDs numbers the evaluations of blocks (Block.EvalID).
var evalIDs atomic.Uint64

// docSerials numbers the documents read (Document.EvaluatedFrom).
var docSerials atomic.Uint64

// blockMemo is what the evaluations of a block share: a block taken over
// by Reevaluate has the memo of the block it was taken from.
type blockMemo struct {
	id       uint64
	once     sync.Once
	mentions map[string]bool // the keys of the names its text may mention
}

// EvalID identifies the evaluation of a block: a block that Reevaluate
// took over has the EvalID of the block it took over from; 0 for a block
// not evaluated.
func (b *Block) EvalID() uint64 {
	if b.memo == nil {
		return 0
	}
	return b.memo.id
}

// TakenOver reports whether Reevaluate took the block's evaluation over
// from the save before.
func (b *Block) TakenOver() bool { return b.takenOver }

// EvaluatedFrom reports whether Reevaluate evaluated d from prev, taking
// over prev's evaluation of the blocks above the first change.
func (d *Document) EvaluatedFrom(prev *Document) bool {
	return prev != nil && d.basis != 0 && d.basis == prev.serial
}

// Redefines reports whether a name that the text of b (a block taken
// over) may mention is defined by the part of the document that
// Reevaluate evaluated again, in the save before or in this one. A block's
// drawing reads the document's final names for the names it shows (their
// display, whether a name is a function); when none of them is defined
// below the first change, the drawing of a block taken over is the one
// of the save before. It reports true for a block not taken over (a block
// below the first change draws as one of the save before when
// Block.DrawnLike says so).
func (d *Document) Redefines(b *Block) bool {
	if !b.takenOver || b.memo == nil {
		return true
	}
	if len(d.redefined) == 0 {
		return false
	}
	// the smaller set is walked, the larger looked up
	m := b.mentions()
	small, large := m, d.redefined
	if len(large) < len(small) {
		small, large = large, small
	}
	for k := range small {
		if large[k] {
			return true
		}
	}
	return false
}

// Mentions are the keys (expr.NameKey) of every name the text of an
// evaluated block may mention (see mentions), made once for the block and
// shared: the caller must not change the map. nil for a block not
// evaluated. It is safe for use by several goroutines.
func (b *Block) Mentions() map[string]bool {
	if b.memo == nil {
		return nil
	}
	return b.mentions()
}

// mentions are the keys of every name the block's text may mention: each
// run of letters, digits, '_', '.' and characters beyond ASCII, whole and
// cut at its dots, each without its leading digits and dots (a number is
// no name; a name may be written straight after one). It errs on the side
// of too many.
func (b *Block) mentions() map[string]bool {
	m := b.memo
	m.once.Do(func() { m.mentions = textMentions(b) })
	return m.mentions
}

// TextMentions is Mentions made anew from the block's text, for a block
// evaluated or not: the same keys. It reads only the block's text, so it
// may run on any goroutine while the document is evaluated.
func (b *Block) TextMentions() map[string]bool { return textMentions(b) }

// textMentions are the keys of the names the block's text may mention
// (mentions).
func textMentions(b *Block) map[string]bool {
	n := len(b.Arg)
	for _, l := range b.Lines {
		n += len(l)
	}
	// at most about a name in twenty bytes (calc lines with comments of
	// calcbench's generated document: 62 names in 1,855 bytes); a map
	// that outgrows the hint doubles, one made too large costs its room
	// every time
	out := make(map[string]bool, n/20)
	add := func(w string) {
		// without its leading digits and dots: a word that starts with
		// one (a number, "2x") is no name, what follows may be
		i := 0
		for i < len(w) && (w[i] >= '0' && w[i] <= '9' || w[i] == '.') {
			i++
		}
		if w = w[i:]; w != "" {
			out[expr.NameKey(w)] = true
		}
	}
	word := func(w string) {
		add(w)
		for rest := w; strings.IndexByte(w, '.') >= 0; {
			part, after, found := strings.Cut(rest, ".")
			add(part)
			if !found {
				break
			}
			rest = after
		}
	}
	scan := func(s string) {
		start := -1
		for i, r := range s {
			in := r == '_' || r == '.' || r >= '0' && r <= '9' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= utf8.RuneSelf && r != '\u00a0' && r != utf8.RuneError
			switch {
			case in && start < 0:
				start = i
			case !in && start >= 0:
				word(s[start:i])
				start = -1
			}
		}
		if start >= 0 {
			word(s[start:])
		}
	}
	scan(b.Arg)
	for _, l := range b.Lines {
		scan(l)
	}
	return out
}

// Reevaluate reads a document from its bytes and evaluates it as
// ParseWith does, taking over from prev, an evaluation of an earlier save
// of the same document (the same path, kinds and inputs), the evaluation
// of every block and inline value above the first one whose text or
// inputs changed: items are compared in order, and one is taken over when
// it is written alike at the same place, all the text above its end is
// unchanged (the front matter included), the data files it read hold the
// same bytes and the sheets it used give the same records
// (UseRecords). Everything from the first other item on is evaluated
// again. The document is the one ParseWith gives: the same values,
// checks, errors and warnings in the same order, every position at the
// same line and column (positions of the items taken over are in prev's
// text, which is the same up to them). Each block below the first change
// whose drawing is that of a block of prev is marked (Block.DrawnLike,
// below.go). prev is not changed, and may be nil (then nothing is taken
// over).
func Reevaluate(prev *Document, path string, src []byte, reg *Registry, in Inputs) *Document {
	d := parseOnly(path, src, reg, in)
	if in.Budget != nil {
		d.Env.Budget = in.Budget
	}
	d.evaluated = true
	compat := d.compatible(prev)
	k := 0
	if compat {
		k = d.takeable(prev)
	}
	if k == 0 || !d.takeOver(prev, k) {
		k = 0
		d.evalFrom(0, newTrail(d))
	}
	if compat {
		d.markTwins(prev, k)
	}
	return d
}

// Reused is the number of blocks whose evaluation Reevaluate took over.
func (d *Document) Reused() int {
	n := 0
	for _, b := range d.Blocks {
		if b.takenOver {
			n++
		}
	}
	return n
}

// takeOver takes over prev's evaluation of d's first k items and
// evaluates the rest; it reports false, having changed nothing, when the
// names above item k cannot be had from prev's.
func (d *Document) takeOver(prev *Document, k int) bool {
	t := prev.trail
	m := t.marks[k]
	cut := math.MaxInt
	if k < len(prev.order) {
		cut = itemStart(prev.order[k])
	}
	// positions of this document are in prev's text or, for the items
	// prev took over, in the text of a save before it: all the same file
	ours := func(p expr.Pos) bool { return p.File != nil && p.File.Name() == prev.File.Name() }
	env := prev.Env.Fork(func(p expr.Pos) bool { return ours(p) && p.Off < cut })
	if v, f, tb := env.Counts(); v != m.vars || f != m.funcs || tb != m.tables {
		return false // a name defined outside its item: evaluate it all
	}
	budget := d.Env.Budget
	if budget == nil || prev.Env.Budget == nil || budget.Limit != prev.Env.Budget.Limit || budget.Spent() != 0 || !budget.TryCharge(m.spent) {
		return false
	}
	env.Budget = budget
	env.SetCase(m.caseIdx)
	env.SetCaseDep(m.caseDep)
	d.Env = env
	for j := 0; j < k; j++ {
		switch o := prev.order[j].(type) {
		case *Block:
			b := d.order[j].(*Block)
			b.Result, b.Errors, b.DrawErrors, b.memo, b.takenOver = o.Result, o.Errors, o.DrawErrors, o.memo, true
		case *Inline:
			in := d.order[j].(*Inline)
			in.Value, in.Display, in.Err, in.Cases = o.Value, o.Display, o.Err, o.Cases
		}
	}
	nt := newTrail(d)
	nt.marks = append(nt.marks, t.marks[:k]...)
	d.Errors = append(d.Errors, t.errs[:m.errs]...)
	d.Warnings = append(d.Warnings, t.warns[:m.warns]...)
	d.Values = append([]*NamedValue(nil), prev.Values[:m.values]...)
	d.Checks = append([]*CheckRecord(nil), prev.Checks[:m.checks]...)
	d.DataFiles = append([]*DataFile(nil), prev.DataFiles[:m.dataFiles]...)
	d.Uses = append([]*Use(nil), prev.Uses[:m.uses]...)
	d.basis = prev.serial
	d.evalFrom(k, nt)
	// the names the part evaluated again defines, before and now
	d.redefined = map[string]bool{}
	for _, key := range prev.Env.KeysWhere(func(p expr.Pos) bool { return !ours(p) || p.Off >= cut }) {
		d.redefined[key] = true
	}
	for _, key := range d.Env.KeysWhere(func(p expr.Pos) bool { return !ours(p) || p.File == d.File }) {
		d.redefined[key] = true
	}
	return true
}

// takeable is the number of d's items (d.order) whose evaluation can be
// taken over from prev, d being compatible with prev.
func (d *Document) takeable(prev *Document) int {
	// the first byte that differs, in the text positions count (the file
	// less a byte-order mark, the same in both); one byte less, since a
	// lone CR reads as a line end by what follows it
	bom := []byte("\uFEFF")
	diff := 0
	for n := min(len(prev.Source), len(d.Source)); diff < n && prev.Source[diff] == d.Source[diff]; diff++ {
	}
	if diff == len(prev.Source) && diff == len(d.Source) {
		diff = math.MaxInt
	} else if bytes.HasPrefix(d.Source, bom) {
		diff -= len(bom)
	}
	diff--
	k := 0
	for j := 0; j < len(prev.order) && j < len(d.order); j++ {
		if prev.trail.marks[j+1].over || !sameItem(prev.order[j], d.order[j], diff) || !d.sameReads(prev, j) {
			break
		}
		k = j + 1
	}
	return k
}

// sameInputs reports whether two documents read their files alike: from
// the disk (nothing carried, no reader of their own), under one root.
func sameInputs(a, b Inputs) bool {
	return a.Root == b.Root && a.Carried == nil && b.Carried == nil && a.Failed == nil && b.Failed == nil && a.Read == nil && b.Read == nil
}

// itemStart is the offset where an item starts.
func itemStart(it any) int {
	switch it := it.(type) {
	case *Block:
		return it.Pos.Off
	case *Inline:
		if n, ok := it.Node.(*ast.CodeSpan); ok {
			if segs := spanSegments(n); len(segs) > 0 {
				return min(segs[0][0], it.Pos.Off)
			}
		}
		return it.Pos.Off
	}
	return 0
}

// spanSegments are the start and stop of each text segment of a code span.
func spanSegments(n *ast.CodeSpan) [][2]int {
	var out [][2]int
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		if t, ok := c.(*ast.Text); ok {
			out = append(out, [2]int{t.Segment.Start, t.Segment.Stop})
		}
	}
	return out
}

// sameItem reports whether two items (of an earlier and a later save) are
// written alike at the same place, ending before the offset diff.
func sameItem(a, b any, diff int) bool {
	switch a := a.(type) {
	case *Block:
		b, ok := b.(*Block)
		if !ok || a.Kind != b.Kind || a.kind != b.kind || a.Arg != b.Arg || a.ArgPos.Off != b.ArgPos.Off || a.InfoPos.Off != b.InfoPos.Off ||
			a.Pos.Off != b.Pos.Off || len(a.Lines) != len(b.Lines) {
			return false
		}
		end := b.InfoPos.Off
		if b.Arg != "" {
			end = b.ArgPos.Off + len(b.Arg)
		}
		for i := range a.Lines {
			if a.Lines[i] != b.Lines[i] || a.LinePos[i].Off != b.LinePos[i].Off {
				return false
			}
			end = max(end, b.LinePos[i].Off+len(b.Lines[i]))
		}
		return end+1 < diff
	case *Inline:
		b, ok := b.(*Inline)
		if !ok || a.Pos.Off != b.Pos.Off || a.Text != b.Text {
			return false
		}
		na, ok1 := a.Node.(*ast.CodeSpan)
		nb, ok2 := b.Node.(*ast.CodeSpan)
		if !ok1 || !ok2 {
			return false
		}
		sa, sb := spanSegments(na), spanSegments(nb)
		if !reflect.DeepEqual(sa, sb) || len(sb) == 0 {
			return false
		}
		return sb[len(sb)-1][1]+1 < diff
	}
	return false
}

// sameReads reports whether what prev's item j read besides the document
// is unchanged: each data file it read first holds the same bytes, and
// each sheet it used gives the same record.
func (d *Document) sameReads(prev *Document, j int) bool {
	m0, m1 := prev.trail.marks[j], prev.trail.marks[j+1]
	for _, f := range prev.DataFiles[m0.dataFiles:m1.dataFiles] {
		if f.Err != "" || f.Disk == "" {
			return false
		}
		now, err := os.ReadFile(f.Disk)
		if err != nil || !bytes.Equal(now, f.Bytes) {
			return false
		}
	}
	for _, u := range prev.Uses[m0.uses:m1.uses] {
		if d.sheets == nil {
			return false
		}
		sh, err := d.sheets.Sheet(d, u.Rel)
		was := UseRecords(&Document{Uses: []*Use{u}})
		now := UseRecords(&Document{Uses: []*Use{{Rel: u.Rel, Sheet: sh, err: errText(err)}}})
		if !reflect.DeepEqual(was, now) {
			return false
		}
	}
	return true
}

func errText(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}
