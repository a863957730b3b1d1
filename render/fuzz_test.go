package render

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
)

// FuzzDocument feeds random Markdown with blocks through the whole
// document layer and the sheet: it never panics, every error lies inside
// the document, and a sheet is always written.
//
//	go test ./render -run XXX -fuzz FuzzDocument -fuzztime 10m
func FuzzDocument(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("..", "examples", "*.md"))
	for _, s := range seeds {
		if b, err := os.ReadFile(s); err == nil {
			f.Add(b)
		}
	}
	for _, s := range []string{
		"```calc\nx = (1 +\n```\n",
		"---\ndigits: 3\n---\n```calc\na = 1 V\nb[kV] = a * 2\ncheck b > 1 V\n```\n`=b`\n",
		"```solve x[V]\nx = 2 V\n```\n",
		"```phasors a, b\ncap\n```\n",
		"```sweep f = 1 Hz .. 10 Hz log 5\n|1 Ω + j*f*1 Ω/Hz|\n```\n",
		"<b>raw</b> `=1/0` ![i](x)\n",
		"---\nrevisions: [1, 2]\n---\n",
		"```network\nground N\ng: N -> A source 10 V, Z 1 Ω\nl: A -> N Z 4 Ω\n```\n",
		"```table t\nsource: test\nx [A] | y [s]\n1 | 2\n3 | \n```\n```calc\nv = interp(t.y, 2 A)\n```\n",
		"```calc\nuse a from other.md\n```\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, src []byte) {
		if len(src) > 1<<16 {
			return
		}
		doc := calcdoc.Parse("fuzz.md", src, kind.Standard())
		lines := strings.Split(string(doc.Text), "\n")
		for _, e := range append(append(expr.ErrorList{}, doc.Errors...), doc.Warnings...) {
			l, c := e.Pos.Line(), e.Pos.Col()
			if l < 1 || l > len(lines) {
				t.Fatalf("error line %d outside 1..%d: %s", l, len(lines), e.Msg)
			}
			if c < 1 || c > utf8.RuneCountInString(lines[l-1])+1 {
				t.Fatalf("error column %d outside line %d (%q): %s", c, l, lines[l-1], e.Msg)
			}
		}
		if _, err := Sheet(doc, Options{Version: "fuzz", EmbedSource: true}); err != nil {
			t.Fatalf("no sheet: %v", err)
		}
	})
}
