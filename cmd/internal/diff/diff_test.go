package diff

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// gitRepo is a temporary git repository for a test.
type gitRepo struct {
	t   *testing.T
	dir string
}

func newRepo(t *testing.T) *gitRepo {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git is not installed")
	}
	r := &gitRepo{t: t, dir: t.TempDir()}
	r.git("init", "-q")
	r.git("config", "user.name", "Test Engineer")
	r.git("config", "user.email", "test@example.invalid")
	r.git("config", "commit.gpgsign", "false")
	return r
}

func (r *gitRepo) git(args ...string) string {
	r.t.Helper()
	cmd := exec.Command("git", args...)
	cmd.Dir = r.dir
	out, err := cmd.CombinedOutput()
	if err != nil {
		r.t.Fatalf("git %v: %v\n%s", args, err, out)
	}
	return string(out)
}

func (r *gitRepo) write(files map[string]string) {
	r.t.Helper()
	for name, text := range files {
		p := filepath.Join(r.dir, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			r.t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			r.t.Fatal(err)
		}
	}
}

func (r *gitRepo) commit(msg string) {
	r.t.Helper()
	r.git("add", "-A")
	r.git("commit", "-q", "-m", msg)
}

func (r *gitRepo) path(name string) string { return filepath.Join(r.dir, filepath.FromSlash(name)) }

// The scenario (our own): a 230 V supply sheet, a CSV of two load
// resistances, and a load sheet that uses both.
const supply = "---\ntitle: Supply\nrevision: A\n---\n```calc\nV = 230 V\n```\n"
const resistances = "n,R [Ω]\n1,10\n2,8\n"

func loadDoc(rev, date, row, extra string) string {
	return "---\ntitle: Load\nrevision: " + rev + "\ndate: " + date + "\nprepared: A. Author\n---\n" +
		"```table rt from ../data/r.csv\nsource: our own test data\n```\n\n" +
		"```calc\nuse V from ../src/supply.md\nR = rt.R(" + row + ")\n" + extra + "I = V / R\ncheck I <= 32 A # breaker rating\n```\n"
}

func baseRepo(t *testing.T) *gitRepo {
	r := newRepo(t)
	r.write(map[string]string{
		"src/supply.md": supply,
		"data/r.csv":    resistances,
		"load/load.md":  loadDoc("A", "2026-01-05", "1", "X = 3 Ω\n"),
	})
	r.commit("first")
	return r
}

func compare(t *testing.T, paths []string, from, to string, o Options) (*Report, string) {
	t.Helper()
	rep, err := Run(paths, from, to, o)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := rep.WriteText(&b); err != nil {
		t.Fatal(err)
	}
	return rep, b.String()
}

// find returns the change of item and name, failing when there is none.
func find(t *testing.T, rep *Report, item, name string) Change {
	t.Helper()
	for _, d := range rep.Docs {
		for _, c := range d.Changes {
			if c.Item == item && c.Name == name {
				return c
			}
		}
	}
	t.Fatalf("no %s change of %q in %+v", item, name, rep.Docs)
	return Change{}
}

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Max(1, math.Abs(b)) }

// TestEachKindOfChange: the working tree against HEAD, with every kind of
// change in one document.
func TestEachKindOfChange(t *testing.T) {
	r := baseRepo(t)
	// row 1 → row 2 of the table; X renamed Y; a new result P; revision,
	// date and preparer changed
	doc := strings.Replace(loadDoc("B", "2026-02-10", "2", "Y = 3 Ω\n"), "prepared: A. Author", "prepared: B. Author", 1)
	doc = strings.Replace(doc, "check I", "P = V * I\ncheck I", 1)
	r.write(map[string]string{"load/load.md": doc})
	rep, text := compare(t, []string{r.path("load/load.md")}, "HEAD", "", Options{})

	// hand derivation: R 10 Ω → 8 Ω is (8 − 10)/10 = −20 %, a table row:
	// an input
	c := find(t, rep, ItemValue, "R")
	if c.Kind != Changed || c.Role != Input || !c.HasRel || !near(c.Rel, -0.20) {
		t.Errorf("R: %+v, want a changed input, -20 %%", c)
	}
	// hand derivation: I = 230 V / 10 Ω = 23 A → 230 V / 8 Ω = 28.75 A,
	// (28.75 − 23)/23 = +25 %, worked out: a result
	c = find(t, rep, ItemValue, "I")
	if c.Kind != Changed || c.Role != Result || !near(c.Rel, 0.25) || c.Old != "23.00 A" || c.New != "28.75 A" {
		t.Errorf("I: %+v, want a changed result 23.00 A → 28.75 A, +25 %%", c)
	}
	if !strings.Contains(text, "load/load.md: changed result I: 23.00 A → 28.75 A (+25 %)\n") {
		t.Errorf("text lacks the line of I:\n%s", text)
	}
	// a renamed value is one removal and one addition (literals: inputs)
	if c := find(t, rep, ItemValue, "X"); c.Kind != Removed || c.Role != Input {
		t.Errorf("X: %+v", c)
	}
	if c := find(t, rep, ItemValue, "Y"); c.Kind != Added || c.Role != Input {
		t.Errorf("Y: %+v", c)
	}
	// hand derivation: P = 230 V · 28.75 A = 6612.5 W, added, a result
	// (shown to four figures: 6.61x kW)
	if c := find(t, rep, ItemValue, "P"); c.Kind != Added || c.Role != Result || !strings.HasPrefix(c.New, "6.61") || !strings.HasSuffix(c.New, " kW") {
		t.Errorf("P: %+v", c)
	}
	// V (used, unchanged) is not reported
	for _, d := range rep.Docs {
		for _, c := range d.Changes {
			if c.Name == "V" {
				t.Errorf("unchanged V reported: %+v", c)
			}
		}
	}
	// hand derivation: utilisation 23/32 = 71.875 % → 28.75/32 = 89.84 %,
	// a +25 % change, the verdict the same (holds); matched by the line's
	// description
	c = find(t, rep, ItemCheck, "breaker rating")
	if c.Kind != Changed || !near(c.Rel, 0.25) || c.Old != "holds, utilisation 71.88 %" || c.New != "holds, utilisation 89.84 %" {
		t.Errorf("check: %+v", c)
	}
	for key, want := range map[string][2]string{"revision": {"A", "B"}, "date": {"2026-01-05", "2026-02-10"}, "prepared": {"A. Author", "B. Author"}} {
		if c := find(t, rep, ItemFront, key); c.Kind != Changed || c.Old != want[0] || c.New != want[1] {
			t.Errorf("front %s: %+v", key, c)
		}
	}
	// stable order: front matter, values in the document's order, checks
	lines := strings.Split(strings.TrimSpace(text), "\n")
	want := []string{"revision", "date", "prepared", " R:", " Y:", " X:", " I:", " P:", "check"}
	if len(lines) != len(want) {
		t.Fatalf("%d lines, want %d:\n%s", len(lines), len(want), text)
	}
	for i, w := range want {
		if !strings.Contains(lines[i], w) {
			t.Errorf("line %d = %q, want it about %q", i+1, lines[i], w)
		}
	}
	if !rep.Changed() || rep.Failed() {
		t.Error("Changed/Failed wrong")
	}
	// the same comparison twice gives the same text
	if _, again := compare(t, []string{r.path("load/load.md")}, "HEAD", "", Options{}); again != text {
		t.Error("two runs differ")
	}
}

// TestCheckVerdict: a check that held fails after the change.
func TestCheckVerdict(t *testing.T) {
	r := baseRepo(t)
	r.write(map[string]string{"load/load.md": strings.Replace(loadDoc("A", "2026-01-05", "2", "X = 3 Ω\n"), "32 A", "25 A", 1)})
	rep, _ := compare(t, []string{r.path("load/load.md")}, "HEAD", "", Options{})
	// hand derivation: 23 A ≤ 32 A holds (71.875 %); 28.75 A ≤ 25 A fails
	// (115 %)
	c := find(t, rep, ItemCheck, "breaker rating")
	if c.Old != "holds, utilisation 71.88 %" || c.New != "fails, utilisation 115 %" {
		t.Errorf("check: %+v", c)
	}
}

// TestUsedSheetChanged: the supply sheet changes between two commits and
// the load sheet does not; the load's results move.
func TestUsedSheetChanged(t *testing.T) {
	r := baseRepo(t)
	r.write(map[string]string{"src/supply.md": strings.Replace(supply, "230 V", "240 V", 1)})
	r.commit("supply raised")
	// the working tree changes the supply again: HEAD~1..HEAD must not see it
	r.write(map[string]string{"src/supply.md": strings.Replace(supply, "230 V", "250 V", 1)})
	rep, text := compare(t, []string{r.path("load/load.md")}, "HEAD~1", "HEAD", Options{})
	// hand derivation: V 230 → 240 V is +10/230 = +4.348 %, a used value:
	// an input; I = 240 V / 10 Ω = 24 A, +1/23 = +4.348 %, a result
	if c := find(t, rep, ItemValue, "V"); c.Role != Input || !near(c.Rel, 10.0/230) || c.New != "240.0 V" {
		t.Errorf("V: %+v", c)
	}
	if c := find(t, rep, ItemValue, "I"); c.Role != Result || !near(c.Rel, 1.0/23) || c.New != "24.00 A" {
		t.Errorf("I: %+v", c)
	}
	if strings.Contains(text, "250") {
		t.Errorf("the working tree leaked into HEAD~1..HEAD:\n%s", text)
	}
	// the working tree untouched by diff
	if b, _ := os.ReadFile(r.path("src/supply.md")); !strings.Contains(string(b), "250 V") {
		t.Error("diff changed the working tree")
	}
}

// TestTableChanged: a row of the CSV table changes.
func TestTableChanged(t *testing.T) {
	r := baseRepo(t)
	r.write(map[string]string{"data/r.csv": "n,R [Ω]\n1,11.5\n2,8\n"})
	r.commit("new resistance")
	rep, _ := compare(t, []string{r.path("load")}, "HEAD~1", "HEAD", Options{})
	// hand derivation: R 10 → 11.5 Ω, +15 %; I = 230/11.5 = 20 A,
	// (20 − 23)/23 = −13.04 %
	if c := find(t, rep, ItemValue, "R"); c.Role != Input || !near(c.Rel, 0.15) {
		t.Errorf("R: %+v", c)
	}
	if c := find(t, rep, ItemValue, "I"); c.Role != Result || !near(c.Rel, -3.0/23) || c.New != "20.00 A" {
		t.Errorf("I: %+v", c)
	}
}

// TestMinChange: a change below the threshold is hidden.
func TestMinChange(t *testing.T) {
	r := baseRepo(t)
	r.write(map[string]string{"src/supply.md": strings.Replace(supply, "230 V", "230.1 V", 1)})
	// hand derivation: 0.1/230 = 0.0435 % for V and for I = V/R
	rep, text := compare(t, []string{r.path("load/load.md")}, "HEAD", "", Options{MinChange: 0.001})
	if rep.Changed() || text != "" {
		t.Errorf("changes below 0.1 %% shown:\n%s", text)
	}
	rep, _ = compare(t, []string{r.path("load/load.md")}, "HEAD", "", Options{MinChange: 0.0004})
	if c := find(t, rep, ItemValue, "I"); !near(c.Rel, 0.1/230) {
		t.Errorf("I: %+v", c)
	}
}

// TestMissingAndFailing: a document added, one removed, one that does not
// evaluate at the new revision; the others are still compared.
func TestMissingAndFailing(t *testing.T) {
	r := baseRepo(t)
	r.write(map[string]string{"old/gone.md": "```calc\nA = 1 m\n```\n", "ok/ok.md": "```calc\nB = 2 m\n```\n"})
	r.commit("more")
	if err := os.Remove(r.path("old/gone.md")); err != nil {
		t.Fatal(err)
	}
	r.write(map[string]string{
		"new/new.md":   "```calc\nC = 3 m\n```\n",
		"ok/ok.md":     "```calc\nB = 2.5 m\n```\n",
		"load/load.md": "```calc\nI = 230 ohms\n```\n", // no such unit
	})
	rep, text := compare(t, []string{r.path("old/gone.md"), r.path("new/new.md"), r.path("load/load.md"), r.path("ok/ok.md")}, "HEAD", "", Options{})
	for _, want := range []string{
		"old/gone.md: removed document\n",
		"new/new.md: added document\n",
		"load/load.md: error: does not evaluate at working tree (1 errors): ",
		"ok/ok.md: changed input B: 2.000 m → 2.500 m (+25 %)\n",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q:\n%s", want, text)
		}
	}
	if !rep.Failed() {
		t.Error("Failed() false")
	}
	// a folder takes the documents at both revisions
	rep, text = compare(t, []string{r.dir}, "HEAD", "", Options{})
	if !strings.Contains(text, "old/gone.md: removed document") || !strings.Contains(text, "new/new.md: added document") {
		t.Errorf("folder:\n%s", text)
	}
	if _, err := Run([]string{r.path("nowhere.md")}, "HEAD", "", Options{}); err == nil {
		t.Error("no error for a file at neither revision")
	}
	if _, err := Run([]string{r.path("ok/ok.md")}, "no-such-rev", "", Options{}); err == nil {
		t.Error("no error for a bad revision")
	}
	_ = rep
}

// TestHTML: the comparison sheet is self-contained and deterministic.
func TestHTML(t *testing.T) {
	r := baseRepo(t)
	r.write(map[string]string{"load/load.md": loadDoc("B", "2026-01-05", "2", "Y = 3 Ω\n")})
	r.commit("second")
	rep, _ := compare(t, []string{r.dir}, "HEAD~1", "HEAD", Options{})
	page := rep.HTML()
	rep2, _ := compare(t, []string{r.dir}, "HEAD~1", "HEAD", Options{})
	if !bytes.Equal(page, rep2.HTML()) {
		t.Error("two runs give different pages")
	}
	s := string(page)
	for _, bad := range []string{"http:", "https:", "src=", "<link", "<script", "//"} {
		if strings.Contains(s, bad) {
			t.Errorf("the page holds %q: not self-contained", bad)
		}
	}
	head := strings.TrimSpace(r.git("rev-parse", "HEAD"))
	prev := strings.TrimSpace(r.git("rev-parse", "HEAD~1"))
	for _, want := range []string{head, prev, Caution, `<tr class="changed">`, `<tr class="added">`, `<tr class="removed">`, "28.75 A", "+25 %", "load/load.md"} {
		if !strings.Contains(s, want) {
			t.Errorf("the page lacks %q", want)
		}
	}
}

// TestTextconv: one file's values as text; a copy in a folder of its own
// cannot resolve its used sheet or its table.
func TestTextconv(t *testing.T) {
	r := baseRepo(t)
	var b bytes.Buffer
	Textconv(&b, r.path("load/load.md"))
	for _, want := range []string{"front revision: A\n", "input V = 230.0 V\n", "input R = 10.00 Ω\n", "result I = 23.00 A\n", "check \"breaker rating\": holds, utilisation 71.88 %\n"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("textconv lacks %q:\n%s", want, b.String())
		}
	}
	tmp := filepath.Join(t.TempDir(), "x.md")
	src, _ := os.ReadFile(r.path("load/load.md"))
	if err := os.WriteFile(tmp, src, 0o644); err != nil {
		t.Fatal(err)
	}
	b.Reset()
	Textconv(&b, tmp)
	for _, want := range []string{"use ../src/supply.md: not resolved\n", "table ../data/r.csv: not resolved\n", "input V = not resolved (use from ../src/supply.md)\n", "I = not evaluated"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("textconv of a lone copy lacks %q:\n%s", want, b.String())
		}
	}
	b.Reset()
	Textconv(&b, filepath.Join(t.TempDir(), "none.md"))
	if !strings.Contains(b.String(), "cannot be read") {
		t.Errorf("missing file: %q", b.String())
	}
}
