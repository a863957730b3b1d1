package render

import (
	"bytes"
	"context"
	"encoding/xml"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render/pdf"
	"calcdoc/render/pdf/pdftest"
)

var update = flag.Bool("update", false, "rewrite the golden sheets in testdata/golden")

// goldenExamples are the examples whose sheets are kept as golden files.
var goldenExamples = []string{"motor-pfc", "cable-voltage-drop", "earth-fault-loop", "supply-unbalance", "line-sequence-impedance"}

// fixedOptions stamp a sheet with fixed facts, so the bytes depend on the
// source alone.
func fixedOptions(src []byte) Options {
	return Options{Version: "test", EmbedSource: true, Stamp: &StampInfo{
		SHA256: SourceHash(src), Commit: "0123456789abcdef0123456789abcdef01234567", CommitDate: "2026-11-30T12:00:00Z",
		State: TreeClean, Detail: "fixed stamp of the golden files",
	}}
}

func buildExample(t *testing.T, name string) (*calcdoc.Document, []byte) {
	t.Helper()
	path := filepath.Join("..", "examples", name+".md")
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	doc := calcdoc.Parse("examples/"+name+".md", src, kind.Standard())
	html, err := Sheet(doc, fixedOptions(src))
	if err != nil {
		t.Fatal(err)
	}
	return doc, html
}

// Golden sheets guard against unintended changes to the layout; the
// structural tests below check what the sheets must contain.
func TestGoldenSheets(t *testing.T) {
	for _, name := range goldenExamples {
		t.Run(name, func(t *testing.T) {
			_, html := buildExample(t, name)
			golden := filepath.Join("..", "testdata", "golden", name+".html")
			if *update {
				if err := os.MkdirAll(filepath.Dir(golden), 0o755); err != nil {
					t.Fatal(err)
				}
				if err := os.WriteFile(golden, html, 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(golden)
			if err != nil {
				t.Fatalf("%v (run go test ./render -run Golden -update)", err)
			}
			if !bytes.Equal(html, want) {
				i := 0
				for i < len(html) && i < len(want) && html[i] == want[i] {
					i++
				}
				lo := max(0, i-80)
				t.Errorf("sheet differs from %s at byte %d:\n got: %q\nwant: %q\n(if the change is intended: go test ./render -run Golden -update)", golden, i, html[lo:min(len(html), i+80)], want[lo:min(len(want), i+80)])
			}
		})
	}
}

func TestDeterministic(t *testing.T) {
	for _, name := range goldenExamples {
		_, a := buildExample(t, name)
		_, b := buildExample(t, name)
		if !bytes.Equal(a, b) {
			t.Errorf("%s: two builds differ", name)
		}
	}
}

var (
	// a statement row: its line as id and data-line (the gutter's number,
	// style.go), its working, then its description or, with none, its end
	rowRE = regexp.MustCompile(`(?s)<div class="row(?: wide)?" id="L(\d+)" data-line="(\d+)"><div>(.*?)</div>(?:<div class="desc">|</div>\n)`)
)

func TestStructure(t *testing.T) {
	for _, name := range goldenExamples {
		t.Run(name, func(t *testing.T) {
			doc, html := buildExample(t, name)
			s := string(html)
			if len(doc.Errors) > 0 {
				t.Fatalf("example has errors: %v", doc.Errors)
			}
			// title block: every front matter field is on the sheet
			fm := doc.Front
			for _, f := range []string{fm.Title, fm.Project, fm.Number, fm.Revision, fm.Prepared, fm.Checked, fm.Approved, fm.Date} {
				if f == "" {
					t.Errorf("example lacks a title block field")
					continue
				}
				if !strings.Contains(s, esc(f)) {
					t.Errorf("title block lacks %q", f)
				}
			}
			for _, r := range fm.Revisions {
				if !strings.Contains(s, esc(r.Note)) {
					t.Errorf("revision history lacks %q", r.Note)
				}
			}
			// every statement row: its line in the gutter, a formula, and for
			// assignments a result; a substitution where the formula uses names
			rows := rowRE.FindAllStringSubmatch(s, -1)
			if len(rows) == 0 {
				t.Fatal("no statement rows")
			}
			for _, r := range rows {
				if r[1] != r[2] {
					t.Errorf("row id L%s shows line %s", r[1], r[2])
				}
				body := r[3]
				if !strings.Contains(body, `<div class="f">`) && !strings.Contains(body, `<div class="f brk">`) {
					t.Errorf("line %s: no formula", r[1])
				}
				isCheck := strings.Contains(body, "kindtag\">check")
				isFunc := strings.Contains(body, "kindtag\">function")
				if !isCheck && !isFunc && !strings.Contains(body, `<div data-value=`) {
					t.Errorf("line %s: no result", r[1])
				}
				if isCheck && !strings.Contains(body, "satisfied") {
					t.Errorf("line %s: check without a verdict", r[1])
				}
			}
			// every named value has its result row at its source line: in
			// the statement row of that line, or a row of a block kind
			// naming the line itself
			rowOf := map[string]string{}
			for _, r := range rows {
				rowOf[r[1]] += r[3]
			}
			for _, v := range doc.Values {
				want := fmt.Sprintf(`data-value="%s" data-line="%d"`, v.Name, v.Pos.Line())
				inRow := strings.Contains(rowOf[strconv.Itoa(v.Pos.Line())], fmt.Sprintf(`<div data-value="%s">`, v.Name))
				if !inRow && !strings.Contains(s, want) {
					t.Errorf("no result row for %s at line %d", v.Name, v.Pos.Line())
				}
			}
			// the caution, the stamp, the embedded source, no script, no outside resource
			for _, want := range []string{Caution[:40], "Traceability", `id="calcdoc-source"`, "page \" counter(page) \" of \" counter(pages)"} {
				if !strings.Contains(s, want) {
					t.Errorf("sheet lacks %q", want)
				}
			}
			for _, bad := range []string{"<script", "http://", "https://", "<link", "<img", "@import"} {
				if strings.Contains(s, bad) {
					t.Errorf("sheet holds %q", bad)
				}
			}
		})
	}
}

// The MathML of every math element must be well-formed XML.
func TestMathWellFormed(t *testing.T) {
	mathRE := regexp.MustCompile(`(?s)<math.*?</math>`)
	for _, name := range goldenExamples {
		_, html := buildExample(t, name)
		for _, m := range mathRE.FindAll(html, -1) {
			d := xml.NewDecoder(bytes.NewReader(m))
			d.Strict = true
			d.Entity = map[string]string{"lt": "<", "gt": ">", "amp": "&", "#34": "\"", "#39": "'"}
			for {
				_, err := d.Token()
				if err != nil {
					if err.Error() != "EOF" {
						t.Errorf("%s: bad MathML %v in %s", name, err, m)
					}
					break
				}
			}
		}
	}
}

func TestEscaping(t *testing.T) {
	src := "---\ntitle: <script>alert('t')</script>\nproject: \"<b>P</b>\"\n---\n\n<script>alert('prose')</script>\n\nText with <em onclick=\"x()\">inline html</em>.\n\n```calc\nx = 2 V   # <script>alert('desc')</script>\n# <script>note</script>\n```\n\n![a picture](http://example.invalid/x.png)\n"
	doc := calcdoc.Parse("esc.md", []byte(src), kind.Standard())
	out, err := Sheet(doc, Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	s := string(out)
	if strings.Contains(s, "<script") || strings.Contains(s, "<em onclick") || strings.Contains(s, "<b>P</b>") {
		t.Errorf("raw HTML passed through:\n%s", s)
	}
	for _, want := range []string{"&lt;script&gt;alert(&#39;t&#39;)&lt;/script&gt;", "&lt;script&gt;alert(&#39;prose&#39;)&lt;/script&gt;", "&lt;script&gt;alert(&#39;desc&#39;)&lt;/script&gt;", "&lt;b&gt;P&lt;/b&gt;", "&lt;script&gt;note&lt;/script&gt;"} {
		if !strings.Contains(s, want) {
			t.Errorf("sheet does not show %s as text", want)
		}
	}
	if strings.Contains(s, "http://example.invalid/x.png\"") || strings.Contains(s, "<img") {
		t.Errorf("image loaded from outside")
	}
}

func TestErrorsInPlace(t *testing.T) {
	src := "```calc\na = 1 ohms\nb = a * 2\nc = 3 V + 2 A\n```\n"
	doc := calcdoc.Parse("e.md", []byte(src), kind.Standard())
	out, _ := Sheet(doc, Options{Version: "test"})
	s := string(out)
	for _, want := range []string{
		`<span class="at">line 2, col 7:</span> unknown unit &#34;ohms&#34;`,
		"NOT EVALUATED</span> uses <var>a</var>",
		`<span class="at">line 4, col 9:</span> cannot add 3 V and 2 A`,
		"NOT FOR ISSUE: errors in the calculation",
		"2 errors: the sheet is incomplete.",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("sheet lacks %s", want)
		}
	}
}

// longDoc is a document of n statements in several sections, long enough
// to print on several pages.
func longDoc(n int) string {
	var b strings.Builder
	b.WriteString("---\ntitle: Print test\nnumber: PRT-E-900\nrevision: C\npaper: a4\n---\n\n# Print test\n\n```calc\nV_0 = 230 V\nZ_0 = (0.5 + j0.2) Ω\n")
	for i := 1; i <= n; i++ {
		fmt.Fprintf(&b, "I_%d = V_0 / (Z_0 * %d)   # branch %d\n", i, i, i)
		if i%40 == 0 {
			b.WriteString("```\n\nMore prose between blocks.\n\n```calc\n")
		}
	}
	b.WriteString("```\n")
	return b.String()
}

// A real browser prints a sheet of several pages; every page carries the
// document number and revision and "page N of M" (pdftotext as the outside
// reader).
func TestPrintedPages(t *testing.T) {
	pdftest.Chromium(t)
	pdftest.Pdftotext(t)
	src := []byte(longDoc(120))
	doc := calcdoc.Parse("print.md", src, kind.Standard())
	html, err := Sheet(doc, fixedOptions(src))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	hp := filepath.Join(dir, "print.html")
	if err := os.WriteFile(hp, html, 0o644); err != nil {
		t.Fatal(err)
	}
	pp := filepath.Join(dir, "print.pdf")
	ctx := context.Background()
	if err := pdf.Print(ctx, hp, pp); err != nil {
		t.Fatal(err)
	}
	pages, err := pdf.PDFText(ctx, pp)
	if err != nil {
		t.Fatal(err)
	}
	if len(pages) < 3 {
		t.Fatalf("want at least 3 pages, got %d", len(pages))
	}
	for i, p := range pages {
		if !strings.Contains(p, "PRT-E-900 rev C") {
			t.Errorf("page %d lacks the number and revision:\n%s", i+1, p)
		}
		if want := fmt.Sprintf("page %d of %d", i+1, len(pages)); !strings.Contains(p, want) {
			t.Errorf("page %d lacks %q", i+1, want)
		}
	}
	if !strings.Contains(strings.Join(pages, "\n"), "competent person") {
		t.Errorf("the caution is not printed")
	}
}
