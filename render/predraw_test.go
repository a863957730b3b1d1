package render

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render/internal/sheettest"
)

// predrawDocs are documents of our own that exercise what the drawing of
// a block may read: errors (syntax, failed definitions and the lines that
// use them, an unclosed bracket), names used above their definition (the
// early drawing cannot know them: it must be drawn again), functions
// defined in one block and called in another (and used before their
// definition), tables and their look-ups (one inside a function defined in
// another block), cases, and blocks of other kinds between calc blocks.
var predrawDocs = map[string]string{
	"errors.md":    "---\ntitle: errors\n---\n\n```calc\na = 3 V\nb = a + 2 A   # a dimension error\nc = b * 2\nd = (a + \n```\n\nText `= c` and `= a`.\n\n```calc\ne = c + 1 V\nf = 2 ** 3\ncheck a <= 2 V\n```\n",
	"forward.md":   "---\ntitle: names used above their definition\n---\n\n```calc\ny = x + 1 V   # x is defined below\nz = g(2)\ncheck x <= 5 V\nm = k(3)\n```\n\n```calc\nx = 3 V [mV]\ng(t) = 2*t\nk = [1, 2, 3]\n```\n\n```calc\nw = x * 2\nv = g(x / 1 V)\n```\n",
	"functions.md": "---\ntitle: functions\nunits: {voltage: kV}\n---\n\n```calc\nZ(f, L) = j*2*pi*f*L\nV_s = 11 kV\nI = 100 A∠-30°\n```\n\n```calc\nX = Z(50 Hz, 10 mH)\nV_d[V] = I * X\nS[kVA] = 3 * V_s * conj(I)\ncheck |V_d| <= 0.05 * V_s\n```\n",
	"tables.md":    "---\ntitle: tables\n---\n\n```table mcb from rated.csv\n# rated currents\nsource: our own list\n```\n\n```calc\nI_b = 37 A\nI_n = up(mcb, I_b)\npick(x) = up(mcb, x)\n```\n\n```calc\nI_2 = pick(50 A)\ncheck I_b <= I_n\n```\n",
	"cases.md":     "---\ntitle: cases\ncases: [max, min]\n---\n\n```calc\nc = {1.1, 0.95}\nV = c * 230 V\nZ = (0.2 + j0.3) Ω\nI_k[kA] = V / Z\ncheck |I_k| >= 100 A\nI_w = casemax(|I_k|)\n```\n\n```solve I_a[A], I_b[A]\nm_a: V = I_a*Z + (I_a + I_b)*Z\nm_b: V = I_b*Z + (I_a + I_b)*Z\n```\n\n```calc\nI_t = I_a + I_b\ncheck |I_t| <= 5 kA\n```\n",
	"uses.md":      "---\ntitle: uses\n---\n\n```calc\nuse base.md: V_n, Z_s\nI_k = V_n / Z_s\n```\n",
	"base.md":      "---\ntitle: base\nnumber: B-1\n---\n\n```calc\nV_n = 400 V\nZ_s = (0.01 + j0.04) Ω\n```\n",
}

// TestPredrawSameBytes: the sheet drawn with blocks drawn while the
// document is evaluated (Predraw) is byte for byte the serial sheet
// (Options.Predrawn nil), for every example (subfolders too), documents of
// our own with errors, cases, uses and tables, and a document of many
// blocks; and a drawing made with no names but those its hook found
// (isolate) is the serial one too, so that the drawing of a calc block
// reads no other name. Run it with -race: the hook and the drawing
// goroutine share the evaluated blocks while evaluation goes on. With a
// limit of one byte held, each early drawing waits for the sheet to take
// the one before, and reuses its buffer.
func TestPredrawSameBytes(t *testing.T) {
	files := sheettest.Examples(t, filepath.Join("..", "examples"))
	dir := t.TempDir()
	for name, src := range predrawDocs {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		files = append(files, filepath.Join(dir, name))
	}
	if err := os.WriteFile(filepath.Join(dir, "rated.csv"), []byte("I_n [A]\n16\n20\n25\n32\n40\n50\n63\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	var many strings.Builder
	many.WriteString("---\ntitle: many blocks\n---\n\n")
	for k := 1; k <= 60; k++ {
		many.WriteString("```calc\n")
		for i := 0; i < 5; i++ {
			n := 5*k + i
			if k == 1 && i == 0 {
				many.WriteString("V_n = 230 V\n")
				continue
			}
			many.WriteString("Z_" + itoa(n) + " = (0.1 + j0.2) Ω * " + itoa(n) + "\nI_" + itoa(n) + "[kA] = V_n / Z_" + itoa(n) + "   # fault current\n")
		}
		many.WriteString("check |I_" + itoa(5*k+1) + "| >= 10 A\n```\n\nProse `= V_n` between.\n\n")
	}
	manyPath := filepath.Join(dir, "many.md")
	if err := os.WriteFile(manyPath, []byte(many.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	files = append(files, manyPath)

	copied := 0
	for _, f := range files {
		src, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		serial := predrawSheets(t, f, src, nil)
		for _, mode := range []struct {
			wait, isolate bool
			limit, most   int
		}{{false, false, 0, 0}, {true, false, 0, 0}, {true, true, 0, 0}, {false, false, 1, 0}, {true, false, 1, 0},
			// most 1: drawn with the sheet after evaluation (startAfter)
			{false, false, 0, 1}, {true, false, 0, 1}, {true, false, 1, 1}} {
			p := NewPredraw()
			p.wait, p.isolate = mode.wait, mode.isolate
			if mode.limit > 0 {
				p.limit = mode.limit // each drawing waits for the sheet to take the one before
			}
			if mode.most > 0 {
				p.most = mode.most
			}
			isolate := mode.isolate
			got := predrawSheets(t, f, src, p)
			if !bytes.Equal(got, serial) {
				t.Errorf("%s (%+v): the sheet with blocks drawn early differs from the serial sheet at byte %d", f, mode, firstDiff(got, serial))
			}
			copied += p.Copied
			if mode.wait && !isolate && mode.limit == 0 {
				t.Logf("%s: %d blocks copied, %d drawn in the serial pass", filepath.Base(f), p.Copied, p.Drawn)
			}
			if filepath.Base(f) == "forward.md" && p.Drawn == 0 && mode.most == 0 {
				t.Errorf("forward.md: no block drawn again, but its first block mentions names defined below it")
			}
		}
	}
	if copied == 0 {
		t.Fatal("no block was copied from an early drawing: the test compared serial sheets only")
	}
}

// predrawSheets evaluates the document at path with a loader of its own
// (uses resolve beside it) and writes its sheet, with p as the per-block
// hook and Options.Predrawn when p is not nil.
func predrawSheets(t *testing.T, path string, src []byte, p *Predraw) []byte {
	t.Helper()
	l := calcdoc.NewLoader(kind.Standard(), filepath.Dir(path))
	opt := fixedOptions(src)
	var doc *calcdoc.Document
	if p != nil {
		doc = l.ParseAfter(path, src, p.Block)
		opt.Predrawn = p
	} else {
		doc = l.Parse(path, src)
	}
	html, err := Sheet(doc, opt)
	if err != nil {
		t.Fatal(err)
	}
	return html
}

func firstDiff(a, b []byte) int {
	for i := range min(len(a), len(b)) {
		if a[i] != b[i] {
			return i
		}
	}
	return min(len(a), len(b))
}

// TestPredrawClosedWithoutBlocks: a Predraw closed before any block (a
// document with no calc block, or no sheet written) ends at once, may be
// closed again, and takes no block after.
func TestPredrawClosedWithoutBlocks(t *testing.T) {
	p := NewPredraw()
	p.Close()
	p.Close()
	p.Wait()
	doc := calcdoc.Parse("late.md", []byte("```calc\nx = 1 V\n```\n"), kind.Standard())
	p.Block(doc.Blocks[0])
	if _, ok := p.copyTo(io.Discard, doc, doc.Blocks[0]); ok || p.queue != nil {
		t.Fatal("a closed Predraw took a block")
	}
}

// TestPredrawLargeDocumentAfter: a document whose drawings would take
// more than Predraw's most has nothing drawn while it is evaluated (no
// goroutine, no look-ups); the sheet then shares the drawing with a
// goroutine (every second block, copied: with DrawAllEarly every block),
// and its sheet is the serial one.
func TestPredrawLargeDocumentAfter(t *testing.T) {
	path := filepath.Join("..", "examples", "motor-pfc.md")
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, wait := range []bool{false, true} {
		p := NewPredraw()
		p.most, p.wait = 1, wait
		doc := calcdoc.NewLoader(kind.Standard(), filepath.Dir(path)).ParseAfter(path, src, p.Block)
		if p.queue != nil || len(p.jobs) != 0 {
			t.Errorf("a document over the limit had %d blocks queued while it was evaluated", len(p.jobs))
		}
		opt := fixedOptions(src)
		opt.Predrawn = p
		got, err := Sheet(doc, opt)
		if err != nil {
			t.Fatal(err)
		}
		p.Wait()
		if !bytes.Equal(got, predrawSheets(t, path, src, nil)) {
			t.Errorf("wait %v: the sheet differs from the serial sheet at byte %d", wait, firstDiff(got, predrawSheets(t, path, src, nil)))
		}
		if wait && (p.Copied == 0 || p.Drawn != 0) {
			t.Errorf("wait %v: %d blocks copied, %d drawn by the sheet: want every block copied", wait, p.Copied, p.Drawn)
		}
		t.Logf("wait %v: %d copied, %d drawn by the sheet", wait, p.Copied, p.Drawn)
	}
}
