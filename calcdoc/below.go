package calcdoc

import (
	"bytes"
	"math"
	"unicode/utf8"

	"calcdoc/expr"
)

// Below the first change, Reevaluate evaluates every block again (a value
// may have moved), but the drawing of a block there often cannot have
// changed: the same text at the same place, seeing the same names with the
// same values. markTwins finds those blocks and records, for each, the
// evaluation of the save before whose drawing it shares (Block.DrawnLike),
// so that the live preview copies that drawing (render.BlockCache).
//
// A block B of the new save is the twin of a block B' of the save before
// when (conservatively):
//   - both documents read their files alike (takeable's first tests), their
//     front matter is the same bytes, and neither evaluation ran out of
//     budget;
//   - B' starts at the same offset, or at the offset moved by the change
//     in the text's length, and is written alike (the same kind, info
//     string and lines, each at the same distance from the start); B and
//     B' start at the same line and column and the text from there to
//     their end is the same bytes (so every place in them is at the same
//     line and column);
//   - neither B nor B' read a data file or used a sheet, and the case
//     state before each is the same;
//   - every name B's text may mention (Block.Mentions) is, in the final
//     names of both documents, either absent from both or a value defined
//     at the same line and column, with the same name as written, the same
//     display and an equal value (complex parts bit for bit, the same
//     dimension, flags and unit; a matrix entry by entry; the same for
//     each case), and no such name is a user function or a table in
//     either (what a function's body reads, its text does not say);
//   - B and B' added as many errors, warnings, values and checks, their
//     errors have the same messages at the same lines and columns, and
//     their checks the same verdicts.
//
// The evaluation of a block reads the names its text mentions, the front
// matter (digits, preferred units, cases), the case state, the data files
// and sheets it reads and the budget, and nothing else; the drawing of a
// calc block reads the block, its evaluation, the front matter and the
// final names its text mentions. With all of these alike the evaluation
// is alike (names are defined once, so a name's value when B is evaluated
// is its final one, or none when it is defined after B, which the same
// line and column of B and of the definition keep the same in both), and
// so is the drawing, which shows places by line and column only. The last test checks the outcome besides.

// DrawnLike is the EvalID of the evaluation of the save before whose
// drawing is also this block's (see markTwins), or 0 when there is none
// (the block is to be drawn).
func (b *Block) DrawnLike() uint64 { return b.twin }

// markTwins sets Block.twin for each block of d at or after item k (the
// first item evaluated again) whose kind draws it from nothing but the
// block, its evaluation, the front matter and the final names its text
// mentions (LocalDrawing: render.LocalDrawer), d having been evaluated
// from prev's evaluation of the items above it; d is compatible with
// prev.
func (d *Document) markTwins(prev *Document, k int) {
	if d.trail == nil || len(d.trail.marks) != len(d.order)+1 || d.Env.Budget == nil ||
		d.Env.Budget.Over() != nil || prev.trail.marks[len(prev.trail.marks)-1].over || !sameFront(prev.Source, d.Source) {
		return
	}
	d.basis = prev.serial // the drawings of prev's blocks serve d's
	// a block of prev is looked for at the same offset and, below an edit
	// that kept the lines but not the length of the text, at the offset
	// moved by the difference in length
	var at map[int]int // prev's blocks by offset: their item
	shift := len(d.Text) - len(prev.Text)
	for i := k; i < len(d.order); i++ {
		b, ok := d.order[i].(*Block)
		if !ok || b.memo == nil {
			continue
		}
		if _, local := b.kind.(interface{ LocalDrawing() }); !local {
			continue // only a drawing that reads nothing else is kept (render.LocalDrawer)
		}
		if at == nil {
			at = make(map[int]int, len(prev.Blocks))
			for j, it := range prev.order {
				if o, ok := it.(*Block); ok {
					at[o.Pos.Off] = j
				}
			}
		}
		for _, off := range [2]int{b.Pos.Off, b.Pos.Off - shift} {
			j, ok := at[off]
			if !ok {
				continue
			}
			if o := prev.order[j].(*Block); o.memo != nil && d.twins(prev, i, b, j, o) {
				b.twin = o.memo.id
				break
			}
			if shift == 0 {
				break
			}
		}
	}
}

// twins reports whether block b (d's item i) draws as o (prev's item j).
func (d *Document) twins(prev *Document, i int, b *Block, j int, o *Block) bool {
	// the same text from the block's start to its end, starting at the
	// same line and column: every place in it at the same line and column
	if !sameShape(o, b) || !samePos(o.Pos, b.Pos) {
		return false
	}
	nb, no := blockEnd(b)-b.Pos.Off, blockEnd(o)-o.Pos.Off
	if nb != no || nb < 0 || b.Pos.Off+nb > len(d.Text) || o.Pos.Off+no > len(prev.Text) ||
		!bytes.Equal(d.Text[b.Pos.Off:b.Pos.Off+nb], prev.Text[o.Pos.Off:o.Pos.Off+no]) {
		return false
	}
	n0, n1 := d.trail.marks[i], d.trail.marks[i+1]
	p0, p1 := prev.trail.marks[j], prev.trail.marks[j+1]
	if n1.over || p1.over || n0.caseIdx != p0.caseIdx || n0.caseDep != p0.caseDep || n1.caseIdx != p1.caseIdx || n1.caseDep != p1.caseDep ||
		n0.dataFiles != n1.dataFiles || p0.dataFiles != p1.dataFiles || n0.uses != n1.uses || p0.uses != p1.uses ||
		n1.errs-n0.errs != p1.errs-p0.errs || n1.warns-n0.warns != p1.warns-p0.warns ||
		n1.values-n0.values != p1.values-p0.values || n1.checks-n0.checks != p1.checks-p0.checks {
		return false
	}
	if !sameErrors(o.Errors, b.Errors) || !sameErrors(o.DrawErrors, b.DrawErrors) {
		return false
	}
	for c := 0; c < n1.checks-n0.checks; c++ {
		if !sameVerdict(prev.Checks[p0.checks+c], d.Checks[n0.checks+c]) {
			return false
		}
	}
	// the same text: the same names; the new block's map is the old one's
	m := o.mentions()
	b.memo.once.Do(func() { b.memo.mentions = m })
	_, df, dt := d.Env.Counts()
	_, pf, pt := prev.Env.Counts()
	for key := range m {
		if df+pf > 0 && (d.Env.LookupFunc(key) != nil || prev.Env.LookupFunc(key) != nil) ||
			dt+pt > 0 && (d.Env.LookupTable(key) != nil || prev.Env.LookupTable(key) != nil) {
			return false
		}
		if !sameBinding(prev.Env.LookupKey(key), d.Env.LookupKey(key)) {
			return false
		}
	}
	return true
}

// sameShape reports whether two blocks (of two saves) are written alike:
// the same kind, info string and lines, each at the same distance from
// the block's start.
func sameShape(a, b *Block) bool {
	if a.Kind != b.Kind || a.kind != b.kind || a.Arg != b.Arg || len(a.Lines) != len(b.Lines) ||
		rel(a.ArgPos, a.Pos) != rel(b.ArgPos, b.Pos) || rel(a.InfoPos, a.Pos) != rel(b.InfoPos, b.Pos) {
		return false
	}
	for i := range a.Lines {
		if a.Lines[i] != b.Lines[i] || rel(a.LinePos[i], a.Pos) != rel(b.LinePos[i], b.Pos) {
			return false
		}
	}
	return true
}

// rel is the distance of p from start; -1 for no place.
func rel(p, start expr.Pos) int {
	if !p.IsValid() {
		return -1
	}
	return p.Off - start.Off
}

// blockEnd is the offset just after the last byte of a block's text (its
// info string, argument and lines).
func blockEnd(b *Block) int {
	end := b.InfoPos.Off
	if b.Arg != "" {
		end = max(end, b.ArgPos.Off+len(b.Arg))
	}
	for i, l := range b.Lines {
		end = max(end, b.LinePos[i].Off+len(l))
	}
	return end
}

// compatible reports whether d may take anything over from prev: the same
// path, kinds and inputs, an evaluation of prev that ran to its end, and
// the same byte-order mark and valid UTF-8 in both.
func (d *Document) compatible(prev *Document) bool {
	if prev == nil || prev.trail == nil || prev.Kinds != d.Kinds || prev.Path != d.Path || !sameInputs(prev.inputs, d.inputs) ||
		prev.Env.Budget.Stopped() || len(prev.trail.marks) != len(prev.order)+1 {
		return false
	}
	bom := []byte("\uFEFF")
	return bytes.HasPrefix(prev.Source, bom) == bytes.HasPrefix(d.Source, bom) && utf8.Valid(prev.Source) && utf8.Valid(d.Source)
}

// sameFront reports whether two sources have the same front matter
// bytes (or none), closed.
func sameFront(a, b []byte) bool {
	bom := []byte("\uFEFF")
	a, b = bytes.TrimPrefix(a, bom), bytes.TrimPrefix(b, bom)
	ya, na, oka := splitFrontMatter(a)
	yb, nb, okb := splitFrontMatter(b)
	if na == 0 && nb == 0 {
		return true
	}
	return oka && okb && na == nb && bytes.Equal(ya, yb) && bytes.Equal(a[:frontLen(a)], b[:frontLen(b)])
}

// frontLen is the length of the closed front matter at the start of src,
// its closing line included.
func frontLen(src []byte) int {
	y, _, _ := splitFrontMatter(src)
	start := bytes.IndexByte(src, '\n') + 1 + len(y)
	if end := bytes.IndexByte(src[start:], '\n'); end >= 0 {
		return start + end + 1
	}
	return len(src)
}

// samePos reports whether two positions (of two saves) are the same place
// as a reader sees it: the same file name, line and column (a drawing
// shows no offset, and within one save the order of places by line and
// column is that by offset).
func samePos(a, b expr.Pos) bool {
	if a.File == nil || b.File == nil {
		return a.File == nil && b.File == nil && a.Off == b.Off
	}
	if a.File == b.File && a.Off == b.Off {
		return true
	}
	return a.File.Name() == b.File.Name() && a.Position() == b.Position()
}

// sameErrors reports whether two lists of errors say the same at the same
// places.
func sameErrors(a, b []*expr.Error) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i].Msg != b[i].Msg || !samePos(a[i].Pos, b[i].Pos) {
			return false
		}
	}
	return true
}

// sameVerdict reports whether two checks came out alike.
func sameVerdict(a, b *CheckRecord) bool {
	if (a.Result == nil) != (b.Result == nil) || a.Result != nil && a.Result.Pass != b.Result.Pass ||
		len(a.Cases) != len(b.Cases) || a.Governing != b.Governing || len(a.NoVerdict) != len(b.NoVerdict) {
		return false
	}
	for i := range a.Cases {
		if (a.Cases[i] == nil) != (b.Cases[i] == nil) || a.Cases[i] != nil && a.Cases[i].Pass != b.Cases[i].Pass {
			return false
		}
	}
	for i := range a.NoVerdict {
		if a.NoVerdict[i] != b.NoVerdict[i] {
			return false
		}
	}
	return true
}

// sameBinding reports whether two final bindings of a name (of two saves)
// are alike: both absent, or defined at the same place with the same
// name, display and value.
func sameBinding(a, b *expr.Binding) bool {
	if a == b {
		return true
	}
	if a == nil || b == nil || a.Name != b.Name || a.Unavailable != b.Unavailable || !samePos(a.Pos, b.Pos) || !samePos(a.Cause, b.Cause) ||
		!sameDisplay(a.Display, b.Display) || !sameValue(a.Value, b.Value) || len(a.Cases) != len(b.Cases) {
		return false
	}
	for i := range a.Cases {
		if !sameValue(a.Cases[i], b.Cases[i]) {
			return false
		}
	}
	return true
}

// sameDisplay reports whether two displays are alike.
func sameDisplay(a, b *expr.Display) bool {
	if a == b {
		return true
	}
	if a == nil || b == nil || a.Text != b.Text || a.Form != b.Form || !samePos(a.Pos(), b.Pos()) || !samePos(a.End(), b.End()) {
		return false
	}
	return a.Unit == b.Unit || a.Unit != nil && b.Unit != nil && *a.Unit == *b.Unit
}

// sameValue reports whether two values are equal exactly: scalars bit
// for bit with the same dimension and flags, matrices entry by entry
// with the same residue bounds.
func sameValue(a, b expr.Value) bool {
	if a == nil || b == nil {
		return a == nil && b == nil
	}
	switch a := a.(type) {
	case *expr.Scalar:
		b, ok := b.(*expr.Scalar)
		return ok && (a == b || a != nil && b != nil && sameScalar(a, b))
	case *expr.Matrix:
		b, ok := b.(*expr.Matrix)
		if !ok || a == nil || b == nil {
			return ok && a == b
		}
		if a == b {
			return true
		}
		if a.Rows != b.Rows || a.Cols != b.Cols || len(a.E) != len(b.E) || len(a.Resid) != len(b.Resid) || (a.Resid == nil) != (b.Resid == nil) {
			return false
		}
		for i := range a.E {
			if !sameScalar(&a.E[i], &b.E[i]) {
				return false
			}
		}
		for i := range a.Resid {
			if math.Float64bits(a.Resid[i]) != math.Float64bits(b.Resid[i]) {
				return false
			}
		}
		return true
	}
	return false
}

// sameScalar reports whether two scalars are equal bit for bit, in every
// field.
func sameScalar(a, b *expr.Scalar) bool {
	x, y := *a, *b
	if math.Float64bits(real(x.Z)) != math.Float64bits(real(y.Z)) || math.Float64bits(imag(x.Z)) != math.Float64bits(imag(y.Z)) {
		return false
	}
	x.Z, y.Z = 0, 0
	return x == y
}
