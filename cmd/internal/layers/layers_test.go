package layers

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// importGraph reads the module's import graph with `go list -json`, the go
// command's own account of each package's imports (tests' imports left
// out: a test may reach up to build what it checks).
func importGraph(t *testing.T) map[string][]string {
	t.Helper()
	gomod, err := exec.Command("go", "env", "GOMOD").Output()
	if err != nil {
		t.Fatalf("go env GOMOD: %v", err)
	}
	cmd := exec.Command("go", "list", "-json=ImportPath,Imports", "./...")
	cmd.Dir = filepath.Dir(strings.TrimSpace(string(gomod)))
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("go list: %v\n%s", err, stderr.String())
	}
	graph := map[string][]string{}
	dec := json.NewDecoder(bytes.NewReader(out))
	for {
		var p struct {
			ImportPath string
			Imports    []string
		}
		if err := dec.Decode(&p); errors.Is(err, io.EOF) {
			break
		} else if err != nil {
			t.Fatalf("go list output: %v", err)
		}
		graph[p.ImportPath] = p.Imports
	}
	return graph
}

// No package of the module imports one above it.
func TestLayering(t *testing.T) {
	graph := importGraph(t)
	for _, must := range []string{"calcdoc/expr", "calcdoc/calcdoc", "calcdoc/render", "calcdoc/cmd/calcdoc"} {
		if _, ok := graph[must]; !ok {
			t.Fatalf("go list did not list %s: %v", must, graph)
		}
	}
	for _, msg := range Check(graph) {
		t.Error(msg)
	}
}

// The check finds what it is for, on graphs made up for the purpose.
func TestCheckFinds(t *testing.T) {
	for _, c := range []struct {
		name  string
		graph map[string][]string
		want  string // "" for no finding
	}{
		{"downwards", map[string][]string{"calcdoc/render": {"calcdoc/calcdoc", "calcdoc/expr", "fmt"}}, ""},
		{"same layer", map[string][]string{"calcdoc/render/verify": {"calcdoc/render/pack"}}, ""},
		{"document imports the sheet writer", map[string][]string{"calcdoc/calcdoc": {"calcdoc/render"}},
			"calcdoc/calcdoc (layer 2, document) imports calcdoc/render (layer 5, sheet writer), which is above it"},
		{"sheet writer imports the stamp", map[string][]string{"calcdoc/render": {"calcdoc/render/stamp"}},
			"calcdoc/render (layer 5, sheet writer) imports calcdoc/render/stamp (layer 6, issuing), which is above it"},
		{"build imports the preview", map[string][]string{"calcdoc/cmd/internal/build": {"calcdoc/cmd/internal/preview"}}, "which is above it"},
		{"engine writes HTML", map[string][]string{"calcdoc/expr": {"html"}}, "HTML writing is not for the engine"},
		{"sheet writer serves HTTP", map[string][]string{"calcdoc/render": {"net/http"}}, "the HTTP server is the preview's"},
		{"a package in no layer", map[string][]string{"calcdoc/misc": nil}, "calcdoc/misc is in no layer"},
		{"a kind below the registry", map[string][]string{"calcdoc/calcdoc/kind/calc": {"calcdoc/render/markup"}}, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := strings.Join(Check(c.graph), "\n")
			if c.want == "" && got != "" || !strings.Contains(got, c.want) {
				t.Errorf("got %q, want %q", got, c.want)
			}
		})
	}
}

func TestOf(t *testing.T) {
	for path, want := range map[string]int{
		"calcdoc/expr": 1, "calcdoc/expr/linalg": 0, "calcdoc/calcdoc": 2, "calcdoc/expr/linalg/sparse": 0,
		"calcdoc/calcdoc/kind/solve/numeric": 4, "calcdoc/render": 5, "calcdoc/render/svg": 3,
		"calcdoc/render/pdf/pdftest": 6, "calcdoc/cmd/internal/preview": 8,
	} {
		if l, ok := Of(path); !ok || l.N != want {
			t.Errorf("Of(%s) = %d, %v; want %d", path, l.N, ok, want)
		}
	}
}
