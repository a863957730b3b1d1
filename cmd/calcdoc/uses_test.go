package main

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// gitIn runs git in dir with a fixed identity.
func gitIn(t *testing.T, dir string, args ...string) {
	t.Helper()
	cmd := exec.Command("git", append([]string{"-C", dir, "-c", "user.name=Test", "-c", "user.email=test@example.invalid", "-c", "commit.gpgsign=false"}, args...)...)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("git %v: %v\n%s", args, err, out)
	}
}

// chainRepo is a repository of three sheets of our own, each using the
// one before: a board's voltage (a.md), a feeder's drop from it (b.md),
// and the voltage at a motor (c.md). Hand derivation: U_b = 400 V −
// 2 · 4 V = 392 V; U_m = U_b − 3 V = 389 V.
func chainRepo(t *testing.T) string {
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not installed")
	}
	dir := t.TempDir()
	gitIn(t, dir, "init", "-q")
	write(t, dir, "calc/a.md", "---\ntitle: Board voltage\nnumber: T-001\nrevision: A\n---\n```calc\nU_0 = 400 V\nV_d = 4 V\n```\n")
	write(t, dir, "calc/b.md", "---\ntitle: Feeder\nnumber: T-002\nrevision: A\n---\n```calc\nuse U_0, V_d as dV from a.md\nU_b = U_0 - 2 * dV\n```\n")
	write(t, dir, "calc/c.md", "---\ntitle: Motor\nnumber: T-003\nrevision: A\n---\n```calc\nuse U_b from b.md\nU_m = U_b - 3 V\ncheck U_m >= 380 V\n```\n")
	gitIn(t, dir, "add", ".")
	gitIn(t, dir, "commit", "-q", "-m", "sheets")
	return dir
}

func marker(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	i := strings.Index(s, `<p class="marker-text">`)
	if i < 0 {
		return ""
	}
	s = s[i+len(`<p class="marker-text">`):]
	return s[:strings.Index(s, "</p>")]
}

// A sheet that uses an uncommitted sheet is not fit for issue, and one
// that uses that sheet is not fit either: each marker says which and why.
func TestNotForIssueThroughAChainOfTwo(t *testing.T) {
	dir := chainRepo(t)
	folder := filepath.Join(dir, "calc")
	if st, _, errs := runCLI("build", folder); st != exitOK {
		t.Fatalf("build: %d %s", st, errs)
	}
	for _, n := range []string{"a", "b", "c"} {
		if m := marker(t, filepath.Join(folder, n+".html")); m != "" {
			t.Errorf("%s.html of a clean repository is marked %q", n, m)
		}
	}
	write(t, dir, "calc/a.md", "---\ntitle: Board voltage\nnumber: T-001\nrevision: A\n---\n```calc\nU_0 = 400 V\nV_d = 5 V\n```\n")
	if st, _, errs := runCLI("build", folder); st != exitOK {
		t.Fatalf("build: %d %s", st, errs)
	}
	if m := marker(t, filepath.Join(folder, "a.html")); m != "NOT FOR ISSUE: uncommitted changes" {
		t.Errorf("a.html marker %q", m)
	}
	if m := marker(t, filepath.Join(folder, "b.html")); m != "NOT FOR ISSUE: uses a.md, which has uncommitted changes" {
		t.Errorf("b.html marker %q", m)
	}
	if m := marker(t, filepath.Join(folder, "c.html")); m != "NOT FOR ISSUE: uses b.md, which is not fit for issue (uses a.md, which has uncommitted changes)" {
		t.Errorf("c.html marker %q", m)
	}
	page, _ := os.ReadFile(filepath.Join(folder, "c.html"))
	if !strings.Contains(string(page), `data-use-path="b.md"`) || !strings.Contains(string(page), `data-use-notfit="uses a.md, which has uncommitted changes"`) {
		t.Error("the stamp of c.html does not list b.md with why it is not fit")
	}
	// the value went through both sheets: 400 − 2·5 − 3 = 387 V (hand derivation)
	if !strings.Contains(string(page), "<mn>387.0</mn>") {
		t.Error("c.html does not show U_m = 387.0 V")
	}
	// the used value's origin: the other sheet's number, revision, title,
	// link, the line of its definition and its SHA-256 (12 hex digits)
	b, _ := os.ReadFile(filepath.Join(folder, "b.md"))
	if want := `from <a href="b.html">T-002 rev A — Feeder</a>, line 8; source SHA-256 <code class="hash" title="` + sha256Hex(b) + `">` + sha256Hex(b)[:12] + `</code>`; !strings.Contains(string(page), want) {
		t.Errorf("c.html lacks the origin row %s", want)
	}
	bp, _ := os.ReadFile(filepath.Join(folder, "b.html"))
	if !strings.Contains(string(bp), ", line 8 (named V_d there);") {
		t.Error("b.html does not say that dV is V_d in a.md")
	}
}

// verify evaluates a sheet from what it carries, and in the repository
// reports a used sheet whose source changed since the build, with the
// values that moved.
func TestVerifyStaleUse(t *testing.T) {
	dir := chainRepo(t)
	folder := filepath.Join(dir, "calc")
	if st, _, errs := runCLI("build", folder); st != exitOK {
		t.Fatalf("build: %d %s", st, errs)
	}
	// the sheet alone: copied out of the repository, it still verifies
	away := t.TempDir()
	page, _ := os.ReadFile(filepath.Join(folder, "b.html"))
	write(t, away, "b.html", string(page))
	if st, out, _ := runCLI("verify", filepath.Join(away, "b.html")); st != exitOK {
		t.Errorf("verify of the sheet alone: %d\n%s", st, out)
	}
	if st, out, _ := runCLI("verify", filepath.Join(folder, "b.html")); st != exitOK {
		t.Fatalf("verify of a fresh sheet: %d\n%s", st, out)
	}
	// the carried value of V_d changed from 4 V to 5 V (IEEE 754 binary64
	// bits 0x4010000000000000 = 4616189618054758400 and 0x4014000000000000
	// = 4617315517961601024): verify evaluates with it and finds the rows
	// the sheet shows no longer follow
	forged := strings.Replace(string(page), `&#34;re&#34;:4616189618054758400`, `&#34;re&#34;:4617315517961601024`, 1)
	if forged == string(page) {
		t.Fatal("no record of V_d = 4 V in the sheet")
	}
	write(t, away, "forged.html", forged)
	if st, out, _ := runCLI("verify", filepath.Join(away, "forged.html")); st != exitCheckFail || !strings.Contains(out, "value dV (line 7): sheet shows dV=4.000 V, source gives dV=5.000 V") || !strings.Contains(out, "value U_b (line 8): sheet shows 392.0 V, source gives 390.0 V") {
		t.Errorf("verify of a sheet whose carried value was changed: %d\n%s", st, out)
	}
	write(t, dir, "calc/a.md", "---\ntitle: Board voltage\nnumber: T-001\nrevision: B\n---\n```calc\nU_0 = 400 V\nV_d = 6 V\n```\n")
	gitIn(t, dir, "commit", "-q", "-am", "a new drop")
	st, out, _ := runCLI("verify", filepath.Join(folder, "b.html"))
	if st != exitCheckFail {
		t.Fatalf("verify of a stale sheet: exit %d, want 1\n%s", st, out)
	}
	for _, w := range []string{"used sheet a.md changed since this sheet was built", "dV 4.000 V → 6.000 V", "build this sheet again"} {
		if !strings.Contains(out, w) {
			t.Errorf("verify does not say %q:\n%s", w, out)
		}
	}
	if strings.Contains(out, "U_0 ") {
		t.Errorf("verify names U_0, which did not move:\n%s", out)
	}
}

func TestValuesJSONUses(t *testing.T) {
	dir := chainRepo(t)
	st, out, errs := runCLI("values", filepath.Join(dir, "calc", "b.md"))
	if st != exitOK {
		t.Fatalf("values: %d %s", st, errs)
	}
	var v struct {
		Uses []struct{ File, Name, As, SHA256 string }
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	a, _ := os.ReadFile(filepath.Join(dir, "calc", "a.md"))
	// the SHA-256 of a.md as sha256sum would print it (FIPS 180-4), by crypto/sha256
	want := sha256Hex(a)
	if len(v.Uses) != 2 || v.Uses[0].File != "a.md" || v.Uses[0].Name != "U_0" || v.Uses[1].Name != "V_d" || v.Uses[1].As != "dV" || v.Uses[0].SHA256 != want {
		t.Errorf("uses = %+v", v.Uses)
	}
}

func sha256Hex(b []byte) string {
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:])
}

// A package keeps the order given except that a used sheet moves before
// its first user; its contents list the uses and say which sheet moved,
// and a sheet it leaves out is named in a warning.
func TestPackageOrderOfUses(t *testing.T) {
	dir := chainRepo(t)
	c, a, b := filepath.Join(dir, "calc", "c.md"), filepath.Join(dir, "calc", "a.md"), filepath.Join(dir, "calc", "b.md")
	out := filepath.Join(dir, "pkg.html")
	st, stdout, stderr := runCLI("package", "-o", out, c, a, b)
	if st != exitOK {
		t.Fatalf("package: %d %s", st, stderr)
	}
	ia, ib, ic := strings.Index(stdout, "sheet 1: "+a), strings.Index(stdout, "sheet 2: "+b), strings.Index(stdout, "sheet 3: "+c)
	if ia < 0 || ib < 0 || ic < 0 {
		t.Errorf("order is not a, b, c:\n%s", stdout)
	}
	if !strings.Contains(stdout, "T-002 ("+b+") moved before T-003 ("+c+"): T-003 ("+c+") uses it") ||
		!strings.Contains(stdout, "T-001 ("+a+") moved before T-003 ("+c+"): T-002 ("+b+") uses it") {
		t.Errorf("the moves are not said:\n%s", stdout)
	}
	page, _ := os.ReadFile(out)
	for _, w := range []string{`<li class="uses">uses <a href="#sheet-1">sheet 1</a> (T-001): U_0, V_d</li>`, `<li class="uses">uses <a href="#sheet-2">sheet 2</a> (T-002): U_b</li>`, `<p class="moved">T-002 (`} {
		if !strings.Contains(string(page), w) {
			t.Errorf("the contents lack %s", w)
		}
	}
	if st, out, _ := runCLI("verify", out); st != exitOK {
		t.Errorf("verify of the package: %d\n%s", st, out)
	}
	// b.md left out: a warning names it
	st, _, stderr = runCLI("package", "-o", filepath.Join(dir, "pkg2.html"), c, a)
	if st != exitOK || !strings.Contains(stderr, "warning: "+c+" uses "+b+", which the package leaves out") {
		t.Errorf("package without b.md: %d, stderr:\n%s", st, stderr)
	}
}

// The example folder of sheets that use sheets evaluates without an error
// and every check holds (README "Sheets that use sheets").
func TestPlantExample(t *testing.T) {
	st, out, errs := runCLI("check", filepath.Join("..", "..", "examples", "plant"))
	if st != exitOK {
		t.Fatalf("check examples/plant: %d\n%s%s", st, out, errs)
	}
	if strings.Count(out, ", 0 errors") != 4 {
		t.Errorf("want four sheets without errors:\n%s", out)
	}
}

// The protection sheet takes the board's maximum fault through the use
// chain unchanged. Hand derivation (IEC 60909-0, equivalent voltage
// source, impedances referred to 400 V): Z_Q = 1.05·400²/180 MVA =
// 0.9333 mΩ, X_Q = 0.995·Z_Q, R_Q = 0.1·X_Q; Z_T = 0.06·400²/1.25 MVA =
// 7.68 mΩ, R_T = 11.5 kW·400²/(1.25 MVA)² = 1.1776 mΩ, X_T = sqrt(Z_T² −
// R_T²) = 7.589 mΩ; |Z_k| = |(R_Q + R_T) + j(X_Q + X_T)| = 8.612 mΩ;
// I_k3 = 1.05·400 V/(√3·|Z_k|) = 28.16 kA.
func TestPlantExampleFaultLevel(t *testing.T) {
	zq := 1.05 * 400 * 400 / 180e6
	xq, zt, rt := 0.995*zq, 0.06*400*400/1.25e6, 11.5e3*400*400/(1.25e6*1.25e6)
	xt := math.Sqrt(zt*zt - rt*rt)
	zk := math.Hypot(0.1*xq+rt, xq+xt)
	want := 1.05 * 400 / (math.Sqrt(3) * zk)
	st, out, errs := runCLI("values", filepath.Join("..", "..", "examples", "plant", "protection", "feeder-settings.md"))
	if st != exitOK {
		t.Fatalf("values: %d %s", st, errs)
	}
	var v struct {
		Values []struct {
			Name string
			Re   float64
		}
	}
	json.Unmarshal([]byte(out), &v)
	for _, x := range v.Values {
		if x.Name == "I_k3" {
			if math.Abs(x.Re-want) > 1e-9*want {
				t.Errorf("I_k3 = %g A, want %g A", x.Re, want)
			}
			return
		}
	}
	t.Error("no I_k3 among the values")
}

// Inside git, a use may not leave the repository, even into the folder
// given on the command line; the error is at the use line's path.
func TestUseOutOfRepository(t *testing.T) {
	dir := chainRepo(t)
	outside := filepath.Join(filepath.Dir(dir), filepath.Base(dir)+"-outside.md")
	if err := os.WriteFile(outside, []byte("```calc\nx = 1\n```\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.Remove(outside) })
	doc := write(t, dir, "calc/d.md", "```calc\nuse x from ../../"+filepath.Base(outside)+"\n```\n")
	st, out, _ := runCLI("check", doc)
	if st != exitError || !strings.Contains(out, doc+":2:12: ../../"+filepath.Base(outside)+" leads out of "+dir) || !strings.Contains(out, "copy the file in") {
		t.Errorf("check: %d\n%s", st, out)
	}
}
