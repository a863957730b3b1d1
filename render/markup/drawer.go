package markup

import "calcdoc/calcdoc"

// Drawer is a block kind's drawing: the sheet draws each evaluated block
// with its kind (calcdoc.Block.KindOf) when the kind is a Drawer. Every
// shipped kind is one (calcdoc/kind's test checks it).
type Drawer interface {
	Draw(w *Writer, b *calcdoc.Block)
}
