package kind_test

import (
	"testing"

	"calcdoc/calcdoc/kind"
	"calcdoc/render/markup"
)

// Every shipped kind is a whole unit: it owns a word, evaluates and draws
// (a kind without a drawing would show its blocks as plain code). The
// words are the six of LANGUAGE.md section 1.
func TestStandardKindsAreWhole(t *testing.T) {
	kinds := kind.Standard().Kinds()
	if len(kinds) != 6 {
		t.Fatalf("%d kinds, want 6", len(kinds))
	}
	for _, k := range kinds {
		if len(k.Words()) == 0 {
			t.Errorf("%T owns no word", k)
		}
		if _, ok := k.(markup.Drawer); !ok {
			t.Errorf("kind %v has no drawing (markup.Drawer)", k.Words())
		}
	}
	for _, w := range []string{"calc", "solve", "phasors", "sweep", "network", "table"} {
		if kind.Standard().Lookup(w) == nil {
			t.Errorf("no kind owns %q (LANGUAGE.md names it)", w)
		}
	}
}
