package pdf

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestFindExecutable(t *testing.T) {
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
			got, err := findExecutable(tc.candidates, ErrNoChromium)
			if tc.want == "" {
				if !errors.Is(err, ErrNoChromium) {
					t.Fatalf("got %q, %v; want ErrNoChromium", got, err)
				}
				if !strings.Contains(err.Error(), "apt-get install chromium") {
					t.Errorf("error %q does not say how to install chromium", err)
				}
				return
			}
			if err != nil || got != tc.want {
				t.Errorf("got %q, %v; want %q", got, err, tc.want)
			}
		})
	}
}
