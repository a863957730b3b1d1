package diff

import (
	"bytes"
	"fmt"
	"html"
)

// Caution is the line every comparison sheet carries.
const Caution = "Results computed by calcdoc are to be checked by a competent person before they are relied on."

const style = `body{font-family:sans-serif;margin:2em;max-width:60em;color:#111}
h1{font-size:1.4em;border-bottom:2px solid #333;padding-bottom:.2em}
h2{font-size:1.1em;margin-top:1.6em}
table{border-collapse:collapse;width:100%;margin:.4em 0}
th,td{border:1px solid #999;padding:.2em .5em;text-align:left;vertical-align:top}
th{background:#eee}
td.num{font-variant-numeric:tabular-nums;white-space:nowrap}
tr.added td.mark{background:#dfd}
tr.removed td.mark{background:#fdd}
tr.changed td.mark{background:#ffd}
tr.error td{background:#fcc}
p.caution{border:1px solid #333;padding:.4em;font-size:.9em}
p.none{font-style:italic}`

// HTML is the comparison sheet: the two revisions, then per document a
// table of its changes. It holds no link out and no time other than the
// commits' own, so the same comparison gives the same bytes.
func (r *Report) HTML() []byte {
	var b bytes.Buffer
	e := html.EscapeString
	b.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>What changed: ")
	b.WriteString(e(r.From.Label() + " → " + r.To.Label()))
	b.WriteString("</title>\n<style>\n" + style + "\n</style>\n</head>\n<body>\n")
	fmt.Fprintf(&b, "<h1>What changed: %s → %s</h1>\n", e(r.From.Label()), e(r.To.Label()))
	b.WriteString("<table class=\"revs\">\n<tr><th></th><th>revision</th><th>commit</th><th>date</th></tr>\n")
	for _, x := range []struct {
		side string
		rev  Revision
	}{{"from", r.From}, {"to", r.To}} {
		commit, date := x.rev.Commit, x.rev.Date
		if commit == "" {
			commit, date = "uncommitted", "—"
		}
		fmt.Fprintf(&b, "<tr><th>%s</th><td>%s</td><td><code>%s</code></td><td>%s</td></tr>\n", x.side, e(x.rev.Label()), e(commit), e(date))
	}
	b.WriteString("</table>\n")
	fmt.Fprintf(&b, "<p class=\"caution\">%s</p>\n", e(Caution))
	for _, d := range r.Docs {
		fmt.Fprintf(&b, "<h2>%s</h2>\n", e(d.Path))
		if len(d.Changes) == 0 {
			b.WriteString("<p class=\"none\">No change.</p>\n")
			continue
		}
		for _, sec := range []struct{ item, title string }{
			{ItemDocument, "Document"}, {ItemFront, "Front matter"}, {ItemValue, "Values"}, {ItemCheck, "Checks"},
		} {
			var rows []Change
			for _, c := range d.Changes {
				if c.Item == sec.item {
					rows = append(rows, c)
				}
			}
			if len(rows) == 0 {
				continue
			}
			fmt.Fprintf(&b, "<h3>%s</h3>\n<table>\n<tr><th>change</th><th>name</th><th>kind</th><th>%s</th><th>%s</th><th>relative change</th></tr>\n", sec.title, e(r.From.Label()), e(r.To.Label()))
			for _, c := range rows {
				name, role, old, nw := c.Name, c.Role, c.Old, c.New
				switch c.Kind {
				case Failed:
					name, role, old = "does not evaluate at "+c.At, c.Name+" error(s)", ""
				case Added, Removed:
					if c.Item == ItemDocument {
						name = d.Path
					}
				}
				fmt.Fprintf(&b, "<tr class=\"%s\"><td class=\"mark\">%s</td><td>%s</td><td>%s</td><td class=\"num\">%s</td><td class=\"num\">%s</td><td class=\"num\">%s</td></tr>\n",
					c.Kind, c.Kind, e(name), e(role), e(old), e(nw), e(c.RelText()))
			}
			b.WriteString("</table>\n")
		}
	}
	b.WriteString("</body>\n</html>\n")
	return b.Bytes()
}
