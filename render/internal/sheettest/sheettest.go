// Package sheettest holds the documents and helpers that the tests of the
// sheet writer and of the issuing layer (stamp, verify, pack) share.
package sheettest

import (
	"fmt"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// HeaterDoc is a one-block document: P = V²/R = (230 V)²/26.45 Ω =
// 52 900/26.45 W = 2000 W exactly (Joule's law, common practice), on line
// 11; the check P <= 2.1 kW is on line 12.
const HeaterDoc = `---
title: Stamp test, heater circuit
number: STP-E-001
revision: A
date: 2026-11-02
---

` + "```calc\nV = 230 V\nR = 26.45 ohm\nP = V^2 / R\ncheck P <= 2.1 kW\n```\n"

// WriteFile writes text to path, making its folder; the test fails on an
// error.
func WriteFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// DropDoc is a document with a revision history and a voltage drop:
// dV = 2·12 A·7.41 mΩ/m·85 m = 15.12 V (Ohm's law, common practice), line 21.
const DropDoc = `---
title: Yard lighting circuit, voltage drop
project: Test works
number: VD-E-002
revision: B
date: 2026-11-03
revisions:
  - {rev: A, date: 2026-10-20, by: TS, note: First issue}
  - {rev: B, date: 2026-11-03, by: TS, note: Route length measured on site}
---

# Lighting circuit L3

## Drop along the route

` + "```calc\nV_n = 230 V\nI_L = 12 A\nL = 85 m\nr = 7.41 mohm/m\ndV = 2 * I_L * r * L\ncheck dV / V_n <= 0.05\n```\n"

// LongDoc is a document of n statements in several sections, long
// enough to print on several pages.
func LongDoc(n int) string {
	var b strings.Builder
	b.WriteString("---\ntitle: Branch currents of a long feeder\nproject: Test works\nnumber: LNG-E-003\nrevision: C\ndate: 2026-11-04\n---\n\n# Branch currents\n\n```calc\nV_0 = 230 V\nZ_0 = (0.5 + j0.2) ohm\n")
	for i := 1; i <= n; i++ {
		fmt.Fprintf(&b, "I_%d = V_0 / (Z_0 * %d)   # branch %d\n", i, i, i)
		if i%40 == 0 {
			b.WriteString("```\n\n## Further branches\n\n```calc\n")
		}
	}
	b.WriteString("```\n")
	return b.String()
}

// Sha256sum is the digest GNU coreutils' sha256sum prints for path.
func Sha256sum(t *testing.T, path string) string {
	t.Helper()
	if _, err := exec.LookPath("sha256sum"); err != nil {
		t.Skip("sha256sum (GNU coreutils) is not installed")
	}
	out, err := exec.Command("sha256sum", path).Output()
	if err != nil {
		t.Fatalf("sha256sum %s: %v", path, err)
	}
	f := strings.Fields(string(out))
	if len(f) == 0 || len(f[0]) != 64 {
		t.Fatalf("sha256sum printed %q", out)
	}
	return f[0]
}

// Examples lists the .md files under the folder examples (subfolders too),
// in lexical order; the test fails when there is none.
func Examples(t *testing.T, examples string) []string {
	t.Helper()
	var files []string
	err := filepath.WalkDir(examples, func(p string, d fs.DirEntry, err error) error {
		if err == nil && !d.IsDir() && strings.HasSuffix(p, ".md") {
			files = append(files, p)
		}
		return err
	})
	if err != nil || len(files) == 0 {
		t.Fatalf("no examples in %s: %v", examples, err)
	}
	return files
}
