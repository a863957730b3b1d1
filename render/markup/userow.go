package markup

import (
	"strconv"

	"calcdoc/calcdoc"
)

// useRows writes the working of a use statement: each value it takes,
// shown as the other sheet shows it, and where it comes from (the other
// sheet's number, revision and title, the line of the definition, the
// first 12 hex digits of its source's SHA-256, and a link to its sheet).
func (w *Writer) useRows(st *calcdoc.Stmt) {
	w.Printf("<div class=\"f\"><code>%s</code></div>", Esc(st.Text))
	u := st.Use
	if u == nil || u.Sheet == nil {
		return
	}
	sh := u.Sheet
	for _, b := range u.Names {
		if b.Value == nil {
			continue
		}
		v := b.Value
		w.WriteString("<div" + resultAttrs(b.Local) + "><math>")
		w.WriteString(NameML(b.Local) + "<mo>=</mo>")
		w.WriteString(ValueML(v.Value, v.Display, w.Digits(), false))
		w.WriteString(SenseML(v.Value))
		w.WriteString("</math></div>")
		w.KindNote(v.Value)
		named := ""
		if b.Name != b.Local {
			named = " (named " + Esc(b.Name) + " there)"
		}
		w.Printf("<div class=\"origin\">from <a href=\"%s\">%s</a>, line %s%s; source SHA-256 <code class=\"hash\" title=\"%s\">%s</code></div>",
			Esc(u.Link), Esc(SheetLabel(sh)), strconv.Itoa(v.Line), named, Esc(sh.SHA256), Esc(ShortHash(sh.SHA256)))
	}
}

// SheetLabel names a used sheet: its number, revision and title, as many
// as it has, else its path.
func SheetLabel(sh *calcdoc.Sheet) string {
	s := sh.Number
	if sh.Revision != "" {
		if s != "" {
			s += " "
		}
		s += "rev " + sh.Revision
	}
	if sh.Title != "" {
		if s != "" {
			s += " — "
		}
		s += sh.Title
	}
	if s == "" {
		s = sh.Path
	}
	return s
}

// ShortHash is the first 12 hex digits of a SHA-256.
func ShortHash(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}
