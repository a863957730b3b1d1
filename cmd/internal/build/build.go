package build

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"sync"

	"calcdoc/calcdoc"
	"calcdoc/render"
	"calcdoc/render/stamp"
)

// Options are the options of a sheet (render.Options), named here so that
// the preview reaches the sheet writer only through this package.
type Options = render.Options

// Predraw is the drawing of a document's blocks while it is evaluated
// (render.Predraw; EvaluateDraw).
type Predraw = render.Predraw

// Stamped are the options of a built sheet: stamped from git (render/stamp)
// and carrying its source, so that verify can check it. The stamp lists
// each sheet the document uses, with its own git facts and whether it is
// fit for issue (through every sheet it uses in turn).
func Stamped(doc *calcdoc.Document, version string) Options {
	return NewStamper(version).Stamped(doc)
}

// Stamper stamps the sheets of one build, each document once (a sheet used
// by many is asked of git once), through one stamp.Session: what git says
// of a repository is asked once for all the build's files in it, and no
// git runs for files outside any repository. It is safe for use by
// several goroutines.
type Stamper struct {
	version string
	git     *stamp.Session
	mu      sync.Mutex
	memo    map[string]*render.StampInfo
}

// NewStamper makes a stamper for sheets of calcdoc version.
func NewStamper(version string) *Stamper {
	return &Stamper{version: version, git: stamp.NewSession(), memo: map[string]*render.StampInfo{}}
}

// Prefetch starts asking git about the inputs' files at once, so that git
// runs while the documents are evaluated; Stamped joins each.
func (s *Stamper) Prefetch(inputs []Input) {
	for _, in := range inputs {
		s.git.Start(in.Path)
	}
}

// Stamped are the options of doc's built sheet (see Stamped).
func (s *Stamper) Stamped(doc *calcdoc.Document) Options {
	return Options{Version: s.version, Stamp: s.stampOf(doc, 0), EmbedSource: true}
}

func (s *Stamper) stampOf(doc *calcdoc.Document, depth int) *render.StampInfo {
	sum := doc.SourceSHA256()
	key := calcdoc.RealPath(doc.Path) + "\x00" + sum
	s.mu.Lock()
	if st := s.memo[key]; st != nil {
		s.mu.Unlock()
		return st
	}
	s.mu.Unlock()
	st := s.git.Start(doc.Path).StampSum(doc.Source, sum)
	st.Files = s.git.Files(doc.DataFiles)
	seen := map[string]bool{}
	for _, u := range doc.Uses {
		if seen[u.Rel] || u.Sheet == nil || u.Sheet.Doc == nil || depth > 64 {
			continue
		}
		seen[u.Rel] = true
		used := u.Sheet.Doc
		ust := s.stampOf(used, depth+1)
		uopt := Options{Version: s.version, Stamp: ust}
		st.Uses = append(st.Uses, render.UseStamp{Path: u.Rel, SHA256: ust.SHA256, Commit: ust.Commit, State: ust.State, NotFit: render.NotFitReason(used, uopt)})
	}
	s.mu.Lock()
	s.memo[key] = &st
	s.mu.Unlock()
	return &st
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
// file made by create (nil: os.CreateTemp). The sheet goes into the
// temporary file as it is drawn (render.WriteSheet), never held whole in
// memory. The error is a *RenderError, ErrOverSource or a *WriteError; a
// sheet that cannot be drawn is a *RenderError whatever else fails.
func Write(doc *calcdoc.Document, opt Options, source, target string, create func(dir, pattern string) (TempFile, error)) error {
	over := SameFile(target, source)
	var dirErr error
	if !over {
		dirErr = os.MkdirAll(filepath.Dir(target), 0o755)
	}
	if over || dirErr != nil {
		// nothing to write to: draw the sheet for its error alone
		if err := render.WriteSheet(io.Discard, doc, opt); err != nil {
			return &RenderError{err}
		}
		if over {
			return ErrOverSource
		}
		return &WriteError{Target: target, Folder: true, Err: dirErr}
	}
	if create == nil {
		create = createTemp
	}
	var drawErr error
	err := writeAtomic(target, create, func(tmp TempFile) error {
		out := &firstError{w: tmp}
		if drawErr = render.WriteSheet(out, doc, opt); drawErr != nil {
			return drawErr
		}
		return out.err
	})
	if drawErr != nil {
		return &RenderError{drawErr}
	}
	if err != nil {
		return &WriteError{Target: target, Err: err}
	}
	return nil
}

// firstError is a writer that keeps its writer's first error and writes
// nothing after it.
type firstError struct {
	w   io.Writer
	err error
}

func (f *firstError) Write(p []byte) (int, error) {
	if f.err == nil {
		_, f.err = f.w.Write(p)
	}
	return len(p), nil
}

func createTemp(dir, pattern string) (TempFile, error) { return os.CreateTemp(dir, pattern) }
