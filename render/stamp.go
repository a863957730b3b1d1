package render

import (
	"bytes"
	"encoding/base64"
	"unicode/utf8"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/stamp"
	"calcdoc/render/markup"
)

// StampInfo is what traces a sheet to its source.
type StampInfo = stamp.Stamp

// markerText is the diagonal marker's wording, or "" for a sheet fit to
// issue: one built from uncommitted changes, or with failing checks or
// errors, is marked.
func markerText(doc *calcdoc.Document, opt Options) string {
	var why string
	switch {
	case len(doc.Errors) > 0:
		why = "errors in the calculation"
	case doc.FailedChecks() > 0:
		why = "a check is not satisfied"
	case opt.Stamp != nil && opt.Stamp.State != stamp.Clean:
		switch opt.Stamp.State {
		case stamp.Modified, stamp.Untracked:
			why = "uncommitted changes"
		default:
			why = "source not under version control"
		}
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
	row("Revision and date", esc(orDash(doc.Front.Revision))+", "+esc(orDash(doc.Front.Date)))
	row("calcdoc version", esc(opt.Version))
	w.WriteString("</table>\n</section>\n")
}

func orDash(s string) string {
	if s == "" {
		return "—"
	}
	return s
}

func stateWords(s stamp.State) string {
	switch s {
	case stamp.Clean:
		return "clean: the file is as committed"
	case stamp.Modified:
		return "uncommitted changes: the file differs from the last commit"
	case stamp.Untracked:
		return "uncommitted changes: the file is not committed"
	case stamp.NoRepo:
		return "not in a git repository"
	case stamp.NoGit:
		return "git not available"
	}
	return "unknown"
}

// SourceID is the id of the element that carries the embedded source.
const SourceID = "calcdoc-source"

// embedSource carries the document's source in the sheet, inert (a hidden
// <pre>, never a script) and escaped, so that verify can recover it byte
// for byte. A source that is not valid UTF-8 is carried as base64.
func embedSource(w *markup.Writer, doc *calcdoc.Document) {
	text := utf8.Valid(doc.Source)
	enc := "text"
	if !text {
		enc = "base64"
	}
	w.Printf("<pre hidden id=\"%s\" data-path=\"%s\" data-encoding=\"%s\" data-sha256=\"%s\">", SourceID, esc(doc.Path), enc, stamp.Hash(doc.Source))
	if text {
		escapeInto(&w.Buffer, doc.Source)
	} else {
		w.WriteString(base64.StdEncoding.EncodeToString(doc.Source))
	}
	w.WriteString("</pre>\n")
}

// escapeInto writes b escaped exactly as html.EscapeString would (& < > '
// " become &amp; &lt; &gt; &#39; &#34;), without a copy of the whole text.
func escapeInto(w *bytes.Buffer, b []byte) {
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
