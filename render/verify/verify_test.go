package verify

import (
	"calcdoc/calcdoc/kind"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/render"
	"calcdoc/render/internal/sheettest"
	"calcdoc/render/pack"
	"calcdoc/render/stamp"
)

// verifyStamp is a stamp as stamp.Of gives it for a file outside any
// repository, with a detail that needs escaping in an attribute.
func verifyStamp(src []byte) *render.StampInfo {
	return &render.StampInfo{SHA256: stamp.Hash(src), Commit: "89abcdef0123456789abcdef0123456789abcdef", CommitDate: "2026-11-02T09:30:00+01:00",
		State: stamp.Modified, Detail: `source differs from its last commit 89abcdef0123 of 2026-11-02T09:30:00+01:00: uncommitted changes & "quotes" <kept>`}
}

func verifySheet(t *testing.T, path, src, version string) []byte {
	t.Helper()
	doc := calcdoc.Parse(path, []byte(src), kind.Standard())
	page, err := render.Sheet(doc, render.Options{Version: version, Stamp: verifyStamp([]byte(src)), EmbedSource: true})
	if err != nil {
		t.Fatal(err)
	}
	return page
}

// replaceAfter replaces the first old after the first mark in s; the test
// fails when either is missing.
func replaceAfter(t *testing.T, s, mark, old, new string) string {
	t.Helper()
	i := strings.Index(s, mark)
	if i < 0 {
		t.Fatalf("no %q in the page", mark)
	}
	j := strings.Index(s[i:], old)
	if j < 0 {
		t.Fatalf("no %q after %q", old, mark)
	}
	j += i
	return s[:j] + new + s[j+len(old):]
}

// In sheettest.HeaterDoc (stamp_test.go), P = V²/R = (230 V)²/26.45 Ω = 52 900/26.45 W
// = 2000 W exactly (Joule's law, common practice), on line 11; the check
// P <= 2.1 kW is on line 12.
func TestVerifySheet(t *testing.T) {
	cases := []struct {
		name  string
		edit  func(t *testing.T, page string) string
		match bool
		kinds []string // the kinds of difference expected, in order
		say   []string // what the messages must say
	}{
		{"untouched", func(t *testing.T, p string) string { return p }, true, nil, nil},
		{"one number of a result edited",
			func(t *testing.T, p string) string {
				return replaceAfter(t, p, `data-value="P">`, "<mn>2.000</mn>", "<mn>2.100</mn>")
			},
			false, []string{"value"}, []string{"value P (line 11): sheet shows 2.100 kW, source gives 2.000 kW"}},
		{"a check's substitution edited",
			func(t *testing.T, p string) string {
				return replaceAfter(t, p, `data-check="12">`, "<mn>2.100</mn>", "<mn>2.500</mn>")
			},
			false, []string{"check"}, []string{"check (line 12): sheet shows 2.000 kW≤2.500 kW satisfied", "source gives 2.000 kW≤2.100 kW satisfied"}},
		{"the embedded source edited",
			func(t *testing.T, p string) string {
				return replaceAfter(t, p, `<pre hidden id="calcdoc-source"`, "R = 26.45 ohm", "R = 25.00 ohm")
			},
			// 230²/25 W = 2116 W
			false, []string{"hash", "value", "value", "check"}, []string{"hash: the embedded source's SHA-256 is", "value R (line 10): sheet shows 26.45 ohm, source gives 25.00 ohm", "source gives 2.116 kW"}},
		{"the stamp's hash edited",
			func(t *testing.T, p string) string {
				return replaceAfter(t, p, `<section class="stamp" data-sha256="`, `data-sha256="`, `data-sha256="0`)
			},
			// the page foot, in the head's style, shows the stamped hash
			false, []string{"hash", "text"}, []string{"but the sheet's stamp states 0", "in <head> > <style>"}},
		{"the stamp's hash cut short",
			func(t *testing.T, p string) string {
				i := strings.Index(p, `<section class="stamp" data-sha256="`) + len(`<section class="stamp" data-sha256="`)
				return p[:i] + "abc" + p[i+64:]
			},
			false, []string{"hash", "text"}, []string{"but the sheet's stamp states abc", "in <head> > <style>"}},
		{"the stamp's commit edited",
			func(t *testing.T, p string) string {
				return replaceAfter(t, p, `<section class="stamp"`, `data-commit="89ab`, `data-commit="99ab`)
			},
			false, []string{"text"}, []string{"text: first difference at line", "99abcdef"}},
		{"the title edited",
			func(t *testing.T, p string) string {
				return replaceAfter(t, p, `<span class="val title">`, "heater circuit", "heater circuits")
			},
			false, []string{"text"}, []string{"heater circuits"}},
	}
	orig := verifySheet(t, "calc/heater.md", sheettest.HeaterDoc, "0.1.0")
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			page := c.edit(t, string(orig))
			rep, err := Verify([]byte(page), "0.1.0")
			if err != nil {
				t.Fatal(err)
			}
			if rep.Package || len(rep.Sheets) != 1 {
				t.Fatalf("want one standalone sheet, got package=%v with %d sheets", rep.Package, len(rep.Sheets))
			}
			s := rep.Sheets[0]
			if rep.OK() != c.match || s.Match != c.match {
				t.Fatalf("OK %v, Match %v, want %v; differences: %v", rep.OK(), s.Match, c.match, s.Differences)
			}
			var kinds []string
			var all []string
			for _, d := range s.Differences {
				kinds = append(kinds, d.Kind)
				all = append(all, d.Message)
			}
			if strings.Join(kinds, ",") != strings.Join(c.kinds, ",") {
				t.Errorf("differences of kinds %v, want %v:\n%s", kinds, c.kinds, strings.Join(all, "\n"))
			}
			for _, want := range c.say {
				if !strings.Contains(strings.Join(all, "\n"), want) {
					t.Errorf("no difference says %q:\n%s", want, strings.Join(all, "\n"))
				}
			}
			if s.Path != "calc/heater.md" || s.SheetVersion != "0.1.0" {
				t.Errorf("path %q, version %q", s.Path, s.SheetVersion)
			}
		})
	}
}

// A value row that names one value of several, and the text line of a
// difference, are read back as they are on the page.
func TestVerifyNamesValueAndLine(t *testing.T) {
	page := string(verifySheet(t, "heater.md", sheettest.HeaterDoc, "0.1.0"))
	edited := replaceAfter(t, page, `data-value="R">`, "<mn>26.45</mn>", "<mn>26.54</mn>")
	rep, err := Verify([]byte(edited), "0.1.0")
	if err != nil {
		t.Fatal(err)
	}
	d := rep.Sheets[0].Differences
	if len(d) != 1 || d[0].Kind != "value" || d[0].Name != "R" || d[0].Line != 10 {
		t.Fatalf("differences %+v", d)
	}
	// a literal is shown in the unit it is written in
	if d[0].Sheet != "=26.54 ohm" || d[0].Source != "=26.45 ohm" {
		t.Errorf("sheet text %q, source text %q", d[0].Sheet, d[0].Source)
	}

	// the text difference names the line of the HTML file
	lines := strings.Split(page, "\n")
	want := -1
	for i, l := range lines {
		if strings.Contains(l, `<span class="val title">`) {
			want = i + 1
			break
		}
	}
	rep, err = Verify([]byte(strings.Replace(page, "Stamp test, heater circuit</span>", "Stamp test, heater circuit!</span>", 1)), "0.1.0")
	if err != nil {
		t.Fatal(err)
	}
	d = rep.Sheets[0].Differences
	if len(d) != 1 || d[0].Kind != "text" || d[0].Line != want {
		t.Fatalf("differences %+v, want one text difference at line %d", d, want)
	}
}

// A source that is not UTF-8 is carried as base64 and recovered byte for
// byte: its hash is sha256sum's of the file (GNU coreutils).
func TestVerifyBase64Source(t *testing.T) {
	src := strings.Replace(sheettest.HeaterDoc, "heater circuit", "heater \xff circuit", 1)
	p := filepath.Join(t.TempDir(), "latin.md")
	sheettest.WriteFile(t, p, src)
	page := verifySheet(t, "latin.md", src, "0.1.0")
	if !strings.Contains(string(page), `data-encoding="base64"`) {
		t.Fatal("the source is not carried as base64")
	}
	rep, err := Verify(page, "0.1.0")
	if err != nil {
		t.Fatal(err)
	}
	if !rep.OK() {
		t.Fatalf("does not verify: %v", rep.Sheets[0].Differences)
	}
	if got, want := rep.Sheets[0].SHA256, sheettest.Sha256sum(t, p); got != want {
		t.Errorf("recovered hash %s, sha256sum says %s", got, want)
	}
	// a damaged base64 body is named, not a panic
	bad := strings.Replace(string(page), `data-encoding="base64" `, `data-encoding="base64" `, 1)
	i := strings.Index(bad, `data-encoding="base64"`)
	j := i + strings.Index(bad[i:], ">") + 1
	bad = bad[:j] + "!!" + bad[j:]
	rep, err = Verify([]byte(bad), "0.1.0")
	if err != nil {
		t.Fatal(err)
	}
	if rep.OK() || !strings.Contains(rep.Sheets[0].Differences[0].Message, "not valid base64") {
		t.Errorf("damaged base64: %v", rep.Sheets[0].Differences)
	}
}

// A sheet built by another version fails, naming that version, even when
// this version would write the same bytes.
func TestVerifyOtherVersion(t *testing.T) {
	page := verifySheet(t, "heater.md", sheettest.HeaterDoc, "0.0.9")
	rep, err := Verify(page, "0.1.0")
	if err != nil {
		t.Fatal(err)
	}
	s := rep.Sheets[0]
	if rep.OK() || s.Match || len(s.Differences) != 1 || s.Differences[0].Kind != "version" ||
		!strings.Contains(s.Differences[0].Message, "built by calcdoc 0.0.9; this is calcdoc 0.1.0") ||
		!strings.Contains(s.Differences[0].Message, "verify it with calcdoc 0.0.9") {
		t.Fatalf("another version: OK %v, %v", rep.OK(), s.Differences)
	}
	same := verifySheet(t, "heater.md", sheettest.HeaterDoc, "0.1.0")
	if rep, _ = Verify(same, "0.1.0"); !rep.OK() {
		t.Errorf("same version: %v", rep.Sheets[0].Differences)
	}
}

func TestVerifyNotASheet(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "..", "examples", "motor-pfc.md"))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		page string
	}{
		{"empty", ""},
		{"plain html", "<!DOCTYPE html><html><body><p>hello</p></body></html>"},
		{"markdown source", string(src)},
		{"sheet without embedded source", func() string {
			doc := calcdoc.Parse("a.md", []byte(sheettest.HeaterDoc), kind.Standard())
			p, _ := render.Sheet(doc, render.Options{Version: "t", Stamp: verifyStamp([]byte(sheettest.HeaterDoc))})
			return string(p)
		}()},
	} {
		t.Run(c.name, func(t *testing.T) {
			rep, err := Verify([]byte(c.page), "0.1.0")
			if !errors.Is(err, ErrNotSheet) || rep != nil {
				t.Errorf("got %v, %v; want ErrNotSheet", rep, err)
			}
		})
	}
}

func TestPlainText(t *testing.T) {
	for _, c := range []struct{ name, in, want string }{
		{"scalar with unit", `<math><mo>=</mo><mn>119.3</mn><mo>∠</mo><mn>−16.26</mn><mo>°</mo><mi class="u">A</mi></math>`, "=119.3∠−16.26° A"},
		{"power factor with its sense", `<math><mo>=</mo><mn>0.8000</mn><mtext class="pfsense">lagging</mtext></math>`, "=0.8000 lagging"},
		{"matrix rows", `<mtable><mtr><mtd><mn>1</mn></mtd><mtd><mn>2</mn></mtd></mtr><mtr><mtd><mn>3</mn></mtd><mtd><mn>4</mn></mtd></mtr></mtable>`, "1 2 ; 3 4"},
		{"entities", `<span>a &lt; b &amp; c</span>`, "a < b & c"},
		// WHATWG HTML, tokenization, "tag open state": a "<" not followed
		// by a letter, "/" or "!" is text
		{"a less-than sign that opens no tag", "a< >b<>c", "a< >b<>c"},
		{"an unclosed tag", "a<mn", "a"},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := plainText([]byte(c.in)); got != c.want {
				t.Errorf("got %q, want %q", got, c.want)
			}
		})
	}
}

// Verify never panics on a damaged page, and a report that is OK has every
// sheet matching with no difference.
func FuzzVerify(f *testing.F) {
	f.Add(verifySheetBytes(sheettest.HeaterDoc))
	f.Add(verifySheetBytes(strings.Replace(sheettest.HeaterDoc, "heater", "h\xffeater", 1)))
	var sheets []pack.Sheet
	for _, src := range []string{sheettest.HeaterDoc, sheettest.DropDoc} {
		sheets = append(sheets, pack.Sheet{Doc: calcdoc.Parse("p.md", []byte(src), kind.Standard()), Options: render.Options{Version: "f", Stamp: verifyStamp([]byte(src)), EmbedSource: true}})
	}
	if page, err := pack.Package(pkgInfo, sheets, "f"); err == nil {
		f.Add(page)
	}
	f.Fuzz(func(t *testing.T, page []byte) {
		rep, err := Verify(page, "f")
		if err != nil {
			if !errors.Is(err, ErrNotSheet) || rep != nil {
				t.Fatalf("%v, %v", rep, err)
			}
			return
		}
		if rep.OK() {
			for _, s := range rep.Sheets {
				if !s.Match || len(s.Differences) > 0 {
					t.Fatalf("OK with sheet %d: %v", s.Index, s.Differences)
				}
			}
		}
	})
}

func verifySheetBytes(src string) []byte {
	doc := calcdoc.Parse("f.md", []byte(src), kind.Standard())
	page, _ := render.Sheet(doc, render.Options{Version: "f", Stamp: verifyStamp([]byte(src)), EmbedSource: true})
	return page
}

// Every sheet of a package verifies from the package's HTML alone; an
// edited value, or a hash edited on the cover, is named.
func TestVerifyPackage(t *testing.T) {
	page := buildPackage(t, pkgFiles)
	cases := []struct {
		name     string
		edit     func(t *testing.T, p string) string
		badSheet int    // the sheet that must not match, 0 for none
		say      string // what a difference must say
		cover    bool   // a cover difference is expected
	}{
		{"untouched", func(t *testing.T, p string) string { return p }, 0, "", false},
		{"a value of sheet 2 edited", func(t *testing.T, p string) string {
			// dV = 2·12 A·7.41 mΩ/m·85 m = 15.12 V (Ohm's law, common practice), line 21
			return replaceAfter(t, p, `data-value="dV">`, "<mn>15.12</mn>", "<mn>15.21</mn>")
		}, 2, "value dV (line 21): sheet shows 15.21 V, source gives 15.12 V", false},
		{"the source of sheet 3 edited", func(t *testing.T, p string) string {
			return replaceAfter(t, p, `<pre hidden id="s3-calcdoc-source"`, "V_0 = 230 V", "V_0 = 240 V")
		}, 3, "hash: the embedded source's SHA-256", true},
		{"a hash on the cover edited", func(t *testing.T, p string) string {
			return replaceAfter(t, p, `<tr data-sheet="1" data-sha256="`, `data-sha256="`, `data-sha256="f`)
		}, 0, "hash: the cover lists sheet 1 with SHA-256 f", true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rep, err := Verify([]byte(c.edit(t, string(page))), "test")
			if err != nil {
				t.Fatal(err)
			}
			if !rep.Package || len(rep.Sheets) != 3 {
				t.Fatalf("package %v with %d sheets", rep.Package, len(rep.Sheets))
			}
			var msgs []string
			for _, d := range rep.PackageDifferences {
				msgs = append(msgs, "cover: "+d.Message)
			}
			for _, s := range rep.Sheets {
				if s.Match != (s.Index != c.badSheet) {
					t.Errorf("sheet %d: match %v", s.Index, s.Match)
				}
				for _, d := range s.Differences {
					msgs = append(msgs, fmt.Sprintf("sheet %d: %s", s.Index, d.Message))
				}
			}
			all := strings.Join(msgs, "\n")
			if rep.OK() != (c.badSheet == 0 && !c.cover) {
				t.Errorf("OK %v:\n%s", rep.OK(), all)
			}
			if (len(rep.PackageDifferences) > 0) != c.cover {
				t.Errorf("cover differences: %v", rep.PackageDifferences)
			}
			if !strings.Contains(all, c.say) {
				t.Errorf("no difference says %q:\n%s", c.say, all)
			}
		})
	}
}

type pkgFile struct{ name, src string }

var pkgFiles = []pkgFile{
	{"heater.md", sheettest.HeaterDoc},
	{"drop.md", sheettest.DropDoc},
	{"long.md", sheettest.LongDoc(110)},
}

var pkgInfo = pack.Info{TitleBlock: calcdoc.TitleBlock{Title: "Test works electrical calculations", Project: "Test works", Number: "TW-PKG-01", Revision: "A", Date: "2026-11-05",
	Revisions: []calcdoc.Revision{{Rev: "A", Date: "2026-11-05", By: "TS", Note: "Issued for review"}}}}

// buildPackage returns the package of the files' sheets, each stamped
// clean with a fixed commit.
func buildPackage(t *testing.T, files []pkgFile) []byte {
	t.Helper()
	var sheets []pack.Sheet
	for _, f := range files {
		st := &render.StampInfo{SHA256: stamp.Hash([]byte(f.src)), Commit: "0123456789abcdef0123456789abcdef01234567",
			CommitDate: "2026-11-05T08:00:00Z", State: stamp.Clean, Detail: "source is as committed"}
		sheets = append(sheets, pack.Sheet{Doc: calcdoc.Parse(f.name, []byte(f.src), kind.Standard()), Options: render.Options{Version: "test", Stamp: st, EmbedSource: true}})
	}
	page, err := pack.Package(pkgInfo, sheets, "test")
	if err != nil {
		t.Fatal(err)
	}
	return page
}

// A source whose lines end in CR LF, or in a lone CR, is carried byte for
// byte: the sheet verifies, and the hash is that of the bytes as given
// (the HTML tokenizer turns CR LF into LF in the text it returns, so the
// source must be read from the raw bytes).
func TestVerifyLineEnds(t *testing.T) {
	for name, src := range map[string]string{
		"crlf":    strings.ReplaceAll(sheettest.HeaterDoc, "\n", "\r\n"),
		"lone cr": strings.Replace(sheettest.HeaterDoc, "# heater", "\r", 1) + "Note.\rEnd.\n",
	} {
		t.Run(name, func(t *testing.T) {
			page := verifySheet(t, "heater.md", src, "0.1.0")
			rep, err := Verify(page, "0.1.0")
			if err != nil {
				t.Fatal(err)
			}
			if !rep.OK() || rep.Sheets[0].SHA256 != stamp.Hash([]byte(src)) {
				t.Errorf("OK %v, hash %s, differences %v", rep.OK(), rep.Sheets[0].SHA256, rep.Sheets[0].Differences)
			}
		})
	}
}
