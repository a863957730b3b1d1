// Package diff compares calculation documents at two git revisions
// (LANGUAGE.md section 12, "What changed"): each document is read at both
// revisions straight from git, with the sheets it uses and the CSV tables
// it reads at the same revision, evaluated, and its values, checks and
// front matter matched.
package diff

import (
	"fmt"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// Roles of a value.
const (
	Input  = "input"  // a literal, a used value, a table row or look-up
	Result = "result" // anything worked out from other names
)

// Value is one named value of a document at a revision.
type Value struct {
	Name  string
	Role  string
	Value expr.Value
	Text  string // as the sheet shows it
	// Case is the case of a value with cases (one Value per case), else "".
	Case string
}

// key is what a value is matched by between the revisions: its name and case.
func (v Value) key() string { return v.Name + "\x00" + v.Case }

// Check is one check of a document at a revision.
type Check struct {
	Key       string // the line's description, or its text
	Evaluated bool
	Pass      bool
	Util      float64
	HasUtil   bool
	// Case is the case of a check with cases (one Check per case it
	// applies to), else "".
	Case string
}

// Field is one front-matter key with its value.
type Field struct {
	Key, Value string
}

// Snapshot is what diff compares of one document at one revision.
type Snapshot struct {
	Missing bool     // the file is not at the revision
	Blocks  int      // the evaluated blocks it holds
	Errors  []string // the document does not evaluate: its errors
	Values  []Value  // in document order
	Checks  []Check  // in document order
	Front   []Field
	// Unresolved are the used sheets and CSV tables that could not be
	// read (textconv), as "use PATH" and "table PATH".
	Unresolved []string
}

// Take makes the snapshot of an evaluated document.
func Take(d *calcdoc.Document) *Snapshot {
	s := &Snapshot{Blocks: len(d.Blocks)}
	for _, e := range d.Errors {
		s.Errors = append(s.Errors, e.Report(""))
	}
	roles, descs := classify(d)
	digits := d.Digits()
	for _, v := range d.Values {
		role := roles[v.Name]
		if role == "" {
			role = Result
		}
		if v.Cases != nil {
			// a value with cases is compared case by case
			for k, c := range d.Front.Cases {
				if k < len(v.Cases) && v.Cases[k] != nil {
					s.Values = append(s.Values, Value{Name: v.Name, Role: role, Value: v.Cases[k], Text: expr.FormatValue(v.Cases[k], v.Display, digits), Case: c})
				}
			}
			continue
		}
		s.Values = append(s.Values, Value{Name: v.Name, Role: role, Value: v.Value, Text: expr.FormatValue(v.Value, v.Display, digits)})
	}
	for _, c := range d.Checks {
		k := descs[c.Pos.Off]
		if k == "" {
			k = strings.Join(strings.Fields(c.Text), " ")
		}
		if c.Cases != nil {
			// a check with cases is compared case by case
			for i, name := range d.Front.Cases {
				r := c.Cases[i]
				nv := i < len(c.NoVerdict) && c.NoVerdict[i]
				if r == nil && !nv {
					continue // the check does not apply in this case
				}
				ck := Check{Key: k, Case: name}
				if r != nil {
					ck.Evaluated, ck.Pass, ck.Util, ck.HasUtil = true, r.Pass, r.Utilisation, r.HasUtil
				}
				s.Checks = append(s.Checks, ck)
			}
			continue
		}
		ck := Check{Key: k}
		if c.Result != nil {
			ck.Evaluated, ck.Pass, ck.Util, ck.HasUtil = true, c.Result.Pass, c.Result.Utilisation, c.Result.HasUtil
		}
		s.Checks = append(s.Checks, ck)
	}
	f := d.Front
	for _, kv := range [][2]string{
		{"title", f.Title}, {"project", f.Project}, {"client", f.Client}, {"number", f.Number},
		{"revision", f.Revision}, {"date", f.Date}, {"prepared", f.Prepared}, {"checked", f.Checked}, {"approved", f.Approved},
	} {
		s.Front = append(s.Front, Field{kv[0], kv[1]})
	}
	for _, r := range f.Revisions {
		s.Front = append(s.Front, Field{"revisions " + r.Rev, strings.TrimSpace(strings.Join([]string{r.Date, r.By, r.Note}, " "))})
	}
	for _, u := range d.Uses {
		if u.Sheet == nil {
			s.Unresolved = append(s.Unresolved, "use "+u.Rel)
		}
	}
	for _, f := range d.DataFiles {
		if f.Err != "" {
			s.Unresolved = append(s.Unresolved, "table "+f.Path)
		}
	}
	return s
}

// classify tells inputs from results: a name a use statement defines, a
// line whose expression names no value (a literal), and a line that looks
// up a table are inputs. descs are the checks' descriptions by offset.
func classify(d *calcdoc.Document) (roles map[string]string, descs map[int]string) {
	roles, descs = map[string]string{}, map[int]string{}
	for _, b := range d.Blocks {
		stmts, ok := b.Result.([]*calcdoc.Stmt)
		if !ok {
			continue
		}
		for _, st := range stmts {
			if st.Use != nil {
				for _, n := range st.Use.Names {
					roles[n.Local] = Input
				}
				continue
			}
			switch s := st.Stmt.(type) {
			case *expr.Check:
				descs[s.Pos().Off] = strings.TrimSpace(s.Desc())
			case *expr.Assign:
				role := Result
				if st.Res != nil && st.Res.Trace != nil && len(st.Res.Trace.Lookups()) > 0 || literal(s.X) {
					role = Input
				}
				for _, id := range s.Names {
					roles[id.Name] = role
				}
			}
		}
	}
	return roles, descs
}

// literal reports whether x names no value: numbers, units and built-in
// constants and functions only.
func literal(x expr.Node) bool {
	lit := true
	expr.Walk(x, func(n expr.Node) bool {
		if id, ok := n.(*expr.Ident); ok && !expr.IsBuiltin(id.Name) {
			lit = false
		}
		return lit
	})
	return lit
}

// verdict is a check's outcome as the output shows it.
func (c Check) verdict() string {
	v := "not evaluated"
	if c.Evaluated {
		v = "fails"
		if c.Pass {
			v = "holds"
		}
	}
	if c.HasUtil {
		v += fmt.Sprintf(", utilisation %s %%", num(100*c.Util))
	}
	return v
}

// num formats a number for a line: four significant figures.
func num(x float64) string {
	return fmt.Sprintf("%.4g", x)
}
