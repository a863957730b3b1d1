// Package calcdoc reads a calculation document (Markdown with front matter
// and evaluated fenced blocks), evaluates it top to bottom in one set of
// names, and keeps everything a sheet needs: the front matter, the
// Markdown tree, each block's results, the values, the checks and one list
// of errors sorted by position.
package calcdoc

import (
	"bytes"
	"os"
	"sort"
	"strings"
	"unicode/utf8"

	"calcdoc/expr"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/text"
)

// Document is one evaluated calculation document.
type Document struct {
	Path   string // as given
	Source []byte // the file's bytes, as read (never written)
	Front  FrontMatter
	// Markdown is the goldmark tree of the body; Text is the source it
	// was parsed from (the file with a leading byte-order mark dropped,
	// lone CRs read as line ends, the front matter blanked out and invalid
	// UTF-8 replaced), so lines and columns match the file as a reader
	// sees it.
	Markdown ast.Node
	Text     []byte
	Blocks   []*Block  // the evaluated blocks, in document order
	Inline   []*Inline // the inline values, in document order
	Values   []*NamedValue
	Checks   []*CheckRecord
	Errors   expr.ErrorList // sorted by position
	Warnings expr.ErrorList // sorted by position
	Env      *expr.Env
	// Kinds are the block kinds the document was evaluated with; the
	// sheet draws each block by its kind.
	Kinds *Registry
	// Uses are the document's use statements, in document order (uses.go).
	Uses []*Use

	sheets  Sheets // where use statements find other documents
	lines   []int  // byte offset of each line start in Text
	byNode  map[ast.Node]*Block
	inlineN map[ast.Node]*Inline
}

// NamedValue is a defined name with its value, as the values JSON and the
// sheet list it.
type NamedValue struct {
	Name    string
	Pos     expr.Pos
	Value   expr.Value
	Display *expr.Display
}

// CheckRecord is one evaluated check.
type CheckRecord struct {
	Pos    expr.Pos
	Text   string
	Result *expr.CheckResult // nil when the check could not be evaluated
}

// Inline is an inline value `=expr` in prose.
type Inline struct {
	Pos     expr.Pos
	Text    string // the expression, without "="
	Node    ast.Node
	Value   expr.Value
	Display *expr.Display
	Err     error
}

// Digits is the number of significant figures the sheet shows.
func (d *Document) Digits() int {
	if d.Front.Digits != 0 {
		return d.Front.Digits
	}
	return DefaultDigits
}

// BlockFor returns the evaluated block of a fenced code block node, or nil.
func (d *Document) BlockFor(n ast.Node) *Block { return d.byNode[n] }

// InlineFor returns the inline value of a code span node, or nil.
func (d *Document) InlineFor(n ast.Node) *Inline { return d.inlineN[n] }

// CheckCounts counts the document's checks: those that hold, those that
// do not, and those that could not be evaluated (no result). It is the
// one place that counts them.
func (d *Document) CheckCounts() (held, failed, notEvaluated int) {
	for _, c := range d.Checks {
		switch {
		case c.Result == nil:
			notEvaluated++
		case c.Result.Pass:
			held++
		default:
			failed++
		}
	}
	return held, failed, notEvaluated
}

// FailedChecks counts the checks that do not hold.
func (d *Document) FailedChecks() int {
	_, failed, _ := d.CheckCounts()
	return failed
}

// HeldChecks counts the checks that hold.
func (d *Document) HeldChecks() int {
	held, _, _ := d.CheckCounts()
	return held
}

// PosAt converts a byte offset of the file into a line and column.
func (d *Document) PosAt(off int) expr.Pos {
	i := sort.Search(len(d.lines), func(i int) bool { return d.lines[i] > off }) - 1
	if i < 0 {
		i = 0
	}
	end := min(off, len(d.Text))
	return expr.Pos{Line: i + 1, Col: utf8.RuneCount(d.Text[d.lines[i]:end]) + 1}
}

// Load reads and evaluates the document at path with the kinds of reg.
func Load(path string, reg *Registry) (*Document, error) {
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return Parse(path, src, reg), nil
}

// markdown is the goldmark configuration: CommonMark with GFM tables.
var markdown = goldmark.New(goldmark.WithExtensions(extension.Table, extension.Strikethrough))

// Markdown returns the goldmark instance calcdoc parses prose with, so
// that renderers use the same configuration.
func Markdown() goldmark.Markdown { return markdown }

// Parse evaluates a document from its bytes, each fenced block whose info
// string starts with a word of reg by the kind that owns it (other fenced
// blocks are shown as code). It never fails: every problem is in the
// document's Errors, and evaluation goes on past each one.
//
// A use statement reads the documents it names through a Loader of its
// own; a build shares one Loader (Loader.Parse) so that each document is
// evaluated once.
func Parse(path string, src []byte, reg *Registry) *Document {
	l := NewLoader(reg)
	real := realPath(path)
	return ParseWith(path, src, reg, &view{l: l, fallback: l.rootFor(real, path), chain: []string{real}, names: []string{path}})
}

// ParseWith is Parse with the documents that use statements name given by
// sheets (verify gives the values a built sheet carries).
func ParseWith(path string, src []byte, reg *Registry, sheets Sheets) *Document {
	d := &Document{Path: path, Source: src, Env: expr.NewEnv(), Kinds: reg, byNode: map[ast.Node]*Block{}, inlineN: map[ast.Node]*Inline{}, sheets: sheets}
	txt := readerLines(src)
	var bad []int
	if !utf8.Valid(txt) {
		txt, bad = sanitizeUTF8(txt)
	}
	d.Text = txt
	d.index()
	for _, off := range bad {
		d.Errors.Add(d.PosAt(off), "invalid UTF-8 in the file: save it as UTF-8 (the byte is shown as �)")
	}
	body := txt
	if y, n, ok := splitFrontMatter(txt); n > 0 {
		if !ok {
			d.Errors.Add(expr.Pos{Line: 1, Col: 1}, "front matter starts with --- but is never closed: add a line --- after it")
		} else {
			parseFrontMatter(y, &d.Front, &d.Errors, &d.Warnings)
			d.Env.Preferred = d.Front.Units
			// blank the front matter out, keeping every offset
			body = append([]byte(nil), txt...)
			end := d.lines[min(n, len(d.lines)-1)]
			if n >= len(d.lines) {
				end = len(txt)
			}
			for i := 0; i < end; i++ {
				if body[i] != '\n' {
					body[i] = ' '
				}
			}
			d.Text = body
		}
	}
	d.Markdown = markdown.Parser().Parse(text.NewReader(d.Text))
	d.evaluate()
	d.Errors.Sort()
	d.Warnings.Sort()
	return d
}

// readerLines returns the file's text as a reader sees it, so that the
// front matter is found and every position is a line and column a reader
// counts: a UTF-8 byte-order mark at the start (invisible in an editor) is
// dropped, and a lone CR (the old Mac line end) becomes LF. A CR LF stays
// as it is (goldmark and the YAML reader both take it as one line end).
// Only the BOM changes the length, so offsets after the first line are
// the file's offsets less three.
func readerLines(src []byte) []byte {
	src = bytes.TrimPrefix(src, []byte("\uFEFF"))
	if bytes.IndexByte(src, '\r') < 0 {
		return src
	}
	out := append([]byte(nil), src...)
	for i, c := range out {
		if c == '\r' && (i+1 == len(out) || out[i+1] != '\n') {
			out[i] = '\n'
		}
	}
	return out
}

func sanitizeUTF8(src []byte) ([]byte, []int) {
	var out bytes.Buffer
	var bad []int
	for i := 0; i < len(src); {
		r, w := utf8.DecodeRune(src[i:])
		if r == utf8.RuneError && w == 1 {
			if len(bad) < 20 {
				bad = append(bad, out.Len())
			}
			out.WriteString("\uFFFD")
			i++
			continue
		}
		out.Write(src[i : i+w])
		i += w
	}
	return out.Bytes(), bad
}

func (d *Document) index() {
	d.lines = []int{0}
	for i, c := range d.Text {
		if c == '\n' {
			d.lines = append(d.lines, i+1)
		}
	}
}

// lineText returns line n (from 1) of the file without its line break.
func (d *Document) lineText(n int) string {
	if n < 1 || n > len(d.lines) {
		return ""
	}
	start := d.lines[n-1]
	end := len(d.Text)
	if n < len(d.lines) {
		end = d.lines[n] - 1
	}
	return strings.TrimRight(string(d.Text[start:end]), "\r")
}

// evaluate walks the Markdown tree in document order, evaluating each
// block and inline value as it comes, so each sees only what is above it.
func (d *Document) evaluate() {
	ast.Walk(d.Markdown, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		switch n := n.(type) {
		case *ast.FencedCodeBlock:
			d.fenced(n)
			return ast.WalkSkipChildren, nil
		case *ast.CodeSpan:
			d.codeSpan(n)
			return ast.WalkSkipChildren, nil
		}
		return ast.WalkContinue, nil
	})
}

func (d *Document) fenced(n *ast.FencedCodeBlock) {
	if n.Info == nil {
		return
	}
	info := string(n.Info.Segment.Value(d.Text))
	word, rest, _ := strings.Cut(strings.TrimSpace(info), " ")
	kind := d.Kinds.Lookup(word)
	if kind == nil {
		return
	}
	b := &Block{Kind: word, Node: n, InfoPos: d.PosAt(n.Info.Segment.Start)}
	// the argument after the word, with its position
	b.Arg = strings.TrimSpace(rest)
	if b.Arg != "" {
		b.ArgPos = d.PosAt(n.Info.Segment.Start + strings.Index(info, b.Arg))
	}
	lines := n.Lines()
	for i := 0; i < lines.Len(); i++ {
		seg := lines.At(i)
		t := strings.TrimRight(string(seg.Value(d.Text)), "\r\n")
		b.Lines = append(b.Lines, t)
		b.LinePos = append(b.LinePos, d.PosAt(seg.Start))
	}
	b.Pos = expr.Pos{Line: b.InfoPos.Line, Col: 1}
	b.doc = d
	d.Blocks = append(d.Blocks, b)
	d.byNode[n] = b
	b.kind = kind
	kind.Eval(b)
	if dc, ok := kind.(DrawChecker); ok {
		b.DrawErrors = dc.DrawCheck(b)
		b.Errors = append(b.Errors, b.DrawErrors...)
	}
	for _, e := range b.Errors {
		d.Errors = append(d.Errors, e)
	}
}

// Source returns the block's lines as an expr.Source, positions included.
func (b *Block) Source() *expr.Source { return expr.NewSourceLines(b.Lines, b.LinePos) }

func (d *Document) codeSpan(n *ast.CodeSpan) {
	var buf bytes.Buffer
	start := -1
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		if t, ok := c.(*ast.Text); ok {
			if start < 0 {
				start = t.Segment.Start
			}
			buf.Write(t.Segment.Value(d.Text))
		}
	}
	s := buf.String()
	if !strings.HasPrefix(s, "=") || start < 0 {
		return
	}
	// position of the text after "=" (a code span's content may start after a space)
	off := start + bytes.IndexByte(d.Text[start:], '=') + 1
	in := &Inline{Pos: d.PosAt(off), Text: strings.TrimSpace(s[1:]), Node: n}
	// The span's text, one line per segment, each at its own position
	// (a code span may run over several lines of the paragraph).
	var lines []string
	var at []expr.Pos
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		t, ok := c.(*ast.Text)
		if !ok {
			continue
		}
		from := t.Segment.Start
		if len(lines) == 0 {
			from = off
		}
		if from > t.Segment.Stop {
			continue
		}
		line := strings.TrimRight(string(d.Text[from:t.Segment.Stop]), " \t\r\n")
		if len(lines) == 0 {
			lead := len(line) - len(strings.TrimLeft(line, " "))
			line, from = line[lead:], from+lead
		}
		lines, at = append(lines, line), append(at, d.PosAt(from))
	}
	src := expr.NewSourceLines(lines, at)
	var errs expr.ErrorList
	x, disp := expr.ParseExpr(src, &errs)
	if len(errs) > 0 {
		in.Err = errs[0]
		d.Errors = append(d.Errors, errs...)
	} else {
		v, err := d.Env.Eval(x, nil)
		if err == nil {
			if derr := expr.CheckDisplay(v, disp); derr != nil {
				err = expr.Errorf(in.Pos, "%s", derr.Error())
			} else if kv, kerr := expr.BracketKind(v, x, disp); kerr != nil {
				err = kerr // a power relabelled to another kind (IEEE 1459)
			} else {
				v = kv
			}
		}
		in.Value, in.Display, in.Err = v, disp, err
		if e, ok := err.(*expr.Error); ok {
			d.Errors = append(d.Errors, e)
		}
	}
	d.Inline = append(d.Inline, in)
	d.inlineN[n] = in
}
