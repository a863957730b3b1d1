package verify

import (
	"bytes"
	"fmt"

	"calcdoc/calcdoc"
	"calcdoc/render"
	"calcdoc/render/pack"
)

func isSheetSection(e *element) bool { return e.name == "section" && e.attr["class"] == "pkg-sheet" }

// isPackage reports whether a page holds the sheets of a package.
func isPackage(b []byte) bool { return find(elements(b), isSheetSection) != nil }

// verifyPackage verifies every sheet of a package and its cover.
func verifyPackage(b []byte, version string) (*Report, error) {
	rep := &Report{Package: true}
	p := tokenize(b)
	// the sheets: each section runs to the next one, or to </body>
	var sections []*element
	for _, e := range p.els {
		if isSheetSection(e) {
			sections = append(sections, e)
		}
	}
	coverEnd := sections[0].start
	bodyEnd := p.bodyEnd
	if bodyEnd < sections[len(sections)-1].start {
		bodyEnd = len(b)
	}
	covered := map[int]string{}
	var coverHashes []string
	var cover *element
	for _, e := range p.els {
		if e.start >= coverEnd {
			break
		}
		switch {
		case e.name == "tr" && e.hasAttr("data-sheet"):
			covered[pack.Atoi(e.attr["data-sheet"])] = e.attr["data-sha256"]
			coverHashes = append(coverHashes, e.attr["data-sha256"])
		case cover == nil && e.name == "section" && e.attr["class"] == "cover":
			cover = e
		}
	}
	var statedPkg string
	if cover != nil {
		statedPkg = cover.attr["data-package-sha256"]
	} else {
		rep.PackageDifferences = append(rep.PackageDifferences, Difference{Kind: "record", Message: "the package has no cover record (section class=\"cover\")"})
	}
	if len(coverHashes) != len(sections) {
		rep.PackageDifferences = append(rep.PackageDifferences, Difference{Kind: "record",
			Message: fmt.Sprintf("the cover lists %d sheets, but the package holds %d", len(coverHashes), len(sections))})
	}
	var found []string
	for j, sec := range sections {
		end := bodyEnd
		if j+1 < len(sections) {
			end = sections[j+1].start
		}
		unit := b[sec.start:end]
		k := pack.Atoi(sec.attr["data-sheet"])
		lineBase := 1 + bytes.Count(b[:sec.start], []byte("\n"))
		rec, err := readSheet(unit, pack.SheetPrefix(k))
		if err != nil {
			rep.Sheets = append(rep.Sheets, &SheetResult{Index: k, Version: version, Differences: []Difference{{Kind: "record",
				Message: fmt.Sprintf("sheet %d carries no embedded source", k)}}})
			continue
		}
		res := rec.check(unit, lineBase, version, func(doc *calcdoc.Document, opt render.Options) ([]byte, error) {
			return pack.Section(doc, opt, k)
		})
		res.Index = k
		rep.Sheets = append(rep.Sheets, res)
		found = append(found, res.SHA256)
		if h, ok := covered[k]; !ok {
			rep.PackageDifferences = append(rep.PackageDifferences, Difference{Kind: "record",
				Message: fmt.Sprintf("the cover does not list sheet %d", k)})
		} else if res.SHA256 != "" && h != res.SHA256 {
			rep.PackageDifferences = append(rep.PackageDifferences, Difference{Kind: "hash", Sheet: h, Source: res.SHA256,
				Message: fmt.Sprintf("hash: the cover lists sheet %d with SHA-256 %s, but its embedded source's is %s", k, h, res.SHA256)})
		}
	}
	if statedPkg != "" {
		if ph := pack.Hash(coverHashes); ph != statedPkg {
			rep.PackageDifferences = append(rep.PackageDifferences, Difference{Kind: "hash", Sheet: statedPkg, Source: ph,
				Message: fmt.Sprintf("hash: the cover states the package SHA-256 %s, but the hashes it lists give %s", statedPkg, ph)})
		}
		if len(found) == len(sections) {
			if ph := pack.Hash(found); ph != statedPkg {
				rep.PackageDifferences = append(rep.PackageDifferences, Difference{Kind: "hash", Sheet: statedPkg, Source: ph,
					Message: fmt.Sprintf("hash: the cover states the package SHA-256 %s, but the sheets' embedded sources give %s", statedPkg, ph)})
			}
		}
	}
	return rep, nil
}
