package expr

import (
	"fmt"
	"io/fs"
	"math/rand"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"unicode/utf8"
)

// TestTokenPositionsAgainstANaiveCount: for random texts (a fixed seed)
// of tokens, multi-byte characters, tabs and LF or CR LF line ends, set
// after some lines of prose in a file, the position of every token and of
// every error of the scanner and the parser resolves to the line and
// column that a naive count from the start of the file gives (lines
// counted by "\n", columns by characters, a tab one).
func TestTokenPositionsAgainstANaiveCount(t *testing.T) {
	naive := func(text string, off int) Position {
		line := 1 + strings.Count(text[:off], "\n")
		col := 1 + utf8.RuneCountInString(text[strings.LastIndex(text[:off], "\n")+1:off])
		return Position{Filename: "t.md", Line: line, Col: col}
	}
	rng := rand.New(rand.NewSource(13))
	pieces := []string{"x", " ", "\t", "Ω", "∠", "é", "12", "(", ")", "+", "230 V", "µF", "# ü\t∥", "\n", "\r\n", "日本", "_a", "∥", ";", "=", "$", "[kA polar]", "j4", "1e999"}
	prose := []string{"", "Prose é ∠ Ω\t", "日本語", "\ttab"}
	checked := 0
	for n := 0; n < 500; n++ {
		var pre, body strings.Builder
		for i := rng.Intn(4); i > 0; i-- {
			pre.WriteString(prose[rng.Intn(len(prose))] + "\n")
		}
		pre.WriteString(prose[rng.Intn(len(prose))]) // the body may start inside a line
		for i := 1 + rng.Intn(40); i > 0; i-- {
			body.WriteString(pieces[rng.Intn(len(pieces))])
		}
		text := pre.String() + body.String()
		f := NewFile("t.md", text)
		src := NewSource(body.String(), f.Pos(pre.Len()))
		var errs ErrorList
		for _, tok := range Scan(src, &errs) {
			off := pre.Len() + tok.Off
			if got, want := src.PosAt(tok.Off).Position(), naive(text, off); got != want {
				t.Fatalf("%q: token %q at %v, counted %v", text, tok.Text, got, want)
			}
			checked++
		}
		ParseBlock(src, CalcMode, &errs)
		for _, e := range errs {
			if got, want := e.Pos.Position(), naive(text, e.Pos.Off); e.Pos.File != f || got != want {
				t.Fatalf("%q: error %q at %v, counted %v", text, e.Msg, got, want)
			}
			checked++
		}
	}
	if checked < 5000 {
		t.Errorf("only %d positions checked", checked)
	}
}

// TestOneConverter: File.Position is the one place that turns an offset
// into a line and a column, and Position.String the one that writes
// file:line:col. No other source file of the project counts characters
// into a column, builds a line-and-column position, or formats
// "%s:%d:%d" by hand (the converters in the document, the scanner, the
// phasors and solve headers and the block's argument, and the command's
// error lines, that this replaced).
func TestOneConverter(t *testing.T) {
	bad := regexp.MustCompile(`RuneCount[^\n]*[Cc]ol\b|[Cc]ol\b[^\n]*RuneCount|Pos\{Line:|%s:%d:%d|"%d:%d"`)
	files := 0
	err := filepath.WalkDir("..", func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && (d.Name() == "testdata" || strings.HasPrefix(d.Name(), ".")) && path != ".." {
			return filepath.SkipDir
		}
		if d.IsDir() || !strings.HasSuffix(path, ".go") || strings.HasSuffix(path, "_test.go") || filepath.ToSlash(path) == "../expr/pos.go" {
			return nil
		}
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		files++
		for i, line := range strings.Split(string(b), "\n") {
			if bad.MatchString(line) {
				t.Errorf("%s:%d: a position converted or written by hand: %s", path, i+1, strings.TrimSpace(line))
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if files < 100 {
		t.Fatalf("only %d source files read: is the test run from expr/?", files)
	}
}

// TestPositionConcurrent: a File answers positions from several
// goroutines at once (a sheet drawn while the preview serves another
// request of the same document), each the naive count ("\n" lines,
// characters as columns) whatever the order the others ask in.
func TestPositionConcurrent(t *testing.T) {
	text := strings.Repeat("é\tΩ ∠ x = 1 V\r\n日本\n", 200)
	f := NewFile("c.md", text)
	done := make(chan string)
	for g := 0; g < 4; g++ {
		go func(g int) {
			for o := g; o < len(text); o += 1 + g {
				if !utf8.RuneStart(text[o]) {
					continue
				}
				line := 1 + strings.Count(text[:o], "\n")
				col := 1 + utf8.RuneCountInString(text[strings.LastIndex(text[:o], "\n")+1:o])
				if p := f.Position(o); p.Line != line || p.Col != col {
					done <- fmt.Sprintf("offset %d: %v, counted %d:%d", o, p, line, col)
					return
				}
			}
			done <- ""
		}(g)
	}
	for g := 0; g < 4; g++ {
		if msg := <-done; msg != "" {
			t.Error(msg)
		}
	}
}
