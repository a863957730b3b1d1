package pdf

import (
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
)

// ErrNoChromium is returned (wrapped in a sentence that says, for the
// system at hand, what to install) when no browser to print with is found.
var ErrNoChromium = errors.New("no Chromium, Chrome or Edge found to print with")

// ErrNoPdftotext is returned when pdftotext is not found.
var ErrNoPdftotext = errors.New("pdftotext is not installed; on Debian: apt-get install poppler-utils")

// ChromiumEnv names the environment variable that, when set, gives the
// browser to print with (an absolute path to an executable), before the
// usual places: for a browser installed elsewhere, and for the tests,
// which print with a stand-in.
const ChromiumEnv = "CALCDOC_CHROMIUM"

// FindChromium returns the path of the browser to print with: the one
// $CALCDOC_CHROMIUM names (ChromiumEnv) if it is set, else the first of
// chromiumCandidates for this system that is there. On Linux that is
// Debian's /usr/bin/chromium, then chromium, chromium-browser,
// google-chrome, google-chrome-stable and microsoft-edge in PATH; on
// Windows chrome.exe (Chromium's or Google Chrome's) or msedge.exe in their
// install folders under %ProgramFiles%, %ProgramFiles(x86)% and
// %LocalAppData%, then in PATH; on macOS the application bundles in
// /Applications and ~/Applications, then PATH. When none is found the
// error wraps ErrNoChromium and says what to install.
func FindChromium() (string, error) {
	if p := os.Getenv(ChromiumEnv); p != "" {
		if !filepath.IsAbs(p) {
			return "", fmt.Errorf("%s=%s: give an absolute path to the browser", ChromiumEnv, p)
		}
		return findExecutable(runtime.GOOS, []string{p}, fmt.Errorf("%s=%s is not an executable file: %w", ChromiumEnv, p, ErrNoChromium))
	}
	p, err := findExecutable(runtime.GOOS, chromiumCandidates(runtime.GOOS, os.Getenv), ErrNoChromium)
	if err != nil {
		return "", noChromium(runtime.GOOS)
	}
	return p, nil
}

// FindPdftotext returns the path of pdftotext found in PATH, or
// ErrNoPdftotext.
func FindPdftotext() (string, error) {
	return findExecutable(runtime.GOOS, []string{"pdftotext"}, ErrNoPdftotext)
}

// chromiumCandidates lists, in the order they are tried, the browsers
// FindChromium looks for on the system goos, with getenv reading the
// environment (os.Getenv). An entry with a separator is a full path; a bare
// name is looked up in PATH (exec.LookPath, which adds .exe on Windows).
// Paths are written with the separator of goos, so that the lists of every
// system can be checked on any one.
func chromiumCandidates(goos string, getenv func(string) string) []string {
	switch goos {
	case "windows":
		var roots []string
		seen := map[string]bool{}
		for _, v := range []string{"ProgramFiles", "ProgramFiles(x86)", "ProgramW6432", "LocalAppData"} {
			r := strings.TrimRight(getenv(v), `\/`)
			if !winAbs(r) || seen[strings.ToLower(r)] {
				continue
			}
			seen[strings.ToLower(r)] = true
			roots = append(roots, r)
		}
		var out []string
		for _, app := range []string{`Chromium\Application\chrome.exe`, `Google\Chrome\Application\chrome.exe`, `Microsoft\Edge\Application\msedge.exe`} {
			for _, r := range roots {
				out = append(out, r+`\`+app)
			}
		}
		return append(out, "chromium", "chrome", "msedge")
	case "darwin":
		bundles := []string{
			"Chromium.app/Contents/MacOS/Chromium",
			"Google Chrome.app/Contents/MacOS/Google Chrome",
			"Microsoft Edge.app/Contents/MacOS/Microsoft Edge",
		}
		var out []string
		for _, b := range bundles {
			out = append(out, "/Applications/"+b)
		}
		if home := strings.TrimRight(getenv("HOME"), "/"); strings.HasPrefix(home, "/") {
			for _, b := range bundles {
				out = append(out, home+"/Applications/"+b)
			}
		}
		return append(out, "chromium", "google-chrome")
	}
	return []string{"/usr/bin/chromium", "chromium", "chromium-browser", "google-chrome", "google-chrome-stable", "microsoft-edge"}
}

// winAbs reports whether p is an absolute Windows path: a drive letter and
// a separator ("C:\...") or a UNC path ("\\server\share").
func winAbs(p string) bool {
	if strings.HasPrefix(p, `\\`) {
		return len(p) > 2
	}
	return len(p) >= 3 && p[1] == ':' && (p[2] == '\\' || p[2] == '/') &&
		(p[0] >= 'A' && p[0] <= 'Z' || p[0] >= 'a' && p[0] <= 'z')
}

// noChromium is the error of FindChromium on the system goos: it wraps
// ErrNoChromium and says what to install there.
func noChromium(goos string) error {
	switch goos {
	case "windows":
		return fmt.Errorf("%w: install Google Chrome or Microsoft Edge (Edge comes with Windows 10 and 11; looked in %%ProgramFiles%%, %%ProgramFiles(x86)%% and %%LocalAppData%%), or put the folder of chrome.exe or msedge.exe in PATH", ErrNoChromium)
	case "darwin":
		return fmt.Errorf("%w: install Google Chrome, Chromium or Microsoft Edge in /Applications, or put a chromium command in PATH", ErrNoChromium)
	}
	return fmt.Errorf("%w: install Chromium (on Debian or Ubuntu: apt-get install chromium), or put chromium, google-chrome or microsoft-edge in PATH", ErrNoChromium)
}

// findExecutable returns the first candidate that can be run on the system
// goos: a full path must name a regular file (with an execute permission
// bit, except on Windows, where files carry none); a bare name is looked up
// in PATH. When none is found the error is missing.
func findExecutable(goos string, candidates []string, missing error) (string, error) {
	for _, c := range candidates {
		if strings.ContainsAny(c, `/\`) {
			if fi, err := os.Stat(c); err == nil && runnable(goos, fi.Mode()) {
				return c, nil
			}
			continue
		}
		if p, err := exec.LookPath(c); err == nil {
			return p, nil
		}
	}
	return "", missing
}

// runnable reports whether a file of mode m can be run on the system goos.
func runnable(goos string, m os.FileMode) bool {
	if !m.IsRegular() {
		return false
	}
	return goos == "windows" || m.Perm()&0o111 != 0
}
