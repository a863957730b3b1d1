package calcdoc_test

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// TestLoaderReadWith: a loader given a reader takes the used sheet and the
// CSV table from it, not from the disk, where neither file exists (diff
// reads them at a git revision this way).
func TestLoaderReadWith(t *testing.T) {
	dir := t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, ".git"), 0o755); err != nil { // the root
		t.Fatal(err)
	}
	mem := map[string]string{
		filepath.Join(dir, "src", "supply.md"): "```calc\nV = 230 V\n```\n",
		filepath.Join(dir, "data", "r.csv"):    "n,R [Ω]\n1,10\n2,8\n",
	}
	var asked []string
	read := func(p string) ([]byte, error) {
		asked = append(asked, p)
		if s, ok := mem[p]; ok {
			return []byte(s), nil
		}
		return nil, errors.New("not at this revision")
	}
	src := "```table rt from ../data/r.csv\nsource: our own test data\n```\n\n```calc\nuse V from ../src/supply.md\nR = rt.R(2)\nI = V / R\n```\n"
	path := filepath.Join(dir, "load", "load.md")
	l := calcdoc.NewLoader(kinds, dir).ReadWith(read)
	d := l.Parse(path, []byte(src))
	if len(d.Errors) > 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	// hand derivation: I = 230 V / 8 Ω = 28.75 A
	if got := real(d.Env.Lookup("I").Value.(*expr.Scalar).Z); math.Abs(got-28.75) > 1e-12 {
		t.Errorf("I = %g, want 28.75", got)
	}
	if len(asked) != 2 {
		t.Errorf("read asked for %v, want the sheet and the table", asked)
	}
	if len(d.DataFiles) != 1 || d.DataFiles[0].Disk != "" || d.DataFiles[0].Path != "../data/r.csv" {
		t.Errorf("data files %+v", d.DataFiles)
	}
	// a file the reader does not have is an error on its line
	delete(mem, filepath.Join(dir, "src", "supply.md"))
	d = calcdoc.NewLoader(kinds, dir).ReadWith(read).Parse(path, []byte(src))
	if len(d.Errors) == 0 {
		t.Error("no error for a used sheet the reader lacks")
	}
	// a path out of the root is refused without asking the reader
	if _, err := calcdoc.ResolveLexical(path, "../../x.md", dir); err == nil {
		t.Error("ResolveLexical let ../../x.md out of the root")
	}
}
