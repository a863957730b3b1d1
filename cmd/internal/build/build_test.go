package build

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"syscall"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// The rules checked here are the README's ("Commands"): without -o a
// sheet NAME.html goes beside NAME.md; -o DIR keeps the paths relative to
// the PATH given; -o FILE.html names the file; a folder PATH means every
// .md below it that holds an evaluated block, .git folders skipped
// (node_modules too: the rule the command has always applied).

func TestTarget(t *testing.T) {
	for _, c := range []struct{ out, file, rel, want string }{
		{"", filepath.Join("calc", "feeder.md"), "feeder.md", filepath.Join("calc", "feeder.html")},
		{"site", filepath.Join("calc", "sub", "feeder.md"), filepath.Join("sub", "feeder.md"), filepath.Join("site", "sub", "feeder.html")},
		{"one.html", filepath.Join("calc", "feeder.md"), "feeder.md", "one.html"},
		{"ONE.HTML", "feeder.md", "feeder.md", "ONE.HTML"},
		// a Windows editor may save the document as NAME.MD
		{"", filepath.Join("calc", "FEEDER.MD"), "FEEDER.MD", filepath.Join("calc", "FEEDER.html")},
		{"site", filepath.Join("calc", "Feeder.Md"), "Feeder.Md", filepath.Join("site", "Feeder.html")},
	} {
		if got := Target(c.out, c.file, c.rel); got != c.want {
			t.Errorf("Target(%q, %q, %q) = %q, want %q", c.out, c.file, c.rel, got, c.want)
		}
	}
}

func write(t *testing.T, path, text string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

const calcDoc = "# A\n\n```calc\nV = 230 V\n```\n"

func TestCollectFolderRule(t *testing.T) {
	dir := t.TempDir()
	write(t, filepath.Join(dir, "b.md"), calcDoc)
	write(t, filepath.Join(dir, "a", "c.md"), calcDoc)
	write(t, filepath.Join(dir, "notes.md"), "# prose only\n")
	write(t, filepath.Join(dir, ".git", "x.md"), calcDoc)
	write(t, filepath.Join(dir, "node_modules", "y.md"), calcDoc)
	write(t, filepath.Join(dir, "z.txt"), calcDoc)
	got, err := Collect([]string{dir}, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	want := []Input{
		{Path: filepath.Join(dir, "a", "c.md"), Rel: filepath.Join("a", "c.md"), Root: dir},
		{Path: filepath.Join(dir, "b.md"), Rel: "b.md", Root: dir},
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("Collect = %v, want %v", got, want)
	}
	if _, err := Collect([]string{filepath.Join(dir, "z.txt")}, kind.Standard()); err == nil {
		t.Error("a file not ending in .md is accepted")
	}
	empty := t.TempDir()
	write(t, filepath.Join(empty, "notes.md"), "# prose only\n")
	if _, err := Collect([]string{empty}, kind.Standard()); err == nil {
		t.Error("a folder without documents is accepted")
	}
}

// The build step refuses to write over the source, and writes the sheet
// where Target says otherwise.
func TestWrite(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join(dir, "a.md")
	write(t, src, calcDoc)
	doc, err := calcdoc.Load(src, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	if err := Write(doc, Options{Version: "t"}, src, src, nil); !errors.Is(err, ErrOverSource) {
		t.Errorf("writing over the source: %v", err)
	}
	if b, _ := os.ReadFile(src); string(b) != calcDoc {
		t.Errorf("the source was changed: %q", b)
	}
	target := Target(filepath.Join(dir, "out"), src, "a.md")
	if err := Write(doc, Options{Version: "t"}, src, target, nil); err != nil {
		t.Fatal(err)
	}
	want, err := Sheet(doc, Options{Version: "t"})
	if err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(target); string(got) != string(want) {
		t.Error("the written sheet is not the sheet")
	}
	blocked := filepath.Join(dir, "file")
	write(t, blocked, "x")
	var we *WriteError
	if err := Write(doc, Options{Version: "t"}, src, filepath.Join(blocked, "a.html"), nil); !errors.As(err, &we) || !we.Folder {
		t.Errorf("a folder that cannot be made: %v", err)
	}
}

// fillingFile is a temporary file on a disk that fills up after room
// bytes: a write past it fails with ENOSPC.
type fillingFile struct {
	*os.File
	room int
}

func (f *fillingFile) Write(p []byte) (int, error) {
	if len(p) > f.room {
		return 0, &fs.PathError{Op: "write", Path: f.Name(), Err: syscall.ENOSPC}
	}
	f.room -= len(p)
	return f.File.Write(p)
}

// TestWriteDiskFull: the sheet streamed into its temporary file
// (render.WriteSheet) on a disk that fills up part way is a WriteError;
// the temporary file is removed and the sheet written before is left as
// it was.
func TestWriteDiskFull(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join(dir, "a.md")
	write(t, src, calcDoc)
	doc, err := calcdoc.Load(src, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	target := Target(out, src, "a.md")
	if err := os.MkdirAll(out, 0o755); err != nil {
		t.Fatal(err)
	}
	write(t, target, "the sheet before")
	for _, room := range []int{0, 100} {
		create := func(dir, pattern string) (TempFile, error) {
			f, err := os.CreateTemp(dir, pattern)
			if err != nil {
				return nil, err
			}
			return &fillingFile{File: f, room: room}, nil
		}
		var we *WriteError
		err := Write(doc, Options{Version: "t"}, src, target, create)
		if !errors.As(err, &we) || we.Folder || !errors.Is(err, syscall.ENOSPC) {
			t.Errorf("room %d: a full disk gave %v, want a WriteError of ENOSPC", room, err)
		}
		if b, _ := os.ReadFile(target); string(b) != "the sheet before" {
			t.Errorf("room %d: the sheet before was changed: %.40q", room, b)
		}
		if es, _ := os.ReadDir(out); len(es) != 1 {
			t.Errorf("room %d: %d files in the output folder, want the sheet alone (the temporary file removed)", room, len(es))
		}
	}
}

// TestWriteAtomicPanic: a fill of the temporary file that panics (a
// sheet whose drawing panics while it is streamed into the file) leaves
// no temporary file behind, and the panic goes on.
func TestWriteAtomicPanic(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "a.html")
	write(t, target, "the sheet before")
	func() {
		defer func() {
			if recover() == nil {
				t.Error("the panic of the fill was swallowed")
			}
		}()
		writeAtomic(target, createTemp, func(tmp TempFile) error {
			tmp.Write([]byte("part of a sheet"))
			panic("a drawing failed")
		})
	}()
	if es, _ := os.ReadDir(dir); len(es) != 1 {
		t.Errorf("%d files in the folder, want the sheet alone (the temporary file removed)", len(es))
	}
	if b, _ := os.ReadFile(target); string(b) != "the sheet before" {
		t.Errorf("the sheet before was changed: %q", b)
	}
}
