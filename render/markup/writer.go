package markup

import (
	"bytes"
	"fmt"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// Writer is what block renderers write into: the page buffer and the
// document being drawn.
type Writer struct {
	bytes.Buffer
	Doc *calcdoc.Document
	// Appendix collects sections drawn at the end of the sheet (large
	// matrices of a solve block).
	Appendix bytes.Buffer
	values   map[valueKey]shownValue
	// typesetters are the formula and substitution typesetters of calc rows
	typesetters [2]*ExprML
}

// Digits is the number of significant figures of the document.
func (w *Writer) Digits() int { return w.Doc.Digits() }

// Printf writes formatted text.
func (w *Writer) Printf(format string, args ...any) { fmt.Fprintf(&w.Buffer, format, args...) }

// ErrorRow writes an error in place: its position and message, on screen
// and in print, marked by words (not colour alone).
func (w *Writer) ErrorRow(e *expr.Error) {
	w.Printf("<div class=\"err\" role=\"alert\"><span class=\"tag\">ERROR</span> <span class=\"at\">line %d, col %d:</span> %s</div>\n", e.Pos.Line, e.Pos.Col, Esc(e.Msg))
}

// UnavailableRow writes the note of a line that could not be evaluated
// because it uses a name whose definition failed.
func (w *Writer) UnavailableRow(u *expr.UnavailableError) {
	w.Printf("<div class=\"na\"><span class=\"tag\">NOT EVALUATED</span> uses %s, which has no value: the definition at line %d failed</div>\n", NameHTML(u.Name), u.Def.Line)
}

// NewWriter returns a writer for the sheet of doc.
func NewWriter(doc *calcdoc.Document) *Writer {
	return &Writer{Doc: doc, values: map[valueKey]shownValue{}}
}

// Plural is "s" unless n is one.
func Plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}
