package preview

import (
	"bytes"
	"encoding/json"
	"fmt"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// applyPatch does to the elements of a page what the live script does to
// the page's DOM: each edit replaces Del elements from At with those of
// its HTML.
func applyPatch(t *testing.T, s shown, pt patch) shown {
	t.Helper()
	for _, op := range pt.Ops {
		list := &s.body
		switch {
		case op.In == "main":
			list = &s.mai
		case strings.HasPrefix(op.In, "#"):
			// the element of that id among main's: its children
			for i, e := range s.mai {
				_, id, kids, ok := children(e)
				if !ok || "#"+id != op.In || len(kids) == 0 {
					continue
				}
				head := e[:bytes.Index(e, kids[0])]
				tail := e[bytes.LastIndex(e, kids[len(kids)-1])+len(kids[len(kids)-1]):]
				kids = applyOps(t, kids, op)
				s.mai[i] = append(append(append([]byte(nil), head...), bytes.Join(kids, nil)...), tail...)
				list = nil
			}
			if list != nil {
				t.Fatalf("the patch names %s, which the page does not have", op.In)
			}
			continue
		}
		*list = applyOps(t, *list, op)
	}
	return s
}

func applyOps(t *testing.T, list [][]byte, op patchOp) [][]byte {
	t.Helper()
	ins, ok := splitPage([]byte("<body>"+op.HTML+"</body>"), "")
	if !ok {
		t.Fatalf("the patch's HTML does not read as elements: %q", op.HTML)
	}
	if op.At+op.Del > len(list) {
		t.Fatalf("the patch edits elements %d to %d of %d", op.At, op.At+op.Del, len(list))
	}
	out := append([][]byte(nil), list[:op.At]...)
	out = append(out, ins.body...)
	return append(out, list[op.At+op.Del:]...)
}

// TestPatch checks the patches an open page asks for after a save: they
// turn the elements of the page before into those of the new page (as the
// new page's bytes read), carry only the elements that changed, and are
// refused (409) from a version that is not the one before, or when the
// head changed.
func TestPatch(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "doc.md")
	save := func(k int, title string) (string, string) {
		src := strings.Replace(longDoc(k, 3, true), "title: Latency test feeder", "title: "+title, 1)
		if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		return src, fmt.Sprintf(`<div class="desc">save-%d</div>`, k)
	}
	save(0, "Feeder A")
	h := start(t, Config{Paths: []string{dir}})
	_, b0 := h.get("/doc.html")
	v0, _ := pageVersion(t, b0)
	for k := 1; k <= 3; k++ {
		title := "Feeder A"
		if k == 3 {
			title = "Feeder B" // the head's title changes: no patch
		}
		_, marker := save(k, title)
		b1 := h.wait("/doc.html", func(st int, body string) string {
			if st != 200 || !strings.Contains(body, marker) || strings.Contains(body, `class="calcdoc-pending"`) {
				return "the save is not shown yet"
			}
			return ""
		})
		v1, _ := pageVersion(t, b1)
		st, js := h.get(PatchPath + "?doc=" + url.QueryEscape("/doc.html") + "&from=" + url.QueryEscape(v0))
		if k == 3 {
			if st != 409 {
				t.Fatalf("save %d changed the title: status %d, want 409", k, st)
			}
			break
		}
		if st != 200 {
			t.Fatalf("save %d: patch from %s: status %d: %s", k, v0, st, js)
		}
		var pt patch
		if err := json.Unmarshal([]byte(js), &pt); err != nil {
			t.Fatal(err)
		}
		if pt.V != v1 {
			t.Errorf("save %d: the patch is to version %q, want %q", k, pt.V, v1)
		}
		before, _ := splitPage([]byte(b0), v0)
		want, _ := splitPage([]byte(b1), v1)
		got := applyPatch(t, before, pt)
		if !equalElems(got.body, want.body) || !equalElems(got.mai, want.mai) {
			t.Fatalf("save %d: the patched page's elements differ from the new page's", k)
		}
		// only a row of the last block changed: a small patch
		if n := len(js); n > 4000 {
			t.Errorf("save %d: a patch of %d bytes for a page of %d", k, n, len(b1))
		}
		if st, _ := h.get(PatchPath + "?doc=" + url.QueryEscape("/doc.html") + "&from=" + url.QueryEscape(v1+"x")); st != 409 {
			t.Errorf("save %d: a patch from an unknown version: status %d, want 409", k, st)
		}
		b0, v0 = b1, v1
	}
}

func equalElems(a, b [][]byte) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if !bytes.Equal(a[i], b[i]) {
			return false
		}
	}
	return true
}
