package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A document of our own: a 3 kW heater element at 230 V. P = V²/R =
// 52 900/17.5 W = 3022.857 W, shown to 4 figures as 3.023 kW (Joule's
// law, common practice), on line 10.
const heaterDoc = `---
title: Water heater element
number: HTR-E-001
revision: A
---

` + "```calc\nV = 230 V\nR = 17.5 ohm\nP = V^2 / R\ncheck P <= 3.2 kW\n```\n"

func TestVerifyCommand(t *testing.T) {
	dir := t.TempDir()
	src := write(t, dir, "heater.md", heaterDoc)
	sheet := filepath.Join(dir, "heater.html")
	if st, _, errs := runCLI("build", src); st != exitOK {
		t.Fatalf("build: %d %s", st, errs)
	}
	page, err := os.ReadFile(sheet)
	if err != nil {
		t.Fatal(err)
	}
	edit := func(name, mark, old, new string) string {
		s := string(page)
		i := strings.Index(s, mark)
		if i < 0 {
			t.Fatalf("no %q in the sheet", mark)
		}
		j := i + strings.Index(s[i:], old)
		if j < i {
			t.Fatalf("no %q after %q", old, mark)
		}
		return write(t, dir, name, s[:j]+new+s[j+len(old):])
	}
	numberEdited := edit("number.html", `data-value="P">`, "<mn>3.023</mn>", "<mn>3.032</mn>")
	sourceEdited := edit("source.html", `<pre hidden id="calcdoc-source"`, "R = 17.5 ohm", "R = 16.5 ohm")
	i := strings.Index(string(page), `<section class="stamp"`)
	j := strings.Index(string(page), "</section>\n<footer class=\"caution\">")
	if i < 0 || j < i {
		t.Fatal("no stamp section before the caution")
	}
	noStamp := write(t, dir, "nostamp.html", string(page[:i])+string(page[j+len("</section>\n"):]))
	appended := write(t, dir, "appended.html", string(page)+"<p>Approved for construction.</p>\n")

	cases := []struct {
		name   string
		args   []string
		status int
		out    []string // on standard output
		errOut string   // on standard error
	}{
		{"untouched sheet", []string{sheet}, exitOK, []string{"heater.html: matches its source " + src}, ""},
		{"one number edited", []string{numberEdited}, exitCheckFail,
			[]string{"DOES NOT MATCH", "value P (line 10): sheet shows 3.032 kW, source gives 3.023 kW"}, ""},
		{"embedded source edited", []string{sourceEdited}, exitCheckFail, []string{"DOES NOT MATCH", "hash: the embedded source's SHA-256 is"}, ""},
		{"stamp removed", []string{noStamp}, exitCheckFail, []string{"DOES NOT MATCH", "stamp: the sheet has no stamp section"}, ""},
		{"bytes after </body>", []string{appended}, exitCheckFail, []string{"DOES NOT MATCH", "after </body>: the sheet goes on", "Approved for construction."}, ""},
		{"one of two fails", []string{sheet, numberEdited}, exitCheckFail, []string{"heater.html: matches", "number.html: DOES NOT MATCH"}, ""},
		{"not a sheet", []string{src}, exitUsage, nil, "not a calcdoc sheet"},
		{"missing file", []string{filepath.Join(dir, "none.html")}, exitUsage, nil, "cannot read"},
		{"no file", nil, exitUsage, nil, "verify needs at least one SHEET.html"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st, out, errs := runCLI(append([]string{"verify"}, c.args...)...)
			if st != c.status {
				t.Errorf("status %d, want %d\nstdout: %s\nstderr: %s", st, c.status, out, errs)
			}
			for _, want := range c.out {
				if !strings.Contains(out, want) {
					t.Errorf("stdout lacks %q:\n%s", want, out)
				}
			}
			if !strings.Contains(errs, c.errOut) {
				t.Errorf("stderr lacks %q:\n%s", c.errOut, errs)
			}
		})
	}
}
