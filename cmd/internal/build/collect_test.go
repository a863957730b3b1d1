package build

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// A folder takes a document whose only calc block is in a blockquote, and
// leaves one whose only fenced block is python.
func TestCollectFindsBlockInBlockquote(t *testing.T) {
	dir := t.TempDir()
	write := func(name, src string) {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("quoted.md", "# Note\n\n> ```calc\n> x = 1 V\n> ```\n")
	write("script.md", "# Script\n\n```python\nx = 1\n```\n")
	in, err := Collect([]string{dir}, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	if len(in) != 1 || in[0].Rel != "quoted.md" {
		t.Fatalf("collected %v, want only quoted.md", in)
	}
	// named, the quoted document evaluates its block
	d, err := calcdoc.Load(in[0].Path, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Blocks) != 1 || len(d.Values) != 1 {
		t.Errorf("blocks %d values %d, want 1 and 1", len(d.Blocks), len(d.Values))
	}
	// a folder with only the python document has none
	only := t.TempDir()
	if err := os.WriteFile(filepath.Join(only, "script.md"), []byte("```python\nx = 1\n```\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Collect([]string{only}, kind.Standard()); err == nil || !strings.Contains(err.Error(), "no document with a calc, network, phasors, solve, sweep or table block") {
		t.Errorf("a folder with only a python block: error %v", err)
	}
}
