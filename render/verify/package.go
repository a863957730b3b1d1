package verify

import (
	"bytes"
	"fmt"
	"html"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/render"
	"calcdoc/render/pack"
)

func isSheetSection(e *element) bool { return e.name == "section" && e.attr["class"] == "pkg-sheet" }

// isPackage reports whether a page holds the sheets of a package.
func isPackage(b []byte) bool { return find(elements(b), isSheetSection) != nil }

// verifyPackage verifies every sheet of a package and its cover.
func verifyPackage(b []byte, opt Options) (*Report, error) {
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
	var sheets []pack.Sheet
	complete := true // every sheet evaluated, so the package can be written again
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
			complete = false
			rep.Sheets = append(rep.Sheets, &SheetResult{Index: k, Version: opt.Version, Differences: []Difference{{Kind: "record",
				Message: fmt.Sprintf("sheet %d carries no embedded source", k)}}})
			continue
		}
		res := rec.check(unit, lineBase, opt, func(doc *calcdoc.Document, opt render.Options) ([]byte, error) {
			return pack.Section(doc, opt, k)
		})
		if res.doc == nil {
			complete = false
		} else {
			o := rec.opt
			o.Version = opt.Version
			sheets = append(sheets, pack.Sheet{Doc: res.doc, Options: o})
		}
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
	if !complete {
		sheets = nil
	}
	rep.PackageDifferences = append(rep.PackageDifferences, wholePackage(b, cover, sections, sheets, opt)...)
	return rep, nil
}

// wholePackage writes the package again from the title block its cover
// records and its sheets' records, and names how the file's head, cover
// and contents, and what follows the last sheet, differ from it (each
// sheet's own section is checked by its SheetResult).
func wholePackage(b []byte, cover *element, sections []*element, sheets []pack.Sheet, opt Options) []Difference {
	if cover != nil && cover.attr["data-version"] != opt.Version {
		v := cover.attr["data-version"]
		return []Difference{{Kind: "version", Sheet: v, Source: opt.Version,
			Message: fmt.Sprintf("version: the package was made by calcdoc %s; this is calcdoc %s, which vouches only for the packages it writes itself: verify it with calcdoc %s", orDash(v), orDash(opt.Version), orDash(v))}}
	}
	rec := find(elements(b), func(e *element) bool { return e.name == "pre" && e.attr["id"] == pack.RecordID })
	if rec == nil || !rec.closed {
		return []Difference{{Kind: "record", Message: "the package's cover carries no record of its title block (pre id=\"" + pack.RecordID + "\"), which every package calcdoc writes carries"}}
	}
	info, err := pack.ParseRecord([]byte(html.UnescapeString(string(rec.raw))))
	if err != nil {
		return []Difference{{Kind: "record", Message: "the package's record of its title block cannot be read: " + err.Error()}}
	}
	if len(sheets) != len(sections) {
		return nil // a sheet without its source is reported on its own
	}
	fresh, err := pack.Package(info, sheets, opt.Version)
	if err != nil {
		return []Difference{{Kind: "record", Message: "the package cannot be written again: " + err.Error()}}
	}
	if bytes.Equal(fresh, b) {
		return nil
	}
	var fsecs []*element
	for _, e := range elements(fresh) {
		if isSheetSection(e) {
			fsecs = append(fsecs, e)
		}
	}
	var out []Difference
	// head, cover and contents: everything before the first sheet
	head, fhead := b[:sections[0].start], fresh[:fsecs[0].start]
	if !bytes.Equal(head, fhead) {
		out = append(out, comparePages(head, fhead, 1, false)...)
	}
	// what follows the last sheet
	_, end := bodyBounds(b)
	_, fend := bodyBounds(fresh)
	if !bytes.Equal(b[end:], fresh[fend:]) {
		d := firstDiff(b, fresh, end, fend, 1)
		d.Kind = "after-body"
		d.Message = "after </body>: " + strings.TrimPrefix(d.Message, "text: ")
		out = append(out, d)
	}
	return out
}
