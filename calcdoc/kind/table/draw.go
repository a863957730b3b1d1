package table

import (
	"sort"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/table/data"
	"calcdoc/expr"
	"calcdoc/render/markup"
)

// LongRows is the number of rows above which the sheet shows only the
// rows that look-ups took, with the count of all.
const LongRows = 12

// drawTable draws a table block: its name, source and notes, a file's
// path and SHA-256, and the table (a long one: the rows used).
func drawTable(w *markup.Writer, b *calcdoc.Block) {
	w.Printf("<div class=\"block table\" id=\"B%d\">\n", b.Pos.Line())
	res, _ := b.Result.(*Result)
	if res == nil || res.Table == nil {
		w.Printf("<div class=\"tablehead\" id=\"L%d\">table <code>%s</code></div>\n", b.InfoPos.Line(), markup.Esc(b.Arg))
		for _, e := range b.Errors {
			w.ErrorRow(e)
		}
		w.WriteString("</div>\n")
		return
	}
	t := res.Table
	w.Printf("<div class=\"tablehead\" id=\"L%d\">Table %s</div>\n", b.InfoPos.Line(), markup.NameHTML(t.Name))
	w.Printf("<p class=\"tablefacts\">Source: %s", markup.Esc(t.Source))
	for _, n := range t.Notes {
		w.Printf("<br>Note: %s", markup.Esc(n))
	}
	if t.Path != "" {
		w.Printf("<br>File: <code>%s</code>, SHA-256 <code class=\"hash\">%s</code>", markup.Esc(t.Path), markup.Esc(t.SHA256))
	}
	w.WriteString("</p>\n")
	rows := allRows(len(t.Rows))
	long := len(t.Rows) > LongRows
	if long {
		rows = usedRows(b.Doc(), t.Name)
		if len(rows) == 0 {
			w.Printf("<p class=\"tablecount\">%d rows, of columns %s; no look-up took any of them, so none is shown</p>\n</div>\n", len(t.Rows), markup.Esc(headers(t)))
			return
		}
	}
	w.WriteString("<table><thead><tr><th>row</th>")
	for _, c := range t.Cols {
		unit := ""
		if c.Unit != nil {
			unit = " <span class=\"unit\">[" + markup.Esc(markup.UnitText(c.Unit.Text)) + "]</span>"
		}
		w.Printf("<th>%s%s</th>", markup.NameHTML(c.Name), unit)
	}
	w.WriteString("</tr></thead><tbody>\n")
	for _, i := range rows {
		w.Printf("<tr><td class=\"rn\">%d</td>", i+1)
		for _, c := range t.Rows[i].Cells {
			if c.Gap {
				w.WriteString("<td class=\"gap\">—</td>")
				continue
			}
			w.Printf("<td>%s</td>", markup.Esc(c.Text))
		}
		w.WriteString("</tr>\n")
	}
	w.WriteString("</tbody></table>\n")
	if long {
		w.Printf("<p class=\"tablecount\">%d of %d rows shown: the rows the look-ups took</p>\n", len(rows), len(t.Rows))
	}
	w.WriteString("</div>\n")
}

func allRows(n int) []int {
	out := make([]int, n)
	for i := range out {
		out[i] = i
	}
	return out
}

// usedRows lists, sorted, the rows of the table named name that the
// document's look-ups took.
func usedRows(doc *calcdoc.Document, name string) []int {
	seen := map[int]bool{}
	key := expr.NameKey(name)
	for _, l := range DocLookups(doc) {
		if expr.NameKey(l.Table) != key {
			continue
		}
		for _, r := range l.Rows {
			seen[r] = true
		}
	}
	out := make([]int, 0, len(seen))
	for r := range seen {
		out = append(out, r)
	}
	sort.Ints(out)
	return out
}

// DocLookups are the look-ups of every statement of the document's calc
// blocks, in document order.
func DocLookups(doc *calcdoc.Document) []expr.Lookup {
	var out []expr.Lookup
	for _, b := range doc.Blocks {
		stmts, _ := b.Result.([]*calcdoc.Stmt)
		for _, st := range stmts {
			if st.Res != nil {
				out = append(out, st.Res.Trace.Lookups()...)
			}
		}
	}
	return out
}

// headers lists the table's column headers as the block writes them.
func headers(t *data.Table) string {
	hs := make([]string, len(t.Cols))
	for i, c := range t.Cols {
		hs[i] = markup.UnitText(c.Header())
	}
	return strings.Join(hs, ", ")
}
