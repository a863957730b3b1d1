package calcdoc

import (
	"bytes"
	"encoding/json"
	"math"

	"calcdoc/expr"
)

// ValuesJSON is the object `calcdoc values` prints (LANGUAGE.md section 8).
type ValuesJSON struct {
	File   string      `json:"file"`
	Values []ValueJSON `json:"values"`
	Checks []CheckJSON `json:"checks"`
	Errors []ErrorJSON `json:"errors"`
	// Sweeps holds every sweep with every point (valuesweep.go).
	Sweeps []SweepJSON `json:"sweeps"`
	// Uses lists each value taken from another document (uses.go).
	Uses []UseJSON `json:"uses"`
}

// UseJSON is one value a use statement takes: the file as written, the
// name there, the name here (as), the line of the use statement, and the
// SHA-256 of the used file's source.
type UseJSON struct {
	File   string `json:"file"`
	Name   string `json:"name"`
	As     string `json:"as"`
	Line   int    `json:"line"`
	SHA256 string `json:"sha256"`
}

// ValueJSON is one named value: re and im in coherent SI units, unit the
// coherent SI unit of its dimension (a power in the unit of its kind: W,
// var or VA), kind the power kind ("active", "reactive", "apparent") or
// null. For a vector or matrix, Re, Im, Unit and Kind are arrays of rows.
type ValueJSON struct {
	Name  string `json:"name"`
	Line  int    `json:"line"`
	Re    any    `json:"re"`
	Im    any    `json:"im"`
	Unit  any    `json:"unit"`
	Kind  any    `json:"kind"`
	Shown string `json:"shown"`
	// the sense of a power factor (valuesweep.go); absent on other values
	*SenseJSON
	// Cases, for a value with cases, stands in place of Re, Im and Shown
	// (MarshalJSON): one {re, im, shown} per case, in the document's order.
	Cases []CaseJSON `json:"-"`
}

// CheckJSON is one check; Pass is null when the check could not be evaluated.
type CheckJSON struct {
	Line int    `json:"line"`
	Text string `json:"text"`
	Pass *bool  `json:"pass"`
	// Cases, for a check with cases: each case's verdict (null where the
	// check does not apply or has none), in the document's order.
	Cases []CaseJSON `json:"-"`
}

// ErrorJSON is one error.
type ErrorJSON struct {
	Line    int    `json:"line"`
	Col     int    `json:"col"`
	Message string `json:"message"`
}

// jsonNum is a float for JSON: NaN and infinities, which JSON cannot
// hold, become null.
func jsonNum(x float64) any {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return x
}

// finiteCheck reports whether every side of a check is finite: a verdict
// is written only then, so that "pass" is never true or false beside a
// side that JSON would write as null (LANGUAGE.md section 4).
func finiteCheck(r *expr.CheckResult) bool {
	for _, s := range r.Values {
		if s == nil || !s.IsFinite() {
			return false
		}
	}
	return true
}

// SIUnit is the coherent SI unit of a dimension as the values JSON writes
// it: "V", "Ω", "W", or base units such as "kg·m²·s⁻³"; "" when
// dimensionless.
func SIUnit(d expr.Dim) string {
	if d.IsZero() {
		return ""
	}
	if u := expr.CoherentUnit(d); u != "" {
		return u
	}
	return d.SI()
}

// scalarUnit is the unit and kind the values JSON writes for s: a power
// in W, var or VA by its kind (IEEE 1459), its kind by name or null.
func scalarUnit(s *expr.Scalar) (string, any) {
	if s.Dim == expr.DimPower {
		if s.Kind == expr.PowerNone {
			return "W", nil
		}
		return s.Kind.Unit(), s.Kind.String()
	}
	return SIUnit(s.Dim), nil
}

// Values builds the values JSON of a document.
func (d *Document) ValuesJSON() *ValuesJSON {
	out := &ValuesJSON{File: d.Path, Values: []ValueJSON{}, Checks: []CheckJSON{}, Errors: []ErrorJSON{}}
	for _, v := range d.Values {
		vj := ValueJSON{Name: v.Name, Line: v.Pos.Line(), Shown: expr.FormatValue(v.Value, v.Display, d.Digits())}
		switch x := v.Value.(type) {
		case *expr.Scalar:
			vj.Re, vj.Im = jsonNum(real(x.Z)), jsonNum(imag(x.Z))
			vj.Unit, vj.Kind = scalarUnit(x)
		case *expr.Matrix:
			re, im, un, kd := make([][]any, x.Rows), make([][]any, x.Rows), make([][]string, x.Rows), make([][]any, x.Rows)
			for i := 0; i < x.Rows; i++ {
				for j := 0; j < x.Cols; j++ {
					e := x.At(i, j)
					re[i] = append(re[i], jsonNum(real(e.Z)))
					im[i] = append(im[i], jsonNum(imag(e.Z)))
					u, k := scalarUnit(&e)
					un[i] = append(un[i], u)
					kd[i] = append(kd[i], k)
				}
			}
			vj.Re, vj.Im, vj.Unit, vj.Kind = re, im, un, kd
		}
		vj.SenseJSON = valueSenseJSON(v.Value)
		vj.Cases = d.valueCasesJSON(v)
		out.Values = append(out.Values, vj)
	}
	for _, c := range d.Checks {
		cj := CheckJSON{Line: c.Pos.Line(), Text: c.Text}
		if c.Result != nil && finiteCheck(c.Result) && !c.noVerdict() {
			p := c.Result.Pass
			cj.Pass = &p
		}
		cj.Cases = d.checkCasesJSON(c)
		out.Checks = append(out.Checks, cj)
	}
	for _, e := range d.Errors {
		p := e.Pos.Position()
		out.Errors = append(out.Errors, ErrorJSON{Line: p.Line, Col: p.Col, Message: e.Msg})
	}
	out.Sweeps = d.SweepsJSON()
	out.Uses = []UseJSON{}
	for _, u := range d.Uses {
		sha := ""
		if u.Sheet != nil {
			sha = u.Sheet.SHA256
		}
		for _, b := range u.Names {
			out.Uses = append(out.Uses, UseJSON{File: u.Rel, Name: b.Name, As: b.Local, Line: u.Pos.Line(), SHA256: sha})
		}
	}
	return out
}

// MarshalValues writes the values JSON with two-space indentation and
// without HTML escaping, ending in a newline.
func (d *Document) MarshalValues() []byte {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	enc.Encode(d.ValuesJSON())
	return buf.Bytes()
}
