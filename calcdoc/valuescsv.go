package calcdoc

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"calcdoc/expr"
)

// The CSV that `calcdoc values --csv` writes (LANGUAGE.md section 8, the
// README's "values as CSV"): RFC 4180 (fields quoted where they hold a
// comma, a quote or a line break, records ending in CRLF), UTF-8 without a
// byte-order mark, one header row. Numbers are in coherent SI units and
// written with the fewest digits that read back to the same float64
// (strconv 'g', -1), so a reader gets exactly the values calcdoc computed;
// a field for a number that has no value (a sweep's gap) is empty.

// csvNum writes x in full precision; "" when it is not finite.
func csvNum(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// ValuesCSVHeader is the header row of the values CSV.
var ValuesCSVHeader = []string{"name", "line", "re", "im", "unit", "shown"}

// WriteValuesCSV writes the document's values as CSV: one row per value,
// with the columns of ValuesCSVHeader (shown as on the sheet, a power
// factor with its sense). A vector or matrix has one row per entry, named
// as the language picks it, counting from 1: v(2) for an entry of a
// column vector, M(1,2) for one of a matrix.
//
// A document with cases (LANGUAGE.md section 10) has a "case" column after
// "line": a value with cases has a row per case, named in it (a case
// with no value has empty numbers); one with no cases a row with an empty
// case.
func (d *Document) WriteValuesCSV(w io.Writer) error {
	cw := newCSV(w)
	withCases := len(d.Front.Cases) > 0
	if withCases {
		cw.Write([]string{"name", "line", "case", "re", "im", "unit", "shown"})
	} else {
		cw.Write(ValuesCSVHeader)
	}
	row := func(cas string, r []string) {
		if withCases {
			r = append(r[:2:2], append([]string{cas}, r[2:]...)...)
		}
		cw.Write(r)
	}
	for _, v := range d.Values {
		line := strconv.Itoa(v.Pos.Line())
		if v.Cases == nil {
			d.valueRows(v.Name, line, v.Value, v.Display, func(r []string) { row("", r) })
			continue
		}
		for k, c := range d.Front.Cases {
			if k >= len(v.Cases) || v.Cases[k] == nil {
				row(c, []string{v.Name, line, "", "", "", ""})
				continue
			}
			d.valueRows(v.Name, line, v.Cases[k], v.Display, func(r []string) { row(c, r) })
		}
	}
	cw.Flush()
	return cw.Error()
}

// valueRows gives the CSV rows of one value: one for a single value, one
// per entry for a matrix.
func (d *Document) valueRows(name, line string, val expr.Value, disp *expr.Display, out func([]string)) {
	switch x := val.(type) {
	case *expr.Scalar:
		out([]string{name, line, csvNum(real(x.Z)), csvNum(imag(x.Z)), csvUnit(x), expr.FormatValue(x, disp, d.Digits())})
	case *expr.Matrix:
		shown := expr.DisplayMatrix(x)
		for i := 0; i < x.Rows; i++ {
			for j := 0; j < x.Cols; j++ {
				e, s := x.At(i, j), shown.At(i, j)
				n := fmt.Sprintf("%s(%d,%d)", name, i+1, j+1)
				if x.Cols == 1 {
					n = fmt.Sprintf("%s(%d)", name, i+1)
				}
				out([]string{n, line, csvNum(real(e.Z)), csvNum(imag(e.Z)), csvUnit(&e), expr.FormatValue(&s, disp, d.Digits())})
			}
		}
	}
}

// NoSweepError is the answer to a sweep asked for by a line where no sweep
// starts: Lines are the lines where sweeps do start.
type NoSweepError struct {
	Path  string
	Line  int
	Lines []int
}

func (e *NoSweepError) Error() string {
	if len(e.Lines) == 0 {
		return fmt.Sprintf("%s: no sweep starts at line %d: the document has no sweep block", e.Path, e.Line)
	}
	var ls []string
	for _, l := range e.Lines {
		ls = append(ls, strconv.Itoa(l))
	}
	word := "line"
	if len(ls) > 1 {
		word = "lines"
	}
	return fmt.Sprintf("%s: no sweep starts at line %d: sweeps start at %s %s (the line of the opening ```sweep fence)", e.Path, e.Line, word, strings.Join(ls, ", "))
}

// SweepCSVHeader is the header row of a sweep's CSV. Each field is a
// quantity followed by its coherent SI unit in brackets, the brackets
// left out for a plain number: first the sweep variable ("f [Hz]"), then
// for each column (SweepJSON.Columns) its real and imaginary parts,
// "re(|Z_in|) [Ω]" and "im(|Z_in|) [Ω]", and for a column that holds a
// power factor one more field, "sense(pf)", with the sense as the sheet
// writes it ("lagging", "leading, export", or empty for Q = 0).
func SweepCSVHeader(sj *SweepJSON) []string {
	h := []string{withUnit(sj.Variable, sj.Unit)}
	for k, c := range sj.Columns {
		h = append(h, withUnit("re("+c.Text+")", c.Unit), withUnit("im("+c.Text+")", c.Unit))
		if sweepColumnHasSense(sj, k) {
			h = append(h, "sense("+c.Text+")")
		}
	}
	return h
}

func withUnit(q, unit string) string {
	if unit == "" {
		return q
	}
	return q + " [" + unit + "]"
}

// sweepColumnHasSense reports whether column k holds a power factor at
// some point.
func sweepColumnHasSense(sj *SweepJSON, k int) bool {
	for _, p := range sj.Points {
		if p.Values[k].SenseJSON != nil {
			return true
		}
	}
	return false
}

// WriteSweepCSV writes the points of the sweep whose block starts at line
// (its opening fence) as CSV: the header of SweepCSVHeader, then one row
// per point, every point of the sweep. It returns a *NoSweepError when no
// sweep starts at line.
func (d *Document) WriteSweepCSV(w io.Writer, line int) error {
	var sj *SweepJSON
	var lines []int
	sweeps := d.SweepsJSON()
	for i := range sweeps {
		lines = append(lines, sweeps[i].Line)
		if sweeps[i].Line == line {
			sj = &sweeps[i]
		}
	}
	if sj == nil {
		return &NoSweepError{Path: d.Path, Line: line, Lines: lines}
	}
	sense := make([]bool, len(sj.Columns))
	for k := range sj.Columns {
		sense[k] = sweepColumnHasSense(sj, k)
	}
	cw := newCSV(w)
	cw.Write(SweepCSVHeader(sj))
	for _, p := range sj.Points {
		row := []string{jsonCSV(p.X)}
		for k, v := range p.Values {
			row = append(row, jsonCSV(v.Re), jsonCSV(v.Im))
			if sense[k] {
				words := ""
				if v.SenseJSON != nil {
					words = senseText(v.SenseJSON)
				}
				row = append(row, words)
			}
		}
		cw.Write(row)
	}
	cw.Flush()
	return cw.Error()
}

// senseText writes a sense as the sheet does: "lagging", "leading, export".
func senseText(s *SenseJSON) string {
	w, _ := s.Sense.(string)
	if ex, _ := s.Export.(bool); ex {
		if w != "" {
			return w + ", export"
		}
		return "export"
	}
	return w
}

// jsonCSV writes a number of the values JSON (a float64, or nil for no
// value) as a CSV field.
func jsonCSV(v any) string {
	if x, ok := v.(float64); ok {
		return csvNum(x)
	}
	return ""
}

func newCSV(w io.Writer) *csv.Writer {
	cw := csv.NewWriter(w)
	cw.UseCRLF = true
	return cw
}

// csvUnit is the unit column of a value: the values JSON's unit (a power
// by its kind: W, var or VA).
func csvUnit(s *expr.Scalar) string {
	u, _ := scalarUnit(s)
	return u
}
