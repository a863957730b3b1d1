package render

import (
	"testing"

	"calcdoc/calcdoc"
)

// Every shipped kind is a whole unit: it owns a word, evaluates and draws
// (a kind without a drawing would show its blocks as plain code).
func TestStandardKindsAreWhole(t *testing.T) {
	kinds := Standard().Kinds()
	if len(kinds) == 0 {
		t.Fatal("no kinds")
	}
	for _, k := range kinds {
		if len(k.Words()) == 0 {
			t.Errorf("%T owns no word", k)
		}
		if _, ok := k.(Drawer); !ok {
			t.Errorf("kind %v has no drawing (Drawer)", k.Words())
		}
		var _ calcdoc.Kind = k
	}
	for _, w := range []string{"calc", "solve", "phasors", "sweep"} {
		if Standard().Lookup(w) == nil {
			t.Errorf("no kind owns %q (LANGUAGE.md names it)", w)
		}
	}
}
