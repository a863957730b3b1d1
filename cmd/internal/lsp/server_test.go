package lsp

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// feeder is a document of our own invention. Its line 10 (0-based) has an
// unknown name after Ω, ∠ and °; its line 14 an unknown name in an
// inline value after 𝒵 (U+1D4B5, outside the BMP: two UTF-16 code units,
// four bytes); line 7's comment holds 𝒵 too.
const feeder = "---\n" +
	"title: Editor test feeder\n" +
	"---\n" +
	"\n" +
	"# Feeder 𝒵\n" +
	"\n" +
	"```calc\n" +
	"U = 230 V   # supply 𝒵 voltage\n" +
	"R = 115 Ω   # load resistance\n" +
	"I_1 = U / R   # load current\n" +
	"Z_x = 10 Ω∠30° * foo_bar\n" +
	"check abs(I_1) <= 1 A   # within the fuse rating\n" +
	"```\n" +
	"\n" +
	"Load 𝒵: `=I_1 * k_q`.\n"

// errAt finds the error diagnostic whose message mentions name.
func errAt(t *testing.T, ds []Diagnostic, name string) Diagnostic {
	t.Helper()
	for _, d := range ds {
		if d.Severity == sevError && strings.Contains(d.Message, name) {
			return d
		}
	}
	t.Fatalf("no error naming %s among %+v", name, ds)
	return Diagnostic{}
}

// TestDiagnosticsPositions: the columns of errors after non-ASCII
// characters, in each encoding the client may negotiate. The columns are
// counted by hand: "Z_x = 10 Ω∠30° * " is 17 characters, each in the BMP
// (17 UTF-16 code units, 17 code points) and 21 bytes (Ω and ° two bytes
// each, ∠ three: RFC 3629); "Load 𝒵: `=I_1 * " is 16 code points, 17
// UTF-16 code units (𝒵 is a surrogate pair, RFC 2781) and 19 bytes (𝒵
// four bytes).
func TestDiagnosticsPositions(t *testing.T) {
	for _, c := range []struct {
		offer     []string
		enc       string
		fooC, kqC int
		fooE, kqE int // ends: foo_bar and k_q are ASCII
	}{
		{nil, "utf-16", 17, 17, 24, 20},
		{[]string{"utf-16"}, "utf-16", 17, 17, 24, 20},
		{[]string{"utf-8", "utf-16"}, "utf-8", 21, 19, 28, 22},
		{[]string{"utf-32"}, "utf-32", 17, 16, 24, 19},
		{[]string{"x-unknown"}, "utf-16", 17, 17, 24, 20},
	} {
		t.Run(c.enc+strings.Join(c.offer, ","), func(t *testing.T) {
			cl := newClient(t, time.Millisecond)
			res := cl.initialize("", c.offer...)
			caps := res["capabilities"].(map[string]any)
			if caps["positionEncoding"] != c.enc {
				t.Errorf("positionEncoding %v, want %s", caps["positionEncoding"], c.enc)
			}
			uri := pathURI(filepath.Join(t.TempDir(), "feeder.md"))
			cl.open(uri, feeder, 1)
			ds := cl.diagnostics(uri, 1)
			foo := errAt(t, ds, "foo_bar")
			if want := (Range{at(10, c.fooC), at(10, c.fooE)}); foo.Range != want {
				t.Errorf("foo_bar error at %+v, want %+v (%s)", foo.Range, want, foo.Message)
			}
			kq := errAt(t, ds, "k_q")
			if want := (Range{at(14, c.kqC), at(14, c.kqE)}); kq.Range != want {
				t.Errorf("k_q error at %+v, want %+v (%s)", kq.Range, want, kq.Message)
			}
			cl.shutdownExit()
		})
	}
}

// TestSession drives one session: open, diagnostics (an unknown name, a
// check that does not hold with its utilisation), an incremental change
// that fixes a line with non-ASCII characters, hover, inlay hints,
// completion, document symbols, shutdown and exit.
func TestSession(t *testing.T) {
	cl := newClient(t, 5*time.Millisecond)
	cl.initialize(t.TempDir())
	uri := pathURI(filepath.Join(t.TempDir(), "feeder.md"))
	cl.open(uri, feeder, 1)
	ds := cl.diagnostics(uri, 1)
	// hand derivation: I_1 = 230 V / 115 Ω = 2 A; the check asks
	// |I_1| <= 1 A, so it fails with a utilisation of 2 A / 1 A = 200 %
	var check *Diagnostic
	for i, d := range ds {
		if d.Severity == sevWarning && strings.Contains(d.Message, "check not satisfied") {
			check = &ds[i]
		}
	}
	if check == nil || check.Range.Start.Line != 11 || !strings.Contains(check.Message, "200.0 %") {
		t.Errorf("the failed check: %+v, want a warning on line 11 with utilisation 200.0 %%", check)
	}
	if len(ds) != 3 {
		t.Errorf("%d diagnostics, want 3 (foo_bar, k_q, the check): %+v", len(ds), ds)
	}

	// replace foo_bar (UTF-16 columns 17 to 24 of line 10) by 1; then
	// k_q (columns 17 to 20 of line 14, after the surrogate pair) by 1
	cl.change(uri, 2, Range{at(10, 17), at(10, 24)}, "1")
	cl.change(uri, 3, Range{at(14, 17), at(14, 20)}, "1")
	ds = cl.diagnostics(uri, 3)
	if len(ds) != 1 || ds[0].Severity != sevWarning {
		t.Errorf("after the fixes: %+v, want only the check's warning", ds)
	}

	// hover on I_1 (line 9): its value, SI unit, line and description
	var hv struct {
		Contents struct{ Kind, Value string }
		Range    Range
	}
	cl.call("textDocument/hover", docParams(uri, at(9, 1)), &hv)
	if !contains(hv.Contents.Value, "**I_1** = 2.000 A", "SI unit: A", "line 10: `I_1 = U / R`", "load current") {
		t.Errorf("hover on I_1: %q", hv.Contents.Value)
	}
	if hv.Range != (Range{at(9, 0), at(9, 3)}) {
		t.Errorf("hover range %+v, want line 9 columns 0 to 3", hv.Range)
	}
	// hover on U where it is used (line 9 column 6): its description,
	// with 𝒵, comes from line 8 (1-based)
	cl.call("textDocument/hover", docParams(uri, at(9, 6)), &hv)
	if !contains(hv.Contents.Value, "**U** = 230.0 V", "line 8:", "supply 𝒵 voltage") {
		t.Errorf("hover on U: %q", hv.Contents.Value)
	}

	// inlay hints: the value after each statement; after the check, that
	// it does not hold. "I_1 = U / R" ends at column 11.
	var hints []InlayHint
	cl.call("textDocument/inlayHint", map[string]any{"textDocument": map[string]any{"uri": uri}, "range": Range{at(0, 0), at(20, 0)}}, &hints)
	found := map[string]Position{}
	for _, h := range hints {
		found[h.Label] = h.Position
	}
	if p, ok := found["= 2.000 A"]; !ok || p != at(9, 11) {
		t.Errorf("inlay hints %+v: want \"= 2.000 A\" at line 9 column 11", hints)
	}
	if p, ok := found["✗ not satisfied, utilisation 200.0 %"]; !ok || p.Line != 11 {
		t.Errorf("inlay hints %+v: want the check's hint on line 11", hints)
	}

	// completion at the start of line 10: U, R and I_1 are defined
	// above, Z_x is not; built-in functions and units are offered
	var comp struct{ Items []CompletionItem }
	cl.call("textDocument/completion", docParams(uri, at(10, 0)), &comp)
	labels := map[string]int{}
	for _, it := range comp.Items {
		labels[it.Label] = it.Kind
	}
	for name, kind := range map[string]int{"U": ciVariable, "R": ciVariable, "I_1": ciVariable, "sqrt": ciFunction, "Ω": ciUnit, "kV": 0} {
		k, ok := labels[name]
		if kind == 0 {
			continue // a prefixed unit is not listed
		}
		if !ok || k != kind {
			t.Errorf("completion: %s kind %d (listed %v), want kind %d", name, k, ok, kind)
		}
	}
	if _, ok := labels["Z_x"]; ok {
		t.Errorf("completion offers Z_x, defined below the cursor")
	}

	// document symbols: the heading holds the four names
	var syms []*DocumentSymbol
	cl.call("textDocument/documentSymbol", map[string]any{"textDocument": map[string]any{"uri": uri}}, &syms)
	if len(syms) != 1 || syms[0].Name != "Feeder 𝒵" || len(syms[0].Children) != 4 {
		b, _ := json.Marshal(syms)
		t.Fatalf("symbols: %s", b)
	}
	if c := syms[0].Children[2]; c.Name != "I_1" || c.SelectionRange != (Range{at(9, 0), at(9, 3)}) {
		t.Errorf("third symbol %+v, want I_1 at line 9 columns 0 to 3", c)
	}
	cl.notify("textDocument/didClose", map[string]any{"textDocument": map[string]any{"uri": uri}})
	cl.shutdownExit()
}

// TestDefinitionAcrossUse: two documents in a folder; the used one is open
// with unsaved text that differs from the disk, and the user's values
// come from the editor's text. Hand derivation: V = 2·U_s = 2·400 V =
// 800 V; after the change U_s = 500 V, V = 1000 V.
func TestDefinitionAcrossUse(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join(dir, "src.md")
	user := filepath.Join(dir, "user.md")
	if err := os.WriteFile(src, []byte("```calc\nU_s = 100 V\n```\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	userText := "# Uses\n\n```calc\nuse U_s from src.md\nV = 2 * U_s\n```\n"
	if err := os.WriteFile(user, []byte(userText), 0o644); err != nil {
		t.Fatal(err)
	}
	cl := newClient(t, time.Millisecond)
	cl.initialize(dir)
	srcURI, userURI := pathURI(src), pathURI(user)
	cl.open(srcURI, "```calc\n# 𝒵 the source\nU_s = 400 V\n```\n", 1)
	cl.diagnostics(srcURI, 1)
	cl.open(userURI, userText, 1)
	if ds := cl.diagnostics(userURI, 1); len(ds) != 0 {
		t.Fatalf("user.md: %+v", ds)
	}
	var hv struct{ Contents struct{ Value string } }
	cl.call("textDocument/hover", docParams(userURI, at(4, 0)), &hv)
	if !contains(hv.Contents.Value, "**V** = 800.0 V") {
		t.Errorf("hover on V: %q, want 800.0 V (the editor's text of src.md)", hv.Contents.Value)
	}
	// U_s in V = 2 * U_s (line 4, column 9) is defined in src.md, line 2
	var loc Location
	cl.call("textDocument/definition", docParams(userURI, at(4, 9)), &loc)
	if loc.URI != srcURI || loc.Range != (Range{at(2, 0), at(2, 3)}) {
		t.Errorf("definition of U_s: %+v, want %s line 2 columns 0 to 3", loc, srcURI)
	}
	// the path of the use statement (line 3, column 14, inside
	// "src.md") goes to the start of src.md
	loc = Location{}
	cl.call("textDocument/definition", docParams(userURI, at(3, 14)), &loc)
	if loc.URI != srcURI || loc.Range != (Range{}) {
		t.Errorf("definition of the use path: %+v, want %s at 0:0", loc, srcURI)
	}
	cl.call("textDocument/hover", docParams(userURI, at(4, 9)), &hv)
	if !contains(hv.Contents.Value, "from src.md, line 3") {
		t.Errorf("hover on a used name: %q", hv.Contents.Value)
	}
	// a change of src.md evaluates user.md again
	cl.change(srcURI, 2, Range{at(2, 6), at(2, 9)}, "500")
	cl.diagnostics(srcURI, 2)
	deadline := time.Now().Add(10 * time.Second)
	for {
		cl.call("textDocument/hover", docParams(userURI, at(4, 0)), &hv)
		if strings.Contains(hv.Contents.Value, "1000 V") || strings.Contains(hv.Contents.Value, "1.000 kV") {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("user.md was not evaluated again after src.md changed: %q", hv.Contents.Value)
		}
		time.Sleep(10 * time.Millisecond)
	}
	cl.shutdownExit()
}

// TestDefinitionOfTable: a table's column goes to the table block's name.
func TestDefinitionOfTable(t *testing.T) {
	// the resistances are IEC 60228:2004, Table 2, class 2 copper (from
	// memory); only the table's name matters here
	doc := "```table cu\nsource: IEC 60228:2004, Table 2\nS [mm²] | R_20 [Ω/km]\n1.5 | 12.1\n2.5 | 7.41\n```\n\n```calc\nr = cu.R_20(2.5 mm²)\n```\n"
	cl := newClient(t, time.Millisecond)
	cl.initialize("")
	uri := pathURI(filepath.Join(t.TempDir(), "t.md"))
	cl.open(uri, doc, 1)
	if ds := cl.diagnostics(uri, 1); len(ds) != 0 {
		t.Fatalf("diagnostics: %+v", ds)
	}
	var loc Location
	cl.call("textDocument/definition", docParams(uri, at(8, 5)), &loc)
	if loc.URI != uri || loc.Range != (Range{at(0, 9), at(0, 11)}) {
		t.Errorf("definition of cu.R_km: %+v, want line 0 columns 9 to 11", loc)
	}
	cl.shutdownExit()
}

// TestMalformed: a body that is not JSON, a message that is not JSON-RPC
// 2.0 and a JSON array are each answered with an error (JSON-RPC 2.0,
// section 5.1: -32700 Parse error, -32600 Invalid Request), an unknown
// method with -32601, and the server goes on.
func TestMalformed(t *testing.T) {
	cl := newClient(t, time.Millisecond)
	cl.raw(`{"jsonrpc":"2.0","id":1,"method":"textDocument/hover"`)
	if m := cl.response(); m.Error == nil || m.Error.Code != codeParseError || string(m.ID) != "null" {
		t.Errorf("truncated JSON: %+v, want error -32700 with id null", m)
	}
	cl.initialize("")
	for _, c := range []struct {
		body string
		code int
		id   string
	}{
		{`not json at all`, codeParseError, "null"},
		{`[1, 2]`, codeInvalidRequest, "null"},
		{`{"jsonrpc":"1.0","id":7,"method":"shutdown"}`, codeInvalidRequest, "7"},
		{`{"jsonrpc":"2.0","id":8,"method":42}`, codeInvalidRequest, "8"},
		{`{"jsonrpc":"2.0","id":9,"method":"no/such"}`, codeMethodNotFound, "9"},
		{`{"jsonrpc":"2.0","id":10,"method":"textDocument/hover","params":"x"}`, codeInvalidParams, "10"},
	} {
		cl.raw(c.body)
		m := cl.response()
		if m.Error == nil || m.Error.Code != c.code || string(m.ID) != c.id {
			t.Errorf("%s: %+v (error %+v), want code %d id %s", c.body, m, m.Error, c.code, c.id)
		}
	}
	// a header that cannot be read, then the stream goes on
	if _, err := cl.in.Write([]byte("Content-Length: many\r\n\r\n")); err != nil {
		t.Fatal(err)
	}
	if m := cl.response(); m.Error == nil || m.Error.Code != codeParseError {
		t.Errorf("bad header: %+v", m)
	}
	uri := pathURI(filepath.Join(t.TempDir(), "x.md"))
	cl.open(uri, "```calc\nx = 1 V\n```\n", 1)
	cl.diagnostics(uri, 1)
	var hv struct{ Contents struct{ Value string } }
	cl.call("textDocument/hover", docParams(uri, at(1, 0)), &hv)
	if !strings.Contains(hv.Contents.Value, "**x**") {
		t.Errorf("after the bad messages, hover: %q", hv.Contents.Value)
	}
	cl.shutdownExit()
}

// TestExitWithoutShutdown: exit without shutdown ends with status 1 (LSP
// 3.17, exit notification).
func TestExitWithoutShutdown(t *testing.T) {
	cl := newClient(t, time.Millisecond)
	cl.initialize("")
	cl.notify("exit", nil)
	select {
	case st := <-cl.done:
		if st != 1 {
			t.Errorf("exit status %d, want 1", st)
		}
		cl.done <- st
	case <-time.After(10 * time.Second):
		t.Fatal("no exit")
	}
}

// TestBudgetDiagnostic: a document whose evaluation would exceed the work
// budget gets a diagnostic, not a stall.
func TestBudgetDiagnostic(t *testing.T) {
	cl := newClient(t, time.Millisecond)
	cl.initialize("")
	uri := pathURI(filepath.Join(t.TempDir(), "big.md"))
	// f_40(1) makes 2^40 calls: far over the budget (the document of
	// calcdoc's own budget test)
	var b strings.Builder
	b.WriteString("```calc\nf_0(x) = x\n")
	for k := 1; k <= 40; k++ {
		fmt.Fprintf(&b, "f_%d(x) = f_%d(x) + f_%d(x)\n", k, k-1, k-1)
	}
	b.WriteString("y = f_40(1)\n```\n")
	start := time.Now()
	cl.open(uri, b.String(), 1)
	ds := cl.diagnostics(uri, 1)
	found := false
	for _, d := range ds {
		if d.Severity == sevError && strings.Contains(d.Message, "budget") {
			found = true
		}
	}
	if !found {
		t.Errorf("no budget diagnostic among %d: %+v (after %v)", len(ds), first(ds), time.Since(start))
	}
	cl.shutdownExit()
}

func first(ds []Diagnostic) any {
	if len(ds) == 0 {
		return nil
	}
	return ds[0]
}

// TestFullSyncCRLFAndBOM: a change without a range replaces the whole
// text; a text with a byte-order mark and CR LF line ends has its
// positions counted as the editor counts them (the mark is a character
// of line 0, CR LF one line end). "y = 2 * " is 8 characters: zz stands
// at line 2, columns 8 to 10.
func TestFullSyncCRLFAndBOM(t *testing.T) {
	cl := newClient(t, time.Millisecond)
	cl.initialize("")
	uri := pathURI(filepath.Join(t.TempDir(), "w.md"))
	cl.open(uri, "```calc\nx = 1 V\n```\n", 1)
	if ds := cl.diagnostics(uri, 1); len(ds) != 0 {
		t.Fatalf("%+v", ds)
	}
	cl.notify("textDocument/didChange", map[string]any{
		"textDocument":   map[string]any{"uri": uri, "version": 2},
		"contentChanges": []any{map[string]any{"text": "\uFEFF```calc\r\nx = 1 V\r\ny = 2 * zz\r\n```\r\n"}},
	})
	ds := cl.diagnostics(uri, 2)
	zz := errAt(t, ds, "zz")
	if zz.Range != (Range{at(2, 8), at(2, 10)}) {
		t.Errorf("zz at %+v, want line 2 columns 8 to 10", zz.Range)
	}
	// an incremental change across the CR LF: lines 1 and 2 become
	// "x = 1 V + 2 * zz" (14 characters before zz)
	cl.change(uri, 3, Range{at(1, 7), at(2, 10)}, " + 2 * zz")
	ds = cl.diagnostics(uri, 3)
	zz = errAt(t, ds, "zz")
	if zz.Range != (Range{at(1, 14), at(1, 16)}) || len(ds) != 1 {
		t.Errorf("after the join, zz at %+v, want line 1 columns 14 to 16 (diagnostics %+v)", zz.Range, ds)
	}
	cl.shutdownExit()
}

// TestNewerTextStopsEvaluation: while a document that would spend the
// whole work budget is being evaluated, newer text arrives: the running
// evaluation is stopped and its result never published; the newer text's
// diagnostics are.
func TestNewerTextStopsEvaluation(t *testing.T) {
	cl := newClient(t, time.Millisecond)
	started := make(chan int, 4)
	cl.srv.debounced = func(string) { started <- 1 }
	cl.initialize("")
	uri := pathURI(filepath.Join(t.TempDir(), "heavy.md"))
	var b strings.Builder
	b.WriteString("```calc\nf_0(x) = x\n")
	for k := 1; k <= 40; k++ {
		fmt.Fprintf(&b, "f_%d(x) = f_%d(x) + f_%d(x)\n", k, k-1, k-1)
	}
	b.WriteString("y = f_40(1)\n```\n")
	cl.open(uri, b.String(), 1)
	<-started // version 1 is being evaluated
	cl.notify("textDocument/didChange", map[string]any{
		"textDocument":   map[string]any{"uri": uri, "version": 2},
		"contentChanges": []any{map[string]any{"text": "```calc\ny = 2 V\n```\n"}},
	})
	deadline := time.After(120 * time.Second)
	for {
		select {
		case m := <-cl.notes:
			var p publishParams
			if json.Unmarshal(m.Params, &p) != nil || m.Method != "textDocument/publishDiagnostics" {
				continue
			}
			if p.Version == 1 {
				t.Fatalf("the evaluation of version 1 was published after version 2 arrived: %+v", p.Diagnostics)
			}
			if p.Version == 2 {
				if len(p.Diagnostics) != 0 {
					t.Errorf("version 2: %+v", p.Diagnostics)
				}
				cl.shutdownExit()
				return
			}
		case <-deadline:
			t.Fatal("no diagnostics of version 2")
		}
	}
}
