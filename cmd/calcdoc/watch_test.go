//go:build unix

package main

import (
	"bytes"
	"io"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"
)

// lockedBuffer is a bytes.Buffer safe to read while the command writes.
type lockedBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

const watchDoc = "```calc\nV = 230 V   # watch-test\ncheck V > 200 V\n```\n"

// TestWatchUsage: bad invocations of watch are usage errors (status 2).
func TestWatchUsage(t *testing.T) {
	dir := t.TempDir()
	doc := filepath.Join(dir, "a.md")
	if err := os.WriteFile(doc, []byte(watchDoc), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"no PATH", []string{"watch"}, "at least one PATH"},
		{"an unknown flag", []string{"watch", "--port", "1", dir}, "flag provided but not defined"},
		{"an address without a port", []string{"watch", "--addr", "127.0.0.1", dir}, "--addr 127.0.0.1"},
		{"a missing PATH", []string{"watch", "--addr", "127.0.0.1:0", filepath.Join(dir, "none")}, "no such file or folder"},
		{"one output file for a folder", []string{"watch", "--addr", "127.0.0.1:0", "-o", filepath.Join(dir, "x.html"), dir}, "names one file"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			cl := &cli{stdout: &out, stderr: &errb}
			if st := cl.run(c.args); st != exitUsage {
				t.Errorf("status %d, want %d", st, exitUsage)
			}
			if !strings.Contains(errb.String(), c.want) {
				t.Errorf("stderr = %q, want it to contain %q", errb.String(), c.want)
			}
		})
	}
}

var servingAt = regexp.MustCompile(`serving the preview at (http://[^/ ]+/)`)

// TestWatchCommand runs watch on a loopback port, reads a page, and stops
// it with SIGTERM: it must exit 0 after a clean shutdown.
func TestWatchCommand(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "a.md"), []byte(watchDoc), 0o644); err != nil {
		t.Fatal(err)
	}
	out, errb := &lockedBuffer{}, &lockedBuffer{}
	cl := &cli{stdout: out, stderr: errb}
	status := make(chan int, 1)
	go func() { status <- cl.run([]string{"watch", "--addr", "127.0.0.1:0", dir}) }()

	// The address is printed once the signals are caught and the server
	// is about to serve; wait until it answers.
	var base string
	end := time.Now().Add(10 * time.Second)
	for {
		if m := servingAt.FindStringSubmatch(out.String()); m != nil {
			base = m[1]
			if resp, err := http.Get(base + "a.html"); err == nil {
				body, _ := io.ReadAll(resp.Body)
				resp.Body.Close()
				if resp.StatusCode != 200 || !strings.Contains(string(body), "watch-test") {
					t.Fatalf("GET a.html: status %d, the page lacks the document", resp.StatusCode)
				}
				break
			}
		}
		select {
		case st := <-status:
			t.Fatalf("watch exited with %d before serving; stderr:\n%s", st, errb.String())
		default:
		}
		if time.Now().After(end) {
			t.Fatalf("watch did not serve within 10 s; stdout:\n%s\nstderr:\n%s", out.String(), errb.String())
		}
		time.Sleep(20 * time.Millisecond)
	}
	if strings.Contains(errb.String(), "warning") {
		t.Errorf("a warning on loopback: %s", errb.String())
	}
	if err := syscall.Kill(os.Getpid(), syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	select {
	case st := <-status:
		if st != exitOK {
			t.Errorf("status %d after SIGTERM, want 0; stderr:\n%s", st, errb.String())
		}
	case <-time.After(15 * time.Second):
		t.Fatalf("watch did not stop within 15 s of SIGTERM")
	}
	if !strings.Contains(out.String(), "stopped") {
		t.Errorf("stdout does not say it stopped:\n%s", out.String())
	}
	if _, err := http.Get(base); err == nil {
		t.Errorf("the server still answers after the shutdown")
	}
}
