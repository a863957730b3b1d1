package calcdoc_test

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/calc"
)

// A document is a calculation when a fenced block starts with a word of
// the registry (LANGUAGE.md: the info string's first word names the kind),
// wherever the block stands: a blockquote and a list item hold blocks as
// the top level does (CommonMark 0.31, sections 5.1 and 5.2).
func TestHasBlock(t *testing.T) {
	for src, want := range map[string]bool{
		"```calc\nx=1\n```":                     true,
		"~~~solve x\n~~~":                       true,
		"```calculator\n```":                    false,
		"```python\ncalc\n```":                  false,
		"text\n   ```calc\n```\n":               true,
		"> ```calc\n> x = 1\n> ```\n":           true,
		"- item\n\n  ```calc\n  x = 1\n  ```\n": true,
		"    ```calc\n    x = 1\n":              false, // an indented code block, not a fence
		"```sweep f from 1 Hz to 2 Hz\n```":     true,
	} {
		if kinds.HasBlock([]byte(src)) != want {
			t.Errorf("HasBlock(%q) != %v", src, want)
		}
	}
}

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
	in, err := calcdoc.Collect([]string{dir}, kinds)
	if err != nil {
		t.Fatal(err)
	}
	if len(in) != 1 || in[0].Rel != "quoted.md" {
		t.Fatalf("collected %v, want only quoted.md", in)
	}
	// named, the quoted document evaluates its block
	d, err := calcdoc.Load(in[0].Path, kinds)
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
	if _, err := calcdoc.Collect([]string{only}, kinds); err == nil || !strings.Contains(err.Error(), "no document with a calc, phasors, solve or sweep block") {
		t.Errorf("a folder with only a python block: error %v", err)
	}
}

// A registry refuses a word owned by two kinds.
func TestRegistryDuplicateWord(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("no panic for a word owned twice")
		}
	}()
	calcdoc.NewRegistry(calc.Kind, calc.Kind)
}
