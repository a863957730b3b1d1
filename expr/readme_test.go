package expr

import (
	"os"
	"regexp"
	"sort"
	"strings"
	"testing"
)

// readmeTable returns the first cells of the Markdown table that follows
// the first line of the README starting with after, split into the words
// written in backticks: "`re im abs`" gives re, im, abs; "`atan2(y, x)`"
// gives atan2.
func readmeTable(t *testing.T, after string) []string {
	t.Helper()
	b, err := os.ReadFile("../README.md")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(b), "\n")
	start := -1
	for i, l := range lines {
		if strings.HasPrefix(l, after) {
			start = i
			break
		}
	}
	if start < 0 {
		t.Fatalf("README has no line starting %q", after)
	}
	code := regexp.MustCompile("`([^`]*)`")
	args := regexp.MustCompile(`\([^)]*\)`)
	var words []string
	inTable := false
	for _, l := range lines[start+1:] {
		if !strings.HasPrefix(l, "|") {
			if inTable {
				break
			}
			continue
		}
		inTable = true
		cells := strings.Split(l, "|")
		if len(cells) < 3 || strings.HasPrefix(strings.TrimSpace(cells[1]), "---") {
			continue
		}
		for _, m := range code.FindAllStringSubmatch(cells[1], -1) {
			for _, w := range strings.Fields(args.ReplaceAllString(m[1], "")) {
				words = append(words, w)
			}
		}
	}
	sort.Strings(words)
	return words
}

func diffSets(t *testing.T, what string, readme, engine []string) {
	t.Helper()
	in := map[string]bool{}
	for _, w := range readme {
		in[w] = true
	}
	for _, w := range engine {
		if !in[w] {
			t.Errorf("the engine has the %s %q, the README's table does not", what, w)
		}
		delete(in, w)
	}
	for w := range in {
		t.Errorf("the README's table lists the %s %q, the engine does not have it", what, w)
	}
}

// The README's table of built-in functions lists exactly the engine's
// built-ins: a function added in expr/funcs.go without a row (or a row
// left behind by a removed one) fails here.
func TestReadmeFunctionTable(t *testing.T) {
	var engine []string
	for name := range builtins {
		engine = append(engine, name)
	}
	diffSets(t, "function", readmeTable(t, "Built-in functions"), engine)
}

// The README's table of units lists exactly the symbols of the unit table
// (alternative code points of one symbol, such as U+2126 for Ω, are named
// in the row's text, not as symbols of their own).
func TestReadmeUnitTable(t *testing.T) {
	var engine []string
	for sym, u := range unitTable {
		if sym == "\u2126" && u == unitTable["\u03a9"] {
			continue
		}
		engine = append(engine, sym)
	}
	diffSets(t, "unit", readmeTable(t, "### Units"), engine)
}
