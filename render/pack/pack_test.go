package pack

import (
	"calcdoc/calcdoc/kind"
	"context"
	"fmt"
	htmlpkg "html"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/render"
	"calcdoc/render/internal/sheettest"
	"calcdoc/render/pdf"
	"calcdoc/render/pdf/pdftest"
	"calcdoc/render/stamp"
)

type pkgFile struct{ name, src string }

var pkgFiles = []pkgFile{
	{"heater.md", sheettest.HeaterDoc},
	{"drop.md", sheettest.DropDoc},
	{"long.md", sheettest.LongDoc(110)},
}

var pkgInfo = Info{TitleBlock: calcdoc.TitleBlock{Title: "Test works electrical calculations", Project: "Test works", Number: "TW-PKG-01", Revision: "A", Date: "2026-11-05",
	Revisions: []calcdoc.Revision{{Rev: "A", Date: "2026-11-05", By: "TS", Note: "Issued for review"}}}}

// buildPackage writes the files into dir and returns the package of their
// sheets, each stamped clean with a fixed commit.
func buildPackage(t *testing.T, dir string, files []pkgFile) ([]byte, []string) {
	t.Helper()
	var sheets []Sheet
	var paths []string
	for _, f := range files {
		p := filepath.Join(dir, f.name)
		sheettest.WriteFile(t, p, f.src)
		paths = append(paths, p)
		st := &render.StampInfo{SHA256: stamp.Hash([]byte(f.src)), Commit: "0123456789abcdef0123456789abcdef01234567",
			CommitDate: "2026-11-05T08:00:00Z", State: stamp.Clean, Detail: "source is as committed"}
		sheets = append(sheets, Sheet{Doc: calcdoc.Parse(f.name, []byte(f.src), kind.Standard()), Options: render.Options{Version: "test", Stamp: st, EmbedSource: true}})
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
		sum := sheettest.Sha256sum(t, paths[i])
		sums = append(sums, sum)
		row := fmt.Sprintf(`<tr data-sheet="%d" data-sha256="%s"><td>%d</td><td>%s</td><td>%s</td>`, i+1, sum, i+1, want.number, htmlpkg.EscapeString(want.title))
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
	if _, err := exec.LookPath("sh"); err != nil {
		t.Skip("the outside reference runs sh and sha256sum (coreutils); no sh here (Windows without Git's shell)")
	}
	cmd := exec.Command("sh", "-c", `printf '%s\n' "$@" | sha256sum`, "sh", sums[0], sums[1], sums[2])
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("printf | sha256sum: %v", err)
	}
	want := strings.Fields(string(out))[0]
	if got := Hash(sums); got != want {
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
	// the cover carries the caution every sheet carries (the project's
	// rule: results are checked by a competent person and follow the
	// local codes and licensed practice)
	coverStart := strings.Index(html, `<section class="cover"`)
	coverEnd := strings.Index(html[max(coverStart, 0):], "</section>")
	if coverStart < 0 || coverEnd < 0 || !strings.Contains(html[coverStart:coverStart+coverEnd], htmlpkg.EscapeString(render.Caution)) {
		t.Errorf("the cover lacks the caution %q", render.Caution)
	}
	// every id is unique: each sheet's ids carry its prefix
	seen := map[string]bool{}
	for _, m := range regexp.MustCompile(` id="([^"]*)"`).FindAllStringSubmatch(html, -1) {
		if seen[m[1]] {
			t.Errorf("id %q appears twice", m[1])
		}
		seen[m[1]] = true
	}
	// every link within the page leads to an element of the page (HTML:
	// a fragment "#X" names the element whose id is X)
	links := 0
	for _, m := range regexp.MustCompile(` href="#([^"]*)"`).FindAllStringSubmatch(html, -1) {
		links++
		if !seen[m[1]] {
			t.Errorf("the link #%s leads to no element", m[1])
		}
	}
	if links < len(paths) {
		t.Errorf("%d links within the package, want at least the contents' %d", links, len(paths))
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
	if got := Hash(nil); got != "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855" {
		t.Errorf("Hash(nil) = %s", got)
	}
	if _, err := Package(pkgInfo, nil, "test"); err == nil {
		t.Error("a package without sheets is accepted")
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
	sheettest.WriteFile(t, hp, string(page))
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
	var sheets []Sheet
	for _, f := range pkgFiles {
		st := &render.StampInfo{SHA256: stamp.Hash([]byte(f.src)), State: stamp.Clean}
		sheets = append(sheets, Sheet{Doc: calcdoc.Parse(f.name, []byte(f.src), kind.Standard()), Options: render.Options{Version: "test", Stamp: st, EmbedSource: true}})
	}
	page2, err := Package(info, sheets, "test")
	if err != nil {
		t.Fatal(err)
	}
	sheettest.WriteFile(t, hp, string(page2))
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
