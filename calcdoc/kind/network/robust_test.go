package network

import (
	"strings"
	"testing"
)

// TestOddBlocksDoNotCrash: blocks that stop at every stage (nothing in
// them, a bad line, a bad tag, only a ground, an element that fails to
// evaluate, a singular set) each give an error through the document and a
// sheet, every error with its position, and nothing crashes.
func TestOddBlocksDoNotCrash(t *testing.T) {
	for _, c := range []struct{ info, body string }{
		{"network", ""},
		{"network", "ground 0"},
		{"network", "this is not a branch"},
		{"network a b", "ground 0\ng: 0 -> A source 1 V, Z 1 Ω\nr: A -> 0 Z 1 Ω"},
		{"network", "ground 0\ng: 0 -> A source 1 V, Z 1 Ω\nr: A -> 0 Z 1 A"},
		{"network", "ground 0\ng: 0 -> A source 1 V, Z 1 Ω\nr: A -> 0 Z 1 Ω\ny1: A -> B Y 0 S\ny2: B -> 0 Y 0 S"},
		{"network", "ground 0\ng: 0 -> A source 1 V, Z 1 Ω\nr: A -> 0 Z 1 Ω\ncouple r, q Z 1 Ω"},
		{"network", "ground 0\ng: 0 -> A source 1 V, Z 1 Ω\nr: A -> 0 Z (1 Ω"},
	} {
		d := parse(t, "```"+c.info, c.body, "```", "", "```calc", "x = 2 * V_A", "```")
		if len(d.Errors) == 0 {
			t.Errorf("%q / %q: no error", c.info, c.body)
		}
		for _, e := range d.Errors {
			if !e.Pos.IsValid() {
				t.Errorf("%q / %q: error without a position: %v", c.info, c.body, e)
			}
		}
		page := sheet(t, d)
		if !strings.Contains(page, "class=\"block network\"") {
			t.Errorf("%q / %q: no network block on the sheet", c.info, c.body)
		}
	}
}
