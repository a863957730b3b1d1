// Package pack writes a calculation package: one HTML file with a cover,
// a contents list and every sheet, composed from the evaluated documents
// and the sheet writer's parts (render.Body, render.CSS).
package pack

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"html"
	"regexp"
	"strconv"
	"strings"
	"sync"

	"calcdoc/calcdoc"
	"calcdoc/render"
	"calcdoc/render/markup"
	"calcdoc/render/stamp"

	"github.com/yuin/goldmark/ast"
)

func esc(s string) string { return html.EscapeString(s) }

var orDash = render.OrDash

// Info is the title block of a calculation package (calcdoc.TitleBlock:
// Paper is the size of the cover and contents pages, each sheet keeping
// its own; Revisions is the package's own revision history), and where
// the sheets start.
type Info struct {
	calcdoc.TitleBlock
	// StartPages, when it has one entry per sheet, is the printed page on
	// which each sheet starts (as SheetStartPages finds it in a first
	// printing); the contents list shows it. The contents keep room for
	// it either way, so adding it does not move any page.
	StartPages []int
	// Moved says which sheets moved before the first sheet that uses
	// them (the order given is kept otherwise); the contents list it.
	Moved []string `json:",omitempty"`
}

// Sheet is one sheet of a package: the evaluated document and the
// options its sheet is built with (as for render.Sheet).
type Sheet struct {
	Doc     *calcdoc.Document
	Options render.Options
}

// SheetOpen starts the section that holds one sheet of a package.
const SheetOpen = `<section class="pkg-sheet"`

// Hash returns the hash of a package whose sheets' source hashes
// are hashes, in package order: the lower-case hexadecimal SHA-256 (FIPS
// 180-4) of the text made of each hash followed by one line feed (U+000A),
// that is of the bytes that `printf '%s\n' H1 H2 ...` writes, so that
// `printf '%s\n' H1 H2 ... | sha256sum` prints it too. Each hash is taken
// as given (Package gives 64 lower-case hexadecimal digits).
func Hash(hashes []string) string {
	var b strings.Builder
	for _, h := range hashes {
		b.WriteString(h)
		b.WriteByte('\n')
	}
	return stamp.Hash([]byte(b.String()))
}

// sourceHash is the SHA-256 of a sheet's source: the stamp's, else
// computed.
func (s Sheet) sourceHash() string {
	if s.Options.Stamp != nil && s.Options.Stamp.SHA256 != "" {
		return s.Options.Stamp.SHA256
	}
	return stamp.Hash(s.Doc.Source)
}

// Package writes one HTML document that holds a cover, a contents list and
// every sheet, each starting on a new page. The cover has the package's
// title block, the list of sheets (number, title, revision, date,
// working-tree state, result and source SHA-256), the package hash
// (Hash over the sheets' hashes, with the rule stated) and the
// revision history of every sheet. Each sheet is the body of its Sheet,
// with its ids prefixed "sK-" (K its position from 1) so that links stay
// within the sheet, and its source embedded as on a built sheet, so that
// Verify can check every sheet of the package.
//
// In print, every page carries the package page number ("page N of M",
// counted through the package) and each sheet's pages also "sheet K of
// n, page I", I counted within the sheet (a CSS named page per sheet with
// its own page counter). A package with a sheet that is not fit for issue
// (see the sheet's marker) carries a diagonal marker on every page and
// lists those sheets on the cover. version is calcdoc's version.
func Package(info Info, sheets []Sheet, version string) ([]byte, error) {
	if len(sheets) == 0 {
		return nil, errors.New("a package needs at least one sheet")
	}
	for i, s := range sheets {
		if s.Doc == nil {
			return nil, fmt.Errorf("sheet %d has no document", i+1)
		}
	}
	hashes := make([]string, len(sheets))
	for i, s := range sheets {
		hashes[i] = s.sourceHash()
	}
	pkgHash := Hash(hashes)
	title := info.Title
	if title == "" {
		title = "Calculation package"
	}

	var w bytes.Buffer
	w.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
	fmt.Fprintf(&w, "<meta name=\"generator\" content=\"calcdoc %s\">\n", esc(version))
	t := title
	if info.Number != "" {
		t = info.Number + " " + title
	}
	fmt.Fprintf(&w, "<title>%s</title>\n<style>\n", esc(t))
	w.WriteString(render.CSS)
	w.WriteString(pkgCSS)
	w.WriteString(packagePageCSS(info, title, sheets, pkgHash))
	w.WriteString("</style>\n</head>\n<body class=\"package\">\n")

	var marked []string
	for i, s := range sheets {
		if m := render.MarkerText(s.Doc, s.Options); m != "" {
			marked = append(marked, fmt.Sprintf("sheet %d (%s): %s", i+1, orDash(s.Doc.Front.Number), strings.TrimPrefix(m, "NOT FOR ISSUE: ")))
		}
	}
	switch len(marked) {
	case 0:
	case 1:
		fmt.Fprintf(&w, "<div class=\"marker\" aria-hidden=\"true\"><span>NOT FOR ISSUE: %s</span></div>\n", esc(marked[0]))
	default:
		fmt.Fprintf(&w, "<div class=\"marker\" aria-hidden=\"true\"><span>NOT FOR ISSUE: %d sheets (see the cover)</span></div>\n", len(marked))
	}

	cover(&w, info, title, sheets, hashes, pkgHash, marked, version)
	contents(&w, sheets, info.StartPages, info.Moved)
	for i, s := range sheets {
		sec, err := Section(s.Doc, s.Options, i+1)
		if err != nil {
			return nil, fmt.Errorf("sheet %d (%s): %w", i+1, s.Doc.Path, err)
		}
		w.Write(sec)
	}
	w.WriteString("</body>\n</html>\n")
	return w.Bytes(), nil
}

// pkgCSS is what a package adds to the sheet's style: the cover, the
// contents, and each sheet on new pages. A sheet's own diagonal marker is
// hidden (a fixed marker would print on every page of the package); the
// package's marker stands for it.
const pkgCSS = `section.cover h1 { font-size: 16pt; border-bottom: none; margin: 6mm 0 4mm; }
table.pkg-sheets { width: 100%; font-size: 8.5pt; margin: 2mm 0; }
table.pkg-sheets th, table.pkg-sheets td { border: var(--thin); padding: 1.5pt 4pt; text-align: left; vertical-align: top; }
table.pkg-sheets code.hash { font-size: 7pt; word-break: break-all; }
p.pkg-hash code { font-size: 9pt; word-break: break-all; }
p.rule, p.gen { font-size: 8.5pt; }
ul.not-for-issue { font-weight: bold; border: 1pt solid #111; padding: 2pt 6pt 2pt 1.6em; }
nav.contents { break-before: page; }
nav.contents ol { padding-left: 0; list-style: none; }
nav.contents > ol > li { margin: 2mm 0; }
nav.contents .cn { display: inline-block; min-width: 18mm; font-weight: bold; }
nav.contents ul { margin: 1pt 0 0 18mm; padding: 0; list-style: none; font-size: 9pt; }
nav.contents a { color: inherit; }
nav.contents .pg { float: right; min-width: 20mm; min-height: 1em; text-align: right; }
section.pkg-sheet { break-before: page; }
section.pkg-sheet .marker { display: none; }
@media screen {
  section.pkg-sheet { border-top: 2pt solid #111; margin-top: 12mm; padding-top: 4mm; }
}
`

// packagePageCSS writes the @page rules: the cover and contents pages, and
// one named page per sheet with its own page counter.
func packagePageCSS(info Info, title string, sheets []Sheet, pkgHash string) string {
	size := func(paper string) string {
		if paper == "letter" {
			return "letter"
		}
		return "A4"
	}
	pkgNo := info.Number
	if pkgNo == "" {
		pkgNo = "unnumbered package"
	}
	if info.Revision != "" {
		pkgNo += " rev " + info.Revision
	}
	var b strings.Builder
	fmt.Fprintf(&b, `@page {
  size: %s;
  margin: 16mm 14mm 18mm 14mm;
  @top-left { content: %s; font: 8pt sans-serif; }
  @top-right { content: "cover and contents"; font: 8pt sans-serif; }
  @bottom-left { content: %s; font: 8pt sans-serif; }
  @bottom-center { content: %s; font: 7pt monospace; }
  @bottom-right { content: "page " counter(page) " of " counter(pages); font: 8pt sans-serif; }
}
`, size(info.Paper), render.CSSString(pkgNo), render.CSSString(title), render.CSSString("package sha256 "+markup.ShortHash(pkgHash)))
	n := len(sheets)
	for i, s := range sheets {
		k := i + 1
		fm := s.Doc.Front
		left := fm.Number
		if left == "" {
			left = "unnumbered"
		}
		if fm.Revision != "" {
			left += " rev " + fm.Revision
		}
		center := "source sha256 " + markup.ShortHash(s.sourceHash())
		fmt.Fprintf(&b, `@page cd-sheet-%d {
  size: %s;
  counter-increment: cd-sheet-%d;
  @top-left { content: %s; font: 8pt sans-serif; }
  @top-right { content: "sheet %d of %d, page " counter(cd-sheet-%d); font: 8pt sans-serif; }
  @bottom-left { content: %s; font: 8pt sans-serif; }
  @bottom-center { content: %s; font: 7pt monospace; }
  @bottom-right { content: "page " counter(page) " of " counter(pages); font: 8pt sans-serif; }
}
#sheet-%d { page: cd-sheet-%d; }
`, k, size(fm.Paper), k, render.CSSString(pkgNo), k, n, k, render.CSSString(left), render.CSSString(center), k, k)
	}
	return b.String()
}

// Section is sheet k of a package: the sheet's body (render.Body), with
// its ids and links within the sheet prefixed (SheetPrefix), in a section
// of its own.
func Section(doc *calcdoc.Document, opt render.Options, k int) ([]byte, error) {
	body, err := render.Body(doc, opt)
	if err != nil {
		return nil, err
	}
	var w bytes.Buffer
	w.Grow(len(body) + len(body)/16 + 128)
	fmt.Fprintf(&w, "%s id=\"sheet-%d\" data-sheet=\"%d\">\n", SheetOpen, k, k)
	if err := prefixIDs(&w, body, SheetPrefix(k)); err != nil {
		return nil, err
	}
	w.WriteString("</section>\n")
	return w.Bytes(), nil
}

// SheetPrefix is the prefix of the ids of sheet k in a package.
func SheetPrefix(k int) string { return fmt.Sprintf("s%d-", k) }

func cover(w *bytes.Buffer, info Info, title string, sheets []Sheet, hashes []string, pkgHash string, marked []string, version string) {
	fmt.Fprintf(w, "<section class=\"cover\" data-package-sha256=\"%s\" data-sheets=\"%d\" data-version=\"%s\">\n", pkgHash, len(sheets), esc(version))
	tw := &markup.Writer{}
	tw.WriteString("<header class=\"tb\">\n<table class=\"tb\">\n<tr>")
	render.Field(tw, "Project", info.Project)
	render.Field(tw, "Client", info.Client)
	render.Field(tw, "Package no.", info.Number)
	render.Field(tw, "Revision", info.Revision)
	tw.WriteString("</tr>\n<tr class=\"tbtitle\">")
	tw.Printf("<td colspan=\"3\"><span class=\"lbl\">Calculation package</span><span class=\"val title\">%s</span></td>", esc(title))
	render.Field(tw, "Date", info.Date)
	tw.WriteString("</tr>\n<tr>")
	render.Field(tw, "Prepared", info.Prepared)
	render.Field(tw, "Checked", info.Checked)
	render.Field(tw, "Approved", info.Approved)
	render.Field(tw, "Sheets", fmt.Sprint(len(sheets)))
	tw.WriteString("</tr>\n</table>\n")
	render.RevisionHistory(tw, "Revision history of the package", info.Revisions)
	tw.WriteString("</header>\n")
	w.Write(tw.Bytes())

	if len(marked) > 0 {
		w.WriteString("<ul class=\"not-for-issue\">\n")
		for _, m := range marked {
			fmt.Fprintf(w, "<li>NOT FOR ISSUE: %s</li>\n", esc(m))
		}
		w.WriteString("</ul>\n")
	}

	w.WriteString("<h2>Sheets in this package</h2>\n<table class=\"pkg-sheets\">\n")
	w.WriteString("<tr><th>Sheet</th><th>Document no.</th><th>Title</th><th>Rev</th><th>Date</th><th>Working tree</th><th>Result</th><th>Source SHA-256</th></tr>\n")
	for i, s := range sheets {
		fm := s.Doc.Front
		state := "no stamp"
		if s.Options.Stamp != nil {
			state = shortState(s.Options.Stamp.State)
		}
		fmt.Fprintf(w, "<tr data-sheet=\"%d\" data-sha256=\"%s\"><td>%d</td><td>%s</td><td>%s</td><td>%s</td><td>%s</td><td>%s</td><td>%s</td><td><code class=\"hash\">%s</code></td></tr>\n",
			i+1, hashes[i], i+1, esc(orDash(fm.Number)), esc(render.SheetTitle(s.Doc)), esc(orDash(fm.Revision)), esc(orDash(fm.Date)),
			esc(state), esc(outcome(s.Doc)), hashes[i])
	}
	w.WriteString("</table>\n")

	w.WriteString("<h2>Package hash</h2>\n")
	fmt.Fprintf(w, "<p class=\"pkg-hash\">SHA-256 of the package: <code class=\"hash\">%s</code></p>\n", pkgHash)
	w.WriteString("<p class=\"rule\">Each sheet's hash is the SHA-256 of its source file, as <code>sha256sum FILE</code> prints it. " +
		"The package's hash is the SHA-256 of the text made of the sheets' hashes, in the order listed, each written as 64 lower-case hexadecimal digits " +
		"and followed by one line feed; it is what <code>printf '%s\\n' HASH1 HASH2 … | sha256sum</code> prints.</p>\n")

	w.WriteString("<h2>Revision history of the sheets</h2>\n<table class=\"revs pkg-revs\">\n<tr><th>Sheet</th><th>Document no.</th><th>Rev</th><th>Date</th><th>By</th><th>Description</th></tr>\n")
	for i, s := range sheets {
		fm := s.Doc.Front
		revs := fm.Revisions
		if len(revs) == 0 {
			fmt.Fprintf(w, "<tr><td>%d</td><td>%s</td><td>%s</td><td>%s</td><td>—</td><td>no revision history given</td></tr>\n",
				i+1, esc(orDash(fm.Number)), esc(orDash(fm.Revision)), esc(orDash(fm.Date)))
			continue
		}
		for _, r := range revs {
			fmt.Fprintf(w, "<tr><td>%d</td><td>%s</td><td>%s</td><td>%s</td><td>%s</td><td>%s</td></tr>\n",
				i+1, esc(orDash(fm.Number)), esc(r.Rev), esc(r.Date), esc(r.By), esc(r.Note))
		}
	}
	w.WriteString("</table>\n")
	w.WriteString(Record(info))
	fmt.Fprintf(w, "<p class=\"caution\">%s</p>\n", esc(render.Caution))
	fmt.Fprintf(w, "<p class=\"gen\">Made by calcdoc %s. Every sheet carries its own source: <code>calcdoc verify</code> on this file evaluates each one again and confirms that the sheet, its hash and the package hash still match it.</p>\n", esc(version))
	w.WriteString("</section>\n")
}

// RecordID is the id of the hidden element of the cover that records the
// package's title block and start pages (Info) as JSON, so that verify
// can write the whole package again from what the file carries.
const RecordID = "calcdoc-package"

// Record is the hidden element that carries info: a <pre hidden> (never
// a script) holding Info as JSON (encoding/json, Go field names),
// HTML-escaped.
func Record(info Info) string {
	b, err := json.Marshal(info)
	if err != nil { // Info holds only strings and ints
		panic(err)
	}
	return fmt.Sprintf("<pre hidden id=\"%s\" data-encoding=\"json\">%s</pre>\n", RecordID, esc(string(b)))
}

// ParseRecord reads the JSON of a Record, after its HTML escapes are
// undone. Unknown keys are an error.
func ParseRecord(b []byte) (Info, error) {
	var info Info
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	err := dec.Decode(&info)
	return info, err
}

// contents lists the sheets and their first two levels of headings.
func contents(w *bytes.Buffer, sheets []Sheet, starts []int, moved []string) {
	w.WriteString("<nav class=\"contents\">\n<h2>Contents</h2>\n<ol>\n")
	for i, s := range sheets {
		fm := s.Doc.Front
		label := orDash(fm.Number)
		if fm.Revision != "" {
			label += " rev " + fm.Revision
		}
		pg := ""
		if len(starts) == len(sheets) && starts[i] > 0 {
			pg = fmt.Sprintf("page %d", starts[i])
		}
		fmt.Fprintf(w, "<li><span class=\"pg\">%s</span><a href=\"#sheet-%d\"><span class=\"cn\">Sheet %d</span> %s: %s</a>", pg, i+1, i+1, esc(label), esc(render.SheetTitle(s.Doc)))
		hs := headings(s.Doc, 2)
		us := usesLines(sheets, i)
		if len(hs)+len(us) > 0 {
			w.WriteString("\n<ul>\n")
			for _, h := range hs {
				fmt.Fprintf(w, "<li>%s</li>\n", esc(h))
			}
			for _, u := range us {
				fmt.Fprintf(w, "<li class=\"uses\">%s</li>\n", u)
			}
			w.WriteString("</ul>\n")
		}
		w.WriteString("</li>\n")
	}
	w.WriteString("</ol>\n")
	for _, m := range moved {
		fmt.Fprintf(w, "<p class=\"moved\">%s</p>\n", esc(m))
	}
	w.WriteString("</nav>\n")
}

// headings returns the text of the document's headings of level 1 to
// maxLevel, in order.
func headings(doc *calcdoc.Document, maxLevel int) []string {
	var out []string
	if doc.Markdown == nil {
		return nil
	}
	_ = ast.Walk(doc.Markdown, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		h, ok := n.(*ast.Heading)
		if !ok || !entering {
			return ast.WalkContinue, nil
		}
		if h.Level <= maxLevel {
			if t := strings.TrimSpace(inlineText(h, doc.Text)); t != "" {
				out = append(out, t)
			}
		}
		return ast.WalkSkipChildren, nil
	})
	return out
}

// inlineText is the text of an inline node's descendants: text and code
// as written in the source.
func inlineText(n ast.Node, src []byte) string {
	var b strings.Builder
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		switch c := c.(type) {
		case *ast.Text:
			b.Write(c.Segment.Value(src))
			if c.SoftLineBreak() || c.HardLineBreak() {
				b.WriteByte(' ')
			}
		case *ast.String:
			b.Write(c.Value)
		default:
			b.WriteString(inlineText(c, src))
		}
	}
	return b.String()
}

// shortState names a working-tree state in a few words, for the cover.
func shortState(s stamp.State) string {
	switch s {
	case stamp.Clean:
		return "clean"
	case stamp.Modified, stamp.Untracked:
		return "uncommitted changes"
	case stamp.NoRepo:
		return "not in a git repository"
	case stamp.NoGit:
		return "git not available"
	}
	return "unknown"
}

// outcome says in a few words how a sheet evaluated.
func outcome(doc *calcdoc.Document) string {
	if n := len(doc.Errors); n > 0 {
		return fmt.Sprintf("%d error%s", n, plural(n))
	}
	if n := doc.FailedChecks(); n > 0 {
		return fmt.Sprintf("%d of %d checks not satisfied", n, len(doc.Checks))
	}
	return fmt.Sprintf("%d of %d checks satisfied", doc.HeldChecks(), len(doc.Checks))
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// SheetStartPages finds, in the text of a printed package (one string
// per page, as pdf.PDFText gives it), the page on which each of its n
// sheets starts: the page whose header reads "sheet K of n, page 1". The
// pages count from 1. ok is false unless every sheet is found once, in
// order.
func SheetStartPages(pages []string, n int) (starts []int, ok bool) {
	starts = make([]int, n)
	for i, p := range pages {
		for _, m := range startRE().FindAllStringSubmatch(p, -1) {
			k, of := Atoi(m[1]), Atoi(m[2])
			if of != n || k < 1 || k > n {
				continue
			}
			if starts[k-1] != 0 {
				return nil, false
			}
			starts[k-1] = i + 1
		}
	}
	for k := range starts {
		if starts[k] == 0 || k > 0 && starts[k] <= starts[k-1] {
			return nil, false
		}
	}
	return starts, true
}

var numberRE = sync.OnceValue(func() *regexp.Regexp { return regexp.MustCompile(`^[0-9]+$`) })

var startRE = sync.OnceValue(func() *regexp.Regexp { return regexp.MustCompile(`sheet ([0-9]+) of ([0-9]+), page 1\b`) })

// Atoi reads a sheet index written by Package; anything else is 0.
func Atoi(s string) int {
	if !numberRE().MatchString(s) {
		return 0
	}
	n, err := strconv.Atoi(s)
	if err != nil {
		return 0
	}
	return n
}
