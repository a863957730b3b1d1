package pdf

import (
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"runtime"
	"strings"
	"testing"
)

func TestFindExecutable(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("the stand-in browsers are files with Unix permission bits; the Windows rule is checked by TestRunnable")
	}
	bin := t.TempDir()
	exe := filepath.Join(bin, "browser-a")
	if err := os.WriteFile(exe, []byte("#!/bin/sh\n"), 0o755); err != nil {
		t.Fatal(err)
	}
	plain := filepath.Join(bin, "browser-b")
	if err := os.WriteFile(plain, []byte("not executable"), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Setenv("PATH", bin)
	tests := []struct {
		name       string
		candidates []string
		want       string // "" for ErrNoChromium
	}{
		{"absolute path", []string{exe}, exe},
		{"name in PATH", []string{"browser-a"}, exe},
		{"first found wins", []string{filepath.Join(bin, "absent"), "absent", "browser-a"}, exe},
		{"not executable is skipped", []string{plain, "browser-b"}, ""},
		{"none", []string{"/nonexistent/chromium", "chromium-absent"}, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := findExecutable(runtime.GOOS, tc.candidates, ErrNoChromium)
			if tc.want == "" {
				if !errors.Is(err, ErrNoChromium) {
					t.Fatalf("got %q, %v; want ErrNoChromium", got, err)
				}
				return
			}
			if err != nil || got != tc.want {
				t.Errorf("got %q, %v; want %q", got, err, tc.want)
			}
		})
	}
}

// TestRunnable: Windows files carry no execute bits (os.Stat reports 0666
// or 0444 there), so any regular file counts; elsewhere an execute bit is
// needed. A folder never counts.
func TestRunnable(t *testing.T) {
	for _, tc := range []struct {
		goos string
		mode os.FileMode
		want bool
	}{
		{"windows", 0o666, true},
		{"windows", 0o444, true},
		{"windows", os.ModeDir | 0o777, false},
		{"linux", 0o644, false},
		{"linux", 0o755, true},
		{"darwin", 0o700, true},
		{"darwin", os.ModeDir | 0o755, false},
	} {
		if got := runnable(tc.goos, tc.mode); got != tc.want {
			t.Errorf("runnable(%s, %v) = %v, want %v", tc.goos, tc.mode, got, tc.want)
		}
	}
}

// TestChromiumCandidates checks the list of every system on any one. The
// install folders are those the vendors' installers use (from memory of
// their documented defaults): a per-machine install under %ProgramFiles%
// or %ProgramFiles(x86)%, a per-user one under %LocalAppData%, each in
// VENDOR\PRODUCT\Application\; on macOS the application bundle's
// Contents/MacOS/NAME.
func TestChromiumCandidates(t *testing.T) {
	env := func(m map[string]string) func(string) string { return func(k string) string { return m[k] } }
	win := chromiumCandidates("windows", env(map[string]string{
		"ProgramFiles":      `C:\Program Files`,
		"ProgramFiles(x86)": `C:\Program Files (x86)\`,
		"ProgramW6432":      `C:\Program Files`, // the same folder as ProgramFiles: tried once
		"LocalAppData":      `C:\Users\ana\AppData\Local`,
	}))
	wantWin := []string{
		`C:\Program Files\Chromium\Application\chrome.exe`,
		`C:\Program Files (x86)\Chromium\Application\chrome.exe`,
		`C:\Users\ana\AppData\Local\Chromium\Application\chrome.exe`,
		`C:\Program Files\Google\Chrome\Application\chrome.exe`,
		`C:\Program Files (x86)\Google\Chrome\Application\chrome.exe`,
		`C:\Users\ana\AppData\Local\Google\Chrome\Application\chrome.exe`,
		`C:\Program Files\Microsoft\Edge\Application\msedge.exe`,
		`C:\Program Files (x86)\Microsoft\Edge\Application\msedge.exe`,
		`C:\Users\ana\AppData\Local\Microsoft\Edge\Application\msedge.exe`,
		"chromium", "chrome", "msedge",
	}
	if !reflect.DeepEqual(win, wantWin) {
		t.Errorf("windows candidates\n got %q\nwant %q", win, wantWin)
	}
	// An unset or relative variable adds no folder; PATH names remain.
	bare := chromiumCandidates("windows", env(map[string]string{"ProgramFiles": `Program Files`}))
	if !reflect.DeepEqual(bare, []string{"chromium", "chrome", "msedge"}) {
		t.Errorf("windows candidates without install folders: %q", bare)
	}
	mac := chromiumCandidates("darwin", env(map[string]string{"HOME": "/Users/ana"}))
	wantMac := []string{
		"/Applications/Chromium.app/Contents/MacOS/Chromium",
		"/Applications/Google Chrome.app/Contents/MacOS/Google Chrome",
		"/Applications/Microsoft Edge.app/Contents/MacOS/Microsoft Edge",
		"/Users/ana/Applications/Chromium.app/Contents/MacOS/Chromium",
		"/Users/ana/Applications/Google Chrome.app/Contents/MacOS/Google Chrome",
		"/Users/ana/Applications/Microsoft Edge.app/Contents/MacOS/Microsoft Edge",
		"chromium", "google-chrome",
	}
	if !reflect.DeepEqual(mac, wantMac) {
		t.Errorf("darwin candidates\n got %q\nwant %q", mac, wantMac)
	}
	linux := chromiumCandidates("linux", env(nil))
	if linux[0] != "/usr/bin/chromium" || !contains(linux, "google-chrome") || !contains(linux, "microsoft-edge") {
		t.Errorf("linux candidates %q", linux)
	}
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// TestNoChromiumSaysWhatToInstall: the error wraps ErrNoChromium and names
// what to install on each system.
func TestNoChromiumSaysWhatToInstall(t *testing.T) {
	for goos, want := range map[string][]string{
		"linux":   {"apt-get install chromium"},
		"windows": {"Google Chrome", "Microsoft Edge", "chrome.exe", "msedge.exe", "PATH"},
		"darwin":  {"Google Chrome", "Chromium", "Microsoft Edge", "/Applications"},
	} {
		err := noChromium(goos)
		if !errors.Is(err, ErrNoChromium) {
			t.Errorf("%s: %v does not wrap ErrNoChromium", goos, err)
		}
		for _, w := range want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q does not say %q", goos, err, w)
			}
		}
	}
}

// TestFindChromiumInInstallFolder lays out a Windows-style install folder
// under a temporary folder and finds chrome.exe there through the
// environment, on whatever system runs the test.
func TestFindChromiumInInstallFolder(t *testing.T) {
	root := t.TempDir()
	exe := filepath.Join(root, "Google", "Chrome", "Application", "chrome.exe")
	if err := os.MkdirAll(filepath.Dir(exe), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(exe, []byte("stand-in"), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Setenv("PATH", "")
	cands := []string{filepath.Join(root, "Google", "Chrome", "Application", "chrome.exe")}
	got, err := findExecutable("windows", cands, ErrNoChromium)
	if err != nil || got != exe {
		t.Errorf("windows: got %q, %v; want %q", got, err, exe)
	}
	if runtime.GOOS != "windows" {
		if _, err := findExecutable("linux", cands, ErrNoChromium); !errors.Is(err, ErrNoChromium) {
			t.Errorf("linux: a file without an execute bit was taken: %v", err)
		}
	}
}
