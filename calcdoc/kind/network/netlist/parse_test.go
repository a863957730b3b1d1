package netlist

import (
	"strings"
	"testing"

	"calcdoc/expr"
)

func parse(text, tag string) (*Netlist, expr.ErrorList) {
	lines := strings.Split(text, "\n")
	at := []expr.Position{{Line: 1, Col: 12}}
	for i := range lines {
		at = append(at, expr.Position{Line: i + 2, Col: 1})
	}
	pos := expr.Place(append([]string{tag}, lines...), at)
	return Parse(lines, pos[1:], tag, pos[0])
}

// TestParseExample reads the example of LANGUAGE.md section 11 and a
// transformer and a coupling, and checks what each line gives.
func TestParseExample(t *testing.T) {
	n, errs := parse(`ground N   # the star point
grid:  N -> A  source 6.35 kV∠0°, Z (0.35 + j2.1) Ω
feed:  A -> B  Z (0.19 + j0.34) Ω/km * 6 km
bank:  B -> N  Y j2.479 mS
mill:  B -> N  Z Z_L
drive: B -> N  current 12 A∠-40°
# the second part
tx: B → N ratio (11 kV / 0.4 kV)∠-30° to S -> n
ground n
l_1: S -> n Z polar(3 Ω, 20°)   # a load
couple feed, mill Z j0.1 Ω
x2: 7 -> 12 Y 1 S`, "")
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	if len(n.Branches) != 8 || len(n.Grounds) != 2 || len(n.Couples) != 1 || len(n.Notes) != 1 || len(n.Lines) != 12 {
		t.Fatalf("%d branches, %d grounds, %d couples, %d notes, %d lines", len(n.Branches), len(n.Grounds), len(n.Couples), len(n.Notes), len(n.Lines))
	}
	g := n.Branches[0]
	if g.Name != "grid" || g.From.Name != "N" || g.To.Name != "A" || g.Element != Source || g.SeriesZ == nil {
		t.Errorf("grid: %+v", g)
	}
	// positions: the series Z expression starts at column 35 of line 3
	if p := g.SeriesZ.Pos(); p.Position().InFile() != (expr.Position{Line: 3, Col: 37}) {
		t.Errorf("series Z at %v", p)
	}
	if p := g.Value.Pos(); p.Position().InFile() != (expr.Position{Line: 3, Col: 23}) {
		t.Errorf("source value at %v", p)
	}
	tx := n.Branches[5]
	if tx.Element != Ratio || tx.From2.Name != "S" || tx.To2.Name != "n" || tx.To.Name != "N" {
		t.Errorf("tx: %+v", tx)
	}
	if n.Branches[6].Comment != "a load" || n.Grounds[0].Comment != "the star point" {
		t.Errorf("comments %q %q", n.Branches[6].Comment, n.Grounds[0].Comment)
	}
	if c := n.Couples[0]; c.A != "feed" || c.B != "mill" || c.APos.Position().InFile() != (expr.Position{Line: 12, Col: 8}) {
		t.Errorf("couple %+v", c)
	}
	if b := n.Branches[7]; b.From.Name != "7" || b.To.Name != "12" || b.Element != Admittance {
		t.Errorf("x2 %+v", b)
	}
	// the tag suffixes every defined name
	n, _ = parse("ground 0\na: 0 -> 1 Z 1 Ω", "zero")
	if n.VoltageName("1") != "V_1_zero" || n.CurrentName("a") != "I_a_zero" || n.PowerName("a") != "S_a_zero" {
		t.Errorf("tagged names %s %s %s", n.VoltageName("1"), n.CurrentName("a"), n.PowerName("a"))
	}
}

// TestParseErrors: every malformed line gives an error at its place
// that says the form.
func TestParseErrors(t *testing.T) {
	for _, c := range []struct {
		line string
		col  int
		want string
	}{
		{"a: A B Z 1 Ω", 6, "an arrow -> is missing after the node A"},
		{"a: A -> B W 1 Ω", 11, `"W" is not an element`},
		{"a: A -> B", 10, "the branch a has no element"},
		{"a: A -> B Z", 12, "has no value"},
		{"a: A -> B Z 1 Ω[kΩ]", 16, "takes no display bracket"},
		{"a: A -> B Z (1 Ω", 13, "unclosed"},
		{"a: -> B Z 1 Ω", 4, "the node the branch starts from"},
		{"a: A -> 1x Z 1 Ω", 9, "neither a name nor a whole number"},
		{"1: A -> B Z 1 Ω", 1, "is a number"},
		{"a: A -> B source 1 V, 2 Ω", 23, "series impedance, written Z z"},
		{"a: A -> B source 1 V, Z 1 Ω, Z 2 Ω", 28, "at most one series impedance"},
		{"a: A -> B ratio 10 S -> n", 17, "a transformer is written"},
		{"a: A -> B ratio 10 to S n", 17, "a transformer is written"},
		{"couple a b Z 1 Ω", 10, "a comma is missing after a"},
		{"couple a, b 1 Ω", 13, "is written Z z_m"},
		{"ground", 7, "the ground node is missing"},
		{"ground A B", 10, "a ground line names one node"},
		{"network pos", 1, "on its opening line"},
		{"feed A -> B Z 1 Ω", 1, `"feed" is not a network line`},
		{"-> B", 1, "a network line is a branch"},
		{"a: Α -> B Z 1 Ω", 4, "looks like the Latin A"},
	} {
		_, errs := parse(c.line, "")
		if len(errs) == 0 {
			t.Errorf("%q: no error", c.line)
			continue
		}
		if errs[0].Pos.Position().InFile() != (expr.Position{Line: 2, Col: c.col}) || !strings.Contains(errs[0].Msg, c.want) {
			t.Errorf("%q: %v, want at 2:%d %q", c.line, errs[0], c.col, c.want)
		}
	}
	_, errs := parse("a: A -> B Z 1 Ω", "p-q")
	if len(errs) == 0 || errs[0].Pos.Position().InFile() != (expr.Position{Line: 1, Col: 12}) {
		t.Errorf("bad tag: %v", errs)
	}
}

// TestCheckErrors: errors of the netlist as a whole that the solve tests
// (package mna) do not reach.
func TestCheckErrors(t *testing.T) {
	for _, c := range []struct {
		text string
		want string
	}{
		{"ground 0\na: 0 -> 0 Z 1 Ω", "goes from node 0 to the same node"},
		{"ground 0\nground 0\na: 0 -> A Z 1 Ω\nb: A -> 0 Z 1 Ω", "named a ground twice"},
		{"ground X\na: 0 -> A Z 1 Ω\nb: A -> 0 Z 1 Ω", "no branch of the network joins the ground node X"},
		{"ground 0\na: 0 -> A Z 1 Ω\nb: A -> 0 Z 1 Ω\ncouple a, c Z 1 Ω", "there is no branch c"},
		{"ground 0\na: 0 -> A Z 1 Ω\nb: A -> 0 Y 1 S\ncouple a, b Z 1 Ω", "b is a admittance"},
		{"ground 0\na: 0 -> A Z 1 Ω\nb: A -> 0 Z 1 Ω\ncouple a, a Z 1 Ω", "coupled with itself"},
		{"ground 0\na: 0 -> A Z 1 Ω\nb: A -> 0 Z 1 Ω\ncouple a, b Z 1 Ω\ncouple b, a Z 1 Ω", "coupled twice"},
		{"ground 0", "the network has no branches"},
	} {
		n, errs := parse(c.text, "")
		if len(errs) > 0 {
			t.Fatalf("%q: %v", c.text, errs)
		}
		_, errs = Check(n, nil)
		if len(errs) == 0 || !strings.Contains(errs.Error(), c.want) {
			t.Errorf("%q: %v, want %q", c.text, errs, c.want)
		}
	}
}
