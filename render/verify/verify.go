// Package verify checks a built sheet, or a calculation package, against
// the source it carries: it reads the page with an HTML tokenizer, takes
// out the embedded source and the recorded stamp, evaluates and renders the
// source again with the same sheet writer, and compares the two.
package verify

import (
	"bytes"
	"encoding/base64"
	"errors"
	"fmt"
	"html"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"

	"calcdoc/calcdoc"
	"calcdoc/render"
	"calcdoc/render/stamp"
)

var orDash = render.OrDash

// ErrNotSheet is returned by Verify for a page that carries no embedded
// calcdoc source: it is not a built calcdoc sheet or package.
var ErrNotSheet = errors.New("not a calcdoc sheet: it carries no embedded source (an element with id \"" + render.SourceID + "\")")

// Difference is one way in which a sheet does not match its source.
type Difference struct {
	// Kind is "hash" (a stated SHA-256 does not fit the embedded source),
	// "value" (a result row, data-value), "check" (a check row,
	// data-check), "text" (the first differing line of the page, reported
	// when no value or check differs) or "record" (the sheet's own record
	// cannot be read back).
	Kind string
	// Name is the value's name (Kind "value"); "" for an unnamed result.
	Name string
	// Line is the source line of a value or check, or the line of the
	// HTML file for Kind "text".
	Line int
	// Sheet is what the sheet shows and Source what the source gives now,
	// as plain text; "" where there is nothing.
	Sheet, Source string
	// Message is the whole difference in one sentence.
	Message string
}

func (d Difference) String() string { return d.Message }

// SheetResult is the verification of one sheet: a standalone sheet, or one
// sheet of a package.
type SheetResult struct {
	// Index is the sheet's position in a package, counting from 1; 0 for a
	// standalone sheet.
	Index int
	// Path is the source path the sheet records (data-path).
	Path string
	// SHA256 is the SHA-256 of the embedded source as recovered (computed
	// here, not read from the sheet).
	SHA256 string
	// StatedSHA256 is the hash the sheet's stamp states ("" without a
	// stamp section).
	StatedSHA256 string
	// SheetVersion is the calcdoc version the sheet records; Version is
	// the version that verified it.
	SheetVersion, Version string
	// Match is true when the page is byte for byte what the source gives.
	Match bool
	// Differences name what differs when Match is false.
	Differences []Difference
}

// VersionNote is a sentence for a mismatch between versions, or "" when
// the sheet was built by the verifying version.
func (r *SheetResult) VersionNote() string {
	if r.SheetVersion == r.Version {
		return ""
	}
	return fmt.Sprintf("the sheet was built by calcdoc %s and is verified by calcdoc %s: another version may lay a sheet out differently, so a difference of layout alone does not mean the calculation changed",
		orDash(r.SheetVersion), orDash(r.Version))
}

// Report is the verification of one HTML file.
type Report struct {
	// Package is true for a calculation package, false for one sheet.
	Package bool
	// Sheets holds one result for a sheet, or one per sheet of a package.
	Sheets []*SheetResult
	// PackageDifferences are differences of the package's cover: a sheet
	// hash listed on the cover that is not the sheet's, or a package hash
	// that does not follow from the listed hashes.
	PackageDifferences []Difference
}

// OK reports whether every sheet matches and the cover (of a package)
// agrees with its sheets.
func (r *Report) OK() bool {
	if len(r.PackageDifferences) > 0 || len(r.Sheets) == 0 {
		return false
	}
	for _, s := range r.Sheets {
		if !s.Match {
			return false
		}
	}
	return true
}

// Verify checks a built sheet, or a calculation package, against the
// source it carries. It reads the page with an HTML tokenizer
// (golang.org/x/net/html). For each sheet it recovers the embedded source
// (HTML entities undone, or base64 decoded), computes the source's SHA-256 (FIPS
// 180-4) and compares it with the hash stated on the source element and in
// the stamp; then it evaluates the source again (calcdoc.Parse with the
// recorded path), renders it with the options the sheet records (the
// stamp's version, hash, commit, state and detail; source embedded) and
// compares the result with the page byte for byte. Where they differ it
// names each result row (data-value, by name and line) and each check row
// (data-check) whose text differs, or else the first differing line.
// version is the verifying calcdoc's version, used only in messages.
//
// The error is ErrNotSheet for a page that carries no embedded source;
// a sheet that carries one but does not match is a Report that is not OK.
//
// Verify shows that the page is what its embedded source gives and that
// the stated hashes fit that source. It is not a signature: whoever can
// edit the file can build a consistent sheet from another source; the
// hash is what ties the sheet to the source kept under version control.
func Verify(page []byte, version string) (*Report, error) {
	if isPackage(page) {
		return verifyPackage(page, version)
	}
	rec, err := readSheet(page, "")
	if err != nil {
		return nil, err
	}
	res := rec.check(page, 1, version, render.Sheet)
	return &Report{Sheets: []*SheetResult{res}}, nil
}

// sheetRecord is what a sheet says about itself.
type sheetRecord struct {
	path        string
	source      []byte
	sourceErr   string // why the source could not be recovered
	sourceSHA   string // data-sha256 of the source element
	hasStamp    bool
	opt         render.Options
	recordDiffs []Difference
}

// readSheet reads the record of the sheet in page (its elements, read
// with the HTML tokenizer) whose ids carry prefix ("" for a standalone
// sheet).
func readSheet(page []byte, prefix string) (*sheetRecord, error) {
	els := elements(page)
	src := find(els, func(e *element) bool { return e.name == "pre" && e.attr["id"] == prefix+render.SourceID })
	if src == nil {
		return nil, ErrNotSheet
	}
	rec := &sheetRecord{}
	a := src.attr
	rec.path = a["data-path"]
	rec.sourceSHA = a["data-sha256"]
	if !src.closed {
		rec.sourceErr = "the embedded source has no end (</pre>)"
	} else {
		switch a["data-encoding"] {
		case "text":
			rec.source = []byte(html.UnescapeString(string(src.raw)))
		case "base64":
			b, err := base64.StdEncoding.DecodeString(string(src.raw))
			if err != nil {
				rec.sourceErr = "the embedded source is not valid base64: " + err.Error()
			}
			rec.source = b
		default:
			rec.sourceErr = fmt.Sprintf("the embedded source has an unknown encoding %q", a["data-encoding"])
		}
	}
	rec.opt.EmbedSource = true
	if st := find(els, func(e *element) bool { return e.name == "section" && e.attr["class"] == "stamp" }); st != nil {
		s := st.attr
		rec.hasStamp = true
		state, known := render.ParseTreeState(s["data-state"])
		if !known {
			rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "record",
				Message: fmt.Sprintf("the stamp states a working-tree state %q that calcdoc does not know", s["data-state"])})
		}
		rec.opt.Version = s["data-version"]
		rec.opt.Stamp = &render.StampInfo{SHA256: s["data-sha256"], Commit: s["data-commit"], CommitDate: s["data-commit-date"],
			State: state, Detail: s["data-detail"]}
	} else if g := find(els, func(e *element) bool { return e.name == "meta" && e.attr["name"] == "generator" }); g != nil {
		rec.opt.Version = strings.TrimPrefix(g.attr["content"], "calcdoc ")
	}
	return rec, nil
}

// check verifies the record against unit, the bytes of the sheet as the
// file holds them, rendering the source again with render. lineBase is the
// line of the file on which unit starts.
func (rec *sheetRecord) check(unit []byte, lineBase int, version string, rerender func(*calcdoc.Document, render.Options) ([]byte, error)) *SheetResult {
	res := &SheetResult{Path: rec.path, SheetVersion: rec.opt.Version, Version: version}
	if rec.opt.Stamp != nil {
		res.StatedSHA256 = rec.opt.Stamp.SHA256
	}
	res.Differences = append(res.Differences, rec.recordDiffs...)
	if rec.sourceErr != "" {
		res.Differences = append(res.Differences, Difference{Kind: "record", Message: rec.sourceErr})
		return res
	}
	res.SHA256 = stamp.Hash(rec.source)
	hashDiff := false
	switch {
	case rec.sourceSHA != res.SHA256 && rec.hasStamp && res.StatedSHA256 == rec.sourceSHA:
		hashDiff = true
		res.Differences = append(res.Differences, Difference{Kind: "hash", Sheet: rec.sourceSHA, Source: res.SHA256,
			Message: fmt.Sprintf("hash: the embedded source's SHA-256 is %s, but the sheet states %s (in its stamp and on the source): the source carried in the sheet was changed", res.SHA256, orDash(rec.sourceSHA))})
	case rec.sourceSHA != res.SHA256:
		hashDiff = true
		res.Differences = append(res.Differences, Difference{Kind: "hash", Sheet: rec.sourceSHA, Source: res.SHA256,
			Message: fmt.Sprintf("hash: the embedded source's SHA-256 is %s, but its element states %s: the source carried in the sheet was changed", res.SHA256, orDash(rec.sourceSHA))})
	}
	if rec.hasStamp && res.StatedSHA256 != res.SHA256 && res.StatedSHA256 != rec.sourceSHA {
		hashDiff = true
		res.Differences = append(res.Differences, Difference{Kind: "hash", Sheet: res.StatedSHA256, Source: res.SHA256,
			Message: fmt.Sprintf("hash: the embedded source's SHA-256 is %s, but the sheet's stamp states %s: the sheet is not the one built from this source", res.SHA256, orDash(res.StatedSHA256))})
	}
	doc := calcdoc.Parse(rec.path, rec.source)
	fresh, err := rerender(doc, rec.opt)
	if err != nil {
		res.Differences = append(res.Differences, Difference{Kind: "record", Message: "the source cannot be rendered again: " + err.Error()})
		return res
	}
	if bytes.Equal(fresh, unit) {
		res.Match = len(res.Differences) == 0
		return res
	}
	diffs := compareItems(unit, fresh)
	if len(diffs) == 0 && !hashDiff {
		diffs = []Difference{firstLineDiff(unit, fresh, lineBase)}
	}
	res.Differences = append(res.Differences, diffs...)
	return res
}

// item is one result or check row of a page.
type item struct {
	kind string // "value" or "check"
	name string
	line int
	text string
}

func (it item) key() string { return it.kind + "\x00" + it.name + "\x00" + strconv.Itoa(it.line) }

// items lists the page's result rows (data-value with data-line) and check
// rows (data-check, whose value is the line) in page order, each with the
// plain text of its content.
func items(page []byte) []item {
	var out []item
	for _, e := range elements(page) {
		it := item{kind: "value", name: e.attr["data-value"]}
		lineAttr := e.attr["data-line"]
		switch {
		case e.hasAttr("data-check"):
			it = item{kind: "check"}
			lineAttr = e.attr["data-check"]
		case !e.hasAttr("data-value"):
			continue
		}
		if numberRE.MatchString(lineAttr) {
			it.line, _ = strconv.Atoi(lineAttr)
		}
		it.text = plainText(e.raw)
		out = append(out, it)
	}
	return out
}

var numberRE = regexp.MustCompile(`^[0-9]+$`)

// compareItems names the result and check rows whose text differs between
// the sheet and the fresh render, and the rows only one of them has.
func compareItems(sheet, fresh []byte) []Difference {
	occ := func(list []item) ([]string, map[string]item) {
		seen := map[string]int{}
		keys := make([]string, 0, len(list))
		m := map[string]item{}
		for _, it := range list {
			k := it.key()
			seen[k]++
			k += "\x00" + strconv.Itoa(seen[k])
			keys = append(keys, k)
			m[k] = it
		}
		return keys, m
	}
	sk, sm := occ(items(sheet))
	fk, fm := occ(items(fresh))
	var out []Difference
	for _, k := range sk {
		s := sm[k]
		f, ok := fm[k]
		switch {
		case !ok:
			out = append(out, Difference{Kind: s.kind, Name: s.name, Line: s.line, Sheet: s.text,
				Message: fmt.Sprintf("%s: the sheet shows %s, but the source gives no such row", s.label(), quoteText(s.text))})
		case f.text != s.text:
			out = append(out, Difference{Kind: s.kind, Name: s.name, Line: s.line, Sheet: s.text, Source: f.text,
				Message: fmt.Sprintf("%s: sheet shows %s, source gives %s", s.label(), quoteText(s.text), quoteText(f.text))})
		}
	}
	for _, k := range fk {
		if _, ok := sm[k]; !ok {
			f := fm[k]
			out = append(out, Difference{Kind: f.kind, Name: f.name, Line: f.line, Source: f.text,
				Message: fmt.Sprintf("%s: the source gives %s, which the sheet does not show", f.label(), quoteText(f.text))})
		}
	}
	return out
}

func (it item) label() string {
	if it.kind == "check" {
		return fmt.Sprintf("check (line %d)", it.line)
	}
	if it.name == "" {
		return fmt.Sprintf("result (line %d)", it.line)
	}
	return fmt.Sprintf("value %s (line %d)", it.name, it.line)
}

// quoteText shows a row's text, dropping the "=" a result row starts with.
func quoteText(s string) string {
	s = strings.TrimSpace(strings.TrimPrefix(s, "="))
	if s == "" {
		return "nothing"
	}
	return s
}

// firstLineDiff reports the first line where the pages differ; lineBase is
// the file line on which the compared bytes start.
func firstLineDiff(sheet, fresh []byte, lineBase int) Difference {
	sl := strings.Split(string(sheet), "\n")
	fl := strings.Split(string(fresh), "\n")
	i := 0
	for i < len(sl) && i < len(fl) && sl[i] == fl[i] {
		i++
	}
	get := func(lines []string) string {
		if i < len(lines) {
			return lines[i]
		}
		return ""
	}
	s, f := get(sl), get(fl)
	col := 0
	for col < len(s) && col < len(f) && s[col] == f[col] {
		col++
	}
	line := lineBase + i
	d := Difference{Kind: "text", Line: line, Sheet: excerpt(s, col), Source: excerpt(f, col)}
	switch {
	case i >= len(sl):
		d.Message = fmt.Sprintf("text: the sheet ends at line %d, where the source gives more: «%s»", line-1, d.Source)
	case i >= len(fl):
		d.Message = fmt.Sprintf("text: the sheet goes on at line %d, where the source gives no more: «%s»", line, d.Sheet)
	default:
		d.Message = fmt.Sprintf("text: first difference at line %d of the file: sheet has «%s», source gives «%s»", line, d.Sheet, d.Source)
	}
	return d
}

// excerpt returns at most about 120 bytes of s around byte col, cut on
// UTF-8 boundaries, with "…" where it was cut.
func excerpt(s string, col int) string {
	const before, after = 40, 80
	start, end := max(0, col-before), min(len(s), col+after)
	for start > 0 && !utf8.RuneStart(s[start]) {
		start--
	}
	for end < len(s) && !utf8.RuneStart(s[end]) {
		end++
	}
	out := s[start:end]
	if start > 0 {
		out = "…" + out
	}
	if end < len(s) {
		out += "…"
	}
	return out
}
