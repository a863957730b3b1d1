package pdf_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"calcdoc/render/pdf"
	"calcdoc/render/pdf/pdftest"
)

// pages is the number of pages the test sheet has: each <section> after
// the first starts a new page by a forced break (CSS Fragmentation Level 3,
// "break-before: page"), and each holds far less than a page of text.
const pages = 3

// sheet is a sheet of three sections, with the page footer made by an
// @page margin box (CSS Paged Media Module Level 3, 5 "Page-Margin Boxes";
// counter(page) and counter(pages) are defined there in 4.1.1 and 4.1.2).
func sheet() string {
	var b strings.Builder
	b.WriteString(`<!doctype html>
<html><head><meta charset="utf-8"><title>DOC-001</title>
<style>
@page {
  size: A4;
  margin: 20mm;
  @bottom-right { content: "DOC-001 rev A, page " counter(page) " of " counter(pages); }
}
body { font: 11pt serif; }
section + section { break-before: page; }
</style></head><body>
`)
	for i := 1; i <= pages; i++ {
		fmt.Fprintf(&b, "<section><h1>Section %d</h1>\n", i)
		for j := 1; j <= 12; j++ {
			fmt.Fprintf(&b, "<p>Line %d.%d: the feeder current is checked against the breaker rating.</p>\n", i, j)
		}
		b.WriteString("</section>\n")
	}
	b.WriteString("</body></html>\n")
	return b.String()
}

func TestPrintPages(t *testing.T) {
	pdftest.Chromium(t)
	pdftest.Pdftotext(t)

	dir := t.TempDir()
	// Names with a space, '#' and a non-ASCII letter, which the file:// URL
	// must escape (RFC 8089, RFC 3986 2.1).
	htmlPath := filepath.Join(dir, "sheet #1 ü.html")
	if err := os.WriteFile(htmlPath, []byte(sheet()), 0o644); err != nil {
		t.Fatal(err)
	}
	outDir := filepath.Join(dir, "out put")
	if err := os.Mkdir(outDir, 0o755); err != nil {
		t.Fatal(err)
	}
	pdfPath := filepath.Join(outDir, "sheet 1.pdf")
	// An older file in the way is replaced.
	if err := os.WriteFile(pdfPath, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}

	ctx := context.Background()
	if err := pdf.Print(ctx, htmlPath, pdfPath); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(pdfPath)
	if err != nil {
		t.Fatal(err)
	}
	// ISO 32000-1, 7.5.2: a PDF file begins with the header "%PDF-".
	if !strings.HasPrefix(string(data), "%PDF-") {
		t.Fatalf("%s does not begin with %%PDF-: %q", pdfPath, data[:min(len(data), 16)])
	}
	// It keeps the permissions of the file it replaced, not the temporary
	// file's 0600.
	if fi, err := os.Stat(pdfPath); err != nil {
		t.Error(err)
	} else if fi.Mode().Perm() != 0o644 {
		t.Errorf("PDF mode %v, want -rw-r--r--", fi.Mode())
	}
	// Only the PDF is left in its folder: no temporary file.
	entries, err := os.ReadDir(outDir)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) != 1 || entries[0].Name() != "sheet 1.pdf" {
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("folder holds %q, want only sheet 1.pdf", names)
	}

	text, err := pdf.PDFText(ctx, pdfPath)
	if err != nil {
		t.Fatal(err)
	}
	if len(text) != pages {
		t.Fatalf("PDFText gave %d pages, want %d:\n%q", len(text), pages, text)
	}
	for i, page := range text {
		n := i + 1
		t.Run(fmt.Sprintf("page %d", n), func(t *testing.T) {
			// -layout may widen the gaps between words; compare words.
			words := strings.Join(strings.Fields(page), " ")
			footer := fmt.Sprintf("DOC-001 rev A, page %d of %d", n, pages)
			if !strings.Contains(words, footer) {
				t.Errorf("page %d lacks %q:\n%s", n, footer, page)
			}
			if got := strings.Count(words, "DOC-001 rev A, page "); got != 1 {
				t.Errorf("page %d shows the footer %d times, want once", n, got)
			}
			if want := fmt.Sprintf("Section %d", n); !strings.Contains(words, want) {
				t.Errorf("page %d lacks its heading %q", n, want)
			}
		})
	}

	t.Run("A4 paper", func(t *testing.T) {
		pdfinfo, err := exec.LookPath("pdfinfo")
		if err != nil {
			t.Skip("pdfinfo (poppler-utils) is missing; on Debian: apt-get install poppler-utils")
		}
		out, err := exec.Command(pdfinfo, "-f", "1", "-l", strconv.Itoa(pages), pdfPath).Output()
		if err != nil {
			t.Fatalf("pdfinfo: %v", err)
		}
		// ISO 216: A4 is 210 mm x 297 mm; PDF user space is 1/72 in
		// (ISO 32000-1, 8.3.2.3) and 1 in = 25.4 mm. Chromium lays pages
		// out in CSS px (1/96 in, CSS Values Level 4, 6.2), so a page may
		// be off by up to one px = 0.75 pt.
		wantW, wantH := 210/25.4*72, 297/25.4*72
		seen := 0
		for _, line := range strings.Split(string(out), "\n") {
			// "Page    1 size: 594.96 x 841.92 pts (A4)"
			if !strings.HasPrefix(line, "Page") || !strings.Contains(line, " size:") {
				continue
			}
			_, rest, _ := strings.Cut(line, "size:")
			var w, h float64
			if _, err := fmt.Sscanf(strings.TrimSpace(rest), "%g x %g", &w, &h); err != nil {
				t.Fatalf("cannot read %q: %v", line, err)
			}
			seen++
			if math.Abs(w-wantW) > 0.75 || math.Abs(h-wantH) > 0.75 {
				t.Errorf("%s: want %.2f x %.2f pt within 0.75 pt", line, wantW, wantH)
			}
		}
		if seen != pages {
			t.Errorf("pdfinfo gave the size of %d pages, want %d:\n%s", seen, pages, out)
		}
	})
}

func TestPrintErrors(t *testing.T) {
	pdftest.Chromium(t)
	dir := t.TempDir()
	good := filepath.Join(dir, "ok.html")
	if err := os.WriteFile(good, []byte("<p>x</p>"), 0o644); err != nil {
		t.Fatal(err)
	}
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	tests := []struct {
		name string
		ctx  context.Context
		html string
		pdf  string
		want string // the error must hold it
	}{
		{"missing HTML", context.Background(), filepath.Join(dir, "none.html"), filepath.Join(dir, "a.pdf"), "none.html"},
		{"HTML is a folder", context.Background(), dir, filepath.Join(dir, "a.pdf"), "not a regular file"},
		{"no PDF path", context.Background(), good, "", "no PDF path"},
		{"PDF path is a folder", context.Background(), good, dir, "is a folder"},
		{"missing PDF folder", context.Background(), good, filepath.Join(dir, "no", "a.pdf"), "folder"},
		{"cancelled", cancelled, good, filepath.Join(dir, "c.pdf"), "cancel"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := pdf.Print(tc.ctx, tc.html, tc.pdf)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("Print error = %v, want one mentioning %q", err, tc.want)
			}
		})
	}
	// No failure left a PDF or a temporary file behind.
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) != 1 {
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("folder holds %q, want only ok.html", names)
	}
}

func TestPrintTimeout(t *testing.T) {
	pdftest.Chromium(t)
	dir := t.TempDir()
	// Print's temporary profile goes under TMPDIR, so every process of this
	// Chromium names this folder in its command line (--user-data-dir=...,
	// --database=...).
	tmp := filepath.Join(dir, "t")
	if err := os.Mkdir(tmp, 0o755); err != nil {
		t.Fatal(err)
	}
	t.Setenv("TMPDIR", tmp)
	// A page whose script never ends never finishes loading, so Chromium
	// never prints it.
	htmlPath := filepath.Join(dir, "hang.html")
	if err := os.WriteFile(htmlPath, []byte("<p>x</p><script>for(;;){}</script>"), 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Second)
	defer cancel()
	err := pdf.Print(ctx, htmlPath, filepath.Join(dir, "hang.pdf"))
	if err == nil || !strings.Contains(err.Error(), "did not finish in time") {
		t.Fatalf("Print error = %v, want a timeout", err)
	}
	// Print moves Chromium's scratch folder into its profile only where the
	// socket path in it stays under 104 bytes (see Print); with a TMPDIR too
	// long for that, Chromium's own scratch folder may be left.
	checked := []string{dir, tmp}
	if len(tmp)+len("/calcdoc-cr-4294967295")+len("/org.chromium.Chromium.XXXXXX/SingletonSocket") >= 104 {
		t.Logf("TMPDIR %s is too long for the scratch folder to move; not checking that it is left empty", tmp)
		checked = checked[:1]
	}
	for _, d := range checked {
		entries, err := os.ReadDir(d)
		if err != nil {
			t.Fatal(err)
		}
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		want := map[string]int{dir: 2, tmp: 0}[d] // dir: hang.html and t
		if len(names) != want {
			t.Errorf("%s holds %q after the timeout, want %d entries", d, names, want)
		}
	}
	// No process of that Chromium is left running (a zombie has an empty
	// command line). Linux's /proc lists the processes.
	procs, err := filepath.Glob("/proc/[0-9]*/cmdline")
	if err != nil || len(procs) == 0 {
		t.Skip("no /proc to list processes")
	}
	for _, p := range procs {
		cmdline, err := os.ReadFile(p)
		if err == nil && strings.Contains(string(cmdline), tmp) {
			t.Errorf("%s still runs: %.200q", p, strings.ReplaceAll(string(cmdline), "\x00", " "))
		}
	}
}

func TestPDFTextErrors(t *testing.T) {
	pdftest.Pdftotext(t)
	dir := t.TempDir()
	notPDF := filepath.Join(dir, "not.pdf")
	if err := os.WriteFile(notPDF, []byte("plain text, not a PDF\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		path string
		want string
	}{
		{"missing file", filepath.Join(dir, "none.pdf"), "none.pdf"},
		{"not a PDF", notPDF, "pdftotext could not read"},
		{"a folder", dir, "not a regular file"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			pages, err := pdf.PDFText(context.Background(), tc.path)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("PDFText = %q, %v; want an error mentioning %q", pages, err, tc.want)
			}
		})
	}
}

func TestMissingTools(t *testing.T) {
	// With an empty PATH pdftotext cannot be found; the error says how to
	// install it (Debian's package of pdftotext is poppler-utils).
	t.Setenv("PATH", t.TempDir())
	_, err := pdf.PDFText(context.Background(), "x.pdf")
	if !errors.Is(err, pdf.ErrNoPdftotext) {
		t.Fatalf("PDFText with no pdftotext: %v, want ErrNoPdftotext", err)
	}
	if !strings.Contains(err.Error(), "apt-get install poppler-utils") {
		t.Errorf("error %q does not say how to install pdftotext", err)
	}
}
