package calcdoc

import (
	"bytes"
	"fmt"
	"regexp"
	"sync"
	"time"
	"unicode/utf8"

	"calcdoc/expr"

	"go.yaml.in/yaml/v3"
)

// Revision is one row of the revision history.
type Revision struct {
	Rev  string `yaml:"rev"`
	Date string `yaml:"date"` // YYYY-MM-DD (ValidDate)
	By   string `yaml:"by"`
	Note string `yaml:"note"`
}

// TitleBlock is the title block of a sheet (read from its front matter) or
// of a calculation package (read from its package file): the one type
// both are kept in. The YAML names are the keys of both files.
type TitleBlock struct {
	Title    string `yaml:"title"`
	Project  string `yaml:"project"`
	Client   string `yaml:"client"`
	Number   string `yaml:"number"`
	Revision string `yaml:"revision"`
	Date     string `yaml:"date"` // YYYY-MM-DD (ValidDate)
	Prepared string `yaml:"prepared"`
	Checked  string `yaml:"checked"`
	Approved string `yaml:"approved"`
	// Paper is "a4" or "letter" ("" is a4).
	Paper     string     `yaml:"paper"`
	Revisions []Revision `yaml:"revisions"`
}

// FrontMatter holds the keys of a document's front matter (LANGUAGE.md
// section 1): the title block and how values are shown.
type FrontMatter struct {
	TitleBlock
	Digits  int             // significant figures shown, 2 to 12
	Phasors string          // "rms" or "peak"
	Units   *expr.Preferred // preferred display units, or nil
	Present bool            // the document has front matter
	// Cases names the document's cases (LANGUAGE.md section 10), or nil.
	Cases []string
}

// DefaultDigits is the number of significant figures shown when the front
// matter does not say.
const DefaultDigits = 4

var dateRE = sync.OnceValue(func() *regexp.Regexp { return regexp.MustCompile(`^\d{4}-\d{2}-\d{2}$`) })

// splitFrontMatter finds the front matter: the first line is "---" and
// the block ends at the next line that is "---" (or "..."). It returns the
// YAML text, the number of lines it spans (fences included) and whether
// it was closed.
func splitFrontMatter(src []byte) (yamlText []byte, lines int, ok bool) {
	if !bytes.HasPrefix(src, []byte("---\n")) && !bytes.HasPrefix(src, []byte("---\r\n")) {
		return nil, 0, false
	}
	rest := src[bytes.IndexByte(src, '\n')+1:]
	n := 1
	off := 0
	for off <= len(rest) {
		end := bytes.IndexByte(rest[off:], '\n')
		var line []byte
		if end < 0 {
			line = rest[off:]
		} else {
			line = rest[off : off+end]
		}
		n++
		l := bytes.TrimRight(line, "\r \t")
		if string(l) == "---" || string(l) == "..." {
			return rest[:off], n, true
		}
		if end < 0 {
			break
		}
		off += end + 1
	}
	return nil, n, false
}

// yamlPos converts a position of the YAML parser in the front matter's
// text (line and column from 1; a YAML line ends at \r\n, \r, \n, NEL, LS
// or PS, and a column counts characters) into the position in the .md
// file (whose lines end at \n only), where the text starts at base. A
// column past the end of its line is taken as the end of the line.
func yamlPos(text []byte, base expr.Pos, line, col int) expr.Pos {
	off := 0
	for l := 1; l < line && off < len(text); {
		if n := yamlBreak(text, off); n > 0 {
			off += n
			l++
		} else {
			_, w := utf8.DecodeRune(text[off:])
			off += w
		}
	}
	for c := 1; c < col && off < len(text) && yamlBreak(text, off) == 0; c++ {
		_, w := utf8.DecodeRune(text[off:])
		off += w
	}
	return base.Add(off)
}

// yamlBreak returns the length in bytes of the YAML line break at text[i],
// or 0.
func yamlBreak(text []byte, i int) int {
	switch b := text[i:]; {
	case bytes.HasPrefix(b, []byte("\r\n")):
		return 2
	case b[0] == '\r' || b[0] == '\n':
		return 1
	case bytes.HasPrefix(b, []byte("\u0085")):
		return 2
	case bytes.HasPrefix(b, []byte("\u2028")) || bytes.HasPrefix(b, []byte("\u2029")):
		return 3
	}
	return 0
}

// parseFrontMatter reads the YAML of the front matter, which stands in the
// .md file at base (the start of line 2); its errors are at positions of
// the file.
func parseFrontMatter(text []byte, base expr.Pos, fm *FrontMatter, errs, warns *expr.ErrorList) {
	fm.Present = true
	var root yaml.Node
	if err := yaml.Unmarshal(text, &root); err != nil {
		errs.Add(base, "front matter is not valid YAML: "+err.Error())
		return
	}
	if len(root.Content) == 0 {
		return
	}
	m := root.Content[0]
	if m.Kind != yaml.MappingNode {
		errs.Add(yamlPos(text, base, m.Line, m.Column), "front matter must be a list of key: value lines")
		return
	}
	pos := func(n *yaml.Node) expr.Pos { return yamlPos(text, base, n.Line, n.Column) }
	str := func(k, v *yaml.Node) string {
		if v.Kind != yaml.ScalarNode {
			errs.Add(pos(v), fmt.Sprintf("front matter key %q needs a single value", k.Value))
			return ""
		}
		return v.Value
	}
	seen := map[string]bool{}
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := m.Content[i], m.Content[i+1]
		if seen[k.Value] {
			errs.Add(pos(k), fmt.Sprintf("front matter key %q is given twice", k.Value))
			continue
		}
		seen[k.Value] = true
		switch k.Value {
		case "title":
			fm.Title = str(k, v)
		case "project":
			fm.Project = str(k, v)
		case "number":
			fm.Number = str(k, v)
		case "revision":
			fm.Revision = str(k, v)
		case "prepared":
			fm.Prepared = str(k, v)
		case "checked":
			fm.Checked = str(k, v)
		case "approved":
			fm.Approved = str(k, v)
		case "client":
			fm.Client = str(k, v)
		case "date":
			fm.Date = str(k, v)
			if fm.Date != "" && !ValidDate(fm.Date) {
				errs.Add(pos(v), fmt.Sprintf("front matter key \"date\": %q is not a date written YYYY-MM-DD", fm.Date))
			}
		case "digits":
			s := str(k, v)
			var d int
			if _, err := fmt.Sscanf(s, "%d", &d); err != nil || fmt.Sprint(d) != s || d < 2 || d > 12 {
				errs.Add(pos(v), fmt.Sprintf("front matter key \"digits\": %q is not a whole number from 2 to 12", s))
			} else {
				fm.Digits = d
			}
		case "phasors":
			s := str(k, v)
			if s != "rms" && s != "peak" {
				errs.Add(pos(v), fmt.Sprintf("front matter key \"phasors\": %q must be rms or peak", s))
			} else {
				fm.Phasors = s
			}
		case "paper":
			s := str(k, v)
			if s != "a4" && s != "letter" {
				errs.Add(pos(v), fmt.Sprintf("front matter key \"paper\": %q must be a4 or letter", s))
			} else {
				fm.Paper = s
			}
		case "units":
			parseUnits(v, fm, errs, pos)
		case "cases":
			parseCases(v, fm, errs, pos)
		case "revisions":
			if v.Kind != yaml.SequenceNode {
				errs.Add(pos(v), "front matter key \"revisions\" must be a list of {rev, date, by, note}")
				continue
			}
			for _, item := range v.Content {
				if item.Kind != yaml.MappingNode {
					errs.Add(pos(item), "each revision must be {rev, date, by, note}")
					continue
				}
				var r Revision
				for j := 0; j+1 < len(item.Content); j += 2 {
					rk, rv := item.Content[j], item.Content[j+1]
					val := str(rk, rv)
					switch rk.Value {
					case "rev":
						r.Rev = val
					case "date":
						r.Date = val
						if val != "" && !ValidDate(val) {
							errs.Add(pos(rv), fmt.Sprintf("revision date %q is not a date written YYYY-MM-DD", val))
						}
					case "by":
						r.By = val
					case "note":
						r.Note = val
					default:
						warns.Add(pos(rk), fmt.Sprintf("unknown revision key %q (known: rev, date, by, note)", rk.Value))
					}
				}
				fm.Revisions = append(fm.Revisions, r)
			}
		default:
			warns.Add(pos(k), fmt.Sprintf("unknown front matter key %q (known: title, project, number, revision, prepared, checked, approved, date, client, revisions, digits, phasors, paper, units, cases)", k.Value))
		}
	}
}

// ValidDate reports whether s is a date written YYYY-MM-DD that exists in
// the calendar (time.Parse's reading of the layout 2006-01-02).
func ValidDate(s string) bool {
	if !dateRE().MatchString(s) {
		return false
	}
	_, err := time.Parse("2006-01-02", s)
	return err == nil
}

// parseUnits reads the key units: a list of preferred display units, at
// most one for each dimension and power kind.
func parseUnits(v *yaml.Node, fm *FrontMatter, errs *expr.ErrorList, pos func(*yaml.Node) expr.Pos) {
	if v.Kind != yaml.SequenceNode {
		errs.Add(pos(v), "front matter key \"units\" must be a list of units, e.g. [mΩ, kA, kV, kVA, kvar]")
		return
	}
	var list []string
	for _, item := range v.Content {
		if item.Kind != yaml.ScalarNode {
			errs.Add(pos(item), "front matter key \"units\": each entry must be one unit, e.g. kA")
			return
		}
		list = append(list, item.Value)
	}
	p, bad, err := expr.NewPreferred(list)
	if err != nil {
		errs.Add(pos(v.Content[bad]), "front matter key \"units\": "+err.Error())
		return
	}
	fm.Units = p
}

// caseNameRE is what a case name may be: a letter, then letters, digits
// and underscores.
var caseNameRE = sync.OnceValue(func() *regexp.Regexp { return regexp.MustCompile(`^\pL[\pL\pN_]*$`) })

// parseCases reads "cases: [max, min]": two or more names, each once.
func parseCases(v *yaml.Node, fm *FrontMatter, errs *expr.ErrorList, pos func(*yaml.Node) expr.Pos) {
	if v.Kind != yaml.SequenceNode || len(v.Content) < 2 {
		errs.Add(pos(v), "front matter key \"cases\" must be a list of two or more case names, e.g. cases: [max, min]")
		return
	}
	seen := map[string]bool{}
	var names []string
	for _, item := range v.Content {
		if item.Kind != yaml.ScalarNode || !caseNameRE().MatchString(item.Value) {
			errs.Add(pos(item), fmt.Sprintf("case name %q must be a name: a letter, then letters, digits or _", item.Value))
			return
		}
		if seen[item.Value] {
			errs.Add(pos(item), fmt.Sprintf("case %q is listed twice in \"cases\": each case is named once", item.Value))
			return
		}
		seen[item.Value] = true
		names = append(names, item.Value)
	}
	fm.Cases = names
}
