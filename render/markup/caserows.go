package markup

import (
	"strings"

	"calcdoc/expr"
)

// Rows of values and checks with cases (LANGUAGE.md section 10): one
// result line per case, marked with the case's name; a check's sides and
// verdict per case and the governing case.

// caseTag marks a line with its case.
func caseTag(name string) string {
	return "<span class=\"case\">" + Esc(name) + "</span>"
}

// caseResults writes one result line per case.
func (w *Writer) caseResults(name string, cases []expr.Value, disp *expr.Display) {
	for k, c := range w.Doc.Front.Cases {
		if k >= len(cases) {
			break
		}
		v := cases[k]
		if v == nil {
			w.Printf("<div class=\"r\" data-case=\"%s\">%s<span class=\"verdict none\">no value in this case</span></div>", Esc(c), caseTag(c))
			continue
		}
		w.Printf("<div data-value=\"%s\" data-case=\"%s\">%s%s</div>", Esc(name), Esc(c), caseTag(c), Math("<mo>=</mo>"+ValueML(v, disp, w.Digits(), false)+SenseML(v)))
	}
}

// governingNote names the case each casemax or casemin chose.
func (w *Writer) governingNote(tr *expr.Trace) {
	if g := tr.Governing(); len(g) > 0 {
		w.Printf("<div class=\"note\">governing case: %s</div>", Esc(strings.Join(g, "; ")))
	}
}

// caseChecks writes a check's sides and verdict in each case it applies
// to, and the governing case.
func (w *Writer) caseChecks(res *expr.Result, cmp *expr.Compare, line int) {
	disp := checkDisplay(w, cmp)
	for k, name := range w.Doc.Front.Cases {
		if k >= len(res.CaseChecks) {
			break
		}
		c := res.CaseChecks[k]
		if err := res.CaseErrs[k]; err != nil {
			w.Printf("<div class=\"s\" data-check=\"%d\" data-case=\"%s\">%s<span class=\"verdict none\">no verdict</span> <span class=\"tol\">%s</span></div>", line, Esc(name), caseTag(name), Esc(errText(err)))
			continue
		}
		if c == nil {
			continue // the check does not apply in this case
		}
		dg := CheckRowDigits(c.Values, cmp.Ops, disp, w.Digits())
		var parts []string
		for i, v := range c.Values {
			if i > 0 {
				parts = append(parts, "<mo>"+OpML[cmp.Ops[i-1]]+"</mo>")
			}
			parts = append(parts, ValueML(v, disp, dg, false))
		}
		parts = WithSense(parts, c.Values)
		verdict := "<span class=\"verdict pass\">satisfied</span>"
		if !c.Pass {
			verdict = "<span class=\"verdict fail\">NOT SATISFIED</span>"
		}
		util := ""
		if c.HasUtil {
			util = "<span class=\"util\">utilisation " + Esc(percent(c.Utilisation)) + " of the limit</span>"
		}
		w.Printf("<div class=\"s\" data-check=\"%d\" data-case=\"%s\">%s%s%s%s</div>", line, Esc(name), caseTag(name), Math(strings.Join(parts, "")), verdict, util)
	}
	if res.Governing != "" {
		w.Printf("<div class=\"note\">governing case: %s</div>", Esc(res.Governing))
	}
}

// errText is an error's message without its position.
func errText(err error) string {
	switch e := err.(type) {
	case *expr.Error:
		return e.Msg
	case *expr.UnavailableError:
		return e.Error()
	}
	return err.Error()
}
