package calcdoc

import (
	"sort"
	"strings"
	"testing"

	"calcdoc/expr"
)

// TestTextMentionsWords: the names a block's text may mention, by hand
// derivation from the rule (incremental.go, mentions): each run of
// letters, digits, '_', '.' and characters beyond ASCII, whole and cut at
// its dots, each without its leading digits and dots; a word left empty
// (a number) is none.
//
//	"L_1 = 21 m"          L_1, m          (21 is a number)
//	"Z = 0.727 Ω/km * L_1" Z, Ω, km, L_1   (0.727, 0 and 727 are numbers)
//	"x2 = 2x # cu.R_20"   x2, x, cu.R_20, cu, R_20   (2x: x after its digit)
func TestTextMentionsWords(t *testing.T) {
	b := &Block{Lines: []string{"L_1 = 21 m", "Z = 0.727 Ω/km * L_1", "x2 = 2x # cu.R_20"}}
	var got []string
	for k := range textMentions(b) {
		got = append(got, k)
	}
	sort.Strings(got)
	want := []string{"L_1", "R_20", "Z", "cu", "cu.R_20", "km", "m", "x", "x2", "Ω"}
	for i, w := range want {
		want[i] = expr.NameKey(w)
	}
	sort.Strings(want)
	if strings.Join(got, " ") != strings.Join(want, " ") {
		t.Errorf("mentions %q, want %q", got, want)
	}
}
