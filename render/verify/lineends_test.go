package verify

import (
	"bytes"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
	"calcdoc/render/stamp"
)

// TestCRLFTwinSheets: a document saved with Windows line ends (CR LF) is
// the same calculation as its LF twin. For every shipped example (each
// kind of block among them) the CR LF copy gives the same values, checks
// and errors at the same lines and columns, the same values JSON, and a
// sheet whose bytes are the LF twin's except the embedded source and its
// SHA-256 (the source is carried byte for byte); and that sheet verifies.
// The two files are read from the examples' own folder, so that the
// tables they read from files resolve as they do for a user.
func TestCRLFTwinSheets(t *testing.T) {
	files, err := shippedExamples()
	if err != nil || len(files) == 0 {
		t.Fatalf("no examples found: %v", err)
	}
	for _, path := range files {
		t.Run(filepath.ToSlash(strings.TrimPrefix(path, filepath.Join("..", "..", "examples")+string(filepath.Separator))), func(t *testing.T) {
			raw, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			lf := bytes.ReplaceAll(raw, []byte("\r\n"), []byte("\n"))
			crlf := bytes.ReplaceAll(lf, []byte("\n"), []byte("\r\n"))
			a := calcdoc.Parse(path, lf, kind.Standard())
			b := calcdoc.Parse(path, crlf, kind.Standard())
			if ga, gb := facts(a), facts(b); ga != gb {
				t.Errorf("values, checks or errors differ:\nLF:\n%s\nCR LF:\n%s", ga, gb)
			}
			if !bytes.Equal(a.MarshalValues(), b.MarshalValues()) {
				t.Errorf("the values JSON differs")
			}
			pa := sheetOf(t, a)
			pb := sheetOf(t, b)
			ca, cb := withoutSource(t, pa, lf), withoutSource(t, pb, crlf)
			if ca != cb {
				i := 0
				for i < len(ca) && i < len(cb) && ca[i] == cb[i] {
					i++
				}
				t.Errorf("the sheets differ beyond the embedded source, first at byte %d: LF %q, CR LF %q",
					i, clip(ca[i:]), clip(cb[i:]))
			}
			rep, err := Verify(pb, "0.1.0")
			if err != nil {
				t.Fatal(err)
			}
			if !rep.OK() || rep.Sheets[0].SHA256 != stamp.Hash(crlf) {
				t.Errorf("the CR LF sheet does not verify: %v", rep.Sheets[0].Differences)
			}
		})
	}
}

func sheetOf(t *testing.T, doc *calcdoc.Document) []byte {
	t.Helper()
	page, err := render.Sheet(doc, render.Options{Version: "0.1.0", Stamp: verifyStamp(doc.Source), EmbedSource: true})
	if err != nil {
		t.Fatal(err)
	}
	return page
}

// facts lists a document's values, checks and errors with their positions.
func facts(d *calcdoc.Document) string {
	var b strings.Builder
	for _, v := range d.Values {
		fmt.Fprintf(&b, "value %s %d:%d %v\n", v.Name, v.Pos.Line(), v.Pos.Col(), v.Value)
	}
	for _, c := range d.Checks {
		pass := "unevaluated"
		if c.Result != nil {
			pass = fmt.Sprint(c.Result.Pass)
		}
		fmt.Fprintf(&b, "check %d:%d %s %s\n", c.Pos.Line(), c.Pos.Col(), c.Text, pass)
	}
	for _, e := range d.Errors {
		fmt.Fprintf(&b, "error %d:%d %s\n", e.Pos.Line(), e.Pos.Col(), e.Msg)
	}
	return b.String()
}

// withoutSource is the page with the embedded source's text cut out and
// the source's SHA-256 (and its 12-digit short form) replaced by a mark; the test fails if either is
// missing.
func withoutSource(t *testing.T, page, src []byte) string {
	t.Helper()
	s := string(page)
	open := `<pre hidden id="` + render.SourceID + `"`
	i := strings.Index(s, open)
	if i < 0 {
		t.Fatal("no embedded source")
	}
	j := strings.Index(s[i:], "</pre>")
	if j < 0 {
		t.Fatal("the embedded source is not closed")
	}
	s = s[:i] + "<source cut>" + s[i+j:]
	h := stamp.Hash(src)
	if !strings.Contains(s, h) {
		t.Fatal("the page does not show the source's SHA-256")
	}
	s = strings.ReplaceAll(s, h, "<sha256>")
	return strings.ReplaceAll(s, h[:12], "<sha256 short>") // the print footer's short form
}

func clip(s string) string {
	if len(s) > 120 {
		return s[:120]
	}
	return s
}

// TestSourceCandidates: a sheet records its source path as it was given
// on the system that built it; on a system whose separator is "/", a path
// written with Windows' "\" is also looked for with "/".
func TestSourceCandidates(t *testing.T) {
	sheet := filepath.Join("out", "a.html")
	got := sourceCandidates(`calc\a.md`, sheet, '/')
	want := []string{`calc\a.md`, filepath.Join("out", `calc\a.md`), filepath.Join("out", filepath.Base(`calc\a.md`)),
		"calc/a.md", filepath.Join("out", "calc", "a.md"), filepath.Join("out", "a.md")}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("separator /:\n got %q\nwant %q", got, want)
	}
	// Where "\" is the separator (Windows), the recorded path is tried as it is.
	if got := sourceCandidates(`calc\a.md`, "", '\\'); len(got) != 1 || got[0] != `calc\a.md` {
		t.Errorf("separator \\: %q", got)
	}
	if got := sourceCandidates("calc/a.md", "", '/'); len(got) != 1 {
		t.Errorf("a /-written path gets no other spelling: %q", got)
	}
}

// shippedExamples lists every .md file under examples/, in subfolders too
// (examples/plant/...), in lexical order; examples/data/README.md, which
// describes the data files and holds no block, is not an example.
func shippedExamples() ([]string, error) {
	var files []string
	err := filepath.WalkDir(filepath.Join("..", "..", "examples"), func(p string, d fs.DirEntry, err error) error {
		if err == nil && !d.IsDir() && strings.HasSuffix(p, ".md") && d.Name() != "README.md" {
			files = append(files, p)
		}
		return err
	})
	return files, err
}
