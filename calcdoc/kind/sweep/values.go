package sweep

import (
	"strings"

	"calcdoc/calcdoc"
)

// Label is the line's text as the sheet's table heads it: the name it
// defines, or its expression as written, without its note.
func (l *SweepLine) Label() string {
	if l.Name != "" {
		return l.Name
	}
	return strings.TrimSpace(strings.SplitN(l.Text, "#", 2)[0])
}

// Columns are the lines of the sweep that have a value at some point: the
// columns of the sheet's table and of the values.
func (s *Sweep) Columns() []*SweepLine {
	var cols []*SweepLine
	for _, l := range s.Lines {
		if l.OK() {
			cols = append(cols, l)
		}
	}
	return cols
}

// SweepJSON is the sweep's entry in the values JSON (LANGUAGE.md section
// 8): every point, not only those the sheet's table shows.
func (sw *Sweep) SweepJSON(line int) calcdoc.SweepJSON {
	sj := calcdoc.SweepJSON{Line: line, Case: sw.Case, Variable: sw.Var, Unit: calcdoc.ValuesUnit(sw.Dim, sw.Angle, sw.Kind), Columns: []calcdoc.ColumnJSON{}, Points: []calcdoc.PointJSON{}}
	if sw.X == nil {
		return sj
	}
	cols := sw.Columns()
	for _, l := range cols {
		sj.Columns = append(sj.Columns, calcdoc.ColumnJSON{Text: l.Label(), Line: l.Stmt.Pos().Line(), Unit: calcdoc.ValuesUnit(l.Dim, l.Angle, l.Kind)})
	}
	for i, x := range sw.X {
		p := calcdoc.PointJSON{X: calcdoc.JSONNum(x), Values: make([]calcdoc.SweepValJSON, len(cols))}
		for k, l := range cols {
			if s := l.At(i); s != nil {
				p.Values[k] = calcdoc.SweepValJSON{Re: calcdoc.JSONNum(real(s.Z)), Im: calcdoc.JSONNum(imag(s.Z)), SenseJSON: calcdoc.SenseJSONOf(s)}
			}
		}
		sj.Points = append(sj.Points, p)
	}
	return sj
}
