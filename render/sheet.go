// Package render writes a calculation sheet: one self-contained HTML file
// per document, with inline CSS, no outside resource and no script. Prose
// is rendered by goldmark; evaluated blocks are drawn by the renderer
// of their kind (markup.Drawer), as goldmark renders by node kind.
package render

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/internal/gfmhtml"
	"calcdoc/render/markup"

	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/renderer"
	ghtml "github.com/yuin/goldmark/renderer/html"
	"github.com/yuin/goldmark/util"
)

// Caution is printed on every sheet.
const Caution = "Caution: these results are produced by software from the inputs shown. " +
	"They must be checked by a competent person before use, and the design must follow the " +
	"local codes and the licensed practice that apply where it is built."

// Options change what a sheet carries beyond the document itself.
type Options struct {
	Version string // calcdoc's version, for the stamp
	// Stamp, when not nil, is written into the sheet (source hash, commit,
	// state); see stamp.go.
	Stamp *StampInfo
	// EmbedSource carries the source in the sheet, inert and escaped, so
	// that verify can re-evaluate it.
	EmbedSource bool
	// HeadExtra is raw HTML added at the end of <head> (the live preview's
	// reload script); built files leave it empty.
	HeadExtra string
	// Blocks, when set, keeps the drawing of blocks for the next sheet of
	// the same document (the live preview); the bytes do not change.
	Blocks *BlockCache
	// Predrawn, when set, holds the blocks drawn while the document was
	// evaluated (the build: Predraw's Block was the document's per-block
	// hook); the sheet copies each that is the serial drawing and draws
	// the rest. The bytes do not change.
	Predrawn *Predraw
}

// Sheet writes the HTML sheet of a document.
func Sheet(doc *calcdoc.Document, opt Options) ([]byte, error) {
	w := newPageWriter(doc, opt)
	// the page buffer is grown once: from the source (pageSize), or from
	// the last sheet of this document when the preview keeps one
	w.Reserve(max(pageSize(doc), opt.Blocks.sizeHint()))
	if err := writeSheet(w, doc, opt, nil); err != nil {
		return nil, err
	}
	return w.Bytes(), nil
}

// WriteSheet writes the HTML sheet of a document to out as it is drawn,
// in pieces of about spillAt bytes, so that the page is never held whole
// in memory (a build writes it into its file this way: at 20,000
// statements the page is 13 MB). The bytes are those of Sheet. The error
// is the drawing's, else the first of out's; after an error out may hold
// part of the sheet (a build removes its temporary file).
func WriteSheet(out io.Writer, doc *calcdoc.Document, opt Options) error {
	w := newPageWriter(doc, opt)
	w.Reserve(min(max(pageSize(doc), opt.Blocks.sizeHint()), spillAt+spillAt/4))
	s := &spill{w: w, out: out}
	if err := writeSheet(w, doc, opt, s); err != nil {
		return err
	}
	return s.err
}

// newPageWriter is the writer of doc's sheet. Its cache of typeset values
// is made for every value of the document, unless the blocks were drawn
// while the document was evaluated (opt.Predrawn): the sheet then copies
// them and typesets the values of the other blocks only, and the cache
// grows as they need.
func newPageWriter(doc *calcdoc.Document, opt Options) *markup.Writer {
	if opt.Predrawn.drawsEarly(doc) {
		return markup.NewWriterFor(doc, 0)
	}
	return markup.NewWriter(doc)
}

// spillAt is the size at which WriteSheet hands the page drawn so far to
// its writer: large enough that the writes are few (a 13 MB page in about
// 200, the 1.4 MB of 2,000 statements in about 20), small enough to stay
// in the processor's cache and to touch few pages of memory (the page
// buffer is the one piece of the sheet a build holds whole: at 256 KiB it
// cost about 50 more page faults, a few per cent of a build of 2,000
// statements).
const spillAt = 64 << 10

// spill hands the page buffer of WriteSheet to out whenever it passes
// spillAt (page.check), and what is left at the end.
type spill struct {
	w   *markup.Writer
	out io.Writer
	n   int   // bytes handed to out
	err error // out's first error: nothing more is written
}

// flush hands the page buffer to out; nothing when s is nil (Sheet: the
// page stays whole in the buffer).
func (s *spill) flush() {
	if s == nil {
		return
	}
	if s.err == nil {
		_, s.err = s.out.Write(s.w.Buffer.Bytes())
	}
	s.n += s.w.Buffer.Len()
	s.w.Buffer.Reset()
}

// page is the writer goldmark renders the body into: the page buffer
// itself (goldmark's util.BufWriter, so that it adds no buffer of its
// own and no copy), handed out by s (nil: none) as it fills. The node
// renderers draw a block straight into the page buffer (nodes.setOutput).
type page struct {
	w *markup.Writer
	s *spill
}

func (p *page) Write(b []byte) (int, error) {
	p.w.Buffer.Write(b)
	p.check()
	return len(b), nil
}

func (p *page) WriteString(s string) (int, error) {
	p.w.Buffer.WriteString(s)
	p.check()
	return len(s), nil
}

func (p *page) WriteByte(c byte) error {
	p.w.Buffer.WriteByte(c)
	p.check()
	return nil
}

func (p *page) WriteRune(r rune) (int, error) {
	n, _ := p.w.Buffer.WriteRune(r)
	p.check()
	return n, nil
}

func (p *page) Available() int { return p.w.Buffer.Available() }
func (p *page) Buffered() int  { return p.w.Buffer.Len() }
func (p *page) Flush() error   { return nil }

// check hands the page buffer out once it passes spillAt.
func (p *page) check() {
	if p.s != nil && p.w.Buffer.Len() >= spillAt {
		p.s.flush()
	}
}

// writeSheet writes the sheet into w's buffer, which s (nil: none)
// empties as it fills.
func writeSheet(w *markup.Writer, doc *calcdoc.Document, opt Options, s *spill) error {
	opt.Predrawn.Close() // the document is evaluated: nothing more is queued
	opt.Predrawn.startAfter(doc)
	w.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
	w.Printf("<meta name=\"generator\" content=\"calcdoc %s\">\n", esc(opt.Version))
	w.Printf("<title>%s</title>\n", esc(HeadTitle(doc)))
	w.WriteString("<style>\n")
	w.WriteString(CSS)
	w.WriteString(PageCSS(doc, opt))
	w.WriteString("</style>\n")
	w.WriteString(opt.HeadExtra)
	w.WriteString("</head>\n<body>\n")
	opt.Blocks.begin()
	if err := body(w, doc, opt, s); err != nil {
		return err
	}
	w.WriteString("</body>\n</html>\n")
	n := 0
	if s != nil {
		n = s.n
	}
	opt.Blocks.end(doc, n+w.Len())
	s.flush()
	return nil
}

// pageSize is the size the page buffer of Sheet (the page held whole: the
// preview, a package) is given once, before anything is written, from the
// document's source, so that writing the page never grows it again (each
// growth copies the page written so far); WriteSheet gives it at most a
// piece's room (spillAt). The rule: 24 KiB
// for the parts every sheet has (stylesheet, title block, summary, stamp,
// caution: 16 to 20 KiB on the examples) and 16 bytes a byte of source. A
// source of statements gives the most sheet a byte: 15.1 on the
// 2,000-statement and 14.3 on the 20,000-statement sheets of cmd/calcbench
// with their source embedded (a statement of about 46 source bytes
// becomes about 650 bytes of rows); the examples, with their prose, give
// 1.5 to 14. Room beyond the sheet is not free: the buffer is cleared
// when it reuses memory the collector freed (at 20,000 statements, 17
// bytes a source byte cost about 1 MB more peak memory than 16). A kind that makes more
// of a byte of its block says how much (markup.PageBytes: a network, 32).
// Only what a few source bytes can make large (a sweep of many points,
// the matrices of a large equation set in the appendix) outgrows it, and
// the buffer then grows as it must.
func pageSize(doc *calcdoc.Document) int {
	const fixed, perByte = 24 << 10, 16
	size := fixed + perByte*len(doc.Source)
	for _, b := range doc.Blocks {
		if k, ok := b.KindOf().(markup.PageBytes); ok {
			n := 0
			for _, l := range b.Lines {
				n += len(l) + 1
			}
			size += (k.PageBytesPerSourceByte() - perByte) * n
		}
	}
	return size
}

// Body writes what a sheet holds in its <body>: the marker of a sheet not
// fit for issue, the title block, the summary, the body, the appendix, the
// stamp, the caution and the embedded source. A page that holds several
// sheets (a package) composes it with CSS, PageCSS and HeadTitle, as Sheet
// does.
func Body(doc *calcdoc.Document, opt Options) ([]byte, error) {
	opt.Predrawn.Close()
	opt.Predrawn.startAfter(doc)
	w := markup.NewWriter(doc)
	w.Reserve(pageSize(doc))
	if err := body(w, doc, opt, nil); err != nil {
		return nil, err
	}
	return w.Bytes(), nil
}

func body(w *markup.Writer, doc *calcdoc.Document, opt Options, s *spill) error {
	if m := MarkerText(doc, opt); m != "" {
		w.Printf("<div class=\"marker\" aria-hidden=\"true\"><span>%s</span></div>\n", esc(m))
		w.Printf("<p class=\"marker-text\">%s</p>\n", esc(m))
	}
	titleBlock(w, doc.Front, SheetTitle(doc))
	summary(w, doc)
	w.WriteString("<main class=\"body\">\n")
	s.flush() // the head, title block and summary
	pg := &page{w: w, s: s}
	err := prose(w, doc, opt.Blocks, opt.Predrawn, pg)
	opt.Predrawn.finish() // every block is taken
	if err != nil {
		return err
	}
	w.WriteString("</main>\n")
	if w.Appendix.Len() > 0 {
		w.WriteString("<section class=\"appendix\">\n<h2>Appendix: working of large equation sets</h2>\n")
		w.Write(w.Appendix.Bytes())
		w.WriteString("</section>\n")
	}
	if opt.Stamp != nil {
		stampSection(w, doc, opt)
	}
	w.Printf("<footer class=\"caution\"><p>%s</p></footer>\n", esc(Caution))
	if opt.EmbedSource {
		s.flush() // the body and the stamp
		embedSource(w, pg, doc)
		embedFiles(w, pg, doc)
		embedUses(w, pg, doc)
	}
	return nil
}

// SheetTitle is the title a sheet shows: its front matter's, else the
// file's base name.
func SheetTitle(doc *calcdoc.Document) string {
	if doc.Front.Title != "" {
		return doc.Front.Title
	}
	return baseName(doc.Path)
}

// HeadTitle is the text of a sheet's <title>: the document number, if
// any, and the title.
func HeadTitle(doc *calcdoc.Document) string {
	return sheetTitle(doc.Front, SheetTitle(doc))
}

func sheetTitle(fm calcdoc.FrontMatter, title string) string {
	if fm.Number != "" {
		return fm.Number + " " + title
	}
	return title
}

func baseName(p string) string {
	if i := strings.LastIndexAny(p, "/\\"); i >= 0 {
		p = p[i+1:]
	}
	return strings.TrimSuffix(p, ".md")
}

// CSSString quotes s as a CSS string.
func CSSString(s string) string {
	var b strings.Builder
	b.WriteByte('"')
	for _, r := range s {
		switch {
		case r == '"' || r == '\\':
			b.WriteString(fmt.Sprintf("\\%x ", r))
		case r < 0x20 || r == 0x7f || r == '<' || r == '>':
			b.WriteString(fmt.Sprintf("\\%x ", r))
		default:
			b.WriteRune(r)
		}
	}
	b.WriteByte('"')
	return b.String()
}

// PageCSS is the @page rule of a sheet: paper size and the margin boxes
// that put the document number, revision and "page N of M" on every
// printed page.
func PageCSS(doc *calcdoc.Document, opt Options) string {
	fm := doc.Front
	size := "A4"
	if fm.Paper == "letter" {
		size = "letter"
	}
	left := fm.Number
	if left == "" {
		left = "unnumbered"
	}
	if fm.Revision != "" {
		left += " rev " + fm.Revision
	}
	center := ""
	if opt.Stamp != nil && len(opt.Stamp.SHA256) >= 12 {
		center = "source sha256 " + opt.Stamp.SHA256[:12]
	}
	return fmt.Sprintf(`@page {
  size: %s;
  margin: 16mm 14mm 18mm 14mm;
  @bottom-left { content: %s; font: 8pt sans-serif; }
  @bottom-center { content: %s; font: 7pt monospace; }
  @bottom-right { content: "page " counter(page) " of " counter(pages); font: 8pt sans-serif; }
}
`, size, CSSString(left), CSSString(center))
}

// Field writes one labelled cell of a title block.
func Field(w *markup.Writer, label, value string) {
	if value == "" {
		value = "—"
	}
	w.Printf("<td><span class=\"lbl\">%s</span><span class=\"val\">%s</span></td>", esc(label), esc(value))
}

func titleBlock(w *markup.Writer, fm calcdoc.FrontMatter, title string) {
	w.WriteString("<header class=\"tb\">\n<table class=\"tb\">\n")
	w.WriteString("<tr>")
	Field(w, "Project", fm.Project)
	Field(w, "Client", fm.Client)
	Field(w, "Document no.", fm.Number)
	Field(w, "Revision", fm.Revision)
	w.WriteString("</tr>\n<tr class=\"tbtitle\">")
	w.Printf("<td colspan=\"3\"><span class=\"lbl\">Title</span><span class=\"val title\">%s</span></td>", esc(title))
	Field(w, "Date", fm.Date)
	w.WriteString("</tr>\n<tr>")
	Field(w, "Prepared", fm.Prepared)
	Field(w, "Checked", fm.Checked)
	Field(w, "Approved", fm.Approved)
	ph := "RMS values"
	if fm.Phasors == "peak" {
		ph = "peak values"
	}
	Field(w, "Phasors", ph)
	w.WriteString("</tr>\n</table>\n")
	RevisionHistory(w, "Revision history", fm.Revisions)
	w.WriteString("</header>\n")
}

// RevisionHistory writes a title block's revision history as a table with
// caption; nothing when there is none.
func RevisionHistory(w *markup.Writer, caption string, revs []calcdoc.Revision) {
	if len(revs) == 0 {
		return
	}
	w.Printf("<table class=\"revs\"><caption>%s</caption>\n<tr><th>Rev</th><th>Date</th><th>By</th><th>Description</th></tr>\n", esc(caption))
	for _, r := range revs {
		w.Printf("<tr><td>%s</td><td>%s</td><td>%s</td><td>%s</td></tr>\n", esc(r.Rev), esc(r.Date), esc(r.By), esc(r.Note))
	}
	w.WriteString("</table>\n")
}

// summary states at the top whether the sheet evaluated, how many checks
// hold, and lists every error and warning with its position.
func summary(w *markup.Writer, doc *calcdoc.Document) {
	held, failed, notEval := doc.CheckCounts()
	state := "Evaluated without errors."
	if len(doc.Errors) > 0 {
		state = fmt.Sprintf("%d error%s: the sheet is incomplete.", len(doc.Errors), plural(len(doc.Errors)))
	}
	w.Printf("<section class=\"summary\"><p><strong>%s</strong> Checks: %d satisfied, %d not satisfied", esc(state), held, failed)
	if notEval > 0 {
		w.Printf(", %d not evaluated", notEval)
	}
	w.WriteString(".</p>\n")
	if ch, cf, cn := doc.CaseCheckCounts(); ch != nil {
		w.WriteString("<ul class=\"cases\">\n")
		for k, name := range doc.Front.Cases {
			w.Printf("<li>case %s: %d satisfied, %d not satisfied", esc(name), ch[k], cf[k])
			if cn[k] > 0 {
				w.Printf(", %d not evaluated", cn[k])
			}
			w.WriteString("</li>\n")
		}
		w.WriteString("</ul>\n")
	}
	if len(doc.Errors) > 0 {
		w.WriteString("<ol class=\"errlist\">\n")
		for _, e := range doc.Errors {
			p := e.Pos.Position()
			w.Printf("<li><a href=\"#L%d\">line %d, col %d</a>: %s</li>\n", p.Line, p.Line, p.Col, esc(e.Msg))
		}
		w.WriteString("</ol>\n")
	}
	if len(doc.Warnings) > 0 {
		w.WriteString("<ul class=\"warnlist\">\n")
		for _, e := range doc.Warnings {
			w.Printf("<li>warning, line %d: %s</li>\n", e.Pos.Line(), esc(e.Msg))
		}
		w.WriteString("</ul>\n")
	}
	w.WriteString("</section>\n")
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// prose renders the Markdown body with goldmark, drawing evaluated blocks
// and inline values through calcdoc's node renderers.
func prose(w *markup.Writer, doc *calcdoc.Document, cache *BlockCache, pre *Predraw, pg *page) error {
	r := renderer.NewRenderer(renderer.WithNodeRenderers(
		util.Prioritized(ghtml.NewRenderer(), 1000),
		util.Prioritized(gfmhtml.NewTableHTMLRenderer(), 500),
		util.Prioritized(gfmhtml.NewStrikethroughHTMLRenderer(), 500),
		util.Prioritized(&nodes{w: w, cache: cache, pre: pre, page: pg}, 100),
	))
	// goldmark writes into the page buffer through pg, the node renderers
	// into the page buffer too (nodes.setOutput); after the body the
	// writer writes into its own buffer (the page) again
	err := r.Render(pg, doc.Text, doc.Markdown)
	w.SetOutput(nil)
	return err
}

// nodes renders the node kinds calcdoc changes: evaluated fenced blocks,
// inline values, raw HTML (shown as text) and images (not loaded).
type nodes struct {
	w     *markup.Writer
	cache *BlockCache // nil: every block drawn
	pre   *Predraw    // nil: every block drawn here
	page  *page       // the writer goldmark renders into
}

// setOutput points the page's markup.Writer at out, the writer goldmark
// hands a node renderer: at its own buffer (the page) when out is the
// page, so that a block is written with no writer between.
func (n *nodes) setOutput(out util.BufWriter) {
	if p, ok := out.(*page); ok && p == n.page {
		n.w.SetOutput(nil)
		return
	}
	n.w.SetOutput(out)
}

func (n *nodes) RegisterFuncs(reg renderer.NodeRendererFuncRegisterer) {
	reg.Register(ast.KindFencedCodeBlock, n.fenced)
	reg.Register(ast.KindCodeSpan, n.codeSpan)
	reg.Register(ast.KindRawHTML, n.rawHTML)
	reg.Register(ast.KindHTMLBlock, n.htmlBlock)
	reg.Register(ast.KindImage, n.image)
}

func (n *nodes) fenced(out util.BufWriter, src []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	n.setOutput(out)
	if !entering {
		return ast.WalkSkipChildren, nil
	}
	w := n.w
	if b := w.Doc.BlockFor(node); b != nil {
		if d, ok := b.KindOf().(markup.Drawer); ok {
			if bs, ok := n.pre.copyTo(out, w.Doc, b); ok {
				n.cache.keep(d, b, bs)
				return ast.WalkSkipChildren, nil
			}
			n.cache.draw(w, out, d, b)
			n.setOutput(out) // the cache may have pointed it elsewhere
			n.page.check()
			return ast.WalkSkipChildren, nil
		}
	}
	fc := node.(*ast.FencedCodeBlock)
	lang := ""
	if fc.Info != nil {
		if f := strings.Fields(string(fc.Info.Segment.Value(src))); len(f) > 0 {
			lang = f[0] // an info string of white space only (a form feed, say) has none
		}
	}
	w.WriteString("<pre class=\"code\"")
	if lang != "" {
		w.Printf(" data-lang=\"%s\"", esc(lang))
	}
	w.WriteString("><code>")
	lines := fc.Lines()
	for i := 0; i < lines.Len(); i++ {
		seg := lines.At(i)
		w.WriteString(esc(string(seg.Value(src))))
	}
	w.WriteString("</code></pre>\n")
	return ast.WalkSkipChildren, nil
}

func (n *nodes) codeSpan(out util.BufWriter, src []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	n.setOutput(out)
	if !entering {
		return ast.WalkSkipChildren, nil
	}
	w := n.w
	if in := w.Doc.InlineFor(node); in != nil {
		switch {
		case in.Err != nil:
			msg := in.Err.Error()
			if e, ok := in.Err.(*expr.Error); ok {
				msg = e.InFile() // the sheet is of the one file: line:col
			}
			if u, ok := in.Err.(*expr.UnavailableError); ok {
				msg = fmt.Sprintf("%s has no value (its definition at line %d failed)", u.Name, u.Def.Line())
			}
			w.Printf("<span class=\"inl-err\" id=\"L%d\">[ERROR: %s]</span>", in.Pos.Line(), esc(msg))
		case in.Cases != nil:
			// one value per case, each marked with its case
			w.Printf("<span class=\"inl\" title=\"%s\">", esc(in.Text))
			for k, name := range w.Doc.Front.Cases {
				if k >= len(in.Cases) {
					break
				}
				if k > 0 {
					w.WriteString("; ")
				}
				w.Printf("<span class=\"case\">%s</span> %s", esc(name), markup.Math(markup.ValueML(in.Cases[k], displayFor(w.Doc, in.Display, in.Text), w.Digits(), false)+markup.SenseML(in.Cases[k])))
			}
			w.WriteString("</span>")
		default:
			w.Printf("<span class=\"inl\" title=\"%s\">%s</span>", esc(in.Text), markup.Math(markup.ValueML(in.Value, displayFor(w.Doc, in.Display, in.Text), w.Digits(), false)+markup.SenseML(in.Value)))
		}
		return ast.WalkSkipChildren, nil
	}
	w.WriteString("<code>")
	for c := node.FirstChild(); c != nil; c = c.NextSibling() {
		if t, ok := c.(*ast.Text); ok {
			w.WriteString(esc(string(t.Segment.Value(src))))
		}
	}
	w.WriteString("</code>")
	return ast.WalkSkipChildren, nil
}

// displayFor is the display of an inline value: its own bracket, else the
// display of the name it shows, when it is a bare name.
func displayFor(doc *calcdoc.Document, d *expr.Display, text string) *expr.Display {
	if d != nil {
		return d
	}
	if b := doc.Env.Lookup(strings.TrimSpace(text)); b != nil {
		return b.Display
	}
	return nil
}

func (n *nodes) rawHTML(out util.BufWriter, src []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	n.setOutput(out)
	if entering {
		raw := node.(*ast.RawHTML)
		for i := 0; i < raw.Segments.Len(); i++ {
			seg := raw.Segments.At(i)
			n.w.Printf("<code class=\"rawhtml\">%s</code>", esc(string(seg.Value(src))))
		}
	}
	return ast.WalkSkipChildren, nil
}

func (n *nodes) htmlBlock(out util.BufWriter, src []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	n.setOutput(out)
	if entering {
		hb := node.(*ast.HTMLBlock)
		n.w.WriteString("<pre class=\"rawhtml\">")
		lines := hb.Lines()
		for i := 0; i < lines.Len(); i++ {
			seg := lines.At(i)
			n.w.WriteString(esc(string(seg.Value(src))))
		}
		if hb.HasClosure() {
			n.w.WriteString(esc(string(hb.ClosureLine.Value(src))))
		}
		n.w.WriteString("</pre>\n")
	}
	return ast.WalkSkipChildren, nil
}

// image shows an image reference as text: a sheet loads nothing from
// outside itself.
func (n *nodes) image(out util.BufWriter, src []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	n.setOutput(out)
	if entering {
		img := node.(*ast.Image)
		alt := string(img.Text(src)) //nolint:staticcheck // the alt text
		n.w.Printf("<span class=\"imgref\">[figure: %s (%s), not embedded]</span>", esc(alt), esc(string(img.Destination)))
	}
	return ast.WalkSkipChildren, nil
}

// sortedKeys returns the keys of a map in order.
func sortedKeys[M ~map[string]V, V any](m M) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
