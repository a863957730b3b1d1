package linalg

import (
	"go/build"
	"strings"
	"testing"
)

// TestLayer: expr/linalg is layer 0 of the package map (DEVELOPERS.md): it
// imports only the standard library and gonum, nothing of calcdoc.
func TestLayer(t *testing.T) {
	pkg, err := build.ImportDir(".", 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, imp := range pkg.Imports {
		first := strings.SplitN(imp, "/", 2)[0]
		if strings.Contains(first, ".") && !strings.HasPrefix(imp, "gonum.org/v1/gonum/") {
			t.Errorf("imports %s: only the standard library and gonum are allowed", imp)
		}
		if first == "calcdoc" {
			t.Errorf("imports %s: a layer-0 package imports nothing of calcdoc", imp)
		}
	}
}
