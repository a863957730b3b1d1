package render

import (
	"calcdoc/render/markup"
	"crypto/sha256"
	"encoding/base64"
	"encoding/hex"
	"fmt"
	"unicode/utf8"

	"calcdoc/calcdoc"
)

// TreeState says how the source bytes relate to git.
type TreeState int

const (
	// TreeUnknown is the zero value: git was found but its answer could not be
	// had or read (a timeout, a damaged repository, a path git refuses).
	// Detail says what happened. A zero StampInfo never claims to be clean.
	TreeUnknown TreeState = iota
	// TreeClean: the bytes read are byte for byte the file's blob at HEAD.
	// Commit is then the last commit that changed the file.
	TreeClean
	// TreeModified: HEAD holds the file, but the bytes read differ from its
	// blob at HEAD, whether the change is unstaged or staged and not yet
	// committed. Commit is the last commit that changed the file, i.e. the
	// commit the uncommitted changes start from.
	TreeModified
	// TreeUntracked: HEAD does not hold the file. It was never added, or it is
	// ignored, or it is only added to the index and never committed, or the
	// repository has no commit yet. Commit is "".
	TreeUntracked
	// TreeNoRepo: the file is not inside a git work tree. Commit is "".
	TreeNoRepo
	// TreeNoGit: no git executable was found in PATH. Commit is "".
	TreeNoGit
)

// String returns a lower-case name for the state: "unknown", "clean",
// "modified", "untracked", "no-repo" or "no-git".
func (s TreeState) String() string {
	switch s {
	case TreeUnknown:
		return "unknown"
	case TreeClean:
		return "clean"
	case TreeModified:
		return "modified"
	case TreeUntracked:
		return "untracked"
	case TreeNoRepo:
		return "no-repo"
	case TreeNoGit:
		return "no-git"
	}
	return fmt.Sprintf("State(%d)", int(s))
}

// ParseTreeState is the inverse of TreeState.String; ok is false for a
// word it does not give.
func ParseTreeState(s string) (st TreeState, ok bool) {
	for st := TreeUnknown; st <= TreeNoGit; st++ {
		if st.String() == s {
			return st, true
		}
	}
	return TreeUnknown, false
}

// StampInfo is what traces a sheet to its source, as the sheet shows it:
// plain data, filled in by the issuing layer (render/stamp finds it from
// git).
type StampInfo struct {
	// SHA256 is the lower-case hex SHA-256 (FIPS 180-4) of the source
	// bytes, 64 characters.
	SHA256 string
	// Commit is the full hash of the last commit in HEAD's history that
	// changed the file (as `git log -1 --format=%H -- FILE`), or "" when
	// State is not TreeClean or TreeModified.
	Commit string
	// CommitDate is that commit's committer date in strict ISO 8601 with
	// the committer's offset (as `git log -1 --format=%cI`), e.g.
	// "2024-03-05T10:20:30+01:00"; "" when Commit is "".
	CommitDate string
	// State says how the bytes relate to git.
	State TreeState
	// Detail is one sentence for the sheet that says what State means for
	// this file, e.g. "git is not installed; no commit recorded".
	Detail string
	// Files trace the data files the sheet read (datafiles.go).
	Files []FileStamp
	// Uses are the sheets the document uses (uses.go).
	Uses []UseStamp
}

// SourceHash returns the lower-case hexadecimal SHA-256 digest (FIPS
// 180-4) of src: 64 characters, the same as the first field that
// `sha256sum` prints.
func SourceHash(src []byte) string {
	sum := sha256.Sum256(src)
	return hex.EncodeToString(sum[:])
}

// MarkerText is the diagonal marker's wording, or "" for a sheet fit to
// issue: one built from uncommitted changes, or with failing checks or
// errors, is marked.
func MarkerText(doc *calcdoc.Document, opt Options) string {
	var why string
	switch {
	case len(doc.Errors) > 0:
		why = "errors in the calculation"
	case doc.FailedChecks() > 0:
		why = "a check is not satisfied"
	case opt.Stamp != nil && opt.Stamp.SheetState() != TreeClean:
		switch opt.Stamp.SheetState() {
		case TreeModified, TreeUntracked:
			why = "uncommitted changes"
		default:
			why = "source not under version control"
		}
	default:
		why = useMarker(opt.Stamp)
	}
	if why == "" {
		return ""
	}
	return "NOT FOR ISSUE: " + why
}

// stampSection writes the traceability record: the full SHA-256 of the
// source, the commit of the file's last change, the state of the working
// tree, calcdoc's version, and the revision and date of the front matter.
// The same facts are data attributes, so verify can read them back.
func stampSection(w *markup.Writer, doc *calcdoc.Document, opt Options) {
	s := opt.Stamp
	w.Printf("<section class=\"stamp\" data-sha256=\"%s\" data-commit=\"%s\" data-commit-date=\"%s\" data-state=\"%s\" data-detail=\"%s\" data-version=\"%s\">\n",
		esc(s.SHA256), esc(s.Commit), esc(s.CommitDate), esc(s.State.String()), esc(s.Detail), esc(opt.Version))
	w.WriteString("<h2>Traceability</h2>\n<table class=\"stamp\">\n")
	row := func(k, v string) { w.Printf("<tr><th>%s</th><td>%s</td></tr>\n", esc(k), v) }
	row("Source file", esc(doc.Path))
	row("Source SHA-256", "<code class=\"hash\">"+esc(s.SHA256)+"</code>")
	commit := "none recorded"
	if s.Commit != "" {
		commit = "<code>" + esc(s.Commit) + "</code>"
		if s.CommitDate != "" {
			commit += " (" + esc(s.CommitDate) + ")"
		}
	}
	row("Last commit of the file", commit)
	row("Working tree", esc(stateWords(s.State))+"; "+esc(s.Detail))
	stampFileRows(w, s)
	row("Revision and date", esc(OrDash(doc.Front.Revision))+", "+esc(OrDash(doc.Front.Date)))
	row("calcdoc version", esc(opt.Version))
	useStampRows(w, s)
	w.WriteString("</table>\n</section>\n")
}

// OrDash is s, or a dash where it is empty.
func OrDash(s string) string {
	if s == "" {
		return "—"
	}
	return s
}

func stateWords(s TreeState) string {
	switch s {
	case TreeClean:
		return "clean: the file is as committed"
	case TreeModified:
		return "uncommitted changes: the file differs from the last commit"
	case TreeUntracked:
		return "uncommitted changes: the file is not committed"
	case TreeNoRepo:
		return "not in a git repository"
	case TreeNoGit:
		return "git not available"
	}
	return "unknown"
}

// SourceID is the id of the element that carries the embedded source.
const SourceID = "calcdoc-source"

// embedSource carries the document's source in the sheet, inert (a hidden
// <pre>, never a script) and escaped, so that verify can recover it byte
// for byte. A source that is not valid UTF-8 is carried as base64.
func embedSource(w *markup.Writer, pg *page, doc *calcdoc.Document) {
	text := utf8.Valid(doc.Source)
	enc := "text"
	if !text {
		enc = "base64"
	}
	w.Printf("<pre hidden id=\"%s\" data-path=\"%s\" data-encoding=\"%s\" data-sha256=\"%s\">", SourceID, esc(doc.Path), enc, doc.SourceSHA256())
	if text {
		escapeInto(pg, doc.Source)
	} else {
		w.WriteString(base64.StdEncoding.EncodeToString(doc.Source))
	}
	w.WriteString("</pre>\n")
}

// escapeInto writes b escaped exactly as html.EscapeString would (& < > '
// " become &amp; &lt; &gt; &#39; &#34;), without a copy of the whole text,
// in pieces of at most escapePiece bytes, so that the page is handed out
// as it fills (page.check) rather than grown to the whole text.
func escapeInto(w *page, b []byte) {
	for len(b) > escapePiece {
		escapeInto(w, b[:escapePiece])
		b = b[escapePiece:]
	}
	last := 0
	for i, c := range b {
		var r string
		switch c {
		case '&':
			r = "&amp;"
		case '<':
			r = "&lt;"
		case '>':
			r = "&gt;"
		case '\'':
			r = "&#39;"
		case '"':
			r = "&#34;"
		default:
			continue
		}
		w.Write(b[last:i])
		w.WriteString(r)
		last = i + 1
	}
	w.Write(b[last:])
}

// escapePiece is the most of a text escapeInto writes at once.
const escapePiece = 32 << 10
