package render

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
	"calcdoc/calcdoc/stamp"
)

// ErrNotSheet is returned by Verify for a page that carries no embedded
// calcdoc source: it is not a built calcdoc sheet or package.
var ErrNotSheet = errors.New("not a calcdoc sheet: it carries no embedded source (an element with id \"" + SourceID + "\")")

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
// source it carries. For each sheet it recovers the embedded source (HTML
// entities undone, or base64 decoded), computes the source's SHA-256 (FIPS
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
// The source is evaluated again with kinds (calcdoc/kind.Standard()).
func Verify(page []byte, version string, kinds *calcdoc.Registry) (*Report, error) {
	if bytes.Contains(page, []byte(pkgSheetOpen)) {
		return verifyPackage(page, version, kinds)
	}
	rec, err := readSheet(page, "")
	if err != nil {
		return nil, err
	}
	res := rec.check(page, 1, version, kinds, func(doc *calcdoc.Document, opt Options) ([]byte, error) {
		return Sheet(doc, opt)
	})
	return &Report{Sheets: []*SheetResult{res}}, nil
}

// sheetRecord is what a sheet says about itself.
type sheetRecord struct {
	path        string
	source      []byte
	sourceErr   string // why the source could not be recovered
	sourceSHA   string // data-sha256 of the source element
	hasStamp    bool
	opt         Options
	recordDiffs []Difference
}

var (
	attrRE   = regexp.MustCompile(`\s([a-zA-Z][a-zA-Z0-9-]*)="([^"]*)"`)
	numberRE = regexp.MustCompile(`^[0-9]+$`)
)

// attrs reads the attributes of a start tag written by this package
// (name="value" with the value HTML-escaped).
func attrs(tag []byte) map[string]string {
	m := map[string]string{}
	for _, a := range attrRE.FindAllSubmatch(tag, -1) {
		if _, dup := m[string(a[1])]; !dup {
			m[string(a[1])] = html.UnescapeString(string(a[2]))
		}
	}
	return m
}

// startTag finds the first start tag that begins with open at or after
// from, returning its text and the offset just past it; ok is false when
// there is none.
func startTag(page []byte, open string, from int) (tag []byte, end int, ok bool) {
	i := bytes.Index(page[from:], []byte(open))
	if i < 0 {
		return nil, 0, false
	}
	i += from
	j := bytes.IndexByte(page[i:], '>')
	if j < 0 {
		return nil, 0, false
	}
	return page[i : i+j+1], i + j + 1, true
}

// readSheet reads the record of the sheet in page whose ids carry prefix
// ("" for a standalone sheet).
func readSheet(page []byte, prefix string) (*sheetRecord, error) {
	tag, end, ok := startTag(page, "<pre hidden id=\""+prefix+SourceID+"\"", 0)
	if !ok {
		return nil, ErrNotSheet
	}
	rec := &sheetRecord{}
	a := attrs(tag)
	rec.path = a["data-path"]
	rec.sourceSHA = a["data-sha256"]
	close := bytes.Index(page[end:], []byte("</pre>"))
	if close < 0 {
		rec.sourceErr = "the embedded source has no end (</pre>)"
	} else {
		body := page[end : end+close]
		switch a["data-encoding"] {
		case "text":
			rec.source = []byte(html.UnescapeString(string(body)))
		case "base64":
			src, err := base64.StdEncoding.DecodeString(string(body))
			if err != nil {
				rec.sourceErr = "the embedded source is not valid base64: " + err.Error()
			}
			rec.source = src
		default:
			rec.sourceErr = fmt.Sprintf("the embedded source has an unknown encoding %q", a["data-encoding"])
		}
	}
	rec.opt.EmbedSource = true
	if st, _, ok := startTag(page, "<section class=\"stamp\"", 0); ok {
		s := attrs(st)
		rec.hasStamp = true
		state, known := parseState(s["data-state"])
		if !known {
			rec.recordDiffs = append(rec.recordDiffs, Difference{Kind: "record",
				Message: fmt.Sprintf("the stamp states a working-tree state %q that calcdoc does not know", s["data-state"])})
		}
		rec.opt.Version = s["data-version"]
		rec.opt.Stamp = &StampInfo{SHA256: s["data-sha256"], Commit: s["data-commit"], CommitDate: s["data-commit-date"],
			State: state, Detail: s["data-detail"]}
	} else if g, _, ok := startTag(page, "<meta name=\"generator\"", 0); ok {
		rec.opt.Version = strings.TrimPrefix(attrs(g)["content"], "calcdoc ")
	}
	return rec, nil
}

// parseState is the inverse of stamp.State.String.
func parseState(s string) (stamp.State, bool) {
	for st := stamp.Unknown; st <= stamp.NoGit; st++ {
		if st.String() == s {
			return st, true
		}
	}
	return stamp.Unknown, false
}

// check verifies the record against unit, the bytes of the sheet as the
// file holds them, rendering the source again with render. lineBase is the
// line of the file on which unit starts.
func (rec *sheetRecord) check(unit []byte, lineBase int, version string, kinds *calcdoc.Registry, render func(*calcdoc.Document, Options) ([]byte, error)) *SheetResult {
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
	doc := calcdoc.Parse(rec.path, rec.source, kinds)
	fresh, err := render(doc, rec.opt)
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

var itemRE = regexp.MustCompile(`<([a-z]+)\b[^>]*\s(data-value|data-check)="([^"]*)"[^>]*>`)

// items lists the page's result rows (data-value with data-line) and check
// rows (data-check, whose value is the line) in page order.
func items(page []byte) []item {
	var out []item
	for _, m := range itemRE.FindAllSubmatchIndex(page, -1) {
		tag := page[m[0]:m[1]]
		name := string(page[m[2]:m[3]])
		a := attrs(tag)
		it := item{kind: "value", name: a["data-value"]}
		lineAttr := a["data-line"]
		if string(page[m[4]:m[5]]) == "data-check" {
			it = item{kind: "check"}
			lineAttr = a["data-check"]
		}
		if numberRE.MatchString(lineAttr) {
			it.line, _ = strconv.Atoi(lineAttr)
		}
		it.text = plainText(page[m[1]:elementEnd(page, m[1], name)])
		out = append(out, it)
	}
	return out
}

// elementEnd returns the offset of the end tag that closes the element
// named name whose content starts at from (counting nested elements of the
// same name), or len(page).
func elementEnd(page []byte, from int, name string) int {
	open, close := []byte("<"+name), []byte("</"+name+">")
	depth := 1
	for i := from; i < len(page); {
		j := bytes.IndexByte(page[i:], '<')
		if j < 0 {
			break
		}
		i += j
		switch {
		case bytes.HasPrefix(page[i:], close):
			depth--
			if depth == 0 {
				return i
			}
			i += len(close)
		case bytes.HasPrefix(page[i:], open) && len(page) > i+len(open) && (page[i+len(open)] == '>' || page[i+len(open)] == ' '):
			depth++
			i += len(open)
		default:
			i++
		}
	}
	return len(page)
}

// plainText is the text of an HTML fragment: tags removed, entities
// undone, a space where MathML or HTML separates things (mspace, table
// cells, spans), rows of a matrix separated by "; ", whitespace collapsed.
func plainText(frag []byte) string {
	var b strings.Builder
	for i := 0; i < len(frag); {
		if frag[i] != '<' {
			j := bytes.IndexByte(frag[i:], '<')
			if j < 0 {
				j = len(frag) - i
			}
			b.WriteString(html.UnescapeString(string(frag[i : i+j])))
			i += j
			continue
		}
		j := bytes.IndexByte(frag[i:], '>')
		if j < 0 {
			break
		}
		tag := string(frag[i+1 : i+j])
		name := ""
		if f := strings.Fields(tag); len(f) > 0 {
			name = strings.TrimSuffix(strings.TrimPrefix(f[0], "/"), "/")
		}
		switch {
		case tag == "/mtr":
			b.WriteString("; ")
		case name == "mspace" || name == "mtd" || name == "span" || name == "div" || name == "td" || name == "th":
			b.WriteByte(' ')
		}
		i += j + 1
	}
	return strings.TrimSpace(strings.TrimSuffix(strings.Join(strings.Fields(b.String()), " "), ";"))
}

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
