package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

func runCLI(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	c := &cli{stdout: &out, stderr: &errb}
	st := c.run(args)
	return st, out.String(), errb.String()
}

func write(t *testing.T, dir, name, src string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

const okDoc = "```calc\nV = 230 V\ncheck V > 200 V\n```\n"
const failDoc = "```calc\nV = 230 V\ncheck V > 240 V\n```\n"
const errDoc = "```calc\nV = 230 ohms\n```\n"

func TestExitStatus(t *testing.T) {
	dir := t.TempDir()
	ok := write(t, dir, "ok.md", okDoc)
	fail := write(t, dir, "fail.md", failDoc)
	bad := write(t, dir, "bad.md", errDoc)
	empty := filepath.Join(dir, "empty")
	os.MkdirAll(empty, 0o755)
	write(t, empty, "notes.md", "# no blocks here\n")
	cases := []struct {
		name string
		args []string
		want int
	}{
		{"check ok", []string{"check", ok}, 0},
		{"check fails", []string{"check", fail}, 1},
		{"check error", []string{"check", bad}, 3},
		{"error wins over fail", []string{"check", fail, bad}, 3},
		{"values ok", []string{"values", ok}, 0},
		{"values error still prints", []string{"values", bad}, 3},
		{"build fails", []string{"build", "-o", t.TempDir(), fail}, 1},
		{"missing file", []string{"check", filepath.Join(dir, "nope.md")}, 2},
		{"folder without documents", []string{"build", empty}, 2},
		{"not markdown", []string{"check", filepath.Join(dir, "x.txt")}, 2},
		{"bad flag", []string{"build", "--frobnicate", ok}, 2},
		{"no command", nil, 2},
		{"unknown command", []string{"frob"}, 2},
		{"values of two", []string{"values", ok, fail}, 2},
		{"version", []string{"version"}, 0},
	}
	os.WriteFile(filepath.Join(dir, "x.txt"), []byte("x"), 0o644)
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st, _, errs := runCLI(c.args...)
			if st != c.want {
				t.Errorf("exit %d, want %d (stderr %q)", st, c.want, errs)
			}
			if c.want == 2 && errs == "" {
				t.Errorf("a usage error without a message")
			}
		})
	}
}

func TestCheckOutput(t *testing.T) {
	dir := t.TempDir()
	p := write(t, dir, "f.md", "# x\n\n```calc\nV = 230 V\ncheck V > 240 V\nW = 1 ohms\n```\n")
	st, out, _ := runCLI("check", p)
	if st != 3 {
		t.Fatalf("exit %d", st)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	want := []string{
		p + ": 1 value, 1 check (0 satisfied, 1 not satisfied), 1 error",
		p + ":5: check not satisfied: V > 240 V",
		p + `:6:7: unknown unit "ohms" (did you mean "ohm" or "Ω"?)`,
	}
	if len(lines) != len(want) {
		t.Fatalf("got\n%s", out)
	}
	for i := range want {
		if lines[i] != want[i] {
			t.Errorf("line %d: %q, want %q", i, lines[i], want[i])
		}
	}
}

func TestValuesJSON(t *testing.T) {
	dir := t.TempDir()
	p := write(t, dir, "feeder.md", "```calc\nZ = (0.12 + j0.08) Ω\nI_ef[kA] = 230 V / Z\ncheck |I_ef| <= 6 kA\n```\n")
	st, out, _ := runCLI("values", p)
	if st != 0 {
		t.Fatalf("exit %d: %s", st, out)
	}
	var v struct {
		File   string `json:"file"`
		Values []struct {
			Name  string  `json:"name"`
			Line  int     `json:"line"`
			Re    float64 `json:"re"`
			Im    float64 `json:"im"`
			Unit  string  `json:"unit"`
			Shown string  `json:"shown"`
		} `json:"values"`
		Checks []struct {
			Line int    `json:"line"`
			Text string `json:"text"`
			Pass bool   `json:"pass"`
		} `json:"checks"`
		Errors []any `json:"errors"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	// 230/(0.12+j0.08) = 230·(0.12-j0.08)/0.0208 = 1326.92 - j884.62 A (by hand)
	i := v.Values[1]
	if v.File != p || i.Name != "I_ef" || i.Line != 3 || i.Unit != "A" || i.Shown != "1.595∠-33.69° kA" ||
		fmt.Sprintf("%.2f %.2f", i.Re, i.Im) != "1326.92 -884.62" {
		t.Errorf("got %+v", v)
	}
	if len(v.Checks) != 1 || v.Checks[0].Line != 4 || !v.Checks[0].Pass || v.Checks[0].Text != "|I_ef| <= 6 kA" || len(v.Errors) != 0 {
		t.Errorf("checks/errors %+v", v)
	}
	if !strings.HasPrefix(out, "{\n  \"file\"") {
		t.Errorf("keys not in the documented order:\n%s", out)
	}
}

func TestBuildOutputs(t *testing.T) {
	dir := t.TempDir()
	a := write(t, dir, "src/a.md", okDoc)
	write(t, dir, "src/sub/b.md", okDoc)
	write(t, dir, "src/readme.md", "no blocks\n")
	before, _ := os.ReadFile(a)

	// beside the source
	if st, _, e := runCLI("build", a); st != 0 {
		t.Fatalf("exit %d %s", st, e)
	}
	if _, err := os.Stat(filepath.Join(dir, "src/a.html")); err != nil {
		t.Error(err)
	}
	// into a folder, keeping relative paths; readme.md has no block
	out := filepath.Join(dir, "out")
	if st, _, e := runCLI("build", "-o", out, filepath.Join(dir, "src")); st != 0 {
		t.Fatalf("exit %d %s", st, e)
	}
	for _, f := range []string{"a.html", "sub/b.html"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Error(err)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "readme.html")); err == nil {
		t.Error("a document without blocks was built")
	}
	// one document to a named file
	named := filepath.Join(dir, "named.html")
	if st, _, e := runCLI("build", "-o", named, a); st != 0 {
		t.Fatalf("exit %d %s", st, e)
	}
	if _, err := os.Stat(named); err != nil {
		t.Error(err)
	}
	// a named file with two documents is a usage error
	if st, _, _ := runCLI("build", "-o", named, filepath.Join(dir, "src")); st != 2 {
		t.Errorf("exit %d, want 2", st)
	}
	after, _ := os.ReadFile(a)
	if !bytes.Equal(before, after) {
		t.Error("the source was written")
	}
	// no temporary files left behind
	ents, _ := os.ReadDir(filepath.Join(dir, "src"))
	for _, e := range ents {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("left %s", e.Name())
		}
	}
}

// BenchmarkBuildProcess runs `calcdoc build` of a generated 2,000-statement
// document as a whole process (the binary is built once). Goal (issue 3):
// 40 ms or less on the project's 2-core machine.
func BenchmarkBuildProcess(b *testing.B) {
	dir := b.TempDir()
	bin := filepath.Join(dir, "calcdoc")
	if runtime.GOOS == "windows" {
		bin += ".exe" // exec finds a program by its extension there
	}
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		b.Fatalf("%v\n%s", err, out)
	}
	doc := filepath.Join(dir, "big.md")
	os.WriteFile(doc, []byte(GenerateDoc(2000)), 0o644)
	outp := filepath.Join(dir, "big.html")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		cmd := exec.Command(bin, "build", "-o", outp, doc)
		if out, err := cmd.CombinedOutput(); err != nil {
			b.Fatalf("%v\n%s", err, out)
		}
	}
}
