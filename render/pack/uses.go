package pack

import (
	"fmt"
	"path"
	"strings"
)

// usesLines are the contents' lines of the sheets that sheet i uses: the
// sheet of the package it is (linked), or its path when the package
// leaves it out, with the names taken.
func usesLines(sheets []Sheet, i int) []string {
	doc := sheets[i].Doc
	at := map[string]int{}
	for k, s := range sheets {
		at[slashClean(s.Doc.Path)] = k
	}
	var out []string
	seen := map[string]bool{}
	for _, u := range doc.Uses {
		var names []string
		for _, b := range u.Names {
			names = append(names, b.Name)
		}
		key := slashClean(path.Join(path.Dir(slashClean(doc.Path)), slashClean(u.Rel)))
		line := ""
		if k, ok := at[key]; ok {
			line = fmt.Sprintf("uses <a href=\"#sheet-%d\">sheet %d</a> (%s)", k+1, k+1, esc(orDash(sheets[k].Doc.Front.Number)))
		} else {
			line = fmt.Sprintf("uses %s, not in this package", esc(u.Rel))
		}
		if len(names) > 0 {
			line += ": " + esc(strings.Join(names, ", "))
		}
		if !seen[line] {
			seen[line] = true
			out = append(out, line)
		}
	}
	return out
}

func slashClean(p string) string { return path.Clean(strings.ReplaceAll(p, `\`, "/")) }
