package svg

import (
	"fmt"
	"math"
	"strings"
	"unicode/utf8"
)

// Series is one line of a Plot.
type Series struct {
	Name string
	// Y holds one value per Plot.X. NaN or ±Inf is a gap in the line; on a
	// logarithmic y axis a value ≤ 0 is a gap too.
	Y []float64
}

// Plot is a line plot of one or more series against a common x.
type Plot struct {
	// Title, XLabel and YLabel are plain text; the axis labels include the
	// unit, e.g. "f [Hz]", "|Z| [Ω]".
	Title, XLabel, YLabel string
	X                     []float64
	Series                []Series
	LogX, LogY            bool
}

// Layout of a plot, in SVG user units.
const (
	plWidth     = 640.0
	plLeft      = 72.0 // plot area offsets from the edges
	plRight     = 20.0
	plTop       = 30.0
	plHeight    = 300.0 // plot area height
	plTickFont  = 10.0
	plTickLen   = 4.0
	plMinorLen  = 2.5
	plLegendRow = 16.0
	plMaxSeries = 2 * 6 // six dash patterns, each in two stroke widths
)

// axis is one computed plot axis.
type axis struct {
	lo, hi float64 // range drawn
	log    bool
	major  []float64
	labels []string
	minor  []float64
}

// frac returns the position of v along the axis: 0 at lo, 1 at hi
// (log10 positions on a logarithmic axis).
func (a *axis) frac(v float64) float64 {
	if a.log {
		return (math.Log10(v) - math.Log10(a.lo)) / (math.Log10(a.hi) - math.Log10(a.lo))
	}
	return (v - a.lo) / (a.hi - a.lo)
}

// degenerate reports whether lo and hi are too close to draw as a range:
// equal, or differing by at most 1e-9 of their magnitude.
func degenerate(lo, hi float64) bool {
	return hi-lo <= 1e-9*math.Max(math.Abs(lo), math.Abs(hi))
}

// newAxis computes the axis for data in [lo, hi] (finite, lo ≤ hi, and
// lo > 0 when log). A degenerate range is first widened: linearly to
// v ± |v|/10 (±1 for v = 0), logarithmically to v/√10 .. v·√10. When expand
// is set, or the range was degenerate, the range is then widened to round
// ends: on a linear axis to multiples of the tick step (repeated until the
// step of the widened range is the step used), on a logarithmic axis to the
// enclosing 1-2-5 numbers.
func newAxis(lo, hi float64, log, expand bool) *axis {
	if degenerate(lo, hi) {
		v := (lo + hi) / 2
		if log {
			lo, hi = v/math.Sqrt(10), v*math.Sqrt(10)
		} else if v == 0 {
			lo, hi = -1, 1
		} else {
			lo, hi = v-math.Abs(v)/10, v+math.Abs(v)/10
		}
		expand = true
	}
	if expand {
		if log {
			lo = val125(niceFloor(lo))
			hi = val125(niceCeil(hi))
		} else {
			for i := 0; i < 4; i++ {
				d, e := linearStep(lo, hi)
				s := val125(d, e)
				klo := math.Floor(lo/s + 1e-9)
				for n := 0; n < 4 && multiple(klo, d, e) > lo; n++ {
					klo--
				}
				khi := math.Ceil(hi/s - 1e-9)
				for n := 0; n < 4 && multiple(khi, d, e) < hi; n++ {
					khi++
				}
				nlo, nhi := multiple(klo, d, e), multiple(khi, d, e)
				lo, hi = nlo, nhi
				if d2, e2 := linearStep(lo, hi); d2 == d && e2 == e {
					break
				}
			}
		}
	}
	a := &axis{lo: lo, hi: hi, log: log}
	if log {
		var linear bool
		var e int
		a.major, a.minor, linear, e = logTicks(lo, hi)
		if linear {
			a.labels = linearLabels(a.major, e)
		} else {
			a.labels = logLabels(a.major)
		}
	} else {
		var e int
		a.major, _, e = linearTicks(lo, hi)
		a.labels = linearLabels(a.major, e)
	}
	return a
}

// validate checks the plot's data and returns the data ranges of x and y
// (ok false when no y value can be drawn).
func (p Plot) validate() (xlo, xhi, ylo, yhi float64, ok bool, err error) {
	if len(p.X) == 0 {
		return 0, 0, 0, 0, false, fmt.Errorf("svg: plot: no x values")
	}
	if len(p.Series) == 0 {
		return 0, 0, 0, 0, false, fmt.Errorf("svg: plot: no series")
	}
	if len(p.Series) > plMaxSeries {
		return 0, 0, 0, 0, false, fmt.Errorf("svg: plot: %d series, at most %d can be told apart by line style", len(p.Series), plMaxSeries)
	}
	xlo, xhi = math.Inf(1), math.Inf(-1)
	for i, x := range p.X {
		switch {
		case !finite(x):
			return 0, 0, 0, 0, false, fmt.Errorf("svg: plot: x value %d is %g, not a finite number", i+1, x)
		case p.LogX && x <= 0:
			return 0, 0, 0, 0, false, fmt.Errorf("svg: plot: x value %d is %g, but a logarithmic x axis needs x > 0", i+1, x)
		case math.Abs(x) > maxMagnitude || (x != 0 && math.Abs(x) < minPositive):
			return 0, 0, 0, 0, false, fmt.Errorf("svg: plot: x value %d is %g, outside the drawable range", i+1, x)
		}
		xlo, xhi = math.Min(xlo, x), math.Max(xhi, x)
	}
	ylo, yhi = math.Inf(1), math.Inf(-1)
	for _, s := range p.Series {
		if len(s.Y) != len(p.X) {
			return 0, 0, 0, 0, false, fmt.Errorf("svg: plot: series %q has %d values for %d x values", s.Name, len(s.Y), len(p.X))
		}
		for i, y := range s.Y {
			if !p.drawable(y) {
				continue
			}
			if math.Abs(y) > maxMagnitude || (y != 0 && math.Abs(y) < minPositive) {
				return 0, 0, 0, 0, false, fmt.Errorf("svg: plot: series %q value %d is %g, outside the drawable range", s.Name, i+1, y)
			}
			ylo, yhi = math.Min(ylo, y), math.Max(yhi, y)
			ok = true
		}
	}
	return xlo, xhi, ylo, yhi, ok, nil
}

// drawable reports whether a y value is drawn (not a gap).
func (p Plot) drawable(y float64) bool {
	return finite(y) && (!p.LogY || y > 0)
}

// Render draws the plot and returns the <svg> element.
//
// The plot area is framed and has a light grid at the major ticks of both
// axes (see Ticks). Linear axes are labelled with one SI prefix for the
// whole axis; logarithmic axes label each decade with its own prefix ("10",
// "100", "1k", "10k") and carry unlabelled minor marks at 2·10^k and 5·10^k.
// Magnitudes below 1e-12 or from 1e15 up, beyond the prefixes p to T, are
// labelled in E notation ("1e+20").
//
// The x axis spans the x data exactly; the y axis spans the drawable y
// values widened to round ends: on a linear axis to multiples of its tick
// step, on a logarithmic axis to the enclosing numbers 1·10^k, 2·10^k or
// 5·10^k. A range whose ends differ by at most 1e-9 of their magnitude (a
// single value, say) is first widened to v ± |v|/10 (−1 to 1 for v = 0) on a
// linear axis and to v/√10 to v·√10 on a logarithmic one, and then to round
// ends, on the x axis too. With no drawable y value at all the y axis runs
// from 0 to 1 (1 to 10 when logarithmic).
//
// Each series is a polyline in data order, broken at gaps; a value standing
// alone between gaps is a dot. Series are told apart by dash
// pattern (solid, dashed, dotted, dash-dot, long dash, dash-dot-dot, then
// the same six in a heavier stroke), and a legend under the x label names
// them when there is more than one.
//
// It returns an error for empty X, no series or more than 12, a series whose
// length differs from X, a non-finite x, x ≤ 0 on a logarithmic x axis, or
// a value beyond 1e280 in magnitude or non-zero below 1e-280 in magnitude.
func (p Plot) Render() (string, error) {
	xlo, xhi, ylo, yhi, ok, err := p.validate()
	if err != nil {
		return "", err
	}
	if !ok { // nothing to draw: an empty y axis
		ylo, yhi = 0, 1
		if p.LogY {
			ylo, yhi = 1, 10
		}
	}
	xa := newAxis(xlo, xhi, p.LogX, false)
	ya := newAxis(ylo, yhi, p.LogY, true)

	pw := plWidth - plLeft - plRight
	left, top, bottom := plLeft, plTop, plTop+plHeight
	px := func(x float64) float64 { return left + pw*xa.frac(x) }
	py := func(y float64) float64 { return bottom - plHeight*ya.frac(y) }

	// Legend rows: entries flow left to right, wrapping at the plot width.
	type entry struct{ x, y float64 }
	var entries []entry
	height := bottom + 44
	if len(p.Series) > 1 {
		ex, ey := left, bottom+58
		for _, s := range p.Series {
			w := 36 + 6.5*float64(utf8.RuneCountInString(s.Name)) + 18
			if ex > left && ex+w > left+pw {
				ex, ey = left, ey+plLegendRow
			}
			entries = append(entries, entry{ex, ey})
			ex += w
		}
		height = ey + 10
	}

	title := p.Title
	if strings.TrimSpace(title) == "" {
		title = "Plot of " + p.YLabel + " against " + p.XLabel
	}
	var w writer
	w.b = make([]byte, 0, 4096+len(p.X)*len(p.Series)*14)
	svgOpen(&w, plWidth, height, title)

	if p.Title != "" {
		w.raw(`<text class="title" font-size="13" text-anchor="middle"`)
		w.attr("x", left+pw/2)
		w.attr("y", top-10)
		w.raw(`>`)
		w.text(p.Title)
		w.raw("</text>\n")
	}

	// Grid.
	w.raw(`<g class="grid" fill="none" stroke="#bbb" stroke-width="0.5">` + "\n")
	for _, t := range xa.major {
		x := px(t)
		w.raw(`<line`)
		w.attr("x1", x)
		w.attr("y1", top)
		w.attr("x2", x)
		w.attr("y2", bottom)
		w.raw("/>\n")
	}
	for _, t := range ya.major {
		y := py(t)
		w.raw(`<line`)
		w.attr("x1", left)
		w.attr("y1", y)
		w.attr("x2", left+pw)
		w.attr("y2", y)
		w.raw("/>\n")
	}
	w.raw("</g>\n")

	// Frame, tick marks and tick labels.
	w.raw(`<rect class="frame" fill="none" stroke="#000" stroke-width="0.75"`)
	w.attr("x", left)
	w.attr("y", top)
	w.attr("width", pw)
	w.attr("height", plHeight)
	w.raw("/>\n")
	w.raw(`<g class="ticks" fill="none" stroke="#000" stroke-width="0.75">` + "\n")
	for _, t := range xa.major {
		tickLine(&w, px(t), bottom, px(t), bottom+plTickLen)
	}
	for _, t := range xa.minor {
		tickLine(&w, px(t), bottom, px(t), bottom+plMinorLen)
	}
	for _, t := range ya.major {
		tickLine(&w, left-plTickLen, py(t), left, py(t))
	}
	for _, t := range ya.minor {
		tickLine(&w, left-plMinorLen, py(t), left, py(t))
	}
	w.raw("</g>\n")
	w.raw(`<g class="xticks" font-size="10" text-anchor="middle">` + "\n")
	for i, t := range xa.major {
		w.raw(`<text class="xtick"`)
		w.attr("x", px(t))
		w.attr("y", bottom+plTickLen+plTickFont+2)
		w.raw(`>`)
		w.text(xa.labels[i])
		w.raw("</text>\n")
	}
	w.raw("</g>\n")
	w.raw(`<g class="yticks" font-size="10" text-anchor="end">` + "\n")
	for i, t := range ya.major {
		w.raw(`<text class="ytick"`)
		w.attr("x", left-plTickLen-3)
		w.attr("y", py(t)+plTickFont*0.35)
		w.raw(`>`)
		w.text(ya.labels[i])
		w.raw("</text>\n")
	}
	w.raw("</g>\n")

	// Axis labels.
	if p.XLabel != "" {
		w.raw(`<text class="xlabel" font-size="11" text-anchor="middle"`)
		w.attr("x", left+pw/2)
		w.attr("y", bottom+38)
		w.raw(`>`)
		w.text(p.XLabel)
		w.raw("</text>\n")
	}
	if p.YLabel != "" {
		yx, yy := 16.0, top+plHeight/2
		w.raw(`<text class="ylabel" font-size="11" text-anchor="middle" transform="rotate(-90 `)
		w.num(yx)
		w.raw(" ")
		w.num(yy)
		w.raw(`)"`)
		w.attr("x", yx)
		w.attr("y", yy)
		w.raw(`>`)
		w.text(p.YLabel)
		w.raw("</text>\n")
	}

	// Series.
	for si, s := range p.Series {
		st := seriesStyle(si)
		w.raw(`<g class="series" fill="none" stroke="#000" stroke-linejoin="round"`)
		w.attr("stroke-width", st.width)
		if st.dash != "" {
			w.raw(` stroke-dasharray="` + st.dash + `"`)
		}
		w.raw(">\n")
		run, start := 0, 0
		flush := func(end int) {
			switch {
			case run == 1:
				w.raw(`<circle fill="#000" stroke="none"`)
				w.attr("cx", px(p.X[start]))
				w.attr("cy", py(s.Y[start]))
				w.raw(` r="1.50"/>` + "\n")
			case run > 1:
				w.raw(`<polyline points="`)
				for i := start; i < end; i++ {
					if i > start {
						w.raw(" ")
					}
					w.num(px(p.X[i]))
					w.raw(",")
					w.num(py(s.Y[i]))
				}
				w.raw(`"/>` + "\n")
			}
			run = 0
		}
		for i, y := range s.Y {
			if !p.drawable(y) {
				flush(i)
				continue
			}
			if run == 0 {
				start = i
			}
			run++
		}
		flush(len(s.Y))
		w.raw("</g>\n")
	}

	// Legend.
	if len(entries) > 0 {
		w.raw(`<g class="legend" font-size="11">` + "\n")
		for si, s := range p.Series {
			st := seriesStyle(si)
			e := entries[si]
			w.raw(`<line fill="none" stroke="#000"`)
			w.attr("stroke-width", st.width)
			if st.dash != "" {
				w.raw(` stroke-dasharray="` + st.dash + `"`)
			}
			w.attr("x1", e.x)
			w.attr("y1", e.y-4)
			w.attr("x2", e.x+30)
			w.attr("y2", e.y-4)
			w.raw("/>\n")
			w.raw(`<text`)
			w.attr("x", e.x+36)
			w.attr("y", e.y)
			w.raw(`>`)
			w.text(s.Name)
			w.raw("</text>\n")
		}
		w.raw("</g>\n")
	}
	w.raw("</svg>\n")
	return w.String(), nil
}

// seriesStyle returns the line style of series i: the six dash patterns at
// stroke width 1.4, then the same six at width 2.4.
func seriesStyle(i int) style {
	st := lineStyles[i%len(lineStyles)]
	if i >= len(lineStyles) {
		st.width = 2.4
	}
	return st
}

func tickLine(w *writer, x1, y1, x2, y2 float64) {
	w.raw(`<line`)
	w.attr("x1", x1)
	w.attr("y1", y1)
	w.attr("x2", x2)
	w.attr("y2", y2)
	w.raw("/>\n")
}

// Check returns the error Render would return for the plot, without
// drawing it.
func (p Plot) Check() error {
	_, _, _, _, _, err := p.validate()
	return err
}
