package calcdoc

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"

	"calcdoc/expr"
)

// SheetRecord is what a built sheet carries of one document it uses, so
// that the sheet can be evaluated again from itself alone (verify): the
// path as the use statement wrote it, the SHA-256 of its source, its
// title block, its values exactly (bits of the numbers, dimension, marks
// and display), its function names and first error; or the error of a use
// that could not read it.
type SheetRecord struct {
	Path       string        `json:"path"`
	Err        string        `json:"err,omitempty"`
	SHA256     string        `json:"sha256,omitempty"`
	Number     string        `json:"number,omitempty"`
	Revision   string        `json:"revision,omitempty"`
	Title      string        `json:"title,omitempty"`
	Errors     int           `json:"errors,omitempty"`
	FirstError string        `json:"first_error,omitempty"`
	Funcs      []string      `json:"funcs,omitempty"`
	Values     []ValueRecord `json:"values,omitempty"`
	// Cases names the sheet's cases (LANGUAGE.md section 10), if any.
	Cases []string `json:"cases,omitempty"`
}

// ValueRecord is one value of a used sheet, exactly.
type ValueRecord struct {
	Name    string         `json:"name"`
	Line    int            `json:"line"`
	Rows    int            `json:"rows,omitempty"` // a matrix: its shape
	Cols    int            `json:"cols,omitempty"`
	E       []ScalarRecord `json:"e"`
	Resid   []uint64       `json:"resid,omitempty"`
	Display *DisplayRecord `json:"display,omitempty"`
	// Cases holds the value in each of the sheet's cases for a value with
	// cases (null for a case with no value); E is then the first's.
	Cases []*ValueRecord `json:"cases,omitempty"`
}

// ScalarRecord is a scalar with the bits of its parts (so that NaN and
// every float round-trip) and its marks.
type ScalarRecord struct {
	Re      uint64  `json:"re"`
	Im      uint64  `json:"im"`
	Dim     [7]int8 `json:"dim"`
	Sense   int     `json:"sense,omitempty"`
	Angle   bool    `json:"angle,omitempty"`
	Kind    int     `json:"kind,omitempty"`
	AbsTemp bool    `json:"abs_temp,omitempty"`
}

// DisplayRecord is a display: its text, its unit as written and its form.
type DisplayRecord struct {
	Text string `json:"text"`
	Unit string `json:"unit,omitempty"`
	Form int    `json:"form,omitempty"`
}

// UseRecords are the records of the documents d uses (one a path, in the
// order first used), for the sheet to carry; nil when it uses none.
func UseRecords(d *Document) []SheetRecord {
	var out []SheetRecord
	seen := map[string]bool{}
	for _, u := range d.Uses {
		if seen[u.Rel] {
			continue
		}
		seen[u.Rel] = true
		r := SheetRecord{Path: u.Rel}
		if u.Sheet == nil {
			r.Err = u.err
			out = append(out, r)
			continue
		}
		sh := u.Sheet
		r.SHA256, r.Number, r.Revision, r.Title, r.Errors, r.Funcs = sh.SHA256, sh.Number, sh.Revision, sh.Title, sh.Errors, sh.Funcs
		r.FirstError = sh.FirstError
		r.Cases = sh.Cases
		for _, v := range sh.Values {
			r.Values = append(r.Values, valueRecord(v))
		}
		out = append(out, r)
	}
	return out
}

func scalarRecord(s *expr.Scalar) ScalarRecord {
	return ScalarRecord{Re: math.Float64bits(real(s.Z)), Im: math.Float64bits(imag(s.Z)), Dim: s.Dim, Sense: int(s.Sense), Angle: s.Angle, Kind: int(s.Kind), AbsTemp: s.AbsTemp}
}

func (r ScalarRecord) scalar() expr.Scalar {
	return expr.Scalar{Z: complex(math.Float64frombits(r.Re), math.Float64frombits(r.Im)), Dim: r.Dim, Sense: expr.PFSense(r.Sense), Angle: r.Angle, Kind: expr.PowerKind(r.Kind), AbsTemp: r.AbsTemp}
}

func valueRecord(v *UsedValue) ValueRecord {
	r := ValueRecord{Name: v.Name, Line: v.Line}
	switch x := v.Value.(type) {
	case *expr.Scalar:
		r.E = []ScalarRecord{scalarRecord(x)}
	case *expr.Matrix:
		r.Rows, r.Cols = x.Rows, x.Cols
		for i := range x.E {
			r.E = append(r.E, scalarRecord(&x.E[i]))
		}
		for _, q := range x.Resid {
			r.Resid = append(r.Resid, math.Float64bits(q))
		}
	}
	for _, c := range v.Cases {
		if c == nil {
			r.Cases = append(r.Cases, nil)
			continue
		}
		cr := valueRecord(&UsedValue{Name: v.Name, Line: v.Line, Value: c})
		r.Cases = append(r.Cases, &cr)
	}
	if d := v.Display; d != nil {
		r.Display = &DisplayRecord{Text: d.Text, Form: int(d.Form)}
		if d.Unit != nil {
			r.Display.Unit = d.Unit.Text
		}
	}
	return r
}

func (r ValueRecord) used() (*UsedValue, error) {
	v := &UsedValue{Name: r.Name, Line: r.Line}
	switch {
	case r.Rows > 0:
		if len(r.E) != r.Rows*r.Cols {
			return nil, fmt.Errorf("the record of %s holds %d entries for a %d×%d matrix", r.Name, len(r.E), r.Rows, r.Cols)
		}
		m := &expr.Matrix{Rows: r.Rows, Cols: r.Cols}
		for _, e := range r.E {
			m.E = append(m.E, e.scalar())
		}
		for _, q := range r.Resid {
			m.Resid = append(m.Resid, math.Float64frombits(q))
		}
		v.Value = m
	case len(r.E) == 1:
		s := r.E[0].scalar()
		v.Value = &s
	default:
		return nil, fmt.Errorf("the record of %s holds no value", r.Name)
	}
	if len(r.Cases) > 0 {
		v.Cases = make([]expr.Value, len(r.Cases))
		for k, c := range r.Cases {
			if c == nil {
				continue
			}
			cv, err := c.used()
			if err != nil {
				return nil, err
			}
			v.Cases[k] = cv.Value
		}
	}
	if r.Display != nil {
		d := &expr.Display{Text: r.Display.Text, Form: expr.Form(r.Display.Form)}
		if r.Display.Unit != "" {
			u, err := expr.ParseUnit(r.Display.Unit)
			if err != nil {
				return nil, fmt.Errorf("the record of %s has a unit calcdoc does not know: %v", r.Name, err)
			}
			d.Unit = u
		}
		v.Display = d
	}
	return v, nil
}

// Sheet is the used sheet the record describes.
func (r SheetRecord) Sheet() (*Sheet, error) {
	if r.Err != "" {
		return nil, errors.New(r.Err)
	}
	sh := &Sheet{Path: r.Path, SHA256: r.SHA256, Number: r.Number, Revision: r.Revision, Title: r.Title, Errors: r.Errors, FirstError: r.FirstError, Funcs: r.Funcs, Cases: r.Cases}
	for _, vr := range r.Values {
		v, err := vr.used()
		if err != nil {
			return nil, err
		}
		sh.Values = append(sh.Values, v)
	}
	return sh.index(), nil
}

// MarshalUseRecords writes records as JSON.
func MarshalUseRecords(recs []SheetRecord) []byte {
	b, _ := json.Marshal(recs)
	return b
}

// RecordedSheets are the used sheets a built sheet carries (the JSON of
// MarshalUseRecords): use statements are answered from them alone.
func RecordedSheets(data []byte) (Sheets, []SheetRecord, error) {
	var recs []SheetRecord
	if err := json.Unmarshal(data, &recs); err != nil {
		return nil, nil, fmt.Errorf("the record of the used sheets cannot be read: %v", err)
	}
	rs := recorded{}
	for _, r := range recs {
		rs[r.Path] = r
	}
	return rs, recs, nil
}

type recorded map[string]SheetRecord

func (rs recorded) Sheet(from *Document, rel string) (*Sheet, error) {
	r, ok := rs[rel]
	if !ok {
		return nil, fmt.Errorf("the sheet carries no record of %s: it was built from another source", rel)
	}
	return r.Sheet()
}
