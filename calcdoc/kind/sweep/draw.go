package sweep

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render/markup"
	"calcdoc/render/svg"
)

// logDecades is the ratio of the largest to the smallest plotted value
// from which a sweep plot's y axis is logarithmic (two decades).
const logDecades = 100

// renderSweep draws a sweep block: a head naming the range, one row per
// line with its formula, a table of a readable subset of the points
// (Sweep.TableRows), notes on gaps, and a plot per plotted line
// (magnitude, and angle for a complex line).
func renderSweep(w *markup.Writer, b *calcdoc.Block) {
	sw, _ := b.Result.(*Sweep)
	w.Printf("<div class=\"block sweep\" id=\"B%d\">\n", b.Pos.Line())
	if sw == nil {
		w.WriteString("</div>\n")
		return
	}
	w.Printf("<div class=\"sweephead\" id=\"L%d\">%s</div>\n", b.InfoPos.Line(), sweepHead(w, sw))
	inLine := map[*expr.Error]bool{}
	for _, e := range b.DrawErrors { // shown in place of their figure
		inLine[e] = true
	}
	for _, l := range sw.Lines {
		for _, e := range l.Errs {
			inLine[e] = true
		}
	}
	for _, e := range b.Errors {
		if !inLine[e] {
			w.ErrorRow(e)
		}
	}
	if sw.Unavailable != nil {
		w.UnavailableRow(sw.Unavailable)
	}
	for _, l := range sw.Lines {
		sweepLineRow(w, l)
	}
	all := append([]*Sweep{sw}, sw.CaseSweeps...)
	for _, c := range all {
		sweepPoints(w, c)
	}
	if len(all) > 1 && casePlots(w, all) {
		w.WriteString("</div>\n")
		return
	}
	for _, c := range all {
		if c.Case != "" && c.X != nil && len(okLines(c)) > 0 {
			w.Printf("<div class=\"sweepcase\"><span class=\"case\">%s</span> plots</div>\n", markup.Esc(c.Case))
		}
		for _, l := range okLines(c) {
			if c.X != nil {
				sweepPlots(w, c, l)
			}
		}
	}
	w.WriteString("</div>\n")
}

// okLines are a sweep's lines with values (its table columns and plots).
func okLines(sw *Sweep) []*SweepLine {
	var cols []*SweepLine
	for _, l := range sw.Lines {
		if l.OK() {
			cols = append(cols, l)
		}
	}
	return cols
}

// sweepPoints draws a sweep's table, under the name of its case for a
// sweep worked per case.
func sweepPoints(w *markup.Writer, sw *Sweep) {
	cols := okLines(sw)
	if sw.X != nil && len(cols) > 0 {
		if sw.Case != "" {
			w.Printf("<div class=\"sweepcase\"><span class=\"case\">%s</span></div>\n", markup.Esc(sw.Case))
		}
		sweepTable(w, sw, cols)
	}
}

// sweepHead describes the range: "sweep of f from 10 Hz to 100 kHz, 200
// points spaced evenly on a logarithmic scale".
func sweepHead(w *markup.Writer, sw *Sweep) string {
	if sw.X == nil {
		return "sweep, not evaluated: its range has no value"
	}
	spacing := "spaced evenly"
	if sw.Log {
		spacing = "spaced evenly on a logarithmic scale"
	}
	return fmt.Sprintf("sweep of %s from %s to %s, %d points %s", markup.NameHTML(sw.Var),
		markup.Esc(expr.FormatScalar(sw.Start, nil, w.Digits()).String()),
		markup.Esc(expr.FormatScalar(sw.Stop, nil, w.Digits()).String()), sw.N, spacing)
}

// sweepLineRow writes one line of the block: gutter, formula, its errors.
func sweepLineRow(w *markup.Writer, l *SweepLine) {
	line := l.Stmt.Pos().Line()
	if n, ok := l.Stmt.(*expr.Note); ok {
		w.Printf("<div class=\"row note\" id=\"L%d\"><div class=\"ln\">%d</div><div class=\"txt\">%s</div></div>\n", line, line, markup.Esc(n.Text))
		return
	}
	w.Printf("<div class=\"row\" id=\"L%d\"><div class=\"ln\">%d</div><div>", line, line)
	f := w.ExprMLFor(false, nil)
	switch {
	case l.X != nil && l.Name != "":
		w.Printf("<div class=\"f\">%s</div>", markup.Math(markup.NameML(l.Name)+"<mo>=</mo>"+f.Node(l.X, false)))
	case l.X != nil:
		w.Printf("<div class=\"f\">%s</div>", markup.Math(f.Node(l.X, false)))
	default:
		w.Printf("<div class=\"f\"><code>%s</code></div>", markup.Esc(l.Text))
	}
	for _, e := range l.Errs {
		w.ErrorRow(e)
	}
	if l.Unavailable != nil {
		w.UnavailableRow(l.Unavailable)
	}
	w.Printf("</div><div class=\"desc\">%s</div></div>\n", markup.Esc(l.Stmt.Desc()))
}

// lineLabel is a line's name in plain text: the name it defines, or its
// expression as written.
func lineLabel(l *SweepLine) string {
	if l.Name != "" {
		return l.Name
	}
	return strings.TrimSpace(strings.SplitN(l.Text, "#", 2)[0])
}

// lineHeadML is a line's table heading in MathML.
func lineHeadML(w *markup.Writer, l *SweepLine) string {
	if l.Name != "" {
		return markup.Math(markup.NameML(l.Name))
	}
	return markup.Math(w.ExprMLFor(false, nil).Node(l.X, false))
}

// sweepTable writes the table of the points TableRows picks, with a note
// column naming why a point is there, and the notes on gaps below it.
func sweepTable(w *markup.Writer, sw *Sweep, cols []*SweepLine) {
	rows := sw.TableRows()
	why := map[int][]string{0: {"first point"}}
	why[len(sw.X)-1] = append(why[len(sw.X)-1], "last point")
	for _, l := range cols {
		lo, hi := l.Extremes()
		q := lineLabel(l)
		if l.Complex {
			q = "|" + q + "|"
		}
		why[lo] = append(why[lo], "min "+q)
		why[hi] = append(why[hi], "max "+q)
		if g := l.FirstGap(); g >= 0 {
			why[g] = append(why[g], "first gap of "+lineLabel(l))
		}
	}
	w.WriteString("<table class=\"data sweep\">\n<thead><tr><th>point</th>")
	w.Printf("<th>%s</th>", markup.Math(markup.NameML(sw.Var)))
	for _, l := range cols {
		w.Printf("<th>%s</th>", lineHeadML(w, l))
	}
	w.WriteString("<th>note</th></tr></thead>\n<tbody>\n")
	varS := &expr.Scalar{Dim: sw.Dim, Angle: sw.Angle, Kind: sw.Kind, AbsTemp: sw.AbsTemp}
	for _, i := range rows {
		varS.Z = complex(sw.X[i], 0)
		// each cell straight into the page
		w.WriteString("<tr><td>")
		w.WriteInt(i + 1)
		w.WriteString("</td><td><math>")
		w.WriteString(markup.ShownML(expr.FormatScalar(varS, nil, w.Digits()), false))
		w.WriteString("</math></td>")
		for _, l := range cols {
			z := l.Z[i]
			if cmplx.IsNaN(z) {
				w.WriteString("<td class=\"gap\">no value</td>")
				continue
			}
			s := l.At(i)
			w.WriteString("<td><math>")
			w.WriteString(markup.ShownML(expr.FormatScalar(s, l.Display, w.Digits()), false))
			w.WriteString(markup.SenseML(s))
			w.WriteString("</math></td>")
		}
		w.WriteString("<td class=\"why\">")
		if len(why[i]) > 0 {
			w.WriteString(markup.Esc(strings.Join(uniq(why[i]), ", ")))
		}
		w.WriteString("</td></tr>\n")
	}
	w.WriteString("</tbody>\n</table>\n")
	w.Printf("<p class=\"sweepnote\">The table shows %d of the %d points: points spread evenly over the sweep, the first and the last, and the smallest and largest value of each line", len(rows), len(sw.X))
	for _, l := range cols {
		if l.Complex {
			w.WriteString(" (magnitude for a complex value)")
			break
		}
	}
	w.WriteString(".</p>\n")
	varText := func(i int) string {
		if i < 0 || i >= len(sw.X) {
			return ""
		}
		varS.Z = complex(sw.X[i], 0)
		return sw.Var + " = " + expr.FormatScalar(varS, nil, w.Digits()).String()
	}
	for _, l := range cols {
		if l.Gaps == 0 {
			continue
		}
		msg := fmt.Sprintf("%s has no value at %d of the %d points (the first at %s)", lineLabel(l), l.Gaps, len(sw.X), varText(l.FirstGap()))
		if l.GapErr != nil {
			m := l.GapErr.Error()
			if e, ok := l.GapErr.(*expr.Error); ok {
				m = e.Msg
			}
			msg += fmt.Sprintf("; at %s: %s", varText(l.GapAt), m)
		}
		w.Printf("<p class=\"sweepnote gapnote\"><strong>Gaps:</strong> %s. These points are left out of the plots.</p>\n", markup.Esc(msg))
	}
}

// baseUnit is the unit the sheet shows a value of dimension d and power
// kind k in, without prefix: the value's coherent SI unit under its
// default symbol ("Ω"; a power W, var or VA by its kind, VA when complex).
func baseUnit(d expr.Dim, k expr.PowerKind, complexValue bool) string {
	z := complex(1, 0)
	if complexValue {
		z = complex(1, 1)
	}
	u, _ := expr.DisplayUnit(&expr.Scalar{Z: z, Dim: d, Kind: k}, nil, 4)
	return u
}

// axisLabel writes "name [unit]", or just the name when unit is empty.
func axisLabel(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " [" + unit + "]"
}

// plotUnit is the unit a line's values are plotted in, its size in
// coherent SI units and its offset (273.15 K for an absolute temperature
// in °C): a value v is plotted as (v − offset) / scale. It is the line's
// display unit, else its default unit (degrees for a real angle, °C for
// an absolute temperature).
func plotUnit(l *SweepLine) (string, float64, float64) {
	if l.Display != nil && l.Display.Unit != nil {
		u := l.Display.Unit.Text
		if u == "deg" {
			u = "°"
		}
		offset := 0.0
		if l.AbsTemp {
			offset = l.Display.Unit.Offset // °C shows (v − 273.15 K) / 1 K
		}
		return markup.UnitText(u), l.Display.Unit.Scale, offset
	}
	if l.Angle && !l.Complex && l.Dim.IsZero() {
		return "°", math.Pi / 180, 0
	}
	if l.AbsTemp && !l.Complex {
		u, scale, offset := expr.DisplayUnitOffset(&expr.Scalar{Z: 1, Dim: l.Dim, AbsTemp: true}, nil, 4)
		return markup.UnitText(u), scale, offset
	}
	return baseUnit(l.Dim, l.Kind, l.Complex), 1, 0
}

// useLogY reports whether values are drawn on a logarithmic y axis: every
// drawn value is positive and the largest is at least logDecades times the
// smallest.
func useLogY(y []float64) bool {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range y {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		if v <= 0 {
			return false
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return hi >= lo && hi >= logDecades*lo
}

// sweepFig is one figure of a sweep line: the plot, the columns it is
// thinned in, its caption and the position its errors are reported at.
type sweepFig struct {
	plot    svg.Plot
	col     []int
	caption string
	pos     expr.Pos
}

// drawn is the plot as it is drawn: thinned to its columns.
func (f sweepFig) drawn() svg.Plot { return thinPlot(f.plot, f.col) }

// drawErr is the error of a figure that cannot be drawn.
func (f sweepFig) drawErr(err error) *expr.Error {
	msg := strings.TrimPrefix(err.Error(), "svg: plot: ")
	if strings.Contains(msg, "drawable range") {
		msg += " (a plot draws magnitudes from 1e-280 to 1e280 in its unit: give the line a unit bracket that brings its values within, or scale the quantity)"
	}
	return expr.Errorf(f.pos, "the plot could not be drawn: %s", msg)
}

// sweepPlots writes the figures of one line: its magnitude (complex) or
// value (real), and for a complex line its angle in degrees.
func sweepPlots(w *markup.Writer, sw *Sweep, l *SweepLine) {
	for _, f := range sweepFigs(sw, l) {
		sweepFigure(w, f)
	}
}

// sweepFigs are the figures of one line (sweepPlots).
func sweepFigs(sw *Sweep, l *SweepLine) []sweepFig {
	n := len(sw.X)
	x := make([]float64, n)
	xUnit, xScale, xOffset := expr.DisplayUnitOffset(&expr.Scalar{Z: 1, Dim: sw.Dim, Kind: sw.Kind, AbsTemp: sw.AbsTemp}, nil, 4)
	if sw.Angle && sw.Dim.IsZero() {
		xUnit, xScale, xOffset = "°", math.Pi/180, 0
	}
	for i, v := range sw.X {
		x[i] = (v - xOffset) / xScale
	}
	xLabel := axisLabel(sw.Var, markup.UnitText(xUnit))
	col := plotColumnsOf(x, sw.Log, plotColumns)
	unit, scale, offset := plotUnit(l)
	name := lineLabel(l)
	line := l.Stmt.Pos().Line()
	y := make([]float64, n)
	for i := range y {
		y[i] = (l.Plot(i) - offset) / scale
	}
	q := name
	what := "value"
	if l.Complex {
		q, what = "|"+name+"|", "magnitude"
	}
	logY := useLogY(y)
	scaleWord := ""
	if logY {
		scaleWord = ", logarithmic scale"
	}
	figs := []sweepFig{{svg.Plot{XLabel: xLabel, YLabel: axisLabel(q, unit), X: x, Series: []svg.Series{{Name: q, Y: y}}, LogX: sw.Log, LogY: logY}, col,
		fmt.Sprintf("Line %d: %s of %s against %s%s.", line, what, name, sw.Var, scaleWord), l.X.Pos()}}
	if !l.Complex {
		return figs
	}
	ang := make([]float64, n)
	for i, z := range l.Z {
		if cmplx.IsNaN(z) || z == 0 {
			ang[i] = math.NaN()
			continue
		}
		ang[i] = cmplx.Phase(z) * 180 / math.Pi
	}
	return append(figs, sweepFig{svg.Plot{XLabel: xLabel, YLabel: axisLabel("arg "+name, "°"), X: x, Series: []svg.Series{{Name: "arg " + name, Y: ang}}, LogX: sw.Log}, col,
		fmt.Sprintf("Line %d: angle of %s against %s, in degrees.", line, name, sw.Var), l.X.Pos()})
}

// plotColumns is the number of columns across the x axis within which a
// long series is thinned: about two per pixel of the plot area (548 user
// units wide at natural size).
const plotColumns = 1100

// plotColumnsOf returns the column of each point when a series of len(x)
// points is thinned (more than 2·cols points), else nil: the x range is cut
// into cols equal columns, equal in log x when log is set. x is increasing.
func plotColumnsOf(x []float64, log bool, cols int) []int {
	n := len(x)
	if n <= 2*cols {
		return nil
	}
	x0, x1 := x[0], x[n-1]
	out := make([]int, n)
	for i, v := range x {
		f := (v - x0) / (x1 - x0)
		if log {
			f = math.Log(v/x0) / math.Log(x1/x0)
		}
		out[i] = min(cols-1, max(0, int(f*float64(cols))))
	}
	return out
}

// thinIndices picks the points of a series y that are drawn, given each
// point's column (plotColumnsOf; nil keeps every point). Each run of
// consecutive finite points within one column is kept as its first,
// smallest, largest and last point (in index order, each once), and each
// run of gaps (NaN or ±Inf) as its first point. So every extreme and every
// gap of the series stays in the picture, which at the plot's resolution
// looks the same.
func thinIndices(col []int, y []float64) []int {
	n := len(y)
	if col == nil {
		all := make([]int, n)
		for i := range all {
			all[i] = i
		}
		return all
	}
	gap := func(i int) bool { return math.IsNaN(y[i]) || math.IsInf(y[i], 0) }
	out := make([]int, 0, 2*plotColumns+16)
	for i := 0; i < n; {
		if gap(i) {
			out = append(out, i)
			for i < n && gap(i) {
				i++
			}
			continue
		}
		c := col[i]
		first, lo, hi, last := i, i, i, i
		for i < n && !gap(i) && col[i] == c {
			if y[i] < y[lo] {
				lo = i
			}
			if y[i] > y[hi] {
				hi = i
			}
			last = i
			i++
		}
		k := [4]int{first, lo, hi, last}
		sort.Ints(k[:])
		for j, v := range k {
			if j == 0 || v != k[j-1] {
				out = append(out, v)
			}
		}
	}
	return out
}

// thinPlot thins the plot's single series by thinIndices.
func thinPlot(p svg.Plot, col []int) svg.Plot {
	if col == nil {
		return p
	}
	idx := thinIndices(col, p.Series[0].Y)
	if len(p.Series) > 1 {
		// one curve per case: the points any curve keeps, for all of them
		keep := map[int]bool{}
		for _, i := range idx {
			keep[i] = true
		}
		for _, s := range p.Series[1:] {
			for _, i := range thinIndices(col, s.Y) {
				keep[i] = true
			}
		}
		idx = idx[:0:0]
		for i := range p.X {
			if keep[i] {
				idx = append(idx, i)
			}
		}
	}
	x := make([]float64, len(idx))
	for k, i := range idx {
		x[k] = p.X[i]
	}
	series := make([]svg.Series, len(p.Series))
	for j, s := range p.Series {
		y := make([]float64, len(idx))
		for k, i := range idx {
			y[k] = s.Y[i]
		}
		series[j] = svg.Series{Name: s.Name, Y: y}
	}
	p.X = x
	p.Series = series
	return p
}

// sweepFigure writes one figure, or in its place the error that it cannot
// be drawn (found already by checkSweepDrawing, so counted as an error of
// the document).
func sweepFigure(w *markup.Writer, f sweepFig) {
	pic, err := f.drawn().Render()
	if err != nil {
		w.ErrorRow(f.drawErr(err))
		return
	}
	w.WriteString("<figure class=\"sweep\">\n")
	w.WriteString(pic)
	w.Printf("<figcaption>%s</figcaption>\n</figure>\n", markup.Esc(f.caption))
}

// uniq drops repeated strings, keeping the first of each.
func uniq(s []string) []string {
	var out []string
	seen := map[string]bool{}
	for _, x := range s {
		if !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}
