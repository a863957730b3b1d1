// Package calcdoc reads a calculation document (Markdown with front matter
// and evaluated fenced blocks), evaluates it top to bottom in one set of
// names, and keeps everything a sheet needs: the front matter, the
// Markdown tree, each block's results, the values, the checks and one list
// of errors sorted by position.
package calcdoc

import (
	"bytes"
	"os"
	"strings"
	"unicode/utf8"

	"calcdoc/calcdoc/gfm"
	"calcdoc/expr"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
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
	// DataFiles are the files the blocks read (a table's CSV), in the
	// order first read; the stamp lists them and the sheet carries them.
	DataFiles []*DataFile

	// Files is the set of files the document is read from; File is the
	// document's own (named Path, holding Text before the front matter is
	// blanked out): every position of the document is an offset in it.
	Files *expr.FileSet
	File  *expr.File

	// Uses are the document's use statements, in document order (uses.go).
	Uses []*Use

	inputs    Inputs
	sheets    Sheets // where use statements find other documents
	byNode    map[ast.Node]*Block
	inlineN   map[ast.Node]*Inline
	order     []any // the blocks and inline values in document order
	evaluated bool
	room      int    // namesAbout, as Evaluate made room for it
	sum       string // hex SHA-256 of Source when the loader made it (SourceSHA256)
	trail     *trail // what each item of order added (incremental.go)
	serial    uint64 // this reading's number; basis: the one Reevaluate took over from
	basis     uint64
	redefined map[string]bool // the names defined below the first change (Redefines)
}

// NamedValue is a defined name with its value, as the values JSON and the
// sheet list it.
type NamedValue struct {
	Name    string
	Pos     expr.Pos
	Value   expr.Value
	Display *expr.Display
	// Cases is the value in each of the document's cases (Front.Cases)
	// for a value that depends on a case, else nil (LANGUAGE.md section 10).
	Cases []expr.Value
}

// CheckRecord is one evaluated check.
type CheckRecord struct {
	Pos    expr.Pos
	Text   string
	Result *expr.CheckResult // nil when the check could not be evaluated
	// Cases is the result in each of the document's cases for a check
	// with cases (nil where it does not apply or has no verdict), else
	// nil; Governing names the case of the highest utilisation.
	Cases     []*expr.CheckResult
	Governing string
	// NoVerdict marks the cases the check applies to but could not be
	// evaluated in (a solve that failed in that case).
	NoVerdict []bool
}

// Inline is an inline value `=expr` in prose.
type Inline struct {
	Pos     expr.Pos
	Text    string // the expression, without "="
	Node    ast.Node
	Value   expr.Value
	Display *expr.Display
	Err     error
	// Cases is the value in each of the document's cases for an inline
	// value that depends on a case, else nil.
	Cases []expr.Value
	src   *expr.Source // the span's text, line by line, with positions
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
		case c.Result == nil || c.noVerdict():
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

// PosAt is the position of a byte offset of Text.
func (d *Document) PosAt(off int) expr.Pos { return d.File.Pos(off) }

// Load reads and evaluates the document at path with the kinds of reg.
func Load(path string, reg *Registry) (*Document, error) {
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return Parse(path, src, reg), nil
}

// markdown is the goldmark configuration: CommonMark with GFM tables.
var markdown = goldmark.New(goldmark.WithExtensions(gfm.Table, gfm.Strikethrough))

// Markdown returns the goldmark instance calcdoc parses prose with, so
// that renderers use the same configuration.
func Markdown() goldmark.Markdown { return markdown }

// Parse reads a document from its bytes and evaluates it, each fenced
// block whose info string starts with a word of reg by the kind that owns
// it (other fenced blocks are shown as code): ParseOnly, then Evaluate.
// It never fails: every problem is in the document's Errors, and
// evaluation goes on past each one.
//
// A use statement reads the documents it names through a Loader of its
// own; a build shares one Loader (Loader.Parse) so that each document is
// evaluated once.
func Parse(path string, src []byte, reg *Registry) *Document {
	return parse(path, src, reg, Inputs{})
}

// ParseBudget is Parse with the work budget the evaluation spends, which
// the caller may stop (expr.Budget.Stop) from another goroutine.
func ParseBudget(path string, src []byte, reg *Registry, budget *expr.Budget) *Document {
	return parse(path, src, reg, Inputs{Budget: budget})
}

// parse reads and evaluates a document with its inputs.
func parse(path string, src []byte, reg *Registry, in Inputs) *Document {
	d := parseOnly(path, src, reg, in)
	if in.Budget != nil {
		d.Env.Budget = in.Budget
	}
	d.Evaluate()
	d.inputs.AfterBlock = nil // called during evaluation only: the document keeps nothing of the caller's
	return d
}

// ParseOnly reads a document from its bytes without evaluating it: the
// front matter, the Markdown tree, and the blocks of the kinds of reg and
// the inline values, in document order with their positions (no results
// yet). Evaluate evaluates them, with the default work budget unless the
// caller sets Env.Budget first.
func ParseOnly(path string, src []byte, reg *Registry) *Document {
	return parseOnly(path, src, reg, Inputs{})
}

func parseOnly(path string, src []byte, reg *Registry, in Inputs) *Document {
	if in.Sheets == nil {
		// use statements read through a loader of this document's own
		var roots []string
		if in.Root != "" {
			roots = append(roots, in.Root)
		}
		in.Sheets = NewLoader(reg, roots...).Sheets(path)
	}
	d := &Document{Path: path, Source: src, Env: expr.NewEnv(), Kinds: reg, Files: &expr.FileSet{}, inputs: in, sheets: in.Sheets, serial: docSerials.Add(1), byNode: map[ast.Node]*Block{}, inlineN: map[ast.Node]*Inline{}}
	d.Env.Budget = expr.NewBudget(expr.DefaultBudget)
	d.sum = in.sum
	txt := readerLines(src)
	var bad []int
	if !utf8.Valid(txt) {
		txt, bad = sanitizeUTF8(txt)
	}
	d.Text = txt
	d.File = d.Files.AddFile(path, string(txt))
	for _, off := range bad {
		d.Errors.Add(d.PosAt(off), "invalid UTF-8 in the file: save it as UTF-8 (the byte is shown as �)")
	}
	if y, n, ok := splitFrontMatter(txt); n > 0 {
		if !ok {
			d.Errors.Add(d.PosAt(0), "front matter starts with --- but is never closed: add a line --- after it")
		} else {
			parseFrontMatter(y, d.File.LineStart(2), &d.Front, &d.Errors, &d.Warnings)
			d.Env.Preferred = d.Front.Units
			d.Env.Cases = d.Front.Cases
			// blank the front matter out, keeping every offset
			body := append([]byte(nil), txt...)
			end := len(txt)
			if n < d.File.LineCount() {
				end = d.File.LineStart(n + 1).Off
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
	d.collect()
	d.Errors.Sort()
	d.Warnings.Sort()
	return d
}

// Evaluate evaluates the document's blocks and inline values top to
// bottom in one set of names, each block by its kind, so each sees only
// what is above it; the errors end sorted by position. A document is
// evaluated once: a second call does nothing.
func (d *Document) Evaluate() {
	if d.evaluated {
		return
	}
	d.evaluated = true
	d.room = d.namesAbout()
	d.Env.Reserve(d.room)
	d.evalFrom(0, newTrail(d))
}

// NamesAbout is about the number of names the document's blocks define,
// as its own names were made room for (expr.Env.Reserve): the room for
// another environment that takes them over.
func (d *Document) NamesAbout() int {
	if d.room > 0 {
		return d.room
	}
	return d.namesAbout()
}

// maxReserve bounds the names an environment makes room for ahead
// (Env.Reserve): beyond it the table grows as it would.
const maxReserve = 1 << 16

// namesAbout is about the number of names the document's blocks define:
// their lines that hold "=" (a statement defines a name per line, a few
// none and a few more), at most maxReserve.
func (d *Document) namesAbout() int {
	n := 0
	for _, it := range d.order {
		if b, ok := it.(*Block); ok {
			for _, l := range b.Lines {
				if strings.IndexByte(l, '=') >= 0 {
					n++
				}
			}
		}
		if n >= maxReserve {
			return maxReserve
		}
	}
	return n
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

// collect walks the Markdown tree in document order and gathers the
// blocks of the registered kinds and the inline values, unevaluated.
func (d *Document) collect() {
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
	if lines.Len() > 0 {
		b.Lines = make([]string, 0, lines.Len())
		b.LinePos = make([]expr.Pos, 0, lines.Len())
	}
	for i := 0; i < lines.Len(); i++ {
		seg := lines.At(i)
		b.Lines = append(b.Lines, d.lineText(seg))
		b.LinePos = append(b.LinePos, d.PosAt(seg.Start))
	}
	b.Pos = b.InfoPos.LineStart()
	b.doc = d
	d.Blocks = append(d.Blocks, b)
	d.byNode[n] = b
	b.kind = kind
	d.order = append(d.order, b)
}

// lineText is a line of a fenced block without its line break: a piece
// of the file's text where the line stands there as it is (no copy), else
// a copy of what goldmark gives (a line with padding, or in the blanked
// front matter).
func (d *Document) lineText(seg text.Segment) string {
	v := seg.Value(d.Text)
	if ft := d.File.Text(); seg.Padding == 0 && seg.Stop <= len(ft) && ft[seg.Start:seg.Stop] == string(v) {
		return strings.TrimRight(ft[seg.Start:seg.Stop], "\r\n")
	}
	return strings.TrimRight(string(v), "\r\n")
}

// evalBlock evaluates a block by its kind, charging its work to the
// document's budget.
func (d *Document) evalBlock(b *Block) {
	kind := b.kind
	d.Env.Budget.Begin(b.InfoPos, b.Kind+" block")
	wasOver := d.Env.Budget.Over() != nil
	kind.Eval(b)
	d.budgetSpentIn(wasOver, &b.Errors)
	if dc, ok := kind.(DrawChecker); ok {
		b.DrawErrors = dc.DrawCheck(b)
		b.Errors = append(b.Errors, b.DrawErrors...)
	}
	for _, e := range b.Errors {
		if !e.Pos.IsValid() {
			e.Pos = b.Pos // an error of the block as a whole: its opening line
		}
		d.Errors = append(d.Errors, e)
	}
}

// budgetSpentIn makes sure that the error of a work budget spent during a
// block or an inline value is among its errors (errs), whatever the kind
// did with it: a sweep, say, keeps a point's error as a gap. wasOver says
// whether the budget was spent before it began.
func (d *Document) budgetSpentIn(wasOver bool, errs *[]*expr.Error) {
	over := d.Env.Budget.Over()
	if over == nil || wasOver {
		return
	}
	for _, e := range *errs {
		if e == over {
			return
		}
	}
	*errs = append(*errs, over)
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
	in.src = expr.NewSourceLines(lines, at)
	d.Inline = append(d.Inline, in)
	d.inlineN[n] = in
	d.order = append(d.order, in)
}

// evalInline parses and evaluates an inline value.
func (d *Document) evalInline(in *Inline) {
	var errs expr.ErrorList
	x, disp := expr.ParseExpr(in.src, &errs)
	if len(errs) > 0 {
		in.Err = errs[0]
		d.Errors = append(d.Errors, errs...)
	} else {
		d.Env.Budget.Begin(in.Pos, "inline value")
		v, cases, err := d.Env.EvalCases(x, nil)
		if err == nil {
			if derr := expr.CheckDisplay(v, disp); derr != nil {
				err = expr.Errorf(in.Pos, "%s", derr.Error())
			} else if kv, kerr := expr.BracketKind(v, x, disp); kerr != nil {
				err = kerr // a power relabelled to another kind (IEEE 1459)
			} else {
				v = kv
			}
		}
		for k := range cases {
			if err != nil {
				break
			}
			if cases[k] == nil {
				continue
			}
			if derr := expr.CheckDisplay(cases[k], disp); derr != nil {
				err = expr.Errorf(in.Pos, "%s", derr.Error())
			} else {
				cases[k], err = expr.BracketKind(cases[k], x, disp)
			}
		}
		if err == nil {
			in.Cases = cases
		}
		in.Value, in.Display, in.Err = v, disp, err
		if e, ok := err.(*expr.Error); ok {
			d.Errors = append(d.Errors, e)
		}
	}
}
