package build

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
)

// Pair writes two outputs that belong together, a package's HTML and its
// PDF, so that they are always of one run: both are made as temporary
// files beside their targets, and only when both are complete are they
// renamed into place. Before the two renames a journal file beside the
// HTML records the pair; it is removed after them. A run killed between
// the renames leaves the journal, and the next Pair for the same outputs
// completes the renames (the temporary files it names are complete) before
// it does anything else. A run that stops earlier (a signal, a browser
// that fails) removes its temporary files and leaves both old outputs.
type Pair struct {
	HTML, PDF       string // the targets
	TmpHTML, TmpPDF string // their temporary files, in the same folders
	journal         string
}

// pairRecord is the journal's content.
type pairRecord struct {
	HTML, PDF, TmpHTML, TmpPDF string
}

// JournalPath is the journal of the pair whose HTML is html: a hidden
// file beside it.
func JournalPath(html string) string {
	return filepath.Join(filepath.Dir(html), "."+filepath.Base(html)+".pair")
}

// Recover completes the renames of a pair that a killed run left half
// done (its journal is there): each temporary file it names that is still
// there is renamed over its target, then the journal is removed. It
// reports whether there was such a pair. A journal for other targets is
// left alone and reported as an error.
func Recover(html, pdf string) (bool, error) {
	j := JournalPath(html)
	data, err := os.ReadFile(j)
	if errors.Is(err, os.ErrNotExist) {
		return false, nil
	}
	if err != nil {
		return false, err
	}
	var rec pairRecord
	if err := json.Unmarshal(data, &rec); err != nil {
		// a journal is written whole before the first rename: one that
		// cannot be read was never acted on, and nothing was renamed
		return true, os.Remove(j)
	}
	ha, _ := filepath.Abs(html)
	pa, _ := filepath.Abs(pdf)
	if rec.HTML != ha || rec.PDF != pa {
		return false, fmt.Errorf("%s records the pair %s and %s, not %s and %s: remove it if that pair is no longer wanted", j, rec.HTML, rec.PDF, ha, pa)
	}
	for _, m := range [][2]string{{rec.TmpHTML, rec.HTML}, {rec.TmpPDF, rec.PDF}} {
		if _, err := os.Stat(m[0]); err == nil {
			if err := os.Rename(m[0], m[1]); err != nil {
				return true, fmt.Errorf("completing the pair an interrupted run left: %w", err)
			}
		}
	}
	return true, os.Remove(j)
}

// NewPair prepares the pair html and pdf: it completes a pair an earlier
// run left (Recover), removes stale temporary files of both outputs
// (RemoveStale) and makes the two temporary files, empty.
func NewPair(html, pdf string) (*Pair, bool, error) {
	recovered, err := Recover(html, pdf)
	if err != nil {
		return nil, recovered, err
	}
	RemoveStale(html)
	RemoveStale(pdf)
	p := &Pair{journal: JournalPath(html)}
	if p.HTML, err = filepath.Abs(html); err != nil {
		return nil, recovered, err
	}
	if p.PDF, err = filepath.Abs(pdf); err != nil {
		return nil, recovered, err
	}
	for _, t := range []struct {
		target string
		tmp    *string
	}{{p.HTML, &p.TmpHTML}, {p.PDF, &p.TmpPDF}} {
		// the temporary file keeps the output's extension: the browser
		// takes a file's type from it (an HTML file not named .html is
		// shown as text)
		f, err := os.CreateTemp(filepath.Dir(t.target), tempPattern(t.target)+filepath.Ext(t.target))
		if err != nil {
			p.Abort()
			return nil, recovered, err
		}
		*t.tmp = f.Name()
		f.Close()
	}
	return p, recovered, nil
}

// Abort removes the temporary files; the targets are left as they were.
func (p *Pair) Abort() {
	for _, t := range []string{p.TmpHTML, p.TmpPDF} {
		if t != "" {
			os.Remove(t)
		}
	}
}

// Commit puts both temporary files in place: it flushes them, writes the
// journal, renames the HTML, then the PDF, and removes the journal. The
// files get the permissions of the files they replace, or rw-r--r--.
func (p *Pair) Commit() error {
	for _, m := range [][2]string{{p.TmpHTML, p.HTML}, {p.TmpPDF, p.PDF}} {
		if err := syncFile(m[0]); err != nil {
			p.Abort()
			return err
		}
		mode := os.FileMode(0o644)
		if st, err := os.Stat(m[1]); err == nil {
			mode = st.Mode().Perm()
		}
		if err := os.Chmod(m[0], mode); err != nil {
			p.Abort()
			return err
		}
	}
	rec, _ := json.Marshal(pairRecord{HTML: p.HTML, PDF: p.PDF, TmpHTML: p.TmpHTML, TmpPDF: p.TmpPDF})
	if err := WriteFileAtomic(p.journal, rec); err != nil {
		p.Abort()
		return fmt.Errorf("cannot write the journal %s: %w", p.journal, err)
	}
	if err := os.Rename(p.TmpHTML, p.HTML); err != nil {
		p.Abort()
		os.Remove(p.journal)
		return err
	}
	if err := os.Rename(p.TmpPDF, p.PDF); err != nil {
		// the journal stays: the next run completes the pair
		return fmt.Errorf("%w (the next run completes the pair from %s)", err, p.journal)
	}
	return os.Remove(p.journal)
}

// syncFile flushes a written file to the disk.
func syncFile(name string) error {
	f, err := os.OpenFile(name, os.O_RDWR, 0)
	if err != nil {
		return err
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
