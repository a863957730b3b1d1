// Package layers states the layers of calcdoc's packages, bottom to top,
// as the data flows (docs: the issue 13 layout). A package may import only
// packages in its own layer or below; the test of this package reads the
// import graph with `go list` and fails on any import that points up.
package layers

import (
	"fmt"
	"sort"
	"strings"
)

// Module is the module path of calcdoc.
const Module = "calcdoc"

// Layer is one layer: its number (0 the bottom), its name, and the
// patterns of its packages' import paths. A pattern is a path, or a path
// followed by "/..." for it and everything below it; a package belongs to
// the layer of the longest pattern that matches it.
type Layer struct {
	N        int
	Name     string
	Patterns []string
}

// Layers are calcdoc's layers, bottom to top.
var Layers = []Layer{
	{0, "numeric", []string{"calcdoc/expr/linalg/..."}},
	{1, "engine", []string{"calcdoc/expr"}},
	{2, "document", []string{"calcdoc/calcdoc", "calcdoc/calcdoc/gfm"}},
	{3, "drawing primitives", []string{"calcdoc/render/markup/...", "calcdoc/render/svg/..."}},
	{4, "block kinds", []string{"calcdoc/calcdoc/kind/..."}},
	{5, "sheet writer", []string{"calcdoc/render", "calcdoc/render/internal/..."}},
	{6, "issuing", []string{"calcdoc/render/stamp/...", "calcdoc/render/verify/...", "calcdoc/render/pack/...", "calcdoc/render/pdf/..."}},
	{7, "build", []string{"calcdoc/cmd/internal/build/...", "calcdoc/cmd/internal/diff/..."}},
	{8, "preview", []string{"calcdoc/cmd/internal/preview/...", "calcdoc/cmd/internal/lsp/..."}},
	{9, "command", []string{"calcdoc/cmd/calcdoc/...", "calcdoc/cmd/calcbench/...", "calcdoc/cmd/internal/layers/..."}},
}

// Confined are imports from outside the module that only some layers may
// make: a path (or path/... prefix) and the lowest layer allowed to import
// it. The document core and the engine never write HTML, and the HTTP
// server is not under the preview.
var Confined = []struct {
	Pattern string
	Lowest  int
	Why     string
}{
	{"html", 3, "HTML writing is not for the engine or the document core"},
	{"golang.org/x/net/html/...", 3, "HTML is not for the engine or the document core"},
	{"github.com/yuin/goldmark/renderer/...", 3, "HTML rendering is not for the engine or the document core"},
	{"net/http/...", 8, "the HTTP server is the preview's"},
}

func match(pattern, path string) bool {
	if p, ok := strings.CutSuffix(pattern, "/..."); ok {
		return path == p || strings.HasPrefix(path, p+"/")
	}
	return path == pattern
}

// Of returns the layer of a package of the module, and false when no
// pattern matches it.
func Of(path string) (Layer, bool) {
	best, bestLen, ok := Layer{}, -1, false
	for _, l := range Layers {
		for _, p := range l.Patterns {
			if match(p, path) && len(p) > bestLen {
				best, bestLen, ok = l, len(p), true
			}
		}
	}
	return best, ok
}

// Check returns one sentence for every import of graph (package → its
// imports, as `go list` gives them) that breaks the layering: a package of
// the module that is in no layer, an import of a package in a higher
// layer, or a confined import below its lowest layer. The sentences are
// sorted.
func Check(graph map[string][]string) []string {
	var out []string
	for pkg, imports := range graph {
		l, ok := Of(pkg)
		if !ok {
			out = append(out, fmt.Sprintf("%s is in no layer: add it to layers.Layers", pkg))
			continue
		}
		for _, imp := range imports {
			if imp == Module || strings.HasPrefix(imp, Module+"/") {
				il, ok := Of(imp)
				if ok && il.N > l.N {
					out = append(out, fmt.Sprintf("%s (layer %d, %s) imports %s (layer %d, %s), which is above it", pkg, l.N, l.Name, imp, il.N, il.Name))
				}
				continue
			}
			for _, c := range Confined {
				if match(c.Pattern, imp) && l.N < c.Lowest {
					out = append(out, fmt.Sprintf("%s (layer %d, %s) imports %s: %s", pkg, l.N, l.Name, imp, c.Why))
				}
			}
		}
	}
	sort.Strings(out)
	return out
}
