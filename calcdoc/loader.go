package calcdoc

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"

	"calcdoc/expr"

	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/text"
)

// Loader reads and evaluates documents for a whole build, so that a
// document that several others use is evaluated once: each is kept by its
// real path (symbolic links followed) and the SHA-256 of its bytes. It is
// safe for use by several goroutines. A change of a file is a new key, so
// a Loader never hands out a document older than the bytes it read; the
// documents that use a changed one need a new Loader (a new build).
type Loader struct {
	kinds  *Registry
	roots  []string                          // the folders given on the command line, absolute
	readFn func(path string) ([]byte, error) // ReadWith; nil: the disk

	mu    sync.Mutex
	memo  map[string]*loaded
	evals atomic.Int64

	// overlay, when set, gives the bytes of a used document by its real
	// path instead of the disk (SetOverlay).
	overlay func(real string) ([]byte, bool)
}

// SetOverlay makes the loader's use statements read a document through
// f, by its real path (symbolic links followed, absolute), before the
// disk: the language server gives the unsaved text of the documents open
// in the editor. f returns false to let the disk be read. Set it before
// the loader is used.
func (l *Loader) SetOverlay(f func(real string) ([]byte, bool)) { l.overlay = f }

// read is the bytes of the document at real: the overlay's, else the
// disk's.
func (l *Loader) readDoc(real string) ([]byte, error) {
	if l.overlay != nil {
		if b, ok := l.overlay(real); ok {
			return b, nil
		}
	}
	if l.readFn != nil {
		return l.readFn(real)
	}
	return os.ReadFile(real)
}

type loaded struct {
	done  chan struct{}
	doc   *Document
	once  sync.Once
	sheet *Sheet // made when a use asks for it
}

// sheetOf is the entry's sheet, made once.
func (e *loaded) sheetOf() *Sheet {
	e.once.Do(func() { e.sheet = SheetOf(e.doc) })
	return e.sheet
}

// NewLoader makes a loader that evaluates with the kinds of reg. roots are
// the folders (or files) given on the command line: outside git, a
// document's uses must stay inside the one that holds it.
func NewLoader(reg *Registry, roots ...string) *Loader {
	l := &Loader{kinds: reg, memo: map[string]*loaded{}}
	for _, r := range roots {
		if a, err := filepath.Abs(r); err == nil {
			if st, err := os.Stat(a); err == nil && !st.IsDir() {
				a = filepath.Dir(a)
			}
			l.roots = append(l.roots, a)
		}
	}
	return l
}

// ReadWith makes the loader read the documents that use statements name,
// and the files their blocks name, through read (given an absolute path,
// resolved without the disk: ResolveLexical) instead of from the disk:
// diff reads them at a git revision. It returns l.
func (l *Loader) ReadWith(read func(path string) ([]byte, error)) *Loader {
	l.readFn = read
	return l
}

// Kinds are the kinds the loader evaluates with.
func (l *Loader) Kinds() *Registry { return l.kinds }

// Evaluations counts the documents the loader has evaluated.
func (l *Loader) Evaluations() int { return int(l.evals.Load()) }

// Load reads the document at path and evaluates it (once per loader for
// the same bytes).
func (l *Loader) Load(path string) (*Document, error) {
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return l.Parse(path, src), nil
}

// Parse evaluates a document from its bytes, or returns the document
// already evaluated from the same bytes at the same place. Its Path is
// path.
func (l *Loader) Parse(path string, src []byte) *Document {
	return l.ParseAfter(path, src, nil)
}

// ParseAfter is Parse that, when this call evaluates the document, calls
// after with each block as soon as it is evaluated (Inputs.AfterBlock);
// when it returns a document evaluated before, after is never called.
func (l *Loader) ParseAfter(path string, src []byte, after func(*Block)) *Document {
	real := realPath(path)
	v := &view{l: l, fallback: l.rootFor(real, path)}
	d, _ := l.eval(path, real, src, v, after)
	return d
}

// Sheets is what the use statements of the document at path read: the
// loader's documents, path starting the chain of uses (so that a cycle
// back to it is found). A caller that evaluates the document itself (the
// preview, with a budget of its own) passes it as Inputs.Sheets.
func (l *Loader) Sheets(path string) Sheets {
	real := realPath(path)
	return &view{l: l, fallback: l.rootFor(real, path), chain: []string{real}, names: []string{path}}
}

// eval evaluates src as the document at real, reached through the view
// parent (whose chain it extends), or returns it from the memo.
func (l *Loader) eval(path, real string, src []byte, parent *view, after func(*Block)) (*Document, *loaded) {
	sum := hashHex(src)
	key := real + "\x00" + sum
	child := &view{l: l, fallback: parent.fallback, chain: append(append([]string(nil), parent.chain...), real), names: append(append([]string(nil), parent.names...), path)}
	l.mu.Lock()
	e := l.memo[key]
	if e == nil {
		e = &loaded{done: make(chan struct{})}
		l.memo[key] = e
		l.mu.Unlock()
		l.evals.Add(1)
		e.doc = ParseWith(path, src, l.kinds, Inputs{Sheets: child, Root: child.fallback, Read: l.readFn, AfterBlock: after, sum: sum})
		close(e.done)
		return e.doc, e
	}
	l.mu.Unlock()
	select {
	case <-e.done:
		return withPath(e.doc, path), e
	default:
		// being evaluated by another goroutine of the build: evaluate a
		// copy rather than wait (waiting could deadlock on a cycle that
		// two goroutines entered from its two ends)
		l.evals.Add(1)
		d := ParseWith(path, src, l.kinds, Inputs{Sheets: child, Root: child.fallback, Read: l.readFn, AfterBlock: after, sum: sum})
		c := &loaded{doc: d}
		return d, c
	}
}

// withPath is d under another path (the same document named from two
// places).
func withPath(d *Document, path string) *Document {
	if d.Path == path {
		return d
	}
	c := *d
	c.Path = path
	return &c
}

// rootFor is the folder given on the command line that holds the file at
// real, or the file's own folder.
func (l *Loader) rootFor(real, path string) string {
	for _, r := range l.roots {
		if inside(real, realPath(r)) || inside(real, r) {
			return r
		}
	}
	if a, err := filepath.Abs(filepath.Dir(path)); err == nil {
		return a
	}
	return filepath.Dir(path)
}

// view is the Sheets of one document: the loader, and the chain of
// documents that led to it (for cycles).
type view struct {
	l        *Loader
	fallback string
	chain    []string // real paths, the document itself last
	names    []string // the same as the user's paths run
}

// Sheet reads and evaluates the document that from names by rel.
func (v *view) Sheet(from *Document, rel string) (*Sheet, error) {
	root := FindRoot(from.Path, v.fallback)
	resolve := ResolveInside
	if v.l.readFn != nil {
		resolve = ResolveLexical
	}
	real, err := resolve(from.Path, rel, root)
	if err != nil {
		return nil, err
	}
	shown := filepath.Clean(filepath.Join(filepath.Dir(from.Path), filepath.FromSlash(strings.ReplaceAll(rel, `\`, "/"))))
	for i, c := range v.chain {
		if c == real {
			ring := append(append([]string(nil), v.names[i:]...), shown)
			return nil, fmt.Errorf("use makes a cycle: %s; a sheet cannot use itself, even through other sheets: take the value from a sheet outside the cycle", strings.Join(ring, " → "))
		}
	}
	src, err := v.l.readDoc(real)
	if err != nil {
		return nil, fmt.Errorf("%s cannot be read: %v", rel, err)
	}
	_, e := v.l.eval(shown, real, src, v, nil)
	return e.sheetOf(), nil
}

// realPath is path with symbolic links followed, absolute; path itself
// (made absolute) when it cannot be resolved.
func realPath(path string) string {
	if r, err := filepath.EvalSymlinks(path); err == nil {
		path = r
	}
	if a, err := filepath.Abs(path); err == nil {
		return a
	}
	return path
}

// SHA256 is the lower-case hex SHA-256 (FIPS 180-4) of b.
func SHA256(b []byte) string { return hashHex(b) }

// SourceSHA256 is SHA256(d.Source): the hash the loader made when it read
// the document (a build hashes its source once, not for each of the memo,
// the stamp and the embedded source), else made now.
func (d *Document) SourceSHA256() string {
	if d.sum != "" {
		return d.sum
	}
	return hashHex(d.Source)
}

func hashHex(b []byte) string {
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:])
}

// UsedFile is a document that a use statement names: its path as the
// user's paths run, and its real path.
type UsedFile struct {
	Path, Real string
}

// UsesOf lists the documents that the use statements of the document at
// path (bytes src) name and that can be found, without evaluating
// anything: a build orders its documents by them. Paths that cannot be
// resolved are left out (evaluation reports them).
func (l *Loader) UsesOf(path string, src []byte) []UsedFile {
	if !bytes.Contains(src, []byte("use")) {
		return nil
	}
	txt := readerLines(src)
	root := markdown.Parser().Parse(text.NewReader(txt))
	fallback := l.rootFor(realPath(path), path)
	var out []UsedFile
	seen := map[string]bool{}
	ast.Walk(root, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		fc, ok := n.(*ast.FencedCodeBlock)
		if !ok {
			return ast.WalkContinue, nil
		}
		if infoWord(fc, txt) != "calc" {
			return ast.WalkSkipChildren, nil
		}
		lines := fc.Lines()
		for i := 0; i < lines.Len(); i++ {
			seg := lines.At(i)
			rel, ok := expr.UsePath(string(seg.Value(txt)))
			if !ok || seen[rel] {
				continue
			}
			seen[rel] = true
			real, err := ResolveInside(path, rel, FindRoot(path, fallback))
			if err != nil {
				continue
			}
			shown := filepath.Clean(filepath.Join(filepath.Dir(path), filepath.FromSlash(strings.ReplaceAll(rel, `\`, "/"))))
			out = append(out, UsedFile{Path: shown, Real: real})
		}
		return ast.WalkSkipChildren, nil
	})
	return out
}

// RealPath is path with symbolic links followed, absolute (the key of a
// document in a build).
func RealPath(path string) string { return realPath(path) }
