package verify

import (
	"fmt"
	"html"
	"os"
	"path/filepath"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
	"calcdoc/render"
	"calcdoc/render/markup"
)

// readUses reads what a sheet carries of the sheets it uses: the records
// of their values (the element render.UsesID, whose ids carry prefix in a
// package) and the stamp's rows of their git facts.
func (rec *sheetRecord) readUses(els []*element, prefix string) {
	rec.sheets = calcdoc.Sheets(noRecords{})
	if e := find(els, func(e *element) bool { return e.name == "pre" && e.attr["id"] == prefix+render.UsesID }); e != nil {
		sheets, recs, err := calcdoc.RecordedSheets([]byte(html.UnescapeString(string(e.raw))))
		if err != nil {
			rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "record", Message: err.Error()})
		} else {
			rec.sheets, rec.useRecs = sheets, recs
		}
	}
	if rec.opt.Stamp == nil {
		return
	}
	for _, e := range els {
		if e.name != "tr" || e.attr["class"] != "use" {
			continue
		}
		state, known := render.ParseTreeState(e.attr["data-use-state"])
		if !known {
			rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "record",
				Message: fmt.Sprintf("the stamp states a working-tree state %q of a used sheet that calcdoc does not know", e.attr["data-use-state"])})
		}
		rec.opt.Stamp.Uses = append(rec.opt.Stamp.Uses, render.UseStamp{Path: e.attr["data-use-path"], SHA256: e.attr["data-use-sha256"],
			Commit: e.attr["data-use-commit"], State: state, NotFit: e.attr["data-use-notfit"]})
	}
}

// noRecords answers a sheet that carries no record of used sheets.
type noRecords struct{}

func (noRecords) Sheet(_ *calcdoc.Document, rel string) (*calcdoc.Sheet, error) {
	return nil, fmt.Errorf("the sheet carries no record of %s: it was built from another source", rel)
}

// staleUses finds each used sheet whose source, in the repository the
// check runs in, is no longer the one the sheet was built from, and names
// the values the document takes from it that moved (old → new).
func (rec *sheetRecord) staleUses(doc *calcdoc.Document, opt Options) []Difference {
	var out []Difference
	for _, r := range rec.useRecs {
		if r.SHA256 == "" {
			continue
		}
		file := ""
		for _, c := range useCandidates(rec.path, opt.SheetPath, r.Path) {
			if st, err := os.Stat(c); err == nil && !st.IsDir() {
				file = c
				break
			}
		}
		if file == "" {
			continue
		}
		src, err := os.ReadFile(file)
		if err != nil || calcdoc.SHA256(src) == r.SHA256 {
			continue
		}
		now := calcdoc.SheetOf(calcdoc.NewLoader(kind.Standard(), filepath.Dir(file)).Parse(file, src))
		old, err := r.Sheet()
		if err != nil {
			continue
		}
		var moved []string
		for _, u := range doc.Uses {
			if u.Rel != r.Path {
				continue
			}
			for _, b := range u.Names {
				ov, nv := old.Lookup(b.Name), now.Lookup(b.Name)
				was, is := "—", "not defined any more"
				if ov != nil {
					was = expr.FormatValue(ov.Value, ov.Display, doc.Digits())
				}
				if nv != nil {
					is = expr.FormatValue(nv.Value, nv.Display, doc.Digits())
				}
				if was != is {
					moved = append(moved, fmt.Sprintf("%s %s → %s", b.Local, was, is))
				}
			}
		}
		what := "no value this sheet takes from it moved"
		if len(moved) > 0 {
			what = "moved: " + strings.Join(moved, "; ")
		}
		out = append(out, Difference{Kind: "use", Name: r.Path, Sheet: r.SHA256, Source: calcdoc.SHA256(src),
			Message: fmt.Sprintf("used sheet %s changed since this sheet was built (SHA-256 %s → %s); %s: build this sheet again", r.Path, markup.ShortHash(r.SHA256), markup.ShortHash(calcdoc.SHA256(src)), what)})
	}
	return out
}

// useCandidates are the places a used sheet may be found from where
// verify runs: beside the recorded source path, and beside the sheet.
func useCandidates(srcPath, sheetPath, rel string) []string {
	rel = filepath.FromSlash(strings.ReplaceAll(rel, `\`, "/"))
	out := []string{filepath.Join(filepath.Dir(srcPath), rel)}
	if sheetPath != "" {
		out = append(out, filepath.Join(filepath.Dir(sheetPath), rel))
	}
	return out
}
