package lsp

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestCodeAction: a name written with the Greek letter omicron ο (U+03BF)
// in place of the Latin o gets an error with one certain fix, and the
// code action replaces the name by the Latin spelling; the columns are
// hand-counted in UTF-16 ("P_lοad" is 6 code units, after "x = 2 * ",
// 8). An error with two possible fixes (an angle without a unit: degrees
// or radians) gets no code action.
func TestCodeAction(t *testing.T) {
	doc := "```calc\nP_load = 3 kW\nx = 2 * P_lοad\ny = 230 V∠-120\n```\n"
	cl := newClient(t, time.Millisecond)
	cl.initialize("")
	uri := pathURI(filepath.Join(t.TempDir(), "a.md"))
	cl.open(uri, doc, 1)
	ds := cl.diagnostics(uri, 1)
	var withFix []Diagnostic
	for _, d := range ds {
		if d.Data != nil {
			withFix = append(withFix, d)
		}
	}
	if len(withFix) != 1 {
		t.Fatalf("diagnostics with a fix: %+v (all: %+v)", withFix, ds)
	}
	fx := withFix[0].Data
	if fx.NewText != "P_load" || fx.Range != (Range{at(2, 8), at(2, 14)}) {
		t.Errorf("fix %+v, want P_load over line 2 columns 8 to 14", fx)
	}
	var acts []struct {
		Title string
		Kind  string
		Edit  struct {
			Changes map[string][]struct {
				Range   Range
				NewText string
			}
		}
	}
	cl.call("textDocument/codeAction", map[string]any{
		"textDocument": map[string]any{"uri": uri},
		"range":        withFix[0].Range,
		"context":      map[string]any{"diagnostics": ds},
	}, &acts)
	if len(acts) != 1 || acts[0].Kind != "quickfix" || len(acts[0].Edit.Changes[uri]) != 1 || acts[0].Edit.Changes[uri][0].NewText != "P_load" {
		b, _ := json.Marshal(acts)
		t.Fatalf("code actions: %s", b)
	}
	// apply it: the document then has only the angle's error
	e := acts[0].Edit.Changes[uri][0]
	cl.change(uri, 2, e.Range, e.NewText)
	ds = cl.diagnostics(uri, 2)
	if len(ds) != 1 || !strings.Contains(ds[0].Message, "angle") || ds[0].Data != nil {
		t.Errorf("after the fix: %+v, want the angle's error alone, without a fix", ds)
	}
	cl.shutdownExit()
}
