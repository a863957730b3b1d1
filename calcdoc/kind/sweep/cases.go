package sweep

import (
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/render/markup"
)

// evalSweep works a sweep block; one whose lines or range read a value
// with cases is worked once per case (LANGUAGE.md section 10): the first
// case's sweep is the block's Result, the others its CaseSweeps, and
// every error names its case.
func evalSweep(b *calcdoc.Block) {
	var all []*Sweep
	n := b.PerCase(func(int) { all = append(all, evalSweepOnce(b)) })
	sw0 := all[0]
	if n > 1 {
		cases := b.Env().Cases
		for k, sw := range all {
			sw.Case = cases[k]
		}
		sw0.CaseSweeps = all[1:]
	}
	b.Result = sw0
}

// CaseSweepValuers are the sweeps of the cases after the first, for the
// values JSON (calcdoc.CaseSweepValuer).
func (sw *Sweep) CaseSweepValuers() []calcdoc.SweepValuer {
	var out []calcdoc.SweepValuer
	for _, c := range sw.CaseSweeps {
		out = append(out, c)
	}
	return out
}

// casePlots draws a sweep worked per case with one curve per case in each
// plot, labelled with its case, when every case has the same points and
// the same plotted lines; it reports false (drawing nothing) otherwise,
// and the caller draws each case's plots apart.
func casePlots(w *markup.Writer, all []*Sweep) bool {
	first := all[0]
	cols := okLines(first)
	if first.X == nil || len(cols) == 0 {
		return false
	}
	for _, c := range all[1:] {
		if len(c.X) != len(first.X) || len(c.Lines) != len(first.Lines) {
			return false
		}
		for i, x := range c.X {
			if x != first.X[i] {
				return false
			}
		}
		for i, l := range c.Lines {
			f := first.Lines[i]
			if l.OK() != f.OK() || (l.OK() && l.Complex != f.Complex) {
				return false
			}
		}
	}
	for _, l := range cols {
		i := lineIndex(first, l)
		figs := sweepFigs(first, l)
		for k := range figs {
			s0 := &figs[k].plot.Series[0]
			name := s0.Name
			s0.Name = name + " (" + first.Case + ")"
			for _, c := range all[1:] {
				other := sweepFigs(c, c.Lines[i])[k].plot.Series[0]
				other.Name = name + " (" + c.Case + ")"
				figs[k].plot.Series = append(figs[k].plot.Series, other)
			}
			// the y axis is logarithmic only when every case's curve would be
			var ys []float64
			for _, s := range figs[k].plot.Series {
				ys = append(ys, s.Y...)
			}
			if figs[k].plot.LogY && !useLogY(ys) {
				figs[k].plot.LogY = false
				figs[k].caption = strings.Replace(figs[k].caption, ", logarithmic scale", "", 1)
			}
			figs[k].caption = strings.TrimSuffix(figs[k].caption, ".") + ", one curve per case."
			sweepFigure(w, figs[k])
		}
	}
	return true
}

func lineIndex(sw *Sweep, l *SweepLine) int {
	for i, x := range sw.Lines {
		if x == l {
			return i
		}
	}
	return -1
}
