package markup

import "calcdoc/calcdoc"

// Drawer is a block kind's drawing: the sheet draws each evaluated block
// with its kind (calcdoc.Block.KindOf) when the kind is a Drawer. Every
// shipped kind is one (calcdoc/kind's test checks it).
type Drawer interface {
	Draw(w *Writer, b *calcdoc.Block)
}

// PageBytes is a kind whose drawing takes more of the sheet for each byte
// of its block's text than a block of statements does (render sizes the
// page buffer once from the source: 16 bytes a source byte): it gives its
// own figure.
type PageBytes interface {
	PageBytesPerSourceByte() int
}
