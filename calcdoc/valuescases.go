package calcdoc

import (
	"bytes"
	"encoding/json"

	"calcdoc/expr"
)

// CaseJSON is one case's entry of a value or a check with cases
// (LANGUAGE.md section 10): the case's name and what the case gives.
type CaseJSON struct {
	Case string
	Data any
}

// caseValueJSON is a value's entry for one case.
type caseValueJSON struct {
	Re    any    `json:"re"`
	Im    any    `json:"im"`
	Shown string `json:"shown"`
}

// valueCasesJSON gives each case's {re, im, shown} of a value with cases,
// or nil.
func (d *Document) valueCasesJSON(v *NamedValue) []CaseJSON {
	if v.Cases == nil {
		return nil
	}
	var out []CaseJSON
	for k, c := range d.Front.Cases {
		var e any // null: the value could not be had in this case
		if k < len(v.Cases) && v.Cases[k] != nil {
			cv := caseValueJSON{Shown: expr.FormatValue(v.Cases[k], v.Display, d.Digits())}
			switch x := v.Cases[k].(type) {
			case *expr.Scalar:
				cv.Re, cv.Im = jsonNum(real(x.Z)), jsonNum(imag(x.Z))
			case *expr.Matrix:
				re, im := make([][]any, x.Rows), make([][]any, x.Rows)
				for i := 0; i < x.Rows; i++ {
					for j := 0; j < x.Cols; j++ {
						s := x.At(i, j)
						re[i] = append(re[i], jsonNum(real(s.Z)))
						im[i] = append(im[i], jsonNum(imag(s.Z)))
					}
				}
				cv.Re, cv.Im = re, im
			}
			e = cv
		}
		out = append(out, CaseJSON{Case: c, Data: e})
	}
	return out
}

// checkCasesJSON gives each case's verdict of a check with cases, or nil.
func (d *Document) checkCasesJSON(c *CheckRecord) []CaseJSON {
	if c.Cases == nil {
		return nil
	}
	var out []CaseJSON
	for k, name := range d.Front.Cases {
		var e any
		if k < len(c.Cases) && c.Cases[k] != nil && finiteCheck(c.Cases[k]) {
			e = c.Cases[k].Pass
		}
		if k < len(c.Cases) && c.Cases[k] == nil && (k >= len(c.NoVerdict) || !c.NoVerdict[k]) {
			continue // the check does not apply in this case
		}
		out = append(out, CaseJSON{Case: name, Data: e})
	}
	return out
}

// casesObject writes cases as one JSON object in the given order.
func casesObject(cases []CaseJSON) (json.RawMessage, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, c := range cases {
		if i > 0 {
			b.WriteByte(',')
		}
		k, _ := marshalRaw(c.Case)
		b.Write(k)
		b.WriteByte(':')
		v, err := marshalRaw(c.Data)
		if err != nil {
			return nil, err
		}
		b.Write(v)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// MarshalJSON writes a value; one with cases has "cases" in place of
// "re", "im" and "shown".
func (v ValueJSON) MarshalJSON() ([]byte, error) {
	type plain ValueJSON
	if v.Cases == nil {
		return marshalRaw(plain(v))
	}
	cases, err := casesObject(v.Cases)
	if err != nil {
		return nil, err
	}
	return marshalRaw(struct {
		Name  string          `json:"name"`
		Line  int             `json:"line"`
		Cases json.RawMessage `json:"cases"`
		Unit  any             `json:"unit"`
		Kind  any             `json:"kind"`
		*SenseJSON
	}{v.Name, v.Line, cases, v.Unit, v.Kind, v.SenseJSON})
}

// MarshalJSON writes a check; one with cases adds "cases" with each
// case's verdict.
func (c CheckJSON) MarshalJSON() ([]byte, error) {
	type plain CheckJSON
	if c.Cases == nil {
		return marshalRaw(plain(c))
	}
	cases, err := casesObject(c.Cases)
	if err != nil {
		return nil, err
	}
	return marshalRaw(struct {
		plain
		Cases json.RawMessage `json:"cases"`
	}{plain(c), cases})
}

// marshalRaw is json.Marshal without escaping <, > and &, as the values
// JSON is written (MarshalValues).
func marshalRaw(v any) ([]byte, error) {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return bytes.TrimRight(b.Bytes(), "\n"), nil
}

// CaseCheckCounts counts, for each of the document's cases, the checks
// that hold in it, those that do not, and those with no verdict there
// (a check on values with no cases counts in every case; a check in some
// cases only, in those). It is nil for a document with no cases.
func (d *Document) CaseCheckCounts() (held, failed, notEvaluated []int) {
	n := len(d.Front.Cases)
	if n == 0 {
		return nil, nil, nil
	}
	held, failed, notEvaluated = make([]int, n), make([]int, n), make([]int, n)
	for _, c := range d.Checks {
		for k := 0; k < n; k++ {
			r := c.Result
			if c.Cases != nil {
				r = c.Cases[k]
				if r == nil {
					if k < len(c.NoVerdict) && c.NoVerdict[k] {
						notEvaluated[k]++
					}
					continue
				}
			}
			switch {
			case r == nil:
				notEvaluated[k]++
			case r.Pass:
				held[k]++
			default:
				failed[k]++
			}
		}
	}
	return held, failed, notEvaluated
}

// FailedCases names the cases in which a check with cases does not hold.
func (c *CheckRecord) FailedCases(cases []string) []string {
	var out []string
	for k, r := range c.Cases {
		if r != nil && !r.Pass && k < len(cases) {
			out = append(out, cases[k])
		}
	}
	return out
}

// noVerdict reports whether a check with cases has no verdict in a case
// it applies to: then it has none as a whole ("pass" is null).
func (c *CheckRecord) noVerdict() bool {
	for _, nv := range c.NoVerdict {
		if nv {
			return true
		}
	}
	return false
}
