package render

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render/pdf"
	"calcdoc/render/pdf/pdftest"
)

// The sheet's MathML is lean: a unit is <mi class="u">, a power factor's
// sense <mtext class="pfsense">, with the space and the upright style in
// the page's one stylesheet; <math> carries no display="inline" (the
// default) and no <mrow> around its content, and an <mrow> stands only
// where MathML Core layout needs one (see markup.group). These tests show
// in headless Chromium that none of it changes a pixel.
//
// testdata/leanml/NAME.before.html are the sheets of NAME.md as the
// writer before the lean markup wrote them (commit c38c832, with
// Options{Version: "test"}), kept as they were: they are never
// regenerated. sheet.md is our own scenario covering units, complex
// values, subscripts, powers of ten, long rows that wrap, checks, cases,
// matrices, a function, an error row, an equation set and a phasor
// diagram; phasors.md and sweep.md are copies of the examples
// compressor-pfc-phasors.md and harmonic-filter-sweep.md (pictures and a
// sweep's table).

// leanDocs are the documents of testdata/leanml.
var leanDocs = []string{"sheet", "phasors", "sweep"}

// leanSheet writes the sheet of testdata/leanml/NAME.md as the
// .before.html sheets were written.
func leanSheet(t *testing.T, name string) []byte {
	t.Helper()
	src, err := os.ReadFile(filepath.Join("testdata", "leanml", name+".md"))
	if err != nil {
		t.Fatal(err)
	}
	doc := calcdoc.Parse(name+".md", src, kind.Standard())
	html, err := Sheet(doc, Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	return html
}

// TestLeanMarkupRendersAsBefore compares, byte for byte, Chromium's
// screenshots of each sheet as the writer writes it now and as the writer
// before the lean markup wrote it.
func TestLeanMarkupRendersAsBefore(t *testing.T) {
	chrome := pdftest.Chromium(t)
	for _, name := range leanDocs {
		t.Run(name, func(t *testing.T) {
			now := leanSheet(t, name)
			before, err := os.ReadFile(filepath.Join("testdata", "leanml", name+".before.html"))
			if err != nil {
				t.Fatal(err)
			}
			// the two really are the two markups
			if bytes.Contains(now, []byte(`display="inline"`)) || bytes.Contains(now, []byte("<mspace")) || !bytes.Contains(before, []byte(`<mspace width="0.25em"/><mi mathvariant="normal">`)) {
				t.Fatal("the sheets are not the lean and the previous markup")
			}
			if len(now) >= len(before) {
				t.Errorf("the lean sheet has %d bytes, the previous one %d", len(now), len(before))
			}
			sameScreenshot(t, chrome, now, before)
		})
	}
}

// TestLeanClassesRenderAsAttributes compares the screenshots of each
// sheet and of the same sheet with the classes written back as the
// attributes they stand for (<mspace width="0.25em"/><mi
// mathvariant="normal"> for a unit, <mspace width="0.3em"/> before a
// sense, display="inline" and an <mrow> in every <math>) and their rules
// taken out of the stylesheet. Unlike the frozen sheets above, this
// follows the writer as it changes.
func TestLeanClassesRenderAsAttributes(t *testing.T) {
	chrome := pdftest.Chromium(t)
	for _, name := range leanDocs {
		t.Run(name, func(t *testing.T) {
			now := leanSheet(t, name)
			expanded := expandLeanClasses(t, now)
			sameScreenshot(t, chrome, now, expanded)
		})
	}
}

// expandLeanClasses writes a sheet's unit and sense classes back as
// attributes and elements, and every <math> with display="inline" and an
// <mrow> around its content, and drops the two rules of the classes.
func expandLeanClasses(t *testing.T, page []byte) []byte {
	t.Helper()
	rules := []string{
		"mi.u { text-transform: none; padding-left: 0.25em; }\n",
		"mtext.pfsense { padding-left: 0.3em; }\n",
	}
	s := string(page)
	for _, r := range rules {
		if !strings.Contains(s, r) {
			t.Fatalf("the stylesheet has no rule %q", r)
		}
		s = strings.Replace(s, r, "", 1)
	}
	n := strings.Count(s, `<mi class="u">`)
	if n == 0 {
		t.Fatal("the sheet shows no unit")
	}
	s = strings.NewReplacer(
		`<mi class="u">`, `<mspace width="0.25em"/><mi mathvariant="normal">`,
		`<mtext class="pfsense">`, `<mspace width="0.3em"/><mtext class="pfsense">`,
		"<math>", `<math display="inline"><mrow>`,
		"</math>", "</mrow></math>",
	).Replace(s)
	return []byte(s)
}

// sameScreenshot fails the test unless Chromium's screenshots of the two
// pages are the same bytes.
func sameScreenshot(t *testing.T, chrome string, a, b []byte) {
	t.Helper()
	dir := t.TempDir()
	pa := screenshot(t, chrome, dir, "a", a)
	pb := screenshot(t, chrome, dir, "b", b)
	if bytes.Equal(pa, pb) {
		return
	}
	msg := "the screenshots differ"
	ia, ea := png.Decode(bytes.NewReader(pa))
	ib, eb := png.Decode(bytes.NewReader(pb))
	if ea == nil && eb == nil {
		msg = firstDifference(ia, ib)
	}
	keep := filepath.Join(os.TempDir(), "calcdoc-leanml-"+strings.ReplaceAll(t.Name(), "/", "-"))
	if os.MkdirAll(keep, 0o755) == nil {
		_ = os.WriteFile(filepath.Join(keep, "a.html"), a, 0o644)
		_ = os.WriteFile(filepath.Join(keep, "b.html"), b, 0o644)
		_ = os.WriteFile(filepath.Join(keep, "a.png"), pa, 0o644)
		_ = os.WriteFile(filepath.Join(keep, "b.png"), pb, 0o644)
		msg += "; the pages and screenshots are in " + keep
	}
	t.Error(msg)
}

// firstDifference names the first row and column where two images differ.
func firstDifference(a, b image.Image) string {
	if a.Bounds() != b.Bounds() {
		return fmt.Sprintf("the screenshots differ in size: %v and %v", a.Bounds(), b.Bounds())
	}
	r := a.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			if a.At(x, y) != b.At(x, y) {
				return fmt.Sprintf("the screenshots differ first at x %d, y %d", x, y)
			}
		}
	}
	return "the screenshots' PNG bytes differ, not their pixels"
}

// shotWidth and shotHeight are the window of a screenshot: wider than the
// page's 200 mm body, and taller than the sheets of testdata/leanml.
const shotWidth, shotHeight = 900, 6000

// screenshot returns Chromium's PNG of page, written to dir as NAME.html.
// It fails the test if the page does not end inside the window: the last
// rows of the image must be the page's background.
func screenshot(t *testing.T, chrome, dir, name string, page []byte) []byte {
	t.Helper()
	htmlPath := filepath.Join(dir, name+".html")
	pngPath := filepath.Join(dir, name+".png")
	if err := os.WriteFile(htmlPath, page, 0o644); err != nil {
		t.Fatal(err)
	}
	profile := filepath.Join(dir, name+"-profile")
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, chrome,
		"--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars",
		"--force-device-scale-factor=1", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir="+profile,
		fmt.Sprintf("--window-size=%d,%d", shotWidth, shotHeight),
		"--screenshot="+pngPath,
		"file://"+filepath.ToSlash(htmlPath))
	cmd.Env = append(os.Environ(),
		"XDG_CONFIG_HOME="+filepath.Join(profile, "config"),
		"XDG_CACHE_HOME="+filepath.Join(profile, "cache"))
	cmd.WaitDelay = 5 * time.Second
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("chromium could not take the screenshot: %v\n%s", err, out)
	}
	img, err := os.ReadFile(pngPath)
	if err != nil {
		t.Fatalf("chromium wrote no screenshot: %v", err)
	}
	m, err := png.Decode(bytes.NewReader(img))
	if err != nil {
		t.Fatalf("the screenshot is no PNG: %v", err)
	}
	// the page ends inside the window: its last rows are all the page's
	// background (style.go: html { background: #f4f4f0 })
	r := m.Bounds()
	for y := r.Max.Y - 8; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			cr, cg, cb, _ := m.At(x, y).RGBA()
			if cr>>8 != 0xf4 || cg>>8 != 0xf4 || cb>>8 != 0xf0 {
				t.Fatalf("the page is taller than the %d px window (row %d is not the background): raise shotHeight", shotHeight, y)
			}
		}
	}
	return img
}

// TestLeanMarkupPrintsAsBefore prints the scenario sheet as the writer
// writes it now and as the writer before the lean markup wrote it to PDF
// (pdf.Print, print media: the sheet's @page rules and print styles) and
// compares every page, rasterised by poppler's pdftoppm, byte for byte.
func TestLeanMarkupPrintsAsBefore(t *testing.T) {
	pdftest.Chromium(t)
	pdftest.Pdftotext(t) // pdftoppm comes with it, in poppler-utils
	toppm, err := exec.LookPath("pdftoppm")
	if err != nil {
		if os.Getenv(pdftest.RequireEnv) == "1" {
			t.Fatalf("no pdftoppm (poppler-utils): %v", err)
		}
		t.Skipf("no pdftoppm (poppler-utils): %v", err)
	}
	before, err := os.ReadFile(filepath.Join("testdata", "leanml", "sheet.before.html"))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	pages := func(name string, page []byte) [][]byte {
		htmlPath := filepath.Join(dir, name+".html")
		pdfPath := filepath.Join(dir, name+".pdf")
		if err := os.WriteFile(htmlPath, page, 0o644); err != nil {
			t.Fatal(err)
		}
		if err := pdf.Print(context.Background(), htmlPath, pdfPath); err != nil {
			t.Fatal(err)
		}
		prefix := filepath.Join(dir, name)
		if out, err := exec.Command(toppm, "-r", "150", "-png", pdfPath, prefix).CombinedOutput(); err != nil {
			t.Fatalf("pdftoppm: %v\n%s", err, out)
		}
		files, _ := filepath.Glob(prefix + "-*.png")
		var out [][]byte
		for _, f := range files {
			b, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			out = append(out, b)
		}
		if len(out) == 0 {
			t.Fatalf("pdftoppm wrote no page of %s", pdfPath)
		}
		return out
	}
	now := pages("now", leanSheet(t, "sheet"))
	was := pages("before", before)
	if len(now) != len(was) {
		t.Fatalf("the sheet prints on %d pages, before on %d", len(now), len(was))
	}
	for i := range now {
		if !bytes.Equal(now[i], was[i]) {
			t.Errorf("printed page %d differs from the page the previous markup printed", i+1)
		}
	}
}
