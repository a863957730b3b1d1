package render

import (
	"bytes"

	"calcdoc/calcdoc"
	"calcdoc/render/markup"

	"github.com/yuin/goldmark/util"
)

// BlockCache keeps the drawing of the blocks of the last sheet drawn of
// one document (Options.Blocks), so that the sheet of its next save,
// evaluated with calcdoc.Reevaluate, copies each block whose drawing
// cannot have changed instead of drawing it again. Such a block is of a
// LocalDrawer kind, and either taken over from the document drawn last
// (above the first change) with none of its names defined again below
// the first change (Document.Redefines), or evaluated again (below the
// first change) and the twin of a block of the document drawn last: at
// the same place, written alike, seeing the same final names with equal
// values and evaluated alike (Block.DrawnLike). The bytes are those
// drawing would write. A BlockCache is not safe for concurrent use.
type BlockCache struct {
	doc        *calcdoc.Document // the document drawn last
	prev, next map[uint64][]byte // drawings by Block.EvalID
	// Copied and Drawn count the blocks of the last sheet copied from
	// the cache and drawn (of LocalDrawer kinds).
	Copied, Drawn int
	size          int // the length of the last sheet: the next one's buffer
}

// LocalDrawer is a kind whose drawing of a block reads nothing but the
// block, its evaluation, the front matter and the document's final names
// for names its text mentions, and writes nothing but the block in its
// place (no appendix): a BlockCache keeps its drawings.
type LocalDrawer interface {
	markup.Drawer
	LocalDrawing()
}

// begin starts the sheet of doc.
func (c *BlockCache) begin() {
	if c != nil {
		c.next, c.Copied, c.Drawn = map[uint64][]byte{}, 0, 0
	}
}

// end keeps the drawings of the sheet of doc, drawn whole, of size bytes.
func (c *BlockCache) end(doc *calcdoc.Document, size int) {
	if c != nil {
		c.prev, c.next, c.doc, c.size = c.next, nil, doc, size
	}
}

// sizeHint is the length the sheet is likely to have: that of the last
// one, with room to grow; 0 when there is none.
func (c *BlockCache) sizeHint() int {
	if c == nil || c.size == 0 {
		return 0
	}
	return c.size + c.size/8 + 4096
}

// draw draws block b by its kind d into out, through the cache.
func (c *BlockCache) draw(w *markup.Writer, out util.BufWriter, d markup.Drawer, b *calcdoc.Block) {
	id := b.EvalID()
	if _, local := d.(LocalDrawer); c == nil || c.next == nil || !local || id == 0 {
		d.Draw(w, b)
		return
	}
	if c.doc != nil && w.Doc.EvaluatedFrom(c.doc) {
		from := uint64(0)
		switch {
		case b.TakenOver() && !w.Doc.Redefines(b):
			from = id // above the first change
		case !b.TakenOver():
			from = b.DrawnLike() // below it
		}
		if bs, ok := c.prev[from]; ok && from != 0 {
			out.Write(bs)
			c.next[id] = bs
			c.Copied++
			return
		}
	}
	var buf bytes.Buffer
	w.SetOutput(&buf)
	d.Draw(w, b)
	w.SetOutput(out)
	out.Write(buf.Bytes())
	c.next[id] = buf.Bytes()
	c.Drawn++
}

// keep keeps a copy of bs, the drawing of block b by its kind d written
// by other means (Predraw, which reuses the bytes), as draw would have
// kept it.
func (c *BlockCache) keep(d markup.Drawer, b *calcdoc.Block, bs []byte) {
	id := b.EvalID()
	if _, local := d.(LocalDrawer); c == nil || c.next == nil || !local || id == 0 {
		return
	}
	c.next[id] = bytes.Clone(bs)
	c.Drawn++
}
