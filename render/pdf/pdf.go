// Package pdf prints an HTML calculation sheet to PDF with a headless
// Chromium, and reads a PDF's text back page by page with pdftotext
// (poppler-utils), which the tests use to check what was printed.
//
// Both tools are outside programs found at run time. When one is missing
// the functions return ErrNoChromium or ErrNoPdftotext (wrapped or bare),
// whose text says how to install it; nothing here panics.
package pdf

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"
)

// PrintTimeout bounds one Print; a caller's earlier deadline wins.
const PrintTimeout = 2 * time.Minute

// TextTimeout bounds one PDFText; a caller's earlier deadline wins.
const TextTimeout = time.Minute

// Print prints the HTML file htmlPath to the PDF file pdfPath with
// headless Chromium, loading the page from its file:// URL so that its
// relative links resolve beside it. The page's own CSS (@page size, margins
// and margin boxes) sets the paper; Chromium's own header and footer are
// off. Chromium runs with a fresh profile in a temporary folder (its
// XDG_CONFIG_HOME and XDG_CACHE_HOME too, and TMPDIR where that is short
// enough), which is removed afterwards, and
// with background networking, component updates, sync and QUIC off.
//
// The PDF is written to a temporary file in pdfPath's folder and renamed
// into place only when Chromium has exited successfully and the file begins
// with the PDF header "%PDF-" (ISO 32000-1, 7.5.2), so pdfPath never holds a
// partial file; an existing pdfPath is replaced. Print gives up after
// PrintTimeout or when ctx ends, killing Chromium's whole process group
// where the system has one. A failure's error includes the end of
// Chromium's standard error output.
func Print(ctx context.Context, htmlPath, pdfPath string) (err error) {
	if ctx == nil {
		ctx = context.Background()
	}
	chrome, err := FindChromium()
	if err != nil {
		return err
	}
	src, err := regularFile(htmlPath, "HTML file")
	if err != nil {
		return err
	}
	if pdfPath == "" {
		return errors.New("print to PDF: no PDF path given")
	}
	dst, err := filepath.Abs(pdfPath)
	if err != nil {
		return fmt.Errorf("print to PDF: %w", err)
	}
	if fi, err := os.Stat(dst); err == nil && fi.IsDir() {
		return fmt.Errorf("print to PDF: %s is a folder, not a file", dst)
	}
	dir := filepath.Dir(dst)
	if fi, err := os.Stat(dir); err != nil {
		return fmt.Errorf("print to PDF: the folder for %s: %w", dst, err)
	} else if !fi.IsDir() {
		return fmt.Errorf("print to PDF: %s is not a folder", dir)
	}

	tmp, err := os.CreateTemp(dir, "."+filepath.Base(dst)+".*.tmp")
	if err != nil {
		return fmt.Errorf("print to PDF: cannot write in %s: %w", dir, err)
	}
	tmpName := tmp.Name()
	if err := tmp.Close(); err != nil {
		os.Remove(tmpName)
		return fmt.Errorf("print to PDF: %w", err)
	}
	renamed := false
	defer func() {
		if !renamed {
			os.Remove(tmpName)
		}
	}()

	profile, err := os.MkdirTemp("", "calcdoc-cr-")
	if err != nil {
		return fmt.Errorf("print to PDF: cannot make a Chromium profile folder: %w", err)
	}
	defer removeAll(profile)
	// Chromium's output goes to a file, not a pipe, so that a helper
	// process it leaves behind cannot hold Print up.
	logFile, err := os.CreateTemp(profile, "stderr-*.log")
	if err != nil {
		return fmt.Errorf("print to PDF: %w", err)
	}
	defer logFile.Close()

	u := url.URL{Scheme: "file", Path: filepath.ToSlash(src)}
	if !strings.HasPrefix(u.Path, "/") { // a drive letter path
		u.Path = "/" + u.Path
	}
	args := []string{
		"--headless",
		"--no-sandbox",
		"--disable-gpu",
		"--disable-quic",
		"--no-first-run",
		"--disable-background-networking",
		"--disable-component-update",
		"--disable-sync",
		"--user-data-dir=" + profile,
		"--no-pdf-header-footer",
		"--print-to-pdf=" + tmpName,
		u.String(),
	}

	ctx, cancel := context.WithTimeout(ctx, PrintTimeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, chrome, args...)
	cmd.Stdout = logFile
	cmd.Stderr = logFile
	// Chromium keeps its crash reports and caches under the XDG folders
	// whatever its profile folder; these point into the temporary one, so
	// that printing leaves nothing in the user's home.
	cmd.Env = append(os.Environ(),
		"XDG_CONFIG_HOME="+filepath.Join(profile, "config"),
		"XDG_CACHE_HOME="+filepath.Join(profile, "cache"))
	// Its scratch folder goes under TMPDIR and holds a Unix socket, whose
	// path must fit in 104 bytes (the smallest sun_path among the systems
	// above; Linux allows 108). Where the socket path
	// "PROFILE/org.chromium.Chromium.XXXXXX/SingletonSocket" fits, TMPDIR
	// points into the profile too, so that even a killed Chromium leaves
	// nothing behind. Where the profile's path is too long for that (a
	// long TMPDIR), a scratch folder of its own is made in /tmp, whose
	// paths are short, and removed with the profile; only where neither
	// fits does Chromium keep the system's TMPDIR.
	const socket = len("/org.chromium.Chromium.XXXXXX/SingletonSocket")
	if len(profile)+socket < 104 {
		cmd.Env = append(cmd.Env, "TMPDIR="+profile)
	} else if scratch, err := os.MkdirTemp("/tmp", "calcdoc-"); err == nil {
		defer removeAll(scratch)
		if len(scratch)+socket < 104 {
			cmd.Env = append(cmd.Env, "TMPDIR="+scratch)
		}
	}
	cmd.WaitDelay = 5 * time.Second
	ownProcessGroup(cmd)
	runErr := cmd.Run()
	killProcessGroup(cmd)

	if runErr != nil {
		why := fmt.Sprint(runErr)
		if ctx.Err() == context.DeadlineExceeded {
			why = fmt.Sprintf("it did not finish in time (%v; Print allows at most %v)", ctx.Err(), PrintTimeout)
		} else if ctx.Err() != nil {
			why = "cancelled: " + ctx.Err().Error()
		}
		return fmt.Errorf("chromium (%s) could not print %s: %s%s", chrome, src, why, outputTail(logFile))
	}
	head := make([]byte, 5)
	f, err := os.Open(tmpName)
	if err != nil {
		return fmt.Errorf("chromium (%s) wrote no PDF for %s: %v%s", chrome, src, err, outputTail(logFile))
	}
	_, err = io.ReadFull(f, head)
	f.Close()
	if err != nil || !bytes.Equal(head, []byte("%PDF-")) {
		return fmt.Errorf("chromium (%s) wrote no PDF for %s (the file is empty or lacks the %%PDF- header)%s",
			chrome, src, outputTail(logFile))
	}
	// The temporary file was made private (0600); the PDF gets the
	// permissions of the file it replaces, or else rw-r--r--.
	perm := os.FileMode(0o644)
	if fi, err := os.Stat(dst); err == nil {
		perm = fi.Mode().Perm()
	}
	if err := os.Chmod(tmpName, perm); err != nil {
		return fmt.Errorf("print to PDF: %w", err)
	}
	if err := os.Rename(tmpName, dst); err != nil {
		return fmt.Errorf("print to PDF: cannot put the PDF in place: %w", err)
	}
	renamed = true
	return nil
}

// removeAll removes the temporary profile folder, trying once more a
// moment later when a Chromium helper that outlived the browser (its crash
// handler, which leaves the process group) was still writing in it.
func removeAll(dir string) {
	if os.RemoveAll(dir) != nil {
		time.Sleep(200 * time.Millisecond)
		_ = os.RemoveAll(dir)
	}
}

// outputTail returns "; chromium said: ..." with the last lines that
// Chromium wrote, less its complaints about a missing D-Bus (a headless
// machine has none), or "" when it wrote nothing else.
func outputTail(f *os.File) string {
	const maxLines, maxBytes = 20, 4000
	data, err := os.ReadFile(f.Name())
	if err != nil {
		return ""
	}
	var keep []string
	for _, line := range strings.Split(string(data), "\n") {
		line = strings.TrimSpace(line)
		if line == "" || strings.Contains(line, ":ERROR:dbus/") {
			continue
		}
		keep = append(keep, line)
	}
	if len(keep) > maxLines {
		keep = keep[len(keep)-maxLines:]
	}
	s := strings.Join(keep, "\n")
	if len(s) > maxBytes {
		s = "…" + s[len(s)-maxBytes:]
	}
	if s == "" {
		return ""
	}
	return "; chromium said:\n" + s
}

// regularFile returns the absolute path of path, which must name an
// existing regular file that can be opened for reading.
func regularFile(path, what string) (string, error) {
	if path == "" {
		return "", fmt.Errorf("no %s given", what)
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return "", fmt.Errorf("%s %s: %w", what, path, err)
	}
	fi, err := os.Stat(abs)
	if err != nil {
		return "", fmt.Errorf("%s: %w", what, err)
	}
	if !fi.Mode().IsRegular() {
		return "", fmt.Errorf("%s %s is not a regular file", what, abs)
	}
	// A file the tools could not read would give an error page, not an error.
	f, err := os.Open(abs)
	if err != nil {
		return "", fmt.Errorf("%s: %w", what, err)
	}
	f.Close()
	return abs, nil
}

// PDFText returns the text of each page of the PDF at pdfPath, in page
// order, as `pdftotext -layout -enc UTF-8 -eol unix` extracts it: the
// words kept in their printed arrangement, lines ending in "\n". pdftotext
// ends every page with a form feed; the text is split there, so element i
// is page i+1 and len is the number of pages. Gives up after TextTimeout or
// when ctx ends; the error of a failed run includes pdftotext's messages.
func PDFText(ctx context.Context, pdfPath string) ([]string, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	tool, err := FindPdftotext()
	if err != nil {
		return nil, err
	}
	src, err := regularFile(pdfPath, "PDF file")
	if err != nil {
		return nil, err
	}
	ctx, cancel := context.WithTimeout(ctx, TextTimeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, tool, "-layout", "-enc", "UTF-8", "-eol", "unix", src, "-")
	var stdout, stderr bytes.Buffer
	cmd.Stdout = &stdout
	cmd.Stderr = &stderr
	cmd.WaitDelay = 5 * time.Second
	if err := cmd.Run(); err != nil {
		if ctx.Err() != nil {
			err = fmt.Errorf("%w (at most %v allowed)", ctx.Err(), TextTimeout)
		}
		msg := strings.TrimSpace(stderr.String())
		if len(msg) > 2000 {
			msg = msg[:2000] + "…"
		}
		if msg != "" {
			msg = ": " + msg
		}
		return nil, fmt.Errorf("pdftotext could not read %s: %v%s", src, err, msg)
	}
	text := stdout.String()
	if text == "" {
		return nil, nil
	}
	pages := strings.Split(text, "\f")
	if strings.HasSuffix(text, "\f") {
		pages = pages[:len(pages)-1]
	}
	return pages, nil
}
