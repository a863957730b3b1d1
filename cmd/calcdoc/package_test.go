package main

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"calcdoc/render/pdf"
	"calcdoc/render/pdf/pdftest"
)

// A second document of our own: the drop along a 40 m, 4 mm² copper run
// at 16 A, 2·16 A·4.61 mΩ/m·40 m = 5.901 V (Ohm's law, common practice).
const socketDoc = `---
title: Workshop socket circuit, voltage drop
number: SKT-E-002
revision: B
date: 2026-11-06
revisions:
  - {rev: A, date: 2026-10-01, by: KM, note: First issue}
  - {rev: B, date: 2026-11-06, by: KM, note: Longer route}
---

` + "```calc\nI = 16 A\nr = 4.61 mohm/m\nL = 40 m\ndV = 2 * I * r * L\ncheck dV <= 0.05 * 230 V\n```\n"

// coreutilsSum is sha256sum's digest of a file or, with stdin, of text.
func coreutilsSum(t *testing.T, args []string, stdin string) string {
	t.Helper()
	if _, err := exec.LookPath("sha256sum"); err != nil {
		t.Skip("sha256sum (GNU coreutils) is not installed")
	}
	cmd := exec.Command("sha256sum", args...)
	cmd.Stdin = strings.NewReader(stdin)
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("sha256sum: %v", err)
	}
	return strings.Fields(string(out))[0]
}

func TestPackageCommand(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	write(t, dir, "heater.md", heaterDoc)
	write(t, dir, "socket.md", socketDoc)
	write(t, dir, "failing.md", strings.Replace(heaterDoc, "check P <= 3.2 kW", "check P <= 2.5 kW", 1))
	write(t, dir, "spec/package.yaml", "title: Workshop calculations\nnumber: WS-PKG-07\nrevision: C\ndate: 2026-11-07\nprepared: K. Mensah\nsheets:\n  - ../socket.md\n  - ../heater.md\n")
	write(t, dir, "bad/package.yaml", "title: x\nsheats: [a.md]\n")
	write(t, dir, "auto/package.yaml", "title: Auto package\nsheets: [one.md]\n")
	write(t, dir, "auto/one.md", heaterDoc)
	hHeater := coreutilsSum(t, []string{"heater.md"}, "")
	hSocket := coreutilsSum(t, []string{"socket.md"}, "")

	cases := []struct {
		name   string
		args   []string
		status int
		file   string   // the HTML file expected
		holds  []string // what it must hold
		out    string   // on standard output
		errOut string   // on standard error
	}{
		{"default output in the current folder", []string{"heater.md", "socket.md"}, exitOK, "package.html",
			[]string{"HTR-E-001", "SKT-E-002", "Water heater element", "Workshop socket circuit, voltage drop", hHeater, hSocket,
				// outside reference: printf '%s\n' H1 H2 | sha256sum
				`data-package-sha256="` + coreutilsSum(t, nil, hHeater+"\n"+hSocket+"\n") + `"`},
			"package -> package.html: 2 sheets, package sha256 " + coreutilsSum(t, nil, hHeater+"\n"+hSocket+"\n"), ""},
		{"flags", []string{"-o", "out/flags.html", "--title", "Heater only", "--number", "HT-PKG-01", "--revision", "A", "--project", "Workshop", "--date", "2026-11-08", "heater.md"},
			exitOK, "out/flags.html", []string{"Heater only", "HT-PKG-01", "Workshop", "2026-11-08"}, "out/flags.html: 1 sheets", ""},
		{"spec lists the sheets", []string{"--spec", "spec/package.yaml", "-o", "spec.html"}, exitOK, "spec.html",
			[]string{"Workshop calculations", "WS-PKG-07", "K. Mensah", `data-package-sha256="` + coreutilsSum(t, nil, hSocket+"\n"+hHeater+"\n") + `"`},
			"sheet 1: socket.md", ""},
		{"a flag overrides the spec", []string{"--spec", "spec/package.yaml", "--title", "Renamed", "-o", "renamed.html"}, exitOK, "renamed.html",
			[]string{"Renamed", "WS-PKG-07"}, "", ""},
		{"package.yaml of the folder given", []string{"-o", "auto.html", "auto"}, exitOK, "auto.html", []string{"Auto package", "HTR-E-001"}, "", ""},
		{"a check fails", []string{"-o", "fail.html", "failing.md", "socket.md"}, exitCheckFail, "fail.html", []string{"NOT FOR ISSUE"}, "", ""},
		{"unknown key in the spec", []string{"--spec", "bad/package.yaml"}, exitUsage, "", nil, "", "sheats"},
		{"spec with sheets and PATHs", []string{"--spec", "spec/package.yaml", "heater.md"}, exitUsage, "", nil, "", "lists the sheets: give no PATH"},
		{"a sheet twice", []string{"-o", "twice.html", "heater.md", "./heater.md"}, exitUsage, "", nil, "", "in the package twice"},
		{"bad date", []string{"--date", "2026-13-01", "heater.md"}, exitUsage, "", nil, "", "not a date"},
		{"no sheet", nil, exitUsage, "", nil, "", "package needs at least one PATH"},
		{"over its source", []string{"-o", "heater.md", "heater.md"}, exitUsage, "", nil, "", "refusing to write the package over its source"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st, out, errs := runCLI(append([]string{"package"}, c.args...)...)
			if st != c.status {
				t.Fatalf("status %d, want %d\nstdout: %s\nstderr: %s", st, c.status, out, errs)
			}
			if !strings.Contains(out, c.out) {
				t.Errorf("stdout lacks %q:\n%s", c.out, out)
			}
			if !strings.Contains(errs, c.errOut) {
				t.Errorf("stderr lacks %q:\n%s", c.errOut, errs)
			}
			if c.file == "" {
				return
			}
			page, err := os.ReadFile(filepath.Join(dir, c.file))
			if err != nil {
				t.Fatal(err)
			}
			for _, want := range c.holds {
				if !strings.Contains(string(page), want) {
					t.Errorf("%s lacks %q", c.file, want)
				}
			}
			// every package verifies from its HTML alone
			if st, out, errs := runCLI("verify", c.file); st != exitOK {
				t.Errorf("verify %s: %d\n%s%s", c.file, st, out, errs)
			}
		})
	}
}

// Without Chromium, --pdf says so plainly and exits 2, after writing the
// HTML package.
func TestPackageWithoutChromium(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	write(t, dir, "heater.md", heaterDoc)
	printed := false
	old := printPDF
	printPDF = func(ctx context.Context, html, pdfPath string) error { printed = true; return pdf.ErrNoChromium }
	defer func() { printPDF = old }()
	st, out, errs := runCLI("package", "--pdf", "p.pdf", "heater.md")
	if st != exitUsage || !printed {
		t.Fatalf("status %d (want %d), printed %v\n%s%s", st, exitUsage, printed, out, errs)
	}
	if !strings.Contains(errs, "no PDF written: "+pdf.ErrNoChromium.Error()) || !strings.Contains(errs, "the HTML package is in package.html") {
		t.Errorf("stderr: %s", errs)
	}
	if _, err := os.Stat("package.html"); err != nil {
		t.Errorf("the HTML package was not written: %v", err)
	}
	if _, err := os.Stat("p.pdf"); err == nil {
		t.Errorf("a PDF was written")
	}
}

// With a real Chromium, --pdf prints the package; pdftotext (the outside
// reader) shows the contents with the page on which each sheet starts.
func TestPackagePDFCommand(t *testing.T) {
	pdftest.Chromium(t)
	pdftest.Pdftotext(t)
	dir := t.TempDir()
	t.Chdir(dir)
	write(t, dir, "heater.md", heaterDoc)
	write(t, dir, "socket.md", socketDoc)
	st, out, errs := runCLI("package", "--number", "WS-PKG-09", "--pdf", "ws.pdf", "-o", "ws.html", "heater.md", "socket.md")
	if st != exitOK {
		t.Fatalf("status %d\n%s%s", st, out, errs)
	}
	if strings.Contains(errs, "warning") || strings.Contains(errs, "note") {
		t.Errorf("stderr: %s", errs)
	}
	pages, err := pdf.PDFText(context.Background(), "ws.pdf")
	if err != nil {
		t.Fatal(err)
	}
	if len(pages) < 4 {
		t.Fatalf("%d pages, want cover, contents and two sheets", len(pages))
	}
	contents := pages[1]
	for _, re := range []string{`Sheet 1\s+HTR-E-001 rev A: Water heater element\s+page 3\n`, `Sheet 2\s+SKT-E-002 rev B: .*page 4\n`} {
		if !regexp.MustCompile(re).MatchString(contents) {
			t.Errorf("the contents do not match %s:\n%s", re, contents)
		}
	}
	if !strings.Contains(pages[2], "sheet 1 of 2, page 1") || !strings.Contains(pages[3], "sheet 2 of 2, page 1") {
		t.Errorf("the sheets do not start on pages 3 and 4")
	}
	// the HTML written last carries the same page numbers, and verifies
	page, _ := os.ReadFile("ws.html")
	if !strings.Contains(string(page), `<span class="pg">page 3</span>`) {
		t.Errorf("the HTML lacks the contents' page numbers")
	}
	if st, out, errs := runCLI("verify", "ws.html"); st != exitOK {
		t.Errorf("verify: %d\n%s%s", st, out, errs)
	}
}
