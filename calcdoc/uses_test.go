package calcdoc_test

import (
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// writeFiles writes name → text under dir.
func writeFiles(t *testing.T, dir string, files map[string]string) {
	t.Helper()
	for name, text := range files {
		p := filepath.Join(dir, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

const faultDoc = "---\ntitle: Fault level at the main board\nnumber: PL-E-001\nrevision: B\n---\n" +
	"```calc\n" +
	"c = 1.1\n" +
	"U_n = 400 V\n" +
	"Z_Q = (0.004 + j0.016) Ω\n" +
	"I_k3[kA] = c * U_n / (sqrt(3) * abs(Z_Q))\n" +
	"phi_Q = arg(Z_Q)\n" +
	"S_k[MVA] = sqrt(3) * U_n * I_k3\n" +
	"f(x) = 2 * x\n" +
	"```\n"

func TestUseTakesValues(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{
		"fault/board.md": faultDoc,
		"cable/c1.md": "```calc\n" +
			"use I_k3, Z_Q from ../fault/board.md # from the fault study\n" +
			"use phi_Q as phi_src from ../fault/board.md\n" +
			"use S_k from ../fault/board.md\n" +
			"I_half = I_k3 / 2\n" +
			"```\n",
	})
	l := calcdoc.NewLoader(kinds, dir)
	d, err := l.Load(filepath.Join(dir, "cable/c1.md"))
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Errors) > 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	// hand derivation: |Z_Q| = sqrt(0.004² + 0.016²) = 0.0164924 Ω;
	// I_k3 = 1.1 · 400 / (sqrt(3) · 0.0164924) = 15 403 A
	want := 1.1 * 400 / (math.Sqrt(3) * cmplx.Abs(complex(0.004, 0.016)))
	b := d.Env.Lookup("I_half")
	if got := real(b.Value.(*expr.Scalar).Z); math.Abs(got-want/2) > 1e-9*want {
		t.Errorf("I_half = %g, want %g", got, want/2)
	}
	phi := d.Env.Lookup("phi_src").Value.(*expr.Scalar)
	if !phi.Angle {
		t.Error("the angle mark of phi_Q is lost")
	}
	// math/cmplx: arg(0.004 + j0.016)
	if math.Abs(real(phi.Z)-cmplx.Phase(complex(0.004, 0.016))) > 1e-15 {
		t.Errorf("phi_src = %v", phi.Z)
	}
	sk := d.Env.Lookup("S_k")
	if s := sk.Value.(*expr.Scalar); s.Dim != expr.DimPower || s.Kind != expr.PowerApparent {
		t.Errorf("S_k kind = %v dim %v, want apparent power (its line's MVA bracket)", s.Kind, s.Dim)
	}
	if ik := d.Env.Lookup("I_k3"); ik.Display == nil || ik.Display.Unit == nil || ik.Display.Text != "kA" {
		t.Errorf("I_k3 display = %+v, want the kA its line chose", ik.Display)
	}
	if len(d.Uses) != 3 || d.Uses[0].Sheet.Number != "PL-E-001" || d.Uses[0].Sheet.Revision != "B" || d.Uses[0].Link != "../fault/board.html" {
		t.Errorf("uses = %+v", d.Uses[0])
	}
	if l.Evaluations() != 2 {
		t.Errorf("%d evaluations, want 2: the used sheet once", l.Evaluations())
	}
	if d.Uses[0].Names[0].Value.Line != 10 {
		t.Errorf("I_k3 defined at line %d, want 10", d.Uses[0].Names[0].Value.Line)
	}
}

// useErr evaluates name in a folder of files and returns its errors.
func useErr(t *testing.T, files map[string]string, name string) expr.ErrorList {
	t.Helper()
	dir := t.TempDir()
	writeFiles(t, dir, files)
	// outside git, the folder given on the command line is the document's own
	root := filepath.Dir(filepath.Join(dir, name))
	d, err := calcdoc.NewLoader(kinds, root).Load(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	return d.Errors
}

func TestUseErrors(t *testing.T) {
	cases := []struct {
		name  string
		files map[string]string
		doc   string
		pos   string
		want  []string
	}{
		{"unknown name", map[string]string{"f.md": faultDoc, "a.md": "```calc\nuse I_k2 from f.md\n```\n"}, "a.md", "2:5",
			[]string{"f.md does not define \"I_k2\"", "did you mean \"I_k3\" (line 10 there)"}},
		{"function", map[string]string{"f.md": faultDoc, "a.md": "```calc\nuse f from f.md\n```\n"}, "a.md", "2:5",
			[]string{"f is a function in f.md"}},
		{"missing file", map[string]string{"a.md": "```calc\nuse x from nothere.md\n```\n"}, "a.md", "2:12",
			[]string{"nothere.md: no such file"}},
		{"out of the folder", map[string]string{"in/a.md": "```calc\nuse x from ../out.md\n```\n", "out.md": faultDoc}, "in/a.md", "2:12",
			[]string{"leads out of"}},
		{"cycle", map[string]string{
			"a.md": "```calc\nuse y from b.md\nx = 1\n```\n",
			"b.md": "```calc\nuse z from c.md\ny = 2\n```\n",
			"c.md": "```calc\nuse x from a.md\nz = 3\n```\n"}, "a.md", "2:12",
			[]string{"cycle", "a.md → ", "b.md → ", "c.md → ", "a.md;"}},
		{"sheet with errors", map[string]string{"f.md": "```calc\nx = 1 V + 1 A\n```\n", "a.md": "```calc\nuse x from f.md\ny = x\n```\n"}, "a.md", "2:12",
			[]string{"f.md has 1 error, the first at line 2:", "correct that sheet first"}},
		{"case", map[string]string{"f.md": faultDoc, "a.md": "```calc\nuse I_k3 in max as I_max from f.md\n```\n"}, "a.md", "2:13",
			[]string{"f.md has no cases", "write use I_k3 from f.md"}},
		{"no path", map[string]string{"a.md": "```calc\nuse x from\n```\n"}, "a.md", "2:7",
			[]string{"no path after from"}},
		{"defined twice", map[string]string{"f.md": faultDoc, "a.md": "```calc\nc = 2\nuse c from f.md\n```\n"}, "a.md", "3:5",
			[]string{"already defined at line 2"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			errs := useErr(t, c.files, c.doc)
			if len(errs) == 0 {
				t.Fatal("no error")
			}
			e := errs[0]
			if e.Pos.String() != c.pos {
				t.Errorf("error at %s, want %s: %v", e.Pos, c.pos, e)
			}
			for _, w := range c.want {
				if !strings.Contains(e.Msg, w) {
					t.Errorf("error %q does not say %q", e.Msg, w)
				}
			}
		})
	}
}

// A name taken from a sheet with errors is unavailable below, once.
func TestUseUnavailableBelow(t *testing.T) {
	errs := useErr(t, map[string]string{"f.md": "```calc\nx = 1 V + 1 A\n```\n", "a.md": "```calc\nuse x from f.md\ny = x\n```\n"}, "a.md")
	if len(errs) != 1 {
		t.Errorf("errors %v, want only the one on the use line", errs)
	}
}

// use is still a name: "use = 3" assigns.
func TestUseAsName(t *testing.T) {
	d := calcdoc.Parse("a.md", []byte("```calc\nuse = 3\nuse2 = use * 2\n```\n"), kinds)
	if len(d.Errors) > 0 || d.Env.Lookup("use2") == nil {
		t.Errorf("errors %v", d.Errors)
	}
}

func TestUseValuesJSON(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{"f.md": faultDoc, "a.md": "```calc\nuse I_k3 as I_b from f.md\n```\n"})
	d, _ := calcdoc.NewLoader(kinds, dir).Load(filepath.Join(dir, "a.md"))
	j := d.ValuesJSON()
	if len(j.Uses) != 1 || j.Uses[0].File != "f.md" || j.Uses[0].Name != "I_k3" || j.Uses[0].As != "I_b" || j.Uses[0].SHA256 != calcdoc.SHA256([]byte(faultDoc)) || j.Uses[0].Line != 2 {
		t.Errorf("uses = %+v", j.Uses)
	}
	if len(j.Values) != 1 || j.Values[0].Name != "I_b" {
		t.Errorf("values = %+v", j.Values)
	}
}
