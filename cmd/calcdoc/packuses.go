package main

import (
	"fmt"
	"path/filepath"

	"calcdoc/calcdoc"
)

// orderUses puts the documents of a package in the order given, except
// that a used document moves before its first user. It returns the new
// order, a sentence for each document that moved, and a warning for each
// used document that the package leaves out.
func orderUses(docs []*calcdoc.Document) (out []*calcdoc.Document, moved, missing []string) {
	at := map[string]int{}
	for i, d := range docs {
		at[calcdoc.RealPath(d.Path)] = i
	}
	used := func(d *calcdoc.Document) []int {
		var idx []int
		for _, u := range d.Uses {
			if u.Sheet == nil {
				continue
			}
			p := filepath.Join(filepath.Dir(d.Path), filepath.FromSlash(u.Rel))
			if j, ok := at[calcdoc.RealPath(p)]; ok {
				idx = append(idx, j)
			}
		}
		return idx
	}
	placed := make([]bool, len(docs))
	visiting := make([]bool, len(docs))
	var place func(i, user int)
	place = func(i, user int) {
		if placed[i] || visiting[i] {
			return
		}
		visiting[i] = true
		for _, j := range used(docs[i]) {
			place(j, i)
		}
		visiting[i] = false
		placed[i] = true
		// it moved if a sheet given before it now comes after it
		for k := 0; k < i && user >= 0; k++ {
			if !placed[k] {
				moved = append(moved, fmt.Sprintf("%s moved before %s: %s uses it", sheetName(docs[i]), sheetName(docs[k]), sheetName(docs[user])))
				break
			}
		}
		out = append(out, docs[i])
	}
	for i := range docs {
		place(i, -1)
	}
	seen := map[string]bool{}
	for _, d := range docs {
		for _, u := range d.Uses {
			if u.Sheet == nil {
				continue
			}
			p := filepath.Join(filepath.Dir(d.Path), filepath.FromSlash(u.Rel))
			if _, ok := at[calcdoc.RealPath(p)]; !ok && !seen[d.Path+"\x00"+p] {
				seen[d.Path+"\x00"+p] = true
				missing = append(missing, fmt.Sprintf("%s uses %s, which the package leaves out: add it to the package", d.Path, filepath.Clean(p)))
			}
		}
	}
	return out, moved, missing
}

// sheetName names a document by its number and path.
func sheetName(d *calcdoc.Document) string {
	if n := d.Front.Number; n != "" {
		return n + " (" + d.Path + ")"
	}
	return d.Path
}
