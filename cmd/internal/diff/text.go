package diff

import (
	"fmt"
	"io"
	"os"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
)

// Line is the change as one line of text, without the document.
func (c Change) Line() string {
	var b strings.Builder
	if c.Case != "" {
		fmt.Fprintf(&b, "[%s] ", c.Case)
	}
	switch c.Item {
	case ItemDocument:
		switch c.Kind {
		case Failed:
			fmt.Fprintf(&b, "error: does not evaluate at %s (%s errors): %s", c.At, c.Name, c.New)
		case Added:
			b.WriteString("added document")
		case Removed:
			b.WriteString("removed document")
		}
		return b.String()
	case ItemValue:
		fmt.Fprintf(&b, "%s %s %s: ", c.Kind, c.Role, c.Name)
	case ItemCheck:
		fmt.Fprintf(&b, "%s check %q: ", c.Kind, c.Name)
	case ItemFront:
		fmt.Fprintf(&b, "%s front matter %s: ", c.Kind, c.Name)
	}
	switch c.Kind {
	case Added:
		b.WriteString(c.New)
	case Removed:
		b.WriteString(c.Old)
	default:
		fmt.Fprintf(&b, "%s → %s", c.Old, c.New)
		if s := c.RelText(); s != "" {
			fmt.Fprintf(&b, " (%s)", s)
		}
	}
	return b.String()
}

// RelText is the relative change as text: "+25 %", "-20 %", "|Δ| 3 %"
// for a complex number; "" when there is none.
func (c Change) RelText() string {
	if !c.HasRel {
		return ""
	}
	if c.Magnitude {
		return "|Δ| " + num(100*c.Rel) + " %"
	}
	return fmt.Sprintf("%+.4g %%", 100*c.Rel)
}

// WriteText writes one line a change, each starting with its document's
// path, the documents in the order given.
func (r *Report) WriteText(w io.Writer) error {
	for _, d := range r.Docs {
		for _, c := range d.Changes {
			if _, err := fmt.Fprintf(w, "%s: %s\n", d.Path, c.Line()); err != nil {
				return err
			}
		}
	}
	return nil
}

// Textconv writes the values, checks and front matter of the document in
// the file at path as text, one a line, for git's textconv diff driver
// (git gives it a temporary file holding one revision). Used sheets and
// CSV tables that cannot be read from where the file stands are marked
// as not resolved. It never fails: a file it cannot read is said so in
// the text.
func Textconv(w io.Writer, path string) {
	src, err := os.ReadFile(path)
	if err != nil {
		fmt.Fprintf(w, "calcdoc: %s cannot be read: %v\n", path, err)
		return
	}
	d := calcdoc.NewLoader(kind.Standard(), path).Parse(path, src)
	s := Take(d)
	for _, f := range s.Front {
		if f.Value != "" {
			fmt.Fprintf(w, "front %s: %s\n", f.Key, f.Value)
		}
	}
	for _, u := range s.Unresolved {
		fmt.Fprintf(w, "%s: not resolved\n", u)
	}
	have := map[string]bool{}
	for _, v := range s.Values {
		have[v.Name] = true
		fmt.Fprintf(w, "%s %s = %s\n", v.Role, v.Name, v.Text)
	}
	for _, b := range d.Blocks {
		stmts, _ := b.Result.([]*calcdoc.Stmt)
		for _, st := range stmts {
			switch x := st.Stmt.(type) {
			case *expr.Use:
				if st.Use != nil && st.Use.Sheet == nil {
					for _, n := range x.Names {
						fmt.Fprintf(w, "input %s = not resolved (use from %s)\n", n.Local().Name, x.Path)
					}
				}
			case *expr.Assign:
				if st.Unavailable != nil {
					for _, id := range x.Names {
						if !have[id.Name] {
							fmt.Fprintf(w, "%s = not evaluated (it needs a value that is not resolved)\n", id.Name)
						}
					}
				}
			}
		}
	}
	for _, c := range s.Checks {
		fmt.Fprintf(w, "check %q: %s\n", c.Key, c.verdict())
	}
}
