package render

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render/internal/sheettest"
)

// pieces records the writes of a streamed sheet.
type pieces struct {
	all    bytes.Buffer
	n, max int
}

func (p *pieces) Write(b []byte) (int, error) {
	p.all.Write(b)
	p.n++
	p.max = max(p.max, len(b))
	return len(b), nil
}

// TestWriteSheetSameBytes: the sheet a build streams into its file
// (WriteSheet, handed out in pieces as the page fills) is byte for byte
// the sheet held whole (Sheet), with and without blocks drawn while the
// document is evaluated (Predraw), for every example and for a document
// whose sheet is many pieces long, and with its source embedded; the
// pieces of the long one are no larger than a piece's room and the
// largest block drawn into it.
func TestWriteSheetSameBytes(t *testing.T) {
	files := sheettest.Examples(t, filepath.Join("..", "examples"))
	// a long document: 400 blocks of statements and prose (about 1.5 MB
	// of sheet), with a quote and an ampersand in the source to escape
	var long strings.Builder
	long.WriteString("---\ntitle: \"a long sheet & its source\"\n---\n\n")
	for k := 1; k <= 400; k++ {
		long.WriteString("```calc\n")
		if k == 1 {
			long.WriteString("V_n = 230 V   # \"nominal\" & <phase>\n")
		}
		for i := 0; i < 5; i++ {
			n := itoa(5*k + i)
			long.WriteString("Z_" + n + " = (0.1 + j0.2) Ω * " + n + "\nI_" + n + "[kA] = V_n / Z_" + n + "   # fault current\n")
		}
		long.WriteString("```\n\nProse `= V_n` between.\n\n")
	}
	dir := t.TempDir()
	longPath := filepath.Join(dir, "long.md")
	if err := os.WriteFile(longPath, []byte(long.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	files = append(files, longPath)

	for _, f := range files {
		src, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		whole := predrawSheets(t, f, src, nil)
		for _, early := range []bool{false, true} {
			l := calcdoc.NewLoader(kind.Standard(), filepath.Dir(f))
			opt := fixedOptions(src)
			var doc *calcdoc.Document
			if early {
				p := NewPredraw()
				doc = l.ParseAfter(f, src, p.Block)
				opt.Predrawn = p
				defer p.Wait()
			} else {
				doc = l.Parse(f, src)
			}
			var out pieces
			if err := WriteSheet(&out, doc, opt); err != nil {
				t.Fatal(err)
			}
			if got := out.all.Bytes(); !bytes.Equal(got, whole) {
				t.Errorf("%s (drawn early %v): the streamed sheet differs from the sheet held whole at byte %d", f, early, firstDiff(got, whole))
			}
			if f == longPath {
				if len(whole) < 4*spillAt {
					t.Fatalf("the long sheet is %d bytes: too short to be handed out in pieces", len(whole))
				}
				// a piece is handed out once the page passes spillAt, so it
				// is at most spillAt and the last write into the page (a
				// block, at most a few KiB here, or 32 KiB of source)
				if out.n < len(whole)/spillAt || out.max > spillAt+64<<10 {
					t.Errorf("drawn early %v: the %d bytes were handed out in %d pieces, the largest %d bytes", early, len(whole), out.n, out.max)
				}
			}
		}
	}
}

// failing is a file whose disk fills up after some bytes.
type failing struct{ room int }

var errFull = errors.New("no space left on device")

func (f *failing) Write(b []byte) (int, error) {
	if len(b) > f.room {
		return 0, errFull
	}
	f.room -= len(b)
	return len(b), nil
}

// TestWriteSheetWriteError: a streamed sheet whose writer fails returns
// the writer's error (the build then removes its temporary file).
func TestWriteSheetWriteError(t *testing.T) {
	path := filepath.Join("..", "examples", "motor-pfc.md")
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	doc := calcdoc.Parse(path, src, kind.Standard())
	for _, room := range []int{0, 1000} {
		err := WriteSheet(&failing{room: room}, doc, fixedOptions(src))
		if !errors.Is(err, errFull) {
			t.Errorf("room %d: WriteSheet returned %v, want the writer's error", room, err)
		}
	}
}
