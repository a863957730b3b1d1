package gfmhtml

import (
	"bytes"
	"testing"

	"calcdoc/calcdoc/gfm"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/renderer"
	"github.com/yuin/goldmark/util"
)

// The copy (calcdoc/calcdoc/gfm's parsers, this package's renderers)
// writes the HTML that goldmark's own extension package writes: the
// reference is goldmark v1.8.7 itself, given the same Markdown. The
// inputs include the table examples of the GitHub Flavored Markdown
// specification (version 0.29-gfm, section 4.10, examples 198 to 205:
// alignment, escaped pipes, a table ended by a block quote or a blank
// line, a header that does not match the delimiter row, cells missing
// or in excess, a table with no body) and its strikethrough examples
// (section 6.5, examples 491 and 492).
func TestCopyWritesWhatGoldmarkWrites(t *testing.T) {
	inputs := []string{
		"| foo | bar |\n| --- | --- |\n| baz | bim |\n",
		"| abc | defghi |\n:-: | -----------:\nbar | baz\n",
		"| f\\|oo  |\n| ------ |\n| b `\\|` az |\n| b **\\|** im |\n",
		"| abc | def |\n| --- | --- |\n| bar | baz |\n> bar\n",
		"| abc | def |\n| --- | --- |\n| bar | baz |\nbar\n\nbar\n",
		"| abc | def |\n| --- |\n| bar |\n",
		"| abc | def |\n| --- | --- |\n| bar |\n| bar | baz | boo |\n",
		"| abc | def |\n| --- | --- |\n",
		"~~Hi~~ Hello, world!\n",
		"This ~~has a\n\nnew paragraph~~.\n",
		"# Cables\n\n| Circuit | I_b [A] | Cable |\n|:--|--:|:-:|\n| L1 | 16 | 2.5 mm² ~~1.5~~ |\n| P1 | 32 | 6 mm² |\n\nText with ~~struck~~ words and a `code | span`.\n",
	}
	ours := goldmark.New(goldmark.WithExtensions(gfm.Table, gfm.Strikethrough))
	ours.Renderer().AddOptions(renderer.WithNodeRenderers(
		util.Prioritized(NewTableHTMLRenderer(), 500),
		util.Prioritized(NewStrikethroughHTMLRenderer(), 500),
	))
	theirs := goldmark.New(goldmark.WithExtensions(extension.Table, extension.Strikethrough))
	tables, dels := 0, 0
	for _, in := range inputs {
		var a, b bytes.Buffer
		if err := ours.Convert([]byte(in), &a); err != nil {
			t.Fatal(err)
		}
		if err := theirs.Convert([]byte(in), &b); err != nil {
			t.Fatal(err)
		}
		if a.String() != b.String() {
			t.Errorf("%q:\ncopy:     %s\ngoldmark: %s", in, a.String(), b.String())
		}
		tables += bytes.Count(a.Bytes(), []byte("<table>"))
		dels += bytes.Count(a.Bytes(), []byte("<del>"))
	}
	// the spec's outcomes: a table in every table example but 203 (a
	// header that does not match the delimiter row is a paragraph), a
	// strikethrough in 491 and two in the last input, none in 492
	if tables != 8 || dels != 3 {
		t.Errorf("%d tables and %d strikethroughs, want 8 and 3", tables, dels)
	}
}
