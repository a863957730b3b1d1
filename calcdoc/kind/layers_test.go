package kind_test

import (
	"os/exec"
	"strings"
	"testing"
)

// The block kinds sit between the document and the sheet writer
// (LAYOUT.md, issue 13): the document layer and the drawing primitives
// import no kind and no page writer, the kinds import the drawing
// primitives but not the page writer, and the page writer gets the kinds
// only through the registry a document carries.
func TestKindLayers(t *testing.T) {
	out, err := exec.Command("go", "list", "-f", "{{.ImportPath}} {{join .Deps \" \"}}",
		"calcdoc/calcdoc", "calcdoc/render/markup", "calcdoc/render", "calcdoc/calcdoc/kind/...").Output()
	if err != nil {
		t.Skipf("go list: %v", err)
	}
	isKind := func(p string) bool { return strings.HasPrefix(p, "calcdoc/calcdoc/kind") }
	for _, line := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		f := strings.Fields(line)
		pkg, deps := f[0], f[1:]
		for _, d := range deps {
			switch {
			case pkg == "calcdoc/calcdoc" && (isKind(d) || strings.HasPrefix(d, "calcdoc/render")):
				t.Errorf("the document layer imports %s", d)
			case pkg == "calcdoc/render/markup" && (isKind(d) || d == "calcdoc/render"):
				t.Errorf("the drawing primitives import %s", d)
			case pkg == "calcdoc/render" && isKind(d):
				t.Errorf("the page writer imports the kind %s", d)
			case isKind(pkg) && d == "calcdoc/render":
				t.Errorf("%s imports the page writer", pkg)
			}
		}
	}
}
