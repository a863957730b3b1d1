package render

import (
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/render/markup"
)

// UseStamp is what the stamp of a sheet records of one sheet it uses: the
// path as the use statement writes it, the SHA-256 of the used source,
// its commit and working-tree state, and why it is not fit for issue ("" when
// it is).
type UseStamp struct {
	Path   string
	SHA256 string
	Commit string
	State  TreeState
	NotFit string
}

// UsesID is the id of the element that carries the used sheets' records.
const UsesID = "calcdoc-uses"

// useMarker is why a sheet is not fit for issue because of a sheet it
// uses, or "": the first used sheet that is uncommitted, or not fit for
// issue itself (its own reason, so a chain says where it starts).
func useMarker(s *StampInfo) string {
	if s == nil {
		return ""
	}
	for _, u := range s.Uses {
		switch {
		case u.State == TreeModified || u.State == TreeUntracked:
			return "uses " + u.Path + ", which has uncommitted changes"
		case u.NotFit != "":
			return "uses " + u.Path + ", which is not fit for issue (" + u.NotFit + ")"
		case u.State != TreeClean:
			return "uses " + u.Path + ", whose source is not under version control"
		}
	}
	return ""
}

// useStampRows lists the used sheets in the stamp's table, each with its
// facts as data attributes (verify reads them back).
func useStampRows(w *markup.Writer, s *StampInfo) {
	for _, u := range s.Uses {
		state := stateWords(u.State)
		if u.NotFit != "" {
			state += "; not fit for issue: " + u.NotFit
		}
		commit := "no commit recorded"
		if u.Commit != "" {
			commit = "commit <code>" + esc(u.Commit) + "</code>"
		}
		w.Printf("<tr class=\"use\" data-use-path=\"%s\" data-use-sha256=\"%s\" data-use-commit=\"%s\" data-use-state=\"%s\" data-use-notfit=\"%s\"><th>Sheet used</th><td>%s, SHA-256 <code class=\"hash\">%s</code>, %s; %s</td></tr>\n",
			esc(u.Path), esc(u.SHA256), esc(u.Commit), esc(u.State.String()), esc(u.NotFit),
			esc(u.Path), esc(u.SHA256), commit, esc(state))
	}
}

// embedUses carries the values of the used sheets (calcdoc.UseRecords),
// inert and escaped as the source is, so that verify evaluates the sheet
// from itself alone.
func embedUses(w *markup.Writer, pg *page, doc *calcdoc.Document) {
	recs := calcdoc.UseRecords(doc)
	if len(recs) == 0 {
		return
	}
	w.Printf("<pre hidden id=\"%s\" data-encoding=\"json\">", UsesID)
	escapeInto(pg, calcdoc.MarshalUseRecords(recs))
	w.WriteString("</pre>\n")
}

// NotFitReason is the marker's reason without its "NOT FOR ISSUE: " prefix.
func NotFitReason(doc *calcdoc.Document, opt Options) string {
	return strings.TrimPrefix(MarkerText(doc, opt), "NOT FOR ISSUE: ")
}
