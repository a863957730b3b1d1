package build

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// genFolder writes a folder of layers×width sheets in which each sheet of
// a layer after the first uses two sheets of the layer before, and the
// first five of each layer after the second one more of the layer two
// before: for 10×20, 200 sheets and 18·20 + 8·5 = 400 uses. It returns
// the folder and the use edges (user → used, by file name).
func genFolder(t testing.TB, layers, width int) (string, map[string][]string) {
	dir := t.TempDir()
	edges := map[string][]string{}
	name := func(l, j int) string { return fmt.Sprintf("s%02d-%02d.md", l, j) }
	for l := 0; l < layers; l++ {
		for j := 0; j < width; j++ {
			var b strings.Builder
			fmt.Fprintf(&b, "---\ntitle: Sheet %d.%d\nnumber: G-%02d%02d\nrevision: A\n---\n```calc\n", l, j, l, j)
			sum := "0 Ω"
			var used []string
			if l > 0 {
				used = append(used, name(l-1, j), name(l-1, (j+1)%width))
			}
			if l > 1 && j < 5 {
				used = append(used, name(l-2, (j+5)%width))
			}
			for k, u := range used {
				fmt.Fprintf(&b, "use Z as Z_%d from %s\n", k, u)
				sum += fmt.Sprintf(" + Z_%d", k)
			}
			edges[name(l, j)] = used
			fmt.Fprintf(&b, "Z_own = (0.%03d + j0.%03d) Ω\n", 10+j, 20+l)
			fmt.Fprintf(&b, "Z[mΩ] = (%s) / %d + Z_own\n", sum, max(1, len(used)))
			fmt.Fprintf(&b, "I_k[kA] = 1.05 * 400 V / (sqrt(3) * abs(Z))\n")
			fmt.Fprintf(&b, "S_k[MVA] = sqrt(3) * 400 V * I_k\n")
			fmt.Fprintf(&b, "check I_k <= 100 kA\n```\n")
			if err := os.WriteFile(filepath.Join(dir, name(l, j)), []byte(b.String()), 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	return dir, edges
}

// buildAll evaluates and draws every sheet of dir on workers goroutines,
// returning the sheets by file name, the order in which they were drawn,
// and the number of evaluations.
func buildAll(t testing.TB, dir string, workers int) (map[string][]byte, []string, int) {
	return buildWith(t, dir, workers, true)
}

// buildWith is buildAll, stamping each sheet from git (as build does) or
// not.
func buildWith(t testing.TB, dir string, workers int, stamped bool) (map[string][]byte, []string, int) {
	inputs, err := Collect([]string{dir}, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	l := NewLoader(kind.Standard(), inputs)
	st := NewStamper("test")
	var mu sync.Mutex
	pages := map[string][]byte{}
	var order []string
	Evaluate(l, inputs, workers, func(i int, doc *calcdoc.Document) {
		opt := Options{Version: "test", EmbedSource: true}
		if stamped {
			opt = st.Stamped(doc)
		}
		page, err := Sheet(doc, opt)
		if err != nil {
			t.Error(err)
		}
		mu.Lock()
		pages[inputs[i].Rel] = page
		order = append(order, inputs[i].Rel)
		mu.Unlock()
	})
	return pages, order, l.Evaluations()
}

// Every document is evaluated once, after each document it uses, and the
// sheets of a parallel build are byte for byte those of a serial one.
func TestEvaluateOrderAndParallel(t *testing.T) {
	dir, edges := genFolder(t, 4, 6)
	serial, order1, n1 := buildAll(t, dir, 1)
	par, order8, n8 := buildAll(t, dir, 8)
	if len(serial) != 24 || n1 != 24 || n8 != 24 {
		t.Errorf("%d sheets, %d and %d evaluations: want 24 of each (each document once)", len(serial), n1, n8)
	}
	for _, order := range [][]string{order1, order8} {
		at := map[string]int{}
		for k, n := range order {
			at[n] = k
		}
		for user, used := range edges {
			for _, u := range used {
				if at[u] >= at[user] {
					t.Errorf("%s was drawn before %s, which it uses", user, u)
				}
			}
		}
	}
	for name, page := range serial {
		if !bytes.Equal(page, par[name]) {
			t.Errorf("%s differs between the serial and the parallel build", name)
		}
		if bytes.Contains(page, []byte("class=\"err")) {
			t.Errorf("%s has an error", name)
		}
	}
}

// A cycle of uses does not hang the scheduler: each sheet on it says so.
func TestEvaluateCycle(t *testing.T) {
	dir := t.TempDir()
	for name, text := range map[string]string{
		"a.md": "```calc\nuse y from b.md\nx = 1\n```\n",
		"b.md": "```calc\nuse x from a.md\ny = 2\n```\n",
		"c.md": "```calc\nuse x from a.md\nz = 3\n```\n",
		"d.md": "```calc\nw = 4\n```\n",
	} {
		os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644)
	}
	inputs, _ := Collect([]string{dir}, kind.Standard())
	for _, workers := range []int{1, 4} {
		evs := Evaluate(NewLoader(kind.Standard(), inputs), inputs, workers, nil)
		for _, ev := range evs {
			errs := ev.Doc.Errors
			if ev.Rel == "d.md" {
				if len(errs) > 0 {
					t.Errorf("d.md: %v", errs)
				}
				continue
			}
			if len(errs) == 0 {
				t.Errorf("%s: no error", ev.Rel)
				continue
			}
			if ev.Rel == "a.md" && !strings.Contains(errs[0].Msg, "use makes a cycle") {
				t.Errorf("a.md: %v", errs[0])
			}
		}
	}
}

// BenchmarkBuild200 evaluates and draws a generated folder of 200 sheets
// with 400 uses (docs/performance.md), serially and on every core, with
// the stamp from git (one git run or more a sheet) and without.
func BenchmarkBuild200(b *testing.B) {
	dir, _ := genFolder(b, 10, 20)
	for _, stamped := range []bool{true, false} {
		for _, w := range []struct {
			name    string
			workers int
		}{{"serial", 1}, {"parallel", 0}} {
			name := w.name
			if !stamped {
				name += "-nostamp"
			}
			b.Run(name, func(b *testing.B) {
				for i := 0; i < b.N; i++ {
					buildWith(b, dir, w.workers, stamped)
				}
			})
		}
	}
}
