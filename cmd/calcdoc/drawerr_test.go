package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestPlotThatCannotBeDrawnIsAnError: a sweep whose values lie below what a
// plot can draw (1e-280, the drawing's documented range) is an error of the
// document in every output of the command: check and build exit 3 with the
// error at file:line:col, the sheet's summary counts it (and shows the
// error row once), and values lists it. The position is counted by hand:
// line 2 is "y = f * 1e-290 s^-1", whose expression starts at column 5.
func TestPlotThatCannotBeDrawnIsAnError(t *testing.T) {
	dir := t.TempDir()
	src := "```sweep f = 1 Hz .. 2 Hz 5\ny = f * 1e-290 s^-1\n```\n"
	p := write(t, dir, "tiny.md", src)
	const at = "tiny.md:2:5: the plot could not be drawn"
	cases := []struct {
		name string
		args []string
	}{
		{"check", []string{"check", p}},
		{"build", []string{"build", "-o", filepath.Join(dir, "out"), p}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st, out, errs := runCLI(c.args...)
			if st != exitError {
				t.Errorf("exit status %d, want %d (an error)", st, exitError)
			}
			if !strings.Contains(out+errs, at) {
				t.Errorf("output %q, want %q", out+errs, at)
			}
		})
	}
	html, err := os.ReadFile(filepath.Join(dir, "out", "tiny.html"))
	if err != nil {
		t.Fatal(err)
	}
	h := string(html)
	if strings.Contains(h, "Evaluated without errors") || !strings.Contains(h, "1 error: the sheet is incomplete") {
		t.Errorf("summary does not count the plot error")
	}
	// once in the summary's list, once in place of the figure
	if n := strings.Count(h, "the plot could not be drawn"); n != 2 {
		t.Errorf("plot error shown %d times, want 2 (summary and body)", n)
	}
	st, out, _ := runCLI("values", p)
	if st != exitError {
		t.Errorf("values exit status %d, want %d", st, exitError)
	}
	var v struct {
		Errors []struct {
			Line, Col int
			Message   string
		}
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if len(v.Errors) != 1 || v.Errors[0].Line != 2 || v.Errors[0].Col != 5 || !strings.Contains(v.Errors[0].Message, "could not be drawn") {
		t.Errorf("values errors %+v, want one at 2:5", v.Errors)
	}
}

// TestPhasorDiagramThatCannotBeDrawnIsAnError: a phasor diagram whose
// drawing fails is counted the same way. Seven dimensions are refused by
// the evaluation already; here an arrow beyond the drawable range in its
// unit (1e300 V is shown in the largest prefix, still above 1e280) is an
// error at the entry (line 4, column 12: hand count of "```phasors V_x").
func TestPhasorDiagramThatCannotBeDrawnIsAnError(t *testing.T) {
	dir := t.TempDir()
	p := write(t, dir, "big.md", "```calc\nV_x = 1e300 V\n```\n```phasors V_x\n```\n")
	st, out, errs := runCLI("check", p)
	if st != exitError || !strings.Contains(out+errs, "big.md:4:12:") {
		t.Errorf("exit %d, output %q; want 3 and an error at big.md:4:12", st, out+errs)
	}
}

// TestLineEndsThroughTheCommand: a file saved with a byte-order mark and
// old Mac line ends (lone CR) is read with its front matter, and its error
// is reported at the line and column an editor shows: line 7 is
// "y = x + 2 A", the "+" its 7th character (hand count).
func TestLineEndsThroughTheCommand(t *testing.T) {
	dir := t.TempDir()
	src := "\uFEFF" + strings.Join([]string{"---", "digits: 3", "---", "", "```calc", "x = 1 V", "y = x + 2 A", "```", ""}, "\r")
	p := write(t, dir, "mac.md", src)
	st, out, errs := runCLI("check", p)
	if st != exitError || !strings.Contains(out+errs, "mac.md:7:7: cannot add") {
		t.Errorf("exit %d, output %q; want 3 and mac.md:7:7: cannot add", st, out+errs)
	}
	if strings.Contains(out+errs, "front matter") {
		t.Errorf("front matter not read: %q", out+errs)
	}
}
