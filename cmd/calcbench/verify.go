package main

import (
	"encoding/json"
	"fmt"
	"html"
	"math"
	"math/cmplx"
	"regexp"
	"strconv"
	"strings"
)

// Result is one named value or check outcome as a program reported it.
type Result struct {
	Name string
	Z    complex128 // in coherent SI units
}

// Outcome is what one program computed: its values in order, and whether
// each check holds, in order.
type Outcome struct {
	Values []Result
	Checks []bool
}

// valuesDoc is the part of `calcdoc values` JSON that the comparison
// reads (LANGUAGE.md section 8). Re and Im are null for a value that is
// not finite.
type valuesDoc struct {
	Values []struct {
		Name string   `json:"name"`
		Re   *float64 `json:"re"`
		Im   *float64 `json:"im"`
	} `json:"values"`
	Checks []struct {
		Line int    `json:"line"`
		Text string `json:"text"`
		Pass *bool  `json:"pass"`
	} `json:"checks"`
	Errors []struct {
		Line    int    `json:"line"`
		Col     int    `json:"col"`
		Message string `json:"message"`
	} `json:"errors"`
}

// ParseValuesJSON reads the output of `calcdoc values`. A document with
// errors, a value that is not a finite scalar, or a check that could not
// be evaluated is an error: the comparison needs every value.
func ParseValuesJSON(data []byte) (*Outcome, error) {
	var v valuesDoc
	if err := json.Unmarshal(data, &v); err != nil {
		return nil, fmt.Errorf("calcdoc values: %v", err)
	}
	if len(v.Errors) > 0 {
		e := v.Errors[0]
		return nil, fmt.Errorf("calcdoc values: %d errors, the first at line %d col %d: %s", len(v.Errors), e.Line, e.Col, e.Message)
	}
	out := &Outcome{}
	for _, x := range v.Values {
		if x.Re == nil || x.Im == nil {
			return nil, fmt.Errorf("calcdoc values: %s is not a finite scalar", x.Name)
		}
		out.Values = append(out.Values, Result{x.Name, complex(*x.Re, *x.Im)})
	}
	for _, c := range v.Checks {
		if c.Pass == nil {
			return nil, fmt.Errorf("calcdoc values: the check at line %d (%s) could not be evaluated", c.Line, c.Text)
		}
		out.Checks = append(out.Checks, *c.Pass)
	}
	return out, nil
}

var (
	valueRow = regexp.MustCompile(`<tr class="v"><td>([^<]*)</td><td>[^<]*</td><td>[^<]*</td><td>([^<]*)</td><td>([^<]*)</td></tr>`)
	checkRow = regexp.MustCompile(`<tr class="c"><td>[^<]*</td><td>(holds|FAILS)</td></tr>`)
)

// ParseScriptHTML reads the HTML table the Python script writes: one row
// per value with its real and imaginary parts in SI units (Python's repr
// of a float, which reads back exactly), one row per check.
func ParseScriptHTML(data []byte) (*Outcome, error) {
	out := &Outcome{}
	for _, m := range valueRow.FindAllSubmatch(data, -1) {
		name := html.UnescapeString(string(m[1]))
		re, err1 := strconv.ParseFloat(string(m[2]), 64)
		im, err2 := strconv.ParseFloat(string(m[3]), 64)
		if err1 != nil || err2 != nil || math.IsNaN(re) || math.IsNaN(im) || math.IsInf(re, 0) || math.IsInf(im, 0) {
			return nil, fmt.Errorf("script output: %s is not a finite number (%s, %s)", name, m[2], m[3])
		}
		out.Values = append(out.Values, Result{name, complex(re, im)})
	}
	for _, m := range checkRow.FindAllSubmatch(data, -1) {
		out.Checks = append(out.Checks, string(m[1]) == "holds")
	}
	if len(out.Values) == 0 {
		return nil, fmt.Errorf("script output: no values in the table")
	}
	return out, nil
}

// Tolerance is the largest difference allowed between the two programs'
// values, relative to the larger magnitude: |a − b| ≤ Tolerance·max(|a|, |b|).
// Both work in IEEE double precision; the statements differ only in the
// order of a few roundings (0.727 Ω/km as 0.727e-3 Ω/m against
// 0.727/1000), and the ladder's two LU solves agree to about κ·ε.
const Tolerance = 1e-9

// Compare reports how calcdoc's outcome c and the script's outcome p
// differ: a list of differences (at most max of them, then a count), empty
// when they hold the same names in the same order, the same values within
// Tolerance, and the same check results.
func Compare(c, p *Outcome, max int) []string {
	var diffs []string
	more := 0
	add := func(format string, args ...any) {
		if len(diffs) < max {
			diffs = append(diffs, fmt.Sprintf(format, args...))
		} else {
			more++
		}
	}
	if len(c.Values) != len(p.Values) {
		add("calcdoc has %d values, the script %d", len(c.Values), len(p.Values))
	}
	for i := 0; i < len(c.Values) && i < len(p.Values); i++ {
		a, b := c.Values[i], p.Values[i]
		if a.Name != b.Name {
			add("value %d: calcdoc names %s, the script %s", i+1, a.Name, b.Name)
			continue
		}
		if !Close(a.Z, b.Z) {
			add("%s: calcdoc %v, the script %v (relative difference %.3g)", a.Name, a.Z, b.Z, relDiff(a.Z, b.Z))
		}
	}
	if len(c.Checks) != len(p.Checks) {
		add("calcdoc has %d checks, the script %d", len(c.Checks), len(p.Checks))
	}
	for i := 0; i < len(c.Checks) && i < len(p.Checks); i++ {
		if c.Checks[i] != p.Checks[i] {
			add("check %d: calcdoc says %v, the script %v", i+1, c.Checks[i], p.Checks[i])
		}
	}
	if more > 0 {
		diffs = append(diffs, fmt.Sprintf("and %d more differences", more))
	}
	return diffs
}

// Close reports whether |a − b| ≤ Tolerance·max(|a|, |b|); two zeros are
// close.
func Close(a, b complex128) bool {
	return cmplx.Abs(a-b) <= Tolerance*math.Max(cmplx.Abs(a), cmplx.Abs(b))
}

func relDiff(a, b complex128) float64 {
	m := math.Max(cmplx.Abs(a), cmplx.Abs(b))
	if m == 0 {
		return 0
	}
	return cmplx.Abs(a-b) / m
}

// pick returns a few of the outcome's values, by name, for the report.
func pick(o *Outcome, names ...string) string {
	var parts []string
	for _, n := range names {
		for _, v := range o.Values {
			if v.Name == n {
				parts = append(parts, fmt.Sprintf("%s = %.10g%+.10gi", n, real(v.Z), imag(v.Z)))
			}
		}
	}
	return strings.Join(parts, ", ")
}
