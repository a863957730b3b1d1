// Package gitrec is for tests that count the git runs of the stamp: it
// puts first on PATH a stand-in git that records each call's arguments
// and then runs the real git.
package gitrec

import (
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// Record puts first on PATH (for the rest of the test) a git that
// appends its arguments, one call a line, to the file it returns, and then
// runs the real git. The test is skipped on Windows (the stand-in is a
// shell script) and where git is not installed.
func Record(t *testing.T) string {
	t.Helper()
	if runtime.GOOS == "windows" {
		t.Skip("the recording git is a shell script, which Windows does not run as git.exe")
	}
	real, err := exec.LookPath("git")
	if err != nil {
		t.Skip("git is not installed; on Debian: apt-get install git")
	}
	dir := t.TempDir()
	log := filepath.Join(dir, "calls")
	script := "#!/bin/sh\nprintf '%s\\n' \"$*\" >> '" + log + "'\nexec '" + real + "' \"$@\"\n"
	if err := os.WriteFile(filepath.Join(dir, "git"), []byte(script), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(log, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Setenv("PATH", dir+string(os.PathListSeparator)+os.Getenv("PATH"))
	return log
}

// Calls returns the git calls recorded in log since the last Calls, and
// empties it.
func Calls(t *testing.T, log string) []string {
	t.Helper()
	b, err := os.ReadFile(log)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(log, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, l := range strings.Split(strings.TrimRight(string(b), "\n"), "\n") {
		if l != "" {
			out = append(out, l)
		}
	}
	return out
}
