package expr

import (
	"fmt"
	"math/cmplx"
	"strings"
)

// Cases (LANGUAGE.md section 10). A value that depends on a case is kept
// as one value per case in its Binding (Binding.Cases); everything else
// is evaluated as it always was, once per case: the environment has a
// current case, a case literal gives that case's branch, and a name with
// cases gives that case's value and marks the evaluation as depending on
// a case (caseDep). An evaluation that did not touch a case value is done
// once; one that did is done again for every other case. So N cases cost
// about N times one case, and no operation, function, matrix or look-up
// needs to know about cases.

// Case returns the index of the case being evaluated.
func (e *Env) Case() int { return e.caseIdx }

// SetCase makes case k the one evaluated, and returns the previous one.
func (e *Env) SetCase(k int) int {
	prev := e.caseIdx
	e.caseIdx = k
	return prev
}

// ResetCaseDep clears the record that an evaluation read a value with
// cases, and returns what it was.
func (e *Env) ResetCaseDep() bool {
	d := e.caseDep
	e.caseDep = false
	return d
}

// SetCaseDep sets the record that an evaluation read a value with cases
// (to restore it after evaluating for each case).
func (e *Env) SetCaseDep(d bool) { e.caseDep = d }

// CaseDep reports whether an evaluation since the last ResetCaseDep read
// a value with cases (a case literal or a name with cases).
func (e *Env) CaseDep() bool { return e.caseDep }

// CaseIndex returns the index of a case name, or -1.
func (e *Env) CaseIndex(name string) int {
	for i, c := range e.Cases {
		if c == name {
			return i
		}
	}
	return -1
}

// bindingValue is a binding's value in the current case.
func (e *Env) bindingValue(b *Binding, pos Pos, name string) (Value, error) {
	if b.Cases == nil {
		return b.Value, nil
	}
	e.caseDep = true
	k := e.caseIdx
	if k >= len(b.Cases) {
		k = 0
	}
	v := b.Cases[k]
	if v == nil {
		return nil, &UnavailableError{Pos: pos, Name: name + " in case " + e.caseName(k), Def: b.Pos}
	}
	return v, nil
}

func (e *Env) caseName(k int) string {
	if k < len(e.Cases) {
		return e.Cases[k]
	}
	return fmt.Sprint(k + 1)
}

// caseLit checks a {case: value, ...} against the document's cases and
// evaluates the branch of the current case.
func (ev *evaluator) caseLit(n *CaseLit) (val, error) {
	e := ev.env
	if len(e.Cases) == 0 {
		return val{}, Errorf(n.P, "{…} gives a value per case, but this document has no cases: name them in the front matter, e.g. cases: [max, min]")
	}
	for _, id := range n.Names {
		if e.CaseIndex(id.Name) < 0 {
			return val{}, Errorf(id.P, "unknown case %q: the document's cases are %s", id.Name, strings.Join(e.Cases, ", "))
		}
	}
	var missing []string
	branch := -1
	for k, c := range e.Cases {
		found := -1
		for i, id := range n.Names {
			if id.Name == c {
				found = i
			}
		}
		if found < 0 {
			missing = append(missing, c)
		}
		if k == e.caseIdx {
			branch = found
		}
	}
	if len(missing) > 0 {
		return val{}, Errorf(n.P, "case %s is missing in {…}: every case of the document (%s) is given a value", strings.Join(missing, ", "), strings.Join(e.Cases, ", "))
	}
	e.caseDep = true
	return ev.eval(n.X[branch])
}

// CaseExtreme is what casemax or casemin chose: the case that governs.
type CaseExtreme struct {
	Case string
}

// caseExtreme evaluates casemax(x) or casemin(x): x in every case, the
// largest or smallest (by magnitude for a complex value). The result
// depends on no case.
func (ev *evaluator) caseExtreme(n *Call, max bool) (val, error) {
	name := n.Fun.Name
	if len(n.Args) != 1 {
		return val{}, Errorf(n.P, "%s takes 1 argument, not %d", name, len(n.Args))
	}
	e := ev.env
	if len(e.Cases) == 0 {
		return val{}, Errorf(n.P, "%s needs cases: name them in the front matter, e.g. cases: [max, min]", name)
	}
	prevCase, prevDep := e.caseIdx, e.caseDep
	defer func() { e.caseIdx, e.caseDep = prevCase, prevDep }()
	var best val
	found := false
	bestK := 0
	for k := range e.Cases {
		e.caseIdx = k
		v, err := ev.eval(n.Args[0])
		if err != nil {
			return val{}, err
		}
		if v.m != nil {
			return val{}, Errorf(n.Args[0].Pos(), "%s takes a single value, not %s", name, Describe(v.m))
		}
		s := &v.s
		if found {
			if _, ok := sumDim(&best.s, s); !ok {
				return val{}, Errorf(n.Args[0].Pos(), "%s: the cases differ in unit (%s and %s)", name, dimWord(best.s.Dim), dimWord(s.Dim))
			}
		}
		m := magnitude(s)
		if !found || (max && m > magnitude(&best.s)) || (!max && m < magnitude(&best.s)) {
			best, bestK, found = v, k, true
		}
	}
	if ev.trace != nil {
		m := ev.trace.extra()
		m.extremes = append(m.extremes, traceExtreme{n, e.Cases[bestK]})
	}
	return best, nil
}

func magnitude(s *Scalar) float64 {
	if s.IsReal() {
		return real(s.Z)
	}
	return cmplx.Abs(s.Z)
}

type traceExtreme struct {
	call *Call
	cas  string
}

// Governing lists, for each casemax or casemin of the expression, the
// case it chose, in the order they were met.
func (t *Trace) Governing() []string {
	if t == nil {
		return nil
	}
	var out []string
	if t.more == nil {
		return nil
	}
	for _, x := range t.more.extremes {
		out = append(out, fmt.Sprintf("%s: %s", x.call.Fun.Name, x.cas))
	}
	return out
}

// sameCaseKind reports why two case values of one name cannot stand
// together (a different dimension, power kind or angle mark), or "".
func sameCaseKind(a, b Value) string {
	sa, oka := scalarOf(a)
	sb, okb := scalarOf(b)
	if oka != okb {
		return fmt.Sprintf("%s and %s", shapeWord(a), shapeWord(b))
	}
	if !oka {
		ma, mb := a.(*Matrix), b.(*Matrix)
		if ma.Rows != mb.Rows || ma.Cols != mb.Cols {
			return fmt.Sprintf("%s and %s", shapeWord(a), shapeWord(b))
		}
		if len(ma.E) == 0 {
			return ""
		}
		sa, sb = &ma.E[0], &mb.E[0]
	}
	switch {
	case sa.Dim != sb.Dim:
		return fmt.Sprintf("units %s and %s", dimWord(sa.Dim), dimWord(sb.Dim))
	case sa.Kind != sb.Kind:
		return fmt.Sprintf("power kinds %s and %s", sa.Kind, sb.Kind)
	case sa.Angle != sb.Angle:
		return "an angle and a plain number"
	}
	return ""
}

// evalCases evaluates n for the first case, and, when it read a value
// with cases, for every other case too. cases is nil for a value that
// depends on no case. The trace records the first case.
func (e *Env) evalCases(n Node, trace *Trace) (v Value, cases []Value, err error) {
	prevCase, prevDep := e.caseIdx, e.caseDep
	defer func() { e.caseIdx, e.caseDep = prevCase, prevDep }()
	e.caseIdx, e.caseDep = 0, false
	v0, err0 := e.Eval(n, trace)
	if !e.caseDep || len(e.Cases) == 0 {
		return v0, nil, err0
	}
	// a case whose inputs have no value (a solve that failed in it) has
	// no value either; the other cases stand
	cases = make([]Value, len(e.Cases))
	var unavailable error
	first := -1
	for k := range e.Cases {
		x, err := v0, err0
		if k > 0 {
			e.caseIdx = k
			x, err = e.Eval(n, nil)
		}
		if err != nil {
			if _, ok := err.(*UnavailableError); ok {
				if unavailable == nil {
					unavailable = err
				}
				continue
			}
			return nil, nil, e.inCase(err, e.Cases[k])
		}
		if first >= 0 {
			if why := sameCaseKind(cases[first], x); why != "" {
				return nil, nil, Errorf(n.Pos(), "the cases of one value must share unit, power kind and angle mark: case %s and case %s give %s", e.Cases[first], e.Cases[k], why)
			}
		} else {
			first = k
		}
		cases[k] = x
	}
	if first < 0 {
		return nil, nil, unavailable
	}
	return cases[first], cases, nil
}

// inCase names the case an error happened in.
func (e *Env) inCase(err error, c string) error {
	if x, ok := err.(*Error); ok && x != e.Budget.Over() {
		y := *x
		y.Msg = "in case " + c + ": " + x.Msg
		return &y
	}
	return err
}

// checkDisplayCases is CheckDisplay for every case's value.
func checkDisplayCases(v Value, cases []Value, d *Display) error {
	if err := CheckDisplay(v, d); err != nil {
		return err
	}
	for _, c := range cases {
		if c == nil {
			continue
		}
		if err := CheckDisplay(c, d); err != nil {
			return err
		}
	}
	return nil
}

// execCheck evaluates a check: once when it depends on no case and names
// none, else in every case it applies to (LANGUAGE.md section 10).
func (e *Env) execCheck(s *Check, r *Result) {
	if len(s.In) > 0 && len(e.Cases) == 0 {
		r.Err = Errorf(s.In[0].P, "\"check in %s:\" names a case, but this document has no cases: name them in the front matter, e.g. cases: [max, min]", s.In[0].Name)
		return
	}
	applies := make([]bool, len(e.Cases))
	for _, id := range s.In {
		k := e.CaseIndex(id.Name)
		if k < 0 {
			r.Err = Errorf(id.P, "unknown case %q: the document's cases are %s", id.Name, strings.Join(e.Cases, ", "))
			return
		}
		applies[k] = true
	}
	if len(e.Cases) == 0 {
		r.Check, r.Err = e.EvalCheck(s.Cmp, r.Trace)
		return
	}
	if s.In == nil {
		for k := range applies {
			applies[k] = true
		}
	}
	prevCase, prevDep := e.caseIdx, e.caseDep
	defer func() { e.caseIdx, e.caseDep = prevCase, prevDep }()
	r.CaseChecks = make([]*CheckResult, len(e.Cases))
	r.CaseErrs = make([]error, len(e.Cases))
	first, dep := true, false
	for k := range e.Cases {
		if !applies[k] {
			continue
		}
		e.caseIdx, e.caseDep = k, false
		var tr *Trace
		if first {
			tr = r.Trace
		}
		c, err := e.EvalCheck(s.Cmp, tr)
		dep = dep || e.caseDep
		if first && !dep && s.In == nil {
			// a check on values with no cases: one verdict
			r.CaseChecks, r.CaseErrs = nil, nil
			r.Check, r.Err = c, err
			return
		}
		first = false
		r.CaseChecks[k] = c
		if err != nil {
			r.CaseErrs[k] = e.inCase(err, e.Cases[k])
		}
	}
	// the governing case: the highest utilisation, else the first that fails
	gov, pass, hard := -1, true, error(nil)
	for k, c := range r.CaseChecks {
		if r.CaseErrs[k] != nil {
			if _, unavailable := r.CaseErrs[k].(*UnavailableError); !unavailable && hard == nil {
				hard = r.CaseErrs[k]
			}
			continue
		}
		if c == nil {
			continue
		}
		pass = pass && c.Pass
		if gov < 0 {
			gov = k
			continue
		}
		g := r.CaseChecks[gov]
		switch {
		case c.HasUtil && g.HasUtil && c.Utilisation > g.Utilisation:
			gov = k
		case !c.HasUtil && g.Pass && !c.Pass:
			gov = k
		}
	}
	if hard != nil {
		r.Err = hard
		return
	}
	if gov < 0 {
		// no case gave a verdict: the first case's error stands
		for _, err := range r.CaseErrs {
			if err != nil {
				r.Err = err
				return
			}
		}
		return
	}
	g := *r.CaseChecks[gov]
	g.Pass = pass
	r.Check = &g
	r.Governing = e.Cases[gov]
}

// EvalCases evaluates n in every case when it depends on one: v is the
// first case's value and cases the value in each case (nil when n depends
// on no case). An error in one case names the case.
func (e *Env) EvalCases(n Node, trace *Trace) (v Value, cases []Value, err error) {
	return e.evalCases(n, trace)
}
