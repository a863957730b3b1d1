package markup

import (
	"bytes"
	"fmt"
	"io"
	"strconv"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// Writer is what block renderers write into: the page and the document
// being drawn. While goldmark renders the body, the page writer points the
// Writer at the writer goldmark hands its node renderers (SetOutput), so a
// block is written in its place among goldmark's own output, with no
// flush and no second buffer; otherwise it writes into its own buffer.
type Writer struct {
	bytes.Buffer
	out bufWriter
	Doc *calcdoc.Document
	// Appendix collects sections drawn at the end of the sheet (large
	// matrices of a solve block).
	Appendix bytes.Buffer
	values   map[valueKey]shownValue
	// typesetters are the formula and substitution typesetters of calc rows
	typesetters [2]*ExprML
	// num holds the digits of a number being written (WriteInt)
	num [20]byte
	// pieces is the row being written in pieces (StartPieces)
	pieces Pieces
	// displays are the displays of the units checks are shown in
	// (checkDisplay)
	displays map[*expr.Unit]*expr.Display
}

// WriteInt writes n in decimal, with no string made for it.
func (w *Writer) WriteInt(n int) {
	w.Write(strconv.AppendInt(w.num[:0], int64(n), 10))
}

// Digits is the number of significant figures of the document.
func (w *Writer) Digits() int { return w.Doc.Digits() }

// bufWriter is the writer goldmark hands node renderers (util.BufWriter).
type bufWriter interface {
	io.Writer
	io.StringWriter
	io.ByteWriter
	WriteRune(r rune) (int, error)
}

// SetOutput makes the writer write into out (goldmark's writer, while it
// renders the body), or into its own buffer when out is nil.
func (w *Writer) SetOutput(out bufWriter) { w.out = out }

// Write writes p.
func (w *Writer) Write(p []byte) (int, error) {
	if w.out != nil {
		return w.out.Write(p)
	}
	return w.Buffer.Write(p)
}

// WriteString writes s.
func (w *Writer) WriteString(s string) (int, error) {
	if w.out != nil {
		return w.out.WriteString(s)
	}
	return w.Buffer.WriteString(s)
}

// WriteByte writes c.
func (w *Writer) WriteByte(c byte) error {
	if w.out != nil {
		return w.out.WriteByte(c)
	}
	return w.Buffer.WriteByte(c)
}

// WriteRune writes r.
func (w *Writer) WriteRune(r rune) (int, error) {
	if w.out != nil {
		return w.out.WriteRune(r)
	}
	return w.Buffer.WriteRune(r)
}

// Printf writes formatted text.
func (w *Writer) Printf(format string, args ...any) { fmt.Fprintf(w, format, args...) }

// ErrorRow writes an error in place: its position and message, on screen
// and in print, marked by words (not colour alone).
func (w *Writer) ErrorRow(e *expr.Error) {
	p := e.Pos.Position()
	w.Printf("<div class=\"err\" role=\"alert\"><span class=\"tag\">ERROR</span> <span class=\"at\">line %d, col %d:</span> %s</div>\n", p.Line, p.Col, Esc(e.Msg))
}

// UnavailableRow writes the note of a line that could not be evaluated
// because it uses a name whose definition failed.
func (w *Writer) UnavailableRow(u *expr.UnavailableError) {
	w.Printf("<div class=\"na\"><span class=\"tag\">NOT EVALUATED</span> uses %s, which has no value: the definition at line %d failed</div>\n", NameHTML(u.Name), u.Def.Line())
}

// NewWriter returns a writer for the sheet of doc.
func NewWriter(doc *calcdoc.Document) *Writer {
	// the typeset values are about one a value the document defines (a
	// result, shown again where later rows use its name): the cache is
	// made that large at once instead of growing through its sizes
	return NewWriterFor(doc, len(doc.Values))
}

// NewWriterFor returns a writer for the sheet of doc whose cache of
// typeset values is made for about values of them: a writer that draws
// while the document is evaluated (doc.Values still empty) says how many
// the document will have, one that draws little says few (a map made
// large is touched, page by page, when it is made).
func NewWriterFor(doc *calcdoc.Document, values int) *Writer {
	return &Writer{Doc: doc, values: make(map[valueKey]shownValue, values)}
}

// Reserve makes the writer's buffer hold at least n bytes before it
// grows. An empty buffer gets fresh room (Room) rather than
// bytes.Buffer.Grow's, which clears all of it: room from an estimate is
// then touched only as far as the sheet fills it.
func (w *Writer) Reserve(n int) {
	if w.Buffer.Len() == 0 && w.Buffer.Cap() < n {
		w.Buffer = *Room(n)
		return
	}
	w.Buffer.Grow(n)
}

// Room is an empty buffer with room for n bytes, made without clearing
// them: bytes.Buffer.Grow clears the room it adds, so memory never used
// is still touched (a page fault for every 4 KiB of a fresh page), while
// a new slice of bytes comes from the runtime already zero when its pages
// are fresh. For a buffer sized from an estimate.
func Room(n int) *bytes.Buffer { return bytes.NewBuffer(make([]byte, 0, n)) }

// Plural is "s" unless n is one.
func Plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}
