package calcdoc

import "calcdoc/expr"

// SweepJSON is one sweep block in the values JSON (LANGUAGE.md section 8):
// the line of its opening fence, the sweep variable and its unit, one
// column per line of the block that has a value (as the sheet's table has
// them), and every point of the sweep, not only those the table shows.
//
// Cases (LANGUAGE.md section 10) will list a sweep once per case; that
// entry then carries a field `Case string `json:"case"“ naming it, and
// SweepsJSON walks the cases. Nothing else here changes.
type SweepJSON struct {
	Line int `json:"line"`
	// Case names the case of a sweep worked per case (one entry per
	// case, LANGUAGE.md section 10); absent otherwise.
	Case     string       `json:"case,omitempty"`
	Variable string       `json:"variable"`
	Unit     string       `json:"unit"`
	Columns  []ColumnJSON `json:"columns"`
	Points   []PointJSON  `json:"points"`
}

// ColumnJSON is one column of a sweep: the line's text as the sheet heads
// it (the name it defines, or its expression as written), the line it
// stands on, and the coherent SI unit of its values.
type ColumnJSON struct {
	Text string `json:"text"`
	Line int    `json:"line"`
	Unit string `json:"unit"`
}

// PointJSON is one point of a sweep: the variable's value X in coherent SI
// units and each column's value there, in the order of Columns.
type PointJSON struct {
	X      any            `json:"x"`
	Values []SweepValJSON `json:"values"`
}

// SweepValJSON is one column's value at a point: re and im in coherent SI
// units (both null at a gap, a point where the line has no value), and,
// for a power factor, its sense.
type SweepValJSON struct {
	Re any `json:"re"`
	Im any `json:"im"`
	*SenseJSON
}

// SenseJSON is the sense of a power factor (the value of powerfactor(S),
// LANGUAGE.md section 3): Sense is "lagging", "leading" or null (Q = 0),
// Export is true when the active power is sent out (P < 0). On a vector or
// matrix both are arrays of rows, null and false for an entry that is no
// power factor. A value that holds no power factor has neither field.
type SenseJSON struct {
	Sense  any `json:"sense"`
	Export any `json:"export"`
}

// senseJSON is the sense of a scalar, or nil when it is no power factor.
func senseJSON(s *expr.Scalar) *SenseJSON {
	if s == nil || !s.Sense.IsPF() {
		return nil
	}
	return &SenseJSON{Sense: senseWord(s.Sense), Export: s.Sense.Export()}
}

// senseWord is a sense as JSON: its word, or null when it has none.
func senseWord(s expr.PFSense) any {
	if w := s.Word(); w != "" {
		return w
	}
	return nil
}

// matrixSenseJSON is the sense of a matrix's entries as arrays of rows,
// or nil when no entry is a power factor.
func matrixSenseJSON(m *expr.Matrix) *SenseJSON {
	pf := false
	for _, e := range m.E {
		pf = pf || e.Sense.IsPF()
	}
	if !pf {
		return nil
	}
	sense, export := make([][]any, m.Rows), make([][]bool, m.Rows)
	for i := 0; i < m.Rows; i++ {
		for j := 0; j < m.Cols; j++ {
			e := m.At(i, j)
			sense[i] = append(sense[i], senseWord(e.Sense))
			export[i] = append(export[i], e.Sense.Export())
		}
	}
	return &SenseJSON{Sense: sense, Export: export}
}

// valueSenseJSON is the sense of any value, or nil.
func valueSenseJSON(v expr.Value) *SenseJSON {
	switch x := v.(type) {
	case *expr.Scalar:
		return senseJSON(x)
	case *expr.Matrix:
		return matrixSenseJSON(x)
	}
	return nil
}

// ValuesUnit is the unit the values write a quantity in: the coherent SI
// unit of its dimension (a power by its kind: W, var or VA), and "rad"
// for a plane angle (the values are in radians).
func ValuesUnit(d expr.Dim, angle bool, kind expr.PowerKind) string {
	if angle && d.IsZero() {
		return "rad"
	}
	u, _ := scalarUnit(&expr.Scalar{Dim: d, Kind: kind})
	return u
}

// SweepValuer is a block result that lists itself in the values JSON as a
// sweep (the sweep kind's result).
type SweepValuer interface {
	// SweepJSON is the entry of the block whose opening fence is at line.
	SweepJSON(line int) SweepJSON
}

// SweepsJSON lists every sweep block of the document with every point. A
// sweep whose range has no value has no columns and no points (its errors
// are among the document's errors).
// CaseSweepValuer is a sweep worked per case: the sweeps of the cases
// after the first (the block's Result being the first's).
type CaseSweepValuer interface {
	CaseSweepValuers() []SweepValuer
}

func (d *Document) SweepsJSON() []SweepJSON {
	out := []SweepJSON{}
	for _, b := range d.Blocks {
		if sv, ok := b.Result.(SweepValuer); ok {
			out = append(out, sv.SweepJSON(b.Pos.Line()))
		}
		if cs, ok := b.Result.(CaseSweepValuer); ok {
			for _, sv := range cs.CaseSweepValuers() {
				out = append(out, sv.SweepJSON(b.Pos.Line()))
			}
		}
	}
	return out
}

// SenseJSONOf is the sense of a scalar, or nil when it is no power factor.
func SenseJSONOf(s *expr.Scalar) *SenseJSON { return senseJSON(s) }

// JSONNum is a float for JSON: NaN and infinities are null.
func JSONNum(x float64) any { return jsonNum(x) }
