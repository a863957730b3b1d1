//go:build linux

package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"calcdoc/render/pdf"
	"calcdoc/render/pdf/pdftest"
)

// stubBrowser is a stand-in for the browser (given by $CALCDOC_CHROMIUM):
// it records its process id and that of a helper it starts (as the real
// browser starts helpers), then either hangs until killed, fails, or
// writes a PDF, as $STUB_MODE says.
const stubBrowser = `#!/bin/sh
out=""
for a in "$@"; do
	case "$a" in --print-to-pdf=*) out="${a#--print-to-pdf=}";; esac
done
sleep 300 &
echo $$ >> "$STUB_PIDS"
echo $! >> "$STUB_PIDS"
case "$STUB_MODE" in
hang) wait ;;
fail) echo "stub: cannot print" >&2; exit 1 ;;
print) printf '%%PDF-1.4 stub %s\n' "$STUB_RUN" > "$out"; kill $!; exit 0 ;;
esac
`

// pairRun is one run of the calcdoc binary on a package with --pdf.
type pairRun struct {
	t                *testing.T
	bin, dir, tmpdir string
	pids             string
}

func newPairRun(t *testing.T) *pairRun {
	t.Helper()
	base := t.TempDir()
	r := &pairRun{t: t, bin: filepath.Join(base, "calcdoc"), dir: filepath.Join(base, "work"), tmpdir: filepath.Join(base, "tmp"), pids: filepath.Join(base, "pids")}
	for _, d := range []string{r.dir, r.tmpdir} {
		if err := os.Mkdir(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	if out, err := exec.Command("go", "build", "-o", r.bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	stub := filepath.Join(base, "browser")
	if err := os.WriteFile(stub, []byte(stubBrowser), 0o755); err != nil {
		t.Fatal(err)
	}
	write(t, r.dir, "heater.md", heaterDoc)
	write(t, r.dir, "ws.html", "old html\n")
	write(t, r.dir, "ws.pdf", "%PDF-old\n")
	t.Setenv(pdf.ChromiumEnv, stub)
	return r
}

// start runs `calcdoc package --pdf ws.pdf -o ws.html heater.md` in the
// work folder with the stub in the given mode.
func (r *pairRun) start(mode string) (*exec.Cmd, *bytes.Buffer) {
	cmd := exec.Command(r.bin, "package", "--pdf", "ws.pdf", "-o", "ws.html", "heater.md")
	cmd.Dir = r.dir
	cmd.Env = append(os.Environ(), "STUB_MODE="+mode, "STUB_PIDS="+r.pids, "STUB_RUN="+mode, "TMPDIR="+r.tmpdir)
	var errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &errb, &errb
	if err := cmd.Start(); err != nil {
		r.t.Fatal(err)
	}
	return cmd, &errb
}

// stubPids are the process ids the stub recorded.
func (r *pairRun) stubPids() []int {
	data, _ := os.ReadFile(r.pids)
	var out []int
	for _, f := range strings.Fields(string(data)) {
		if n, err := strconv.Atoi(f); err == nil {
			out = append(out, n)
		}
	}
	return out
}

// alive reports whether a process runs (a zombie does not).
func alive(pid int) bool {
	data, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat")
	if err != nil {
		return false
	}
	s := string(data)
	i := strings.LastIndexByte(s, ')')
	return i < 0 || i+2 >= len(s) || s[i+2] != 'Z'
}

// checkClean checks the work folder holds only the document and the two
// outputs with the given contents, that the temporary folder is empty (the
// browser's profile is gone), and that no stub process runs.
func (r *pairRun) checkClean(html, pdfText string) {
	r.t.Helper()
	names := func(d string) []string {
		es, _ := os.ReadDir(d)
		var out []string
		for _, e := range es {
			out = append(out, e.Name())
		}
		return out
	}
	if got := names(r.dir); !slices.Equal(got, []string{"heater.md", "ws.html", "ws.pdf"}) {
		r.t.Errorf("the folder holds %v, want heater.md, ws.html, ws.pdf only", got)
	}
	if got := names(r.tmpdir); len(got) != 0 {
		r.t.Errorf("the temporary folder holds %v (the browser's profile is not removed)", got)
	}
	h, _ := os.ReadFile(filepath.Join(r.dir, "ws.html"))
	p, _ := os.ReadFile(filepath.Join(r.dir, "ws.pdf"))
	if !strings.Contains(string(h), html) || !strings.Contains(string(p), pdfText) {
		r.t.Errorf("ws.html starts %.40q, ws.pdf %.40q; want them to hold %q and %q", h, p, html, pdfText)
	}
	end := time.Now().Add(5 * time.Second)
	for _, pid := range r.stubPids() {
		for alive(pid) && time.Now().Before(end) {
			time.Sleep(50 * time.Millisecond)
		}
		if alive(pid) {
			r.t.Errorf("browser process %d still runs", pid)
			syscall.Kill(pid, syscall.SIGKILL)
		}
	}
}

func wait(t *testing.T, cmd *exec.Cmd) int {
	t.Helper()
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	select {
	case <-done:
	case <-time.After(30 * time.Second):
		cmd.Process.Kill()
		t.Fatal("calcdoc did not end within 30 s")
	}
	return cmd.ProcessState.ExitCode()
}

// TestPackagePDFInterrupted: SIGINT or SIGTERM to calcdoc while the
// browser prints leaves the old HTML and PDF as they were, kills the
// browser and its helper, and leaves no temporary file or profile folder.
func TestPackagePDFInterrupted(t *testing.T) {
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		t.Run(sig.String(), func(t *testing.T) {
			r := newPairRun(t)
			cmd, out := r.start("hang")
			end := time.Now().Add(30 * time.Second)
			for len(r.stubPids()) < 2 { // mid-print: the browser and its helper run
				if time.Now().After(end) {
					cmd.Process.Kill()
					t.Fatalf("the browser did not start; output:\n%s", out)
				}
				time.Sleep(20 * time.Millisecond)
			}
			if err := cmd.Process.Signal(sig); err != nil {
				t.Fatal(err)
			}
			if st := wait(t, cmd); st != exitError {
				t.Errorf("status %d, want %d", st, exitError)
			}
			if !strings.Contains(out.String(), "interrupted while printing") {
				t.Errorf("output: %s", out)
			}
			r.checkClean("old html", "%PDF-old")
		})
	}
}

// TestPackagePDFBrowserFails: a browser that fails leaves both old files.
func TestPackagePDFBrowserFails(t *testing.T) {
	r := newPairRun(t)
	cmd, out := r.start("fail")
	if st := wait(t, cmd); st != exitError {
		t.Errorf("status %d, want %d\n%s", st, exitError, out)
	}
	if !strings.Contains(out.String(), "left as they were") || !strings.Contains(out.String(), "stub: cannot print") {
		t.Errorf("output: %s", out)
	}
	r.checkClean("old html", "%PDF-old")
}

// TestPackagePDFPair: a print that succeeds replaces both files with those
// of the run, and a run after one killed between its two renames (the
// journal and the PDF's temporary file left) completes that pair first.
func TestPackagePDFPair(t *testing.T) {
	r := newPairRun(t)
	cmd, out := r.start("print")
	if st := wait(t, cmd); st != exitOK {
		t.Fatalf("status %d\n%s", st, out)
	}
	r.checkClean(`<meta name="generator" content="calcdoc`, "%PDF-1.4 stub print")

	// a run killed after renaming the HTML, before the PDF: what it left
	html := filepath.Join(r.dir, "ws.html")
	pdfPath := filepath.Join(r.dir, "ws.pdf")
	tmpPDF := filepath.Join(r.dir, ".ws.pdf.tmp-999999999-1")
	write(t, r.dir, ".ws.pdf.tmp-999999999-1", "%PDF-1.4 the killed run's\n")
	rec := `{"HTML":"` + html + `","PDF":"` + pdfPath + `","TmpHTML":"` + filepath.Join(r.dir, ".ws.html.tmp-999999999-1") + `","TmpPDF":"` + tmpPDF + `"}`
	write(t, r.dir, ".ws.html.pair", rec)
	cmd, out = r.start("fail")
	wait(t, cmd)
	if !strings.Contains(out.String(), "that pair is now completed") {
		t.Errorf("output: %s", out)
	}
	r.checkClean(`<meta name="generator" content="calcdoc`, "%PDF-1.4 the killed run's")
}

// groupOf returns the process ids whose process group is pgid, from /proc.
func groupOf(pgid int) []int {
	es, _ := os.ReadDir("/proc")
	var out []int
	for _, e := range es {
		pid, err := strconv.Atoi(e.Name())
		if err != nil {
			continue
		}
		data, err := os.ReadFile("/proc/" + e.Name() + "/stat")
		if err != nil {
			continue
		}
		s := string(data)
		i := strings.LastIndexByte(s, ')')
		f := strings.Fields(s[i+1:]) // state ppid pgrp ...
		if len(f) > 2 && f[0] != "Z" && f[2] == strconv.Itoa(pgid) {
			out = append(out, pid)
		}
	}
	return out
}

// childOf returns a process whose parent is ppid, or 0.
func childOf(ppid int) int {
	es, _ := os.ReadDir("/proc")
	for _, e := range es {
		data, err := os.ReadFile("/proc/" + e.Name() + "/stat")
		if err != nil {
			continue
		}
		s := string(data)
		i := strings.LastIndexByte(s, ')')
		f := strings.Fields(s[i+1:])
		if len(f) > 1 && f[1] == strconv.Itoa(ppid) {
			pid, _ := strconv.Atoi(e.Name())
			return pid
		}
	}
	return 0
}

// TestPackagePDFInterruptedChromium: the same with the real browser: SIGINT
// once Chromium runs leaves the old pair, and no process of Chromium's
// process group is left (checked in /proc).
func TestPackagePDFInterruptedChromium(t *testing.T) {
	chrome := pdftest.Chromium(t)
	r := newPairRun(t)
	t.Setenv(pdf.ChromiumEnv, chrome)
	cmd, out := r.start("real")
	var browser int
	end := time.Now().Add(30 * time.Second)
	for browser == 0 {
		browser = childOf(cmd.Process.Pid)
		if cmd.ProcessState != nil || time.Now().After(end) {
			cmd.Process.Kill()
			t.Fatalf("the browser did not start; output:\n%s", out)
		}
		time.Sleep(5 * time.Millisecond)
	}
	time.Sleep(100 * time.Millisecond) // let it start its helpers
	if err := cmd.Process.Signal(syscall.SIGINT); err != nil {
		t.Fatal(err)
	}
	st := wait(t, cmd)
	if st == exitOK {
		t.Skipf("the browser printed before the signal came; output:\n%s", out)
	}
	if st != exitError || !strings.Contains(out.String(), "interrupted while printing") {
		t.Errorf("status %d; output:\n%s", st, out)
	}
	deadline := time.Now().Add(5 * time.Second)
	left := groupOf(browser)
	for len(left) > 0 && time.Now().Before(deadline) {
		time.Sleep(50 * time.Millisecond)
		left = groupOf(browser)
	}
	if len(left) > 0 {
		t.Errorf("browser processes %v are left", left)
		for _, p := range left {
			syscall.Kill(p, syscall.SIGKILL)
		}
	}
	r.checkClean("old html", "%PDF-old")
}
