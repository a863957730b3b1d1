package calcdoc_test

import (
	"path/filepath"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// TestLoaderOverlay: a use statement reads the overlay's bytes of a
// document (an editor's unsaved buffer) instead of the disk, and the disk
// when the overlay has none. Hand derivation: the disk says U = 100 V, the
// overlay 230 V; 2·230 V = 460 V.
func TestLoaderOverlay(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{
		"src.md": "```calc\nU = 100 V\n```\n",
		"use.md": "```calc\nuse U from src.md\nV = 2 * U\n```\n",
	})
	user := filepath.Join(dir, "use.md")
	src := []byte("```calc\nuse U from src.md\nV = 2 * U\n```\n")
	value := func(l *calcdoc.Loader) float64 {
		t.Helper()
		d := calcdoc.ParseWith(user, src, kinds, calcdoc.Inputs{Sheets: l.Sheets(user)})
		if len(d.Errors) > 0 {
			t.Fatalf("errors: %v", d.Errors)
		}
		v := d.Env.Lookup("V").Value.(*expr.Scalar)
		return real(v.Z)
	}
	l := calcdoc.NewLoader(kinds)
	if got := value(l); got != 200 {
		t.Errorf("from the disk: V = %g V, want 200 V", got)
	}
	want := calcdoc.RealPath(filepath.Join(dir, "src.md"))
	l = calcdoc.NewLoader(kinds)
	l.SetOverlay(func(real string) ([]byte, bool) {
		if real == want {
			return []byte("```calc\nU = 230 V\n```\n"), true
		}
		return nil, false
	})
	if got := value(l); got != 460 {
		t.Errorf("from the overlay: V = %g V, want 460 V", got)
	}
}
