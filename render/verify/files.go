package verify

import (
	"encoding/base64"
	"fmt"
	"html"
	"path/filepath"

	"calcdoc/render"
	"calcdoc/render/stamp"
)

// readFiles reads back the data files a sheet carries (render's
// embedFiles: pre elements with ids FileID(1), FileID(2), ... carrying
// prefix) into rec.files, which the document is evaluated from in place
// of the disk, and the stamp's rows of the data files (tr elements with
// data-file) into the recorded stamp. A carried file whose bytes do not
// fit its stated SHA-256 is a difference of kind "hash".
func (rec *sheetRecord) readFiles(els []*element, prefix string) {
	rec.files = map[string][]byte{}
	rec.failed = map[string]string{}
	for n := 1; ; n++ {
		id := prefix + render.FileID(n)
		e := find(els, func(e *element) bool { return e.name == "pre" && e.attr["id"] == id })
		if e == nil {
			break
		}
		path := e.attr["data-file"]
		if e.hasAttr("data-error") {
			rec.failed[path] = e.attr["data-error"]
			continue
		}
		if !e.closed {
			rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "record", Message: fmt.Sprintf("the carried data file %s has no end (</pre>)", path)})
			continue
		}
		var b []byte
		switch e.attr["data-encoding"] {
		case "text":
			b = []byte(html.UnescapeString(string(e.raw)))
		case "base64":
			var err error
			if b, err = base64.StdEncoding.DecodeString(string(e.raw)); err != nil {
				rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "record", Message: fmt.Sprintf("the carried data file %s is not valid base64: %v", path, err)})
				continue
			}
		default:
			rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "record", Message: fmt.Sprintf("the carried data file %s has an unknown encoding %q", path, e.attr["data-encoding"])})
			continue
		}
		if got := stamp.Hash(b); got != e.attr["data-sha256"] {
			rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "hash", Sheet: e.attr["data-sha256"], Source: got,
				Message: fmt.Sprintf("hash: the carried data file %s has SHA-256 %s, but its element states %s: the file carried in the sheet was changed", path, got, orDash(e.attr["data-sha256"]))})
		}
		rec.files[path] = b
	}
	if rec.opt.Stamp == nil {
		return
	}
	for _, e := range els {
		if e.name != "tr" || !e.hasAttr("data-file") {
			continue
		}
		a := e.attr
		state, known := render.ParseTreeState(a["data-state"])
		if !known {
			rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "record",
				Message: fmt.Sprintf("the stamp states a working-tree state %q for the data file %s that calcdoc does not know", a["data-state"], a["data-file"])})
		}
		rec.opt.Stamp.Files = append(rec.opt.Stamp.Files, render.FileStamp{Path: a["data-file"], SHA256: a["data-sha256"],
			Commit: a["data-commit"], CommitDate: a["data-commit-date"], State: state, Detail: a["data-detail"]})
	}
}

// fileGitProblems holds the recorded git facts of each data file against
// git (stamp.Check, as for the source), looking for the file at its path
// from each place the source is looked for; a problem names the file.
func (rec *sheetRecord) fileGitProblems(opt Options) []string {
	if rec.opt.Stamp == nil {
		return nil
	}
	var out []string
	for _, f := range rec.opt.Stamp.Files {
		b, ok := rec.files[f.Path]
		if !ok || f.Commit == "" {
			continue
		}
		var cands []string
		for _, c := range sourceCandidates(rec.path, opt.SheetPath, filepath.Separator) {
			cands = append(cands, filepath.Join(filepath.Dir(c), filepath.FromSlash(f.Path)))
		}
		st := render.StampInfo{SHA256: f.SHA256, Commit: f.Commit, CommitDate: f.CommitDate, State: f.State, Detail: f.Detail}
		c := stamp.Check(st, b, cands...)
		for _, p := range c.Problems {
			out = append(out, "data file "+f.Path+": "+p)
		}
	}
	return out
}
