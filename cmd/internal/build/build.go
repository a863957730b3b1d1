package build

import (
	"errors"
	"os"
	"path/filepath"

	"calcdoc/calcdoc"
	"calcdoc/render"
	"calcdoc/render/stamp"
)

// Options are the options of a sheet (render.Options), named here so that
// the preview reaches the sheet writer only through this package.
type Options = render.Options

// Stamped are the options of a built sheet: stamped from git (render/stamp)
// and carrying its source, so that verify can check it.
func Stamped(doc *calcdoc.Document, version string) Options {
	st := stamp.Of(doc.Path, doc.Source)
	st.Files = stamp.Files(doc.DataFiles)
	return Options{Version: version, Stamp: &st, EmbedSource: true}
}

// Sheet writes the HTML sheet of an evaluated document.
func Sheet(doc *calcdoc.Document, opt Options) ([]byte, error) { return render.Sheet(doc, opt) }

// ErrOverSource is the error of a build whose target is its source file.
var ErrOverSource = errors.New("the target is the source itself")

// RenderError is a sheet that could not be drawn.
type RenderError struct{ Err error }

func (e *RenderError) Error() string { return e.Err.Error() }
func (e *RenderError) Unwrap() error { return e.Err }

// WriteError is a sheet that could not be written: its folder could not be
// made (Folder), or the file could not be written; any earlier file is left
// as it was.
type WriteError struct {
	Target string
	Folder bool
	Err    error
}

func (e *WriteError) Error() string { return e.Err.Error() }
func (e *WriteError) Unwrap() error { return e.Err }

// Write is the build step of an evaluated document: it draws the sheet
// with opt, refuses a target that is the source file (ErrOverSource),
// makes the target's folder and writes the sheet atomically, the temporary
// file made by create (nil: os.CreateTemp). The error is a *RenderError,
// ErrOverSource or a *WriteError.
func Write(doc *calcdoc.Document, opt Options, source, target string, create func(dir, pattern string) (TempFile, error)) error {
	html, err := Sheet(doc, opt)
	if err != nil {
		return &RenderError{err}
	}
	if SameFile(target, source) {
		return ErrOverSource
	}
	if err := os.MkdirAll(filepath.Dir(target), 0o755); err != nil {
		return &WriteError{Target: target, Folder: true, Err: err}
	}
	if create == nil {
		create = createTemp
	}
	if err := WriteFileAtomicWith(target, html, create); err != nil {
		return &WriteError{Target: target, Err: err}
	}
	return nil
}

func createTemp(dir, pattern string) (TempFile, error) { return os.CreateTemp(dir, pattern) }
