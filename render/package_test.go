package render

import (
	"context"
	"fmt"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/calcdoc/stamp"
	"calcdoc/render/pdf"
	"calcdoc/render/pdf/pdftest"
)

const pkgDropDoc = `---
title: Yard lighting circuit, voltage drop
project: Test works
number: VD-E-002
revision: B
date: 2026-11-03
revisions:
  - {rev: A, date: 2026-10-20, by: TS, note: First issue}
  - {rev: B, date: 2026-11-03, by: TS, note: Route length measured on site}
---

# Lighting circuit L3

## Drop along the route

` + "```calc\nV_n = 230 V\nI_L = 12 A\nL = 85 m\nr = 7.41 mohm/m\ndV = 2 * I_L * r * L\ncheck dV / V_n <= 0.05\n```\n"

// pkgLongDoc is a document of n statements in several sections, long
// enough to print on several pages.
func pkgLongDoc(n int) string {
	var b strings.Builder
	b.WriteString("---\ntitle: Branch currents of a long feeder\nproject: Test works\nnumber: LNG-E-003\nrevision: C\ndate: 2026-11-04\n---\n\n# Branch currents\n\n```calc\nV_0 = 230 V\nZ_0 = (0.5 + j0.2) ohm\n")
	for i := 1; i <= n; i++ {
		fmt.Fprintf(&b, "I_%d = V_0 / (Z_0 * %d)   # branch %d\n", i, i, i)
		if i%40 == 0 {
			b.WriteString("```\n\n## Further branches\n\n```calc\n")
		}
	}
	b.WriteString("```\n")
	return b.String()
}

type pkgFile struct{ name, src string }

var pkgFiles = []pkgFile{
	{"heater.md", stampDoc},
	{"drop.md", pkgDropDoc},
	{"long.md", pkgLongDoc(110)},
}

var pkgInfo = PackageInfo{Title: "Test works electrical calculations", Project: "Test works", Number: "TW-PKG-01", Revision: "A", Date: "2026-11-05",
	Revisions: []calcdoc.Revision{{Rev: "A", Date: "2026-11-05", By: "TS", Note: "Issued for review"}}}

// buildPackage writes the files into dir and returns the package of their
// sheets, each stamped clean with a fixed commit.
func buildPackage(t *testing.T, dir string, files []pkgFile) ([]byte, []string) {
	t.Helper()
	var sheets []PackageSheet
	var paths []string
	for _, f := range files {
		p := filepath.Join(dir, f.name)
		writeFile(t, p, f.src)
		paths = append(paths, p)
		st := &StampInfo{SHA256: stamp.Hash([]byte(f.src)), Commit: "0123456789abcdef0123456789abcdef01234567",
			CommitDate: "2026-11-05T08:00:00Z", State: stamp.Clean, Detail: "source is as committed"}
		sheets = append(sheets, PackageSheet{Doc: calcdoc.Parse(f.name, []byte(f.src), kind.Standard()), Options: Options{Version: "test", Stamp: st, EmbedSource: true}})
	}
	page, err := Package(pkgInfo, sheets, "test")
	if err != nil {
		t.Fatal(err)
	}
	return page, paths
}

// The package's HTML holds each sheet's number, title and hash (the hash
// being sha256sum's of the file), and the package hash is what
// `printf '%s\n' H1 H2 H3 | sha256sum` prints (GNU coreutils).
func TestPackageHTML(t *testing.T) {
	dir := t.TempDir()
	page, paths := buildPackage(t, dir, pkgFiles)
	html := string(page)
	var sums []string
	for i, want := range []struct{ number, title string }{
		{"STP-E-001", "Stamp test, heater circuit"},
		{"VD-E-002", "Yard lighting circuit, voltage drop"},
		{"LNG-E-003", "Branch currents of a long feeder"},
	} {
		sum := coreutilsSHA256(t, paths[i])
		sums = append(sums, sum)
		row := fmt.Sprintf(`<tr data-sheet="%d" data-sha256="%s"><td>%d</td><td>%s</td><td>%s</td>`, i+1, sum, i+1, want.number, esc(want.title))
		if !strings.Contains(html, row) {
			t.Errorf("the cover lacks the row %s", row)
		}
		if !strings.Contains(html, fmt.Sprintf(`<section class="pkg-sheet" id="sheet-%d" data-sheet="%d">`, i+1, i+1)) {
			t.Errorf("no section for sheet %d", i+1)
		}
		if !strings.Contains(html, fmt.Sprintf(`<pre hidden id="s%d-calcdoc-source" data-path="%s" data-encoding="text" data-sha256="%s">`, i+1, filepath.Base(paths[i]), sum)) {
			t.Errorf("sheet %d does not carry its source", i+1)
		}
		if !strings.Contains(html, fmt.Sprintf(`<a href="#sheet-%d"><span class="cn">Sheet %d</span> %s`, i+1, i+1, want.number)) {
			t.Errorf("the contents lack sheet %d", i+1)
		}
	}
	// outside reference: coreutils over the printed list of hashes
	cmd := exec.Command("sh", "-c", `printf '%s\n' "$@" | sha256sum`, "sh", sums[0], sums[1], sums[2])
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("printf | sha256sum: %v", err)
	}
	want := strings.Fields(string(out))[0]
	if got := PackageHash(sums); got != want {
		t.Errorf("PackageHash %s, sha256sum %s", got, want)
	}
	if !strings.Contains(html, `data-package-sha256="`+want+`"`) || !strings.Contains(html, `<code class="hash">`+want+`</code>`) {
		t.Errorf("the cover lacks the package hash %s", want)
	}
	// the cover summarises every sheet's revision history
	for _, row := range []string{
		"<tr><td>2</td><td>VD-E-002</td><td>A</td><td>2026-10-20</td><td>TS</td><td>First issue</td></tr>",
		"<tr><td>2</td><td>VD-E-002</td><td>B</td><td>2026-11-03</td><td>TS</td><td>Route length measured on site</td></tr>",
		"<tr><td>1</td><td>STP-E-001</td><td>A</td><td>2026-11-02</td><td>—</td><td>no revision history given</td></tr>",
		"<tr><td>A</td><td>2026-11-05</td><td>TS</td><td>Issued for review</td></tr>",
	} {
		if !strings.Contains(html, row) {
			t.Errorf("the cover lacks the revision row %s", row)
		}
	}
	// every id is unique: each sheet's ids carry its prefix
	seen := map[string]bool{}
	for _, m := range regexp.MustCompile(` id="([^"]*)"`).FindAllStringSubmatch(html, -1) {
		if seen[m[1]] {
			t.Errorf("id %q appears twice", m[1])
		}
		seen[m[1]] = true
	}
	if strings.Count(html, "<style>") != 1 {
		t.Errorf("the package has %d style elements, want one", strings.Count(html, "<style>"))
	}
	if strings.Contains(html, `<div class="marker"`) && !strings.Contains(html, `<div class="marker" aria-hidden="true"><span>NOT FOR ISSUE: sheet 2`) {
		t.Errorf("a marker on a package whose sheets are clean, except the failing check of sheet 2")
	}
}

// The SHA-256 of no bytes (NIST CAVP, SHA256ShortMsg, Len = 0) is the
// hash of an empty package.
func TestPackageHashEmpty(t *testing.T) {
	if got := PackageHash(nil); got != "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855" {
		t.Errorf("PackageHash(nil) = %s", got)
	}
	if _, err := Package(pkgInfo, nil, "test"); err == nil {
		t.Error("a package without sheets is accepted")
	}
}

// Every sheet of a package verifies from the package's HTML alone; an
// edited value, or a hash edited on the cover, is named.
func TestVerifyPackage(t *testing.T) {
	page, _ := buildPackage(t, t.TempDir(), pkgFiles)
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
			return replaceAfter(t, p, `data-value="dV" data-line="21">`, "<mn>15.12</mn>", "<mn>15.21</mn>")
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
			rep, err := Verify([]byte(c.edit(t, string(page))), "test", kind.Standard())
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

var (
	pageNoRE  = regexp.MustCompile(`page (\d+) of (\d+)`)
	sheetNoRE = regexp.MustCompile(`sheet (\d+) of (\d+), page (\d+)`)
)

// A package printed by a real Chromium: the cover and every sheet are in
// the PDF, pdftotext (the outside reader) shows each sheet's number, the
// package page numbers run on across the sheets, and each sheet's pages
// are numbered from 1 within it.
func TestPackagePDF(t *testing.T) {
	pdftest.Chromium(t)
	pdftest.Pdftotext(t)
	dir := t.TempDir()
	page, _ := buildPackage(t, dir, pkgFiles)
	hp := filepath.Join(dir, "package.html")
	writeFile(t, hp, string(page))
	pp := filepath.Join(dir, "package.pdf")
	ctx := context.Background()
	if err := pdf.Print(ctx, hp, pp); err != nil {
		t.Fatal(err)
	}
	pages, err := pdf.PDFText(ctx, pp)
	if err != nil {
		t.Fatal(err)
	}
	if len(pages) < 6 {
		t.Fatalf("%d pages; want a cover, contents and at least four pages of sheets", len(pages))
	}
	if p := pages[0]; !strings.Contains(p, "Test works electrical calculations") || !strings.Contains(p, "Sheets in this package") ||
		!strings.Contains(p, "cover and contents") {
		t.Errorf("page 1 is not the cover:\n%s", p)
	}
	numbers := []string{"STP-E-001", "VD-E-002", "LNG-E-003"}
	all := strings.Join(pages, "\f")
	for _, n := range numbers {
		if !strings.Contains(all, n) {
			t.Errorf("pdftotext does not show %s", n)
		}
	}
	lastSheet, lastPage := 0, 0
	var firstPages []int
	for i, p := range pages {
		m := pageNoRE.FindAllStringSubmatch(p, -1)
		want := fmt.Sprintf("page %d of %d", i+1, len(pages))
		found := false
		for _, x := range m {
			found = found || x[0] == want
		}
		if !found {
			t.Errorf("page %d lacks %q:\n%s", i+1, want, p)
		}
		s := sheetNoRE.FindStringSubmatch(p)
		if s == nil {
			if lastSheet != 0 {
				t.Errorf("page %d, after sheet %d began, has no sheet header", i+1, lastSheet)
			}
			continue
		}
		k, _ := strconv.Atoi(s[1])
		j, _ := strconv.Atoi(s[3])
		if s[2] != "3" {
			t.Errorf("page %d: %q", i+1, s[0])
		}
		switch {
		case k == lastSheet && j == lastPage+1:
		case k == lastSheet+1 && j == 1:
			firstPages = append(firstPages, i+1)
			// a sheet starts on a new page, which shows its number
			if !strings.Contains(p, numbers[k-1]) {
				t.Errorf("the first page of sheet %d lacks %s:\n%s", k, numbers[k-1], p)
			}
		default:
			t.Errorf("page %d says %q after sheet %d page %d", i+1, s[0], lastSheet, lastPage)
		}
		lastSheet, lastPage = k, j
	}
	if lastSheet != 3 {
		t.Errorf("the last sheet printed is %d, want 3", lastSheet)
	}
	// the embedded sources are inert: none of their text is printed
	if strings.Contains(all, "```calc") || strings.Contains(all, "# branch 7") {
		t.Errorf("an embedded source is printed")
	}
	// the long sheet runs over more than one page
	if !strings.Contains(all, "sheet 3 of 3, page 2") {
		t.Errorf("sheet 3 did not run to a second page")
	}

	// the first pages found from the text give the contents its page
	// numbers, and printing again with them moves no page
	starts, ok := SheetStartPages(pages, 3)
	if !ok || fmt.Sprint(starts) != fmt.Sprint(firstPages) {
		t.Fatalf("SheetStartPages %v %v, the headers say %v", starts, ok, firstPages)
	}
	info := pkgInfo
	info.StartPages = starts
	var sheets []PackageSheet
	for _, f := range pkgFiles {
		st := &StampInfo{SHA256: stamp.Hash([]byte(f.src)), State: stamp.Clean}
		sheets = append(sheets, PackageSheet{Doc: calcdoc.Parse(f.name, []byte(f.src), kind.Standard()), Options: Options{Version: "test", Stamp: st, EmbedSource: true}})
	}
	page2, err := Package(info, sheets, "test")
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, hp, string(page2))
	if err := pdf.Print(ctx, hp, pp); err != nil {
		t.Fatal(err)
	}
	pages2, err := pdf.PDFText(ctx, pp)
	if err != nil {
		t.Fatal(err)
	}
	if again, ok := SheetStartPages(pages2, 3); len(pages2) != len(pages) || !ok || fmt.Sprint(again) != fmt.Sprint(starts) {
		t.Errorf("with page numbers in the contents: %d pages, starts %v; before: %d pages, starts %v", len(pages2), again, len(pages), starts)
	}
	contentsPage := pages2[starts[0]-2] // the page before the first sheet
	for k, n := range numbers {
		re := regexp.MustCompile(fmt.Sprintf(`Sheet %d\s+%s rev \S+: .*page %d\n`, k+1, n, starts[k]))
		if !re.MatchString(contentsPage) {
			t.Errorf("the contents do not give sheet %d page %d:\n%s", k+1, starts[k], contentsPage)
		}
	}
}

func TestSheetStartPages(t *testing.T) {
	for _, c := range []struct {
		name  string
		pages []string
		n     int
		want  []int
	}{
		{"in order", []string{"cover", "contents", "sheet 1 of 2, page 1", "sheet 1 of 2, page 2", "sheet 2 of 2, page 1"}, 2, []int{3, 5}},
		{"page 10 is not page 1", []string{"sheet 1 of 2, page 1", "sheet 1 of 2, page 10", "sheet 2 of 2, page 1"}, 2, []int{1, 3}},
		{"a sheet missing", []string{"sheet 1 of 2, page 1"}, 2, nil},
		{"another package's count", []string{"sheet 1 of 3, page 1", "sheet 2 of 3, page 1"}, 2, nil},
		{"out of order", []string{"sheet 2 of 2, page 1", "sheet 1 of 2, page 1"}, 2, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, ok := SheetStartPages(c.pages, c.n)
			if ok != (c.want != nil) || fmt.Sprint(got) != fmt.Sprint(c.want) && c.want != nil {
				t.Errorf("got %v %v, want %v", got, ok, c.want)
			}
		})
	}
}
