package calcdoc_test

import (
	"fmt"
	"math/rand"
	"strings"
	"testing"
	"unicode/utf8"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// naivePos is the line and column of byte offset off of src as a reader
// counts them, from scratch: a byte-order mark at the start is not seen,
// a line ends at "\r\n", a lone "\r" or "\n", and a column counts
// characters (a tab is one).
func naivePos(src string, off int) expr.Position {
	start := 0
	if strings.HasPrefix(src, "\uFEFF") {
		start = len("\uFEFF")
	}
	line, col := 1, 1
	for i := start; i < off; {
		switch {
		case strings.HasPrefix(src[i:], "\r\n"):
			line, col, i = line+1, 1, i+2
		case src[i] == '\r' || src[i] == '\n':
			line, col, i = line+1, 1, i+1
		default:
			_, w := utf8.DecodeRuneInString(src[i:])
			col, i = col+1, i+w
		}
	}
	return expr.Position{Line: line, Col: col}
}

// TestPositionsAgainstANaiveCount: for random documents (a fixed seed)
// holding multi-byte characters, tabs, front matter, a byte-order mark and
// LF, CR LF or lone CR line ends, every error of an unknown name and every
// defined value stands at the line and column a naive count of the source
// gives for where that name is written. Each marker name zqNw is used once
// and never defined, so each gives one "unknown name" error at itself.
func TestPositionsAgainstANaiveCount(t *testing.T) {
	rng := rand.New(rand.NewSource(13))
	prose := []string{"Prose é and Ω", "tabbed\t∠ line\twith tabs", "日本語 text", "plain", "", "µ\t∥\tΩ"}
	stmts := []string{
		"y%d = zq%dw",
		"y%d = 2 Ω\t∥ zq%dw # ü note",
		"y%d = 230 V∠-120° + zq%dw",
		"\ty%d =\t(1 +\n zq%dw)",
	}
	for doc := 0; doc < 200; doc++ {
		var b strings.Builder
		if rng.Intn(3) == 0 {
			b.WriteString("\uFEFF")
		}
		if rng.Intn(2) == 0 {
			b.WriteString("---\ntitle: Überschlag ∠\ndigits: 4\n---\n")
		}
		k, ok := 0, 0
		for part := 0; part < 8; part++ {
			switch rng.Intn(3) {
			case 0:
				b.WriteString(prose[rng.Intn(len(prose))] + "\n\n")
			case 1:
				b.WriteString("```calc\n")
				for n := rng.Intn(4); n >= 0; n-- {
					k++
					b.WriteString(fmt.Sprintf(stmts[rng.Intn(len(stmts))], k, k) + "\n")
					if rng.Intn(2) == 0 {
						ok++
						b.WriteString(fmt.Sprintf("\tv%d_ok = 2 kV\t∠ 30° # é\n", ok))
					}
				}
				b.WriteString("```\n\n")
			case 2:
				k++
				b.WriteString(fmt.Sprintf("%s `=zq%dw + 1` and\t`=Ω`\n\n", prose[rng.Intn(len(prose))], k))
			}
		}
		src := b.String()
		switch rng.Intn(3) {
		case 1:
			src = strings.ReplaceAll(src, "\n", "\r\n")
		case 2:
			src = strings.ReplaceAll(src, "\n", "\r")
		}
		d := calcdoc.Parse("rand.md", []byte(src), kinds)
		unknown := 0
		for _, e := range d.Errors {
			if !strings.HasPrefix(e.Msg, "unknown name \"zq") {
				continue
			}
			unknown++
			name := strings.Split(e.Msg, "\"")[1]
			want := naivePos(src, strings.Index(src, name))
			if got := e.Pos.Position().InFile(); got != want {
				t.Fatalf("document %d: %s at %v, counted %v\n%q", doc, e.Msg, got, want, src)
			}
		}
		if unknown != k {
			t.Fatalf("document %d: %d unknown-name errors, want %d: %v", doc, unknown, k, d.Errors)
		}
		if len(d.Values) != ok {
			t.Fatalf("document %d: %d values, want %d", doc, len(d.Values), ok)
		}
		for _, v := range d.Values {
			off := strings.Index(src, v.Name+" =")
			if got, want := v.Pos.Position().InFile(), naivePos(src, off); got != want {
				t.Fatalf("document %d: value %s at %v, counted %v", doc, v.Name, got, want)
			}
		}
	}
}
