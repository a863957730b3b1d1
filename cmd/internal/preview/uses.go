package preview

import (
	"fmt"
	"html"
	"path/filepath"
	"strings"

	"calcdoc/calcdoc"
	blockkind "calcdoc/calcdoc/kind"
)

// loaderFor is the loader of the current rebuild: one a burst of events,
// so that a document several others use is evaluated once, and a changed
// document is read afresh by every sheet that uses it.
func (w *Watcher) loaderFor() *calcdoc.Loader {
	if w.loader == nil {
		var roots []string
		for _, r := range w.roots {
			roots = append(roots, r.dir)
		}
		w.loader = calcdoc.NewLoader(blockkind.Standard(), roots...)
	}
	return w.loader
}

// usedFiles are the real paths of the documents doc (the file at file)
// uses, and the paths as its use statements write them.
func usedFiles(doc *calcdoc.Document, file string) (real, rel []string) {
	seen := map[string]bool{}
	for _, u := range doc.Uses {
		p := calcdoc.RealPath(filepath.Join(filepath.Dir(file), filepath.FromSlash(strings.ReplaceAll(u.Rel, `\`, "/"))))
		if !seen[p] {
			seen[p] = true
			real, rel = append(real, p), append(rel, u.Rel)
		}
	}
	return real, rel
}

// queueUsers queues, to be evaluated again though their own bytes did not
// change, the pages that use a document of moved (by real path); it
// reports whether there is one. Their evaluations in turn queue the pages
// that use them, so a change reaches every sheet that depends on it.
func (w *Watcher) queueUsers(moved map[string]bool) bool {
	w.mu.RLock()
	var next []string
	for _, p := range w.docs {
		for _, u := range p.usedFiles {
			if moved[u] {
				next = append(next, p.file)
				break
			}
		}
	}
	w.mu.RUnlock()
	for _, f := range next {
		w.pending[f] = true
		w.stale[f] = true
	}
	return len(next) > 0
}

// usesListing writes, for the index, which sheet uses which.
func usesListing(b *strings.Builder, pages []*page) {
	first := true
	for _, p := range pages {
		if len(p.uses) == 0 {
			continue
		}
		if first {
			b.WriteString("<h2>Sheets that use sheets</h2>\n<ul class=\"uses\">\n")
			first = false
		}
		var parts []string
		for _, u := range p.uses {
			parts = append(parts, "<code>"+html.EscapeString(u)+"</code>")
		}
		fmt.Fprintf(b, "<li><code>%s</code> uses %s</li>\n", html.EscapeString(p.display), strings.Join(parts, ", "))
	}
	if !first {
		b.WriteString("</ul>\n<p>When a sheet is saved, every sheet that uses it is evaluated again, and the sheets that use those.</p>\n")
	}
}
