package calcdoc_test

import (
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

// A registry refuses a word owned by two kinds.
func TestRegistryDuplicateWord(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("no panic for a word owned twice")
		}
	}()
	calcdoc.NewRegistry(calc.Kind, calc.Kind)
}
