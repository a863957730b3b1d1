package preview

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/render"
)

// belowDoc is a long document of our own invention whose first block
// defines p_1 and p_2 (first, its lines as given) and whose blocks
// below either use neither (kind 1), use p_1 (kind 0), use p_2 (kind 2),
// or use p_1 through a value of a block above (kind 3). Every line of the
// first block is padded to one width, so that an edit of it that keeps
// the line's length moves nothing below.
func belowDoc(first []string, blocks int) string {
	var b strings.Builder
	b.WriteString("---\ntitle: Below the first change\n---\n\n# Feeder\n\n```calc\n")
	for _, l := range first {
		fmt.Fprintf(&b, "%-28s\n", l)
	}
	b.WriteString("```\n\n")
	for i := 0; i < blocks; i++ {
		fmt.Fprintf(&b, "## Branch %d\n\n", i)
		if i == 5 {
			b.WriteString("The load of branch 1 is `=w_1`.\n\n")
		}
		b.WriteString("```calc\n")
		switch i % 4 {
		case 0:
			fmt.Fprintf(&b, "d_%d = p_1 * %d\ncheck |d_%d| <= 10 kV   # insulation\n", i, i+1, i)
		case 1:
			fmt.Fprintf(&b, "q_%d = (5 + %d) Ω   # branch resistance\nw_%d = q_%d * 3 A\ncheck |w_%d| <= 1 kV\n", i, i, i, i, i)
		case 2:
			fmt.Fprintf(&b, "e_%d = p_2 / %d\ng_%d = e_%d * 4 Ω\n", i, i, i, i)
		default:
			fmt.Fprintf(&b, "t_%d = d_%d + 1 V\n", i, i-3)
		}
		b.WriteString("```\n\n")
	}
	return b.String()
}

// TestBelowFirstChange edits the first block of a long document, mostly in
// place (its length kept, so nothing below moves; or its lines kept, so
// the text below moves by some bytes but every place in it keeps its line
// and column; once a line added: everything below on another line), and
// checks, after each edit,
// that the sheet drawn from the save before (calcdoc.Reevaluate and the
// block cache) is byte for byte the full build's, that every calc block
// below that reads none of the names whose definition changed was copied
// from the sheet before (all of them drawn after the line added), and
// that every block that reads one was drawn.
func TestBelowFirstChange(t *testing.T) {
	const blocks = 24
	dir := t.TempDir()
	path := filepath.Join(dir, "doc.md")
	if err := os.WriteFile(path, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	in := calcdoc.Inputs{Root: dir}
	cache := &render.BlockCache{}
	var prev *calcdoc.Document
	// changed: the names whose final definition (place, value or
	// display) the edit changed: the blocks below that read p_1 are of
	// kind 0, those that read p_2 of kind 2; moved: p_1's value moved,
	// and with it the values of kind 0 that kind 3 reads
	steps := []struct {
		what    string
		first   []string
		changed []string
		moved   bool
	}{
		{"the first save", []string{"p_1 = 230 V   # supply", "p_2 = 10 A    # load"}, nil, false},
		{"a number changed in place", []string{"p_1 = 240 V   # supply", "p_2 = 10 A    # load"}, []string{"p_1"}, true},
		{"a comment changed", []string{"p_1 = 240 V   # source", "p_2 = 10 A    # load"}, nil, false},
		{"a value written anew, the same value", []string{"p_1 = 240 V   # source", "p_2 = 10.0 A  # load"}, nil, false},
		// a literal's unit is the display of the value it defines
		{"the same value with no literal's unit", []string{"p_1 = 240 V   # source", "p_2 = 2*5 A   # load"}, []string{"p_2"}, false},
		{"another number changed in place", []string{"p_1 = 240 V   # source", "p_2 = 12 A    # feed"}, []string{"p_2"}, false},
		{"a display unit", []string{"p_1[kV] = 240 V   # source", "p_2 = 12 A    # feed"}, []string{"p_1"}, false},
		{"the display unit taken out", []string{"p_1 = 240 V   # source", "p_2 = 12 A    # feed"}, []string{"p_1"}, false},
		{"a definition moved", []string{"p_2 = 12 A    # feed", "p_1 = 240 V   # source"}, []string{"p_1", "p_2"}, false},
		{"the same value written otherwise", []string{"p_2 = 12 A    # feed", "p_1 = 0.24 kV # source"}, []string{"p_1"}, false},
		// the text below moves by some bytes, its lines stay
		{"a line made longer, the same value", []string{"p_2 = 12 A    # feed", "p_1 = 0.24000000000000 kV   # source"}, nil, false},
		{"a line made longer, another value", []string{"p_2 = 12.5 A    # feed of the branches", "p_1 = 0.24000000000000 kV   # source"}, []string{"p_2"}, false},
		{"a line made shorter, the same value", []string{"p_2 = 12.5 A", "p_1 = 0.24000000000000 kV   # source"}, nil, false},
		// every block below on another line
		{"a line added", []string{"p_2 = 12.5 A", "p_1 = 0.24000000000000 kV   # source", "p_3 = 1"}, []string{"all"}, false},
		{"saved unchanged", []string{"p_2 = 12.5 A", "p_1 = 0.24000000000000 kV   # source", "p_3 = 1"}, nil, false},
	}
	for n, st := range steps {
		src := []byte(belowDoc(st.first, blocks))
		full, inc, _, diff := incrementalAgainstFull(t, prev, path, src, in, cache)
		if len(full.Errors) > 0 {
			t.Fatalf("%s: the document has errors: %v", st.what, full.Errors[0])
		}
		if diff != "" {
			t.Fatalf("%s: %s", st.what, diff)
		}
		prev = inc
		if n == 0 {
			continue
		}
		p1, p2, all := false, false, false
		for _, c := range st.changed {
			p1, p2, all = p1 || c == "p_1", p2 || c == "p_2", all || c == "all"
		}
		wantCopied, wantDrawn := 0, 0
		if st.what == "saved unchanged" {
			wantCopied = blocks + 1 // the first block taken over too
		} else {
			wantDrawn = 1 // the first block, whose text changed
		}
		for i := 0; i < blocks; i++ {
			if k := i % 4; all || k == 0 && p1 || k == 3 && st.moved || k == 2 && p2 {
				wantDrawn++
			} else if st.what != "saved unchanged" {
				wantCopied++
			}
		}
		if cache.Copied != wantCopied || cache.Drawn != wantDrawn {
			t.Errorf("%s: %d calc blocks copied and %d drawn, want %d and %d", st.what, cache.Copied, cache.Drawn, wantCopied, wantDrawn)
		}
	}
}
