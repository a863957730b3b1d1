package main

import (
	"strings"
	"testing"
)

// check prints a failing check with the cases it fails in. Hand
// derivation: V = {a: 230 V, b: 250 V}; V <= 240 V fails in b only.
func TestCheckNamesFailingCase(t *testing.T) {
	dir := t.TempDir()
	p := write(t, dir, "f.md", "---\ncases: [a, b]\n---\n```calc\nV = {a: 230 V, b: 250 V}\ncheck V <= 240 V\n```\n")
	st, out, _ := runCLI("check", p)
	if st == 0 {
		t.Errorf("exit 0 with a failing check")
	}
	if !strings.Contains(out, p+":6: check not satisfied in case b: V <= 240 V") {
		t.Errorf("got\n%s", out)
	}
}
