package render

import (
	"encoding/base64"
	"strconv"
	"unicode/utf8"

	"calcdoc/calcdoc"
	"calcdoc/render/markup"
)

// FileStamp traces one data file a sheet read (a table's CSV file): its
// path as the document writes it, its SHA-256 and its git facts, as
// StampInfo traces the source.
type FileStamp struct {
	Path       string
	SHA256     string
	Commit     string
	CommitDate string
	State      TreeState
	Detail     string
}

// SheetState is the state the sheet is marked by: the source's, or,
// where the source is clean, that of the first data file that is not, so
// that a change to a data file marks the sheet exactly as a change to its
// source does.
func (s *StampInfo) SheetState() TreeState {
	if s.State != TreeClean {
		return s.State
	}
	for _, f := range s.Files {
		if f.State != TreeClean {
			return f.State
		}
	}
	return TreeClean
}

// stampFileRows writes a row of the stamp for each data file the sheet
// read, its facts also as data attributes that verify reads back.
func stampFileRows(w *markup.Writer, s *StampInfo) {
	for _, f := range s.Files {
		commit := "no commit recorded"
		if f.Commit != "" {
			commit = "last commit <code>" + esc(f.Commit) + "</code>"
			if f.CommitDate != "" {
				commit += " (" + esc(f.CommitDate) + ")"
			}
		}
		w.Printf("<tr data-file=\"%s\" data-sha256=\"%s\" data-commit=\"%s\" data-commit-date=\"%s\" data-state=\"%s\" data-detail=\"%s\"><th>Data file</th><td><code>%s</code>, SHA-256 <code class=\"hash\">%s</code>; %s; %s; %s</td></tr>\n",
			esc(f.Path), esc(f.SHA256), esc(f.Commit), esc(f.CommitDate), esc(f.State.String()), esc(f.Detail),
			esc(f.Path), esc(f.SHA256), commit, esc(stateWords(f.State)), esc(f.Detail))
	}
}

// FileID is the id of the element that carries the n-th data file
// (counting from 1).
func FileID(n int) string { return "calcdoc-file-" + strconv.Itoa(n) }

// embedFiles carries the data files the document read, each as the
// source is carried (embedSource), so that verify evaluates the sheet
// from the sheet alone; a file that could not be read is carried as the
// error it gave (data-error).
func embedFiles(w *markup.Writer, pg *page, doc *calcdoc.Document) {
	for i, f := range doc.DataFiles {
		if f.Err != "" {
			w.Printf("<pre hidden id=\"%s\" data-file=\"%s\" data-error=\"%s\"></pre>\n", FileID(i+1), esc(f.Path), esc(f.Err))
			continue
		}
		text := utf8.Valid(f.Bytes)
		enc := "text"
		if !text {
			enc = "base64"
		}
		w.Printf("<pre hidden id=\"%s\" data-file=\"%s\" data-encoding=\"%s\" data-sha256=\"%s\">", FileID(i+1), esc(f.Path), enc, SourceHash(f.Bytes))
		if text {
			escapeInto(pg, f.Bytes)
		} else {
			w.WriteString(base64.StdEncoding.EncodeToString(f.Bytes))
		}
		w.WriteString("</pre>\n")
	}
}
