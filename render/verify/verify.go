// Package verify checks a built sheet, or a calculation package, against
// the inputs and facts it records: it reads the page with an HTML
// tokenizer, takes out the signature elements, the embedded source and
// the recorded stamp, evaluates and writes the whole file again with the
// same sheet and package writers, and compares every byte; inside the
// source's git repository it also holds the recorded facts against git.
// It adds and checks signatures in the SSH signature format (OpenSSH
// PROTOCOL.sshsig) by calling ssh-keygen -Y, as git does.
package verify

import (
	"bytes"
	"encoding/base64"
	"errors"
	"fmt"
	"html"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"unicode/utf8"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
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
	// Git is what holding the recorded facts against git found; nil when
	// it was not asked for or the sheet has no stamp.
	Git *stamp.GitCheck
	// doc is the document evaluated from the embedded source; nil when it
	// was not evaluated
	doc *calcdoc.Document
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
	// Signatures are the signatures the file carries, in file order.
	Signatures []SignatureResult
}

// OK reports whether every sheet matches and the cover (of a package)
// agrees with its sheets.
func (r *Report) OK() bool {
	if len(r.PackageDifferences) > 0 || len(r.Sheets) == 0 {
		return false
	}
	for _, s := range r.Signatures {
		if !s.OK {
			return false
		}
	}
	for _, s := range r.Sheets {
		if !s.Match {
			return false
		}
	}
	return true
}

// Options say how Check works.
type Options struct {
	// Version is the verifying calcdoc's version: a sheet that records
	// another version fails, and the fresh render carries this one.
	Version string
	// SheetPath is the path of the HTML file ("" when not known). With
	// Git, the recorded source path is looked for from the current folder
	// and from this file's folder.
	SheetPath string
	// Git holds the recorded git facts against the repository that holds
	// the source, when the recorded path leads to one (stamp.Check).
	Git bool
	// Signers is an allowed-signers file in git's format; "" checks each
	// signature against the key it carries without naming a signer.
	Signers string
}

// Verify is Check without git and with no allowed-signers file.
func Verify(page []byte, version string) (*Report, error) {
	return Check(page, Options{Version: version})
}

// Check checks a built sheet, or a calculation package, against the
// inputs and facts it records. It reads the page with an HTML tokenizer
// (golang.org/x/net/html). It takes out the signature elements (the
// canonical form, Canonical); every other byte must be what this calcdoc
// writes. For each sheet it recovers the embedded source (HTML entities
// undone, or base64 decoded), computes the source's SHA-256 (FIPS 180-4)
// and compares it with the hash stated on the source element and in the
// stamp; then it evaluates the source again (calcdoc.Parse with the
// recorded path), renders it with the facts the sheet records (hash,
// commit, state and detail; source embedded) and compares the result
// with the page byte for byte: head, styles, body and what follows
// </body>. A package is written again whole (pack.Package with the title
// block its cover records). Where they differ it names each result row
// (data-value, by name and line) and each check row (data-check) whose
// text differs, and the first difference of the head, of the body and
// after </body>, with the element that holds it. A sheet without a stamp
// fails, and so does one built by another calcdoc version (naming it).
// With opt.Git, the recorded commit, date and working-tree state are held
// against git (stamp.Check). Each signature is checked (signature.go).
//
// The error is ErrNotSheet for a page that carries no embedded source;
// a sheet that carries one but does not match is a Report that is not OK.
//
// Check shows that the file is what this calcdoc writes from the inputs
// and facts it records, and that the stated hashes fit those inputs; a
// signature shows that the holder of a key signed those bytes. Neither
// shows that the inputs are right.
func Check(page []byte, opt Options) (*Report, error) {
	canon, sigs, sigDiffs := Canonical(page)
	var rep *Report
	if isPackage(canon) {
		var err error
		if rep, err = verifyPackage(canon, opt); err != nil {
			return nil, err
		}
	} else {
		rec, err := readSheet(canon, "")
		if err != nil {
			return nil, err
		}
		res := rec.check(canon, 1, opt, func(doc *calcdoc.Document, o render.Options) ([]byte, error) {
			return render.Sheet(doc, o)
		})
		rep = &Report{Sheets: []*SheetResult{res}}
	}
	rep.PackageDifferences = append(rep.PackageDifferences, sigDiffs...)
	rep.Signatures = checkSignatures(canon, sigs, opt)
	return rep, nil
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
	// files are the data files the sheet carries, by the path the
	// document writes (files.go)
	files map[string][]byte
	// failed are the files the build could not read, with the error
	failed map[string]string
	// sheets answer the use statements from the records the sheet
	// carries; useRecs are those records (uses.go)
	sheets  calcdoc.Sheets
	useRecs []calcdoc.SheetRecord
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
	rec.readFiles(els, prefix)
	rec.readUses(els, prefix)
	return rec, nil
}

// check verifies the record against unit, the bytes of the sheet as the
// file holds them (a whole page, or one section of a package), rendering
// the source again with rerender. lineBase is the line of the file on
// which unit starts.
func (rec *sheetRecord) check(unit []byte, lineBase int, opt Options, rerender func(*calcdoc.Document, render.Options) ([]byte, error)) *SheetResult {
	res := &SheetResult{Path: rec.path, SheetVersion: rec.opt.Version, Version: opt.Version}
	if rec.opt.Stamp != nil {
		res.StatedSHA256 = rec.opt.Stamp.SHA256
	}
	res.Differences = append(res.Differences, rec.recordDiffs...)
	if rec.sourceErr != "" {
		res.Differences = append(res.Differences, Difference{Kind: "record", Message: rec.sourceErr})
		return res
	}
	res.SHA256 = stamp.Hash(rec.source)
	if !rec.hasStamp {
		res.Differences = append(res.Differences, Difference{Kind: "stamp",
			Message: "stamp: the sheet has no stamp section (section class=\"stamp\"), which every sheet that build writes carries: it was removed, or the page was not written by build"})
	}
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
	if rec.opt.Version != opt.Version {
		res.Differences = append(res.Differences, Difference{Kind: "version", Sheet: rec.opt.Version, Source: opt.Version,
			Message: fmt.Sprintf("version: the sheet was built by calcdoc %s; this is calcdoc %s, which vouches only for the sheets it writes itself: verify it with calcdoc %s", orDash(rec.opt.Version), orDash(opt.Version), orDash(rec.opt.Version))})
		return res
	}
	if opt.Git && rec.opt.Stamp != nil {
		res.Git = rec.gitCheck(opt)
		for _, p := range append(res.Git.Problems, rec.fileGitProblems(opt)...) {
			res.Differences = append(res.Differences, Difference{Kind: "git", Message: "git: " + p})
		}
	}
	files := rec.files
	if files == nil {
		files = map[string][]byte{} // a sheet without a stamp: still no disk
	}
	doc := calcdoc.ParseWith(rec.path, rec.source, kind.Standard(), calcdoc.Inputs{Carried: files, Failed: rec.failed, Sheets: rec.sheets})
	res.doc = doc
	if opt.Git {
		res.Differences = append(res.Differences, rec.staleUses(doc, opt)...)
	}
	ropt := rec.opt
	ropt.Version = opt.Version
	fresh, err := rerender(doc, ropt)
	if err != nil {
		res.Differences = append(res.Differences, Difference{Kind: "record", Message: "the source cannot be rendered again: " + err.Error()})
		return res
	}
	if bytes.Equal(fresh, unit) {
		res.Match = len(res.Differences) == 0
		return res
	}
	res.Differences = append(res.Differences, comparePages(unit, fresh, lineBase, hashDiff)...)
	return res
}

// gitCheck holds the recorded stamp against git, looking for the source
// at its recorded path from the current folder and from the sheet's.
func (rec *sheetRecord) gitCheck(opt Options) *stamp.GitCheck {
	c := stamp.Check(*rec.opt.Stamp, rec.source, sourceCandidates(rec.path, opt.SheetPath, filepath.Separator)...)
	return &c
}

// sourceCandidates are the paths at which verify looks for the source a
// sheet records, on a system whose separator is sep: the recorded path
// from the current folder, then from the sheet's folder, then its base
// name in the sheet's folder. A path recorded on Windows (calc\a.md) is
// also tried with "/" where "/" is the separator, so that a sheet built on
// Windows can be checked on Linux or macOS; Windows reads "/" itself.
func sourceCandidates(recorded, sheetPath string, sep byte) []string {
	paths := []string{recorded}
	if sep == '/' && strings.Contains(recorded, `\`) {
		paths = append(paths, strings.ReplaceAll(recorded, `\`, "/"))
	}
	var cands []string
	for _, p := range paths {
		cands = append(cands, p)
		if sheetPath != "" && !filepath.IsAbs(p) {
			dir := filepath.Dir(sheetPath)
			cands = append(cands, filepath.Join(dir, p), filepath.Join(dir, filepath.Base(p)))
		}
	}
	return cands
}

// item is one result or check row of a page.
type item struct {
	kind string // "value" or "check"
	name string
	line int
	text string
}

func (it item) key() string { return it.kind + "\x00" + it.name + "\x00" + strconv.Itoa(it.line) }

// items lists the page's result rows (data-value with data-line, or
// within a row carrying data-line: a statement's result lines leave the
// line to their row) and check rows (data-check, whose value is the
// line) in page order, each with the plain text of its content.
func items(page []byte) []item {
	var out []item
	rowLine, rowEnd := "", 0 // the data-line of the row the elements are in
	for _, e := range elements(page) {
		if e.start >= rowEnd {
			rowLine = ""
		}
		if e.name == "div" && strings.HasPrefix(e.attr["class"], "row") {
			rowLine, rowEnd = e.attr["data-line"], e.content+len(e.raw)
		}
		it := item{kind: "value", name: e.attr["data-value"]}
		lineAttr, own := e.attr["data-line"]
		if !own {
			lineAttr = rowLine
		}
		switch {
		case e.hasAttr("data-check"):
			it = item{kind: "check"}
			lineAttr = e.attr["data-check"]
		case !e.hasAttr("data-value"):
			continue
		}
		if numberRE().MatchString(lineAttr) {
			it.line, _ = strconv.Atoi(lineAttr)
		}
		it.text = plainText(e.raw)
		out = append(out, it)
	}
	return out
}

var numberRE = sync.OnceValue(func() *regexp.Regexp { return regexp.MustCompile(`^[0-9]+$`) })

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
