package pdftest

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

// recorder is a testing.TB that records Fatalf and Skipf instead of ending
// the test, so the skip rule itself can be checked.
type recorder struct {
	testing.TB
	fatal, skip string
}

func (r *recorder) Helper()                           {}
func (r *recorder) Fatalf(format string, args ...any) { r.fatal = fmt.Sprintf(format, args...) }
func (r *recorder) Skipf(format string, args ...any)  { r.skip = fmt.Sprintf(format, args...) }

func TestSkipRule(t *testing.T) {
	missing := errors.New("chromium is not installed; on Debian: apt-get install chromium")
	tests := []struct {
		name      string
		require   string // value of CALCDOC_REQUIRE_BROWSER
		found     bool
		wantPath  string
		wantFatal bool
		wantSkip  bool
	}{
		{name: "found", found: true, wantPath: "/opt/x/chromium"},
		{name: "found, required", require: "1", found: true, wantPath: "/opt/x/chromium"},
		{name: "missing", wantSkip: true},
		{name: "missing, required", require: "1", wantFatal: true},
		{name: "missing, variable not 1", require: "yes", wantSkip: true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Setenv(RequireEnv, tc.require)
			r := &recorder{TB: t}
			got := need(r, func() (string, error) {
				if tc.found {
					return "/opt/x/chromium", nil
				}
				return "", missing
			})
			if got != tc.wantPath {
				t.Errorf("path = %q, want %q", got, tc.wantPath)
			}
			if (r.fatal != "") != tc.wantFatal || (r.skip != "") != tc.wantSkip {
				t.Fatalf("fatal %q, skip %q; want fatal %v, skip %v", r.fatal, r.skip, tc.wantFatal, tc.wantSkip)
			}
			// The message says how to install the tool.
			if msg := r.fatal + r.skip; (tc.wantFatal || tc.wantSkip) && !strings.Contains(msg, "apt-get install chromium") {
				t.Errorf("message %q does not say how to install chromium", msg)
			}
		})
	}
}
