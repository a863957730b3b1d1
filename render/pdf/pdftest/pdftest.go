// Package pdftest holds test helpers for packages whose tests print PDFs
// with calcdoc/render/pdf.
//
// A missing tool skips the test with a message saying how to install it,
// unless the environment variable CALCDOC_REQUIRE_BROWSER is "1", as on a
// machine that must run these tests (CI), where it fails the test instead.
package pdftest

import (
	"os"
	"testing"

	"calcdoc/render/pdf"
)

// RequireEnv names the variable that turns a missing tool from a skip into
// a failure when it is "1".
const RequireEnv = "CALCDOC_REQUIRE_BROWSER"

// Chromium returns the path of the Chromium that pdf.Print uses, or skips
// (or, with CALCDOC_REQUIRE_BROWSER=1, fails) the test when there is none.
func Chromium(t testing.TB) string {
	t.Helper()
	return need(t, pdf.FindChromium)
}

// Pdftotext returns the path of the pdftotext that pdf.PDFText uses, or
// skips (or, with CALCDOC_REQUIRE_BROWSER=1, fails) the test when there is
// none. A test that prints a PDF and reads it back calls both helpers.
func Pdftotext(t testing.TB) string {
	t.Helper()
	return need(t, pdf.FindPdftotext)
}

func need(t testing.TB, find func() (string, error)) string {
	t.Helper()
	p, err := find()
	if err == nil {
		return p
	}
	if os.Getenv(RequireEnv) == "1" {
		t.Fatalf("%v (%s=1: this test must run here)", err, RequireEnv)
		return ""
	}
	t.Skipf("%v (set %s=1 to make this a failure)", err, RequireEnv)
	return ""
}
