package diff

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// Report is the comparison of documents between two revisions.
type Report struct {
	From, To Revision
	Docs     []DocReport
}

// DocReport is one document's changes.
type DocReport struct {
	Path    string // relative to the repository's top, with /
	Changes []Change
}

// Changed reports whether any change was found.
func (r *Report) Changed() bool {
	for _, d := range r.Docs {
		if len(d.Changes) > 0 {
			return true
		}
	}
	return false
}

// Failed reports whether a document did not evaluate at a revision.
func (r *Report) Failed() bool {
	for _, d := range r.Docs {
		for _, c := range d.Changes {
			if c.Kind == Failed {
				return true
			}
		}
	}
	return false
}

// Run compares the documents at paths (files, or folders meaning every
// .md file below them at either revision that holds an evaluated block)
// between the revisions from and to ("" the working tree).
func Run(paths []string, from, to string, o Options) (*Report, error) {
	if len(paths) == 0 {
		return nil, errors.New("no PATH given")
	}
	first, err := filepath.Abs(paths[0])
	if err != nil {
		return nil, err
	}
	dir := first
	if st, err := os.Stat(first); err != nil || !st.IsDir() {
		dir = filepath.Dir(first)
	}
	g, err := OpenRepo(dir)
	if err != nil {
		return nil, err
	}
	r := &Report{}
	if r.From, err = g.Resolve(from); err != nil {
		return nil, err
	}
	if r.To, err = g.Resolve(to); err != nil {
		return nil, err
	}
	type doc struct {
		abs    string
		folder bool
	}
	var docs []doc
	seen := map[string]bool{}
	add := func(p string, folder bool) {
		if !seen[p] {
			seen[p] = true
			docs = append(docs, doc{p, folder})
		}
	}
	for _, p := range paths {
		abs, err := g.abs(p)
		if err != nil {
			return nil, err
		}
		if st, err := os.Stat(abs); err == nil && st.IsDir() {
			var all []string
			for _, rev := range []Revision{r.From, r.To} {
				l, err := g.List(rev, abs)
				if err != nil {
					return nil, fmt.Errorf("%s: %v", p, err)
				}
				all = append(all, l...)
			}
			sort.Strings(all)
			for _, f := range all {
				add(f, true)
			}
			continue
		}
		add(abs, false)
	}
	la, lb := g.loader(r.From), g.loader(r.To)
	for _, d := range docs {
		rel, _ := g.Rel(d.abs)
		a, b := g.snapshot(la, r.From, d.abs), g.snapshot(lb, r.To, d.abs)
		for _, s := range []*Snapshot{a, b} {
			for i, e := range s.Errors {
				// name files as the output does: from the repository's top
				s.Errors[i] = filepath.ToSlash(strings.ReplaceAll(e, g.Top+string(filepath.Separator), ""))
			}
		}
		if d.folder && a.Blocks == 0 && b.Blocks == 0 && len(a.Errors) == 0 && len(b.Errors) == 0 {
			continue // prose, not a calculation document
		}
		dr := DocReport{Path: rel}
		switch {
		case a.Missing && b.Missing:
			return nil, fmt.Errorf("%s is at neither revision (%s, %s)", rel, r.From.Label(), r.To.Label())
		case len(a.Errors) > 0 || len(b.Errors) > 0:
			for _, x := range []struct {
				s   *Snapshot
				rev Revision
			}{{a, r.From}, {b, r.To}} {
				if len(x.s.Errors) > 0 {
					dr.Changes = append(dr.Changes, Change{Doc: rel, Kind: Failed, Item: ItemDocument, At: x.rev.Label(), New: x.s.Errors[0], Name: fmt.Sprint(len(x.s.Errors))})
				}
			}
		default:
			dr.Changes = Compare(rel, a, b, o)
		}
		r.Docs = append(r.Docs, dr)
	}
	return r, nil
}

// abs is the absolute path of p with the repository's top written as
// Top (links followed), so that paths below it are lexically under it.
func (g *Repo) abs(p string) (string, error) {
	a, err := filepath.Abs(p)
	if err != nil {
		return "", err
	}
	// follow links in the longest part of the path that exists
	dir, rest := a, ""
	for {
		if r, err := filepath.EvalSymlinks(dir); err == nil {
			a = filepath.Join(r, rest)
			break
		}
		up := filepath.Dir(dir)
		if up == dir {
			break
		}
		rest = filepath.Join(filepath.Base(dir), rest)
		dir = up
	}
	if _, err := g.Rel(a); err != nil {
		return "", err
	}
	return a, nil
}

// loader evaluates documents at rev: used sheets and CSV tables are read
// at the same revision.
func (g *Repo) loader(rev Revision) *calcdoc.Loader {
	l := calcdoc.NewLoader(kind.Standard(), g.Top)
	if rev.Commit != "" {
		l.ReadWith(func(p string) ([]byte, error) {
			b, err := g.Read(rev, p)
			if errors.Is(err, ErrMissing) {
				return nil, fmt.Errorf("not in revision %s", rev.Rev)
			}
			return b, err
		})
	}
	return l
}

// snapshot reads and evaluates the document at abs at rev.
func (g *Repo) snapshot(l *calcdoc.Loader, rev Revision, abs string) *Snapshot {
	src, err := g.Read(rev, abs)
	if errors.Is(err, ErrMissing) {
		return &Snapshot{Missing: true}
	}
	if err != nil {
		return &Snapshot{Errors: []string{fmt.Sprintf("%s: cannot be read: %v", abs, err)}}
	}
	return Take(l.Parse(abs, src))
}
