package sweep

import (
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/markup"
)

// evalSweep works a sweep block; one whose lines or range read a value
// with cases is worked once per case (LANGUAGE.md section 10): the first
// case's sweep is the block's Result, the others its CaseSweeps, and
// every error names its case.
func evalSweep(b *calcdoc.Block) {
	env := b.Env()
	if len(env.Cases) < 2 {
		evalSweepOnce(b)
		return
	}
	prev := env.SetCase(0)
	prevDep := env.ResetCaseDep()
	defer func() {
		env.SetCase(prev)
		env.SetCaseDep(prevDep)
	}()
	n0 := len(b.Errors)
	sw0 := evalSweepOnce(b)
	if !env.CaseDep() {
		return
	}
	nameCase(b.Errors[n0:], env.Cases[0])
	sw0.Case = env.Cases[0]
	for k := 1; k < len(env.Cases); k++ {
		env.SetCase(k)
		nk := len(b.Errors)
		sw := evalSweepOnce(b)
		nameCase(b.Errors[nk:], env.Cases[k])
		sw.Case = env.Cases[k]
		sw0.CaseSweeps = append(sw0.CaseSweeps, sw)
	}
	b.Result = sw0
}

// nameCase says in each error which case it happened in.
func nameCase(errs []*expr.Error, c string) {
	for _, e := range errs {
		e.Msg = "in case " + c + ": " + e.Msg
	}
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
