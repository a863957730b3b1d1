package svg

import (
	"math"
	"strconv"
	"strings"
	"testing"
)

// logspace returns n points from a to b evenly spaced on a log scale.
func logspace(a, b float64, n int) []float64 {
	out := make([]float64, n)
	la, lb := math.Log10(a), math.Log10(b)
	for i := range out {
		out[i] = math.Pow(10, la+(lb-la)*float64(i)/float64(n-1))
	}
	return out
}

// points parses a polyline's points attribute.
func points(t *testing.T, s string) [][2]float64 {
	t.Helper()
	var out [][2]float64
	for _, f := range strings.Fields(s) {
		xy := strings.Split(f, ",")
		if len(xy) != 2 {
			t.Fatalf("bad point %q", f)
		}
		x, err1 := strconv.ParseFloat(xy[0], 64)
		y, err2 := strconv.ParseFloat(xy[1], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("bad point %q", f)
		}
		out = append(out, [2]float64{x, y})
	}
	return out
}

func render(t *testing.T, p Plot) (string, *node) {
	t.Helper()
	out, err := p.Render()
	if err != nil {
		t.Fatal(err)
	}
	root := parseSVG(t, out)
	checkRoot(t, root)
	checkSelfContained(t, out)
	return out, root
}

// TestPlotGaps checks that a non-finite value (and a value ≤ 0 on a log
// axis, where log10 is undefined) breaks the line: common practice for
// plotting sampled data with missing points.
func TestPlotGaps(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	x := []float64{1, 2, 3, 4, 5, 6, 7}
	cases := []struct {
		name      string
		y         []float64
		logY      bool
		wantLines []int // points per polyline, in order
		wantDots  int
	}{
		{"no gap", []float64{1, 2, 3, 4, 5, 6, 7}, false, []int{7}, 0},
		{"NaN in the middle", []float64{1, 2, 3, nan, 5, 6, 7}, false, []int{3, 3}, 0},
		{"+Inf in the middle", []float64{1, 2, inf, 4, 5, 6, 7}, false, []int{2, 4}, 0},
		{"-Inf in the middle", []float64{1, 2, 3, 4, -inf, 6, 7}, false, []int{4, 2}, 0},
		{"NaN at the start", []float64{nan, 2, 3, 4, 5, 6, 7}, false, []int{6}, 0},
		{"NaN at the end", []float64{1, 2, 3, 4, 5, 6, nan}, false, []int{6}, 0},
		{"two gaps", []float64{1, 2, nan, 4, 5, nan, 7}, false, []int{2, 2}, 1},
		{"isolated point", []float64{1, nan, 3, nan, 5, 6, 7}, false, []int{3}, 2},
		{"run of gaps", []float64{1, 2, nan, nan, nan, 6, 7}, false, []int{2, 2}, 0},
		{"zero on a log axis", []float64{1, 2, 3, 0, 5, 6, 7}, true, []int{3, 3}, 0},
		{"negative on a log axis", []float64{1, -2, 3, 4, 5, 6, 7}, true, []int{5}, 1},
		{"all gaps", []float64{nan, nan, nan, nan, nan, nan, nan}, false, nil, 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, root := render(t, Plot{Title: "gaps", XLabel: "t [s]", YLabel: "v [V]", X: x,
				Series: []Series{{Name: "v", Y: tc.y}}, LogY: tc.logY})
			groups := root.find("g", "series")
			if len(groups) != 1 {
				t.Fatalf("%d series groups, want 1", len(groups))
			}
			lines := groups[0].find("polyline", "")
			if len(lines) != len(tc.wantLines) {
				t.Fatalf("%d polylines, want %d", len(lines), len(tc.wantLines))
			}
			for i, l := range lines {
				if n := len(points(t, l.attr["points"])); n != tc.wantLines[i] {
					t.Errorf("polyline %d has %d points, want %d", i+1, n, tc.wantLines[i])
				}
			}
			if n := len(groups[0].find("circle", "")); n != tc.wantDots {
				t.Errorf("%d dots, want %d", n, tc.wantDots)
			}
		})
	}
}

// parseSI reads a tick label: a number with an optional SI prefix (SI
// Brochure, 9th edition, Table 7).
func parseSI(t *testing.T, s string) float64 {
	t.Helper()
	mult := 1.0
	for p, m := range map[string]float64{"p": 1e-12, "n": 1e-9, "µ": 1e-6, "m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9, "T": 1e12} {
		if strings.HasSuffix(s, p) {
			s, mult = strings.TrimSuffix(s, p), m
			break
		}
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("tick label %q is not a number with an SI prefix", s)
	}
	return v * mult
}

// yMapping recovers the y axis mapping from the SVG: the position of two
// labelled y ticks. It returns a function from a value to its pixel y.
func yMapping(t *testing.T, root *node, log bool) func(float64) float64 {
	t.Helper()
	ticks := root.find("text", "ytick")
	if len(ticks) < 2 {
		t.Fatalf("%d y tick labels", len(ticks))
	}
	a, b := ticks[0], ticks[len(ticks)-1]
	va, vb := parseSI(t, a.text), parseSI(t, b.text)
	// Tick labels are drawn 0.35 font sizes below their tick (centred).
	pa, pb := a.num(t, "y")-plTickFont*0.35, b.num(t, "y")-plTickFont*0.35
	if log {
		va, vb = math.Log10(va), math.Log10(vb)
	}
	return func(v float64) float64 {
		if log {
			v = math.Log10(v)
		}
		return pa + (pb-pa)*(v-va)/(vb-va)
	}
}

// TestPlotMapping checks where points are drawn. Sources: a linear axis
// maps v to a position proportional to v, a logarithmic axis to one
// proportional to log10 v (common practice); positions are in SVG user
// space, y pointing down (W3C SVG 1.1, section 7.3). The y mapping is read
// from the labelled ticks in the SVG, so points must agree with the axis a
// reader sees.
func TestPlotMapping(t *testing.T) {
	cases := []struct {
		name       string
		x, y       []float64
		logX, logY bool
	}{
		{"log x, linear y", []float64{10, 31.6, 100, 1000, 12345, 1e5}, []float64{0, 1, 2.5, 7.3, 3, 8}, true, false},
		{"linear x, log y", []float64{0, 1, 2, 3, 4}, []float64{1, 10, 100, 1000, 10}, false, true},
		{"linear both, negative", []float64{-5, -1, 0, 2, 5}, []float64{-3, 0, 4, -1, 2}, false, false},
		{"log both", logspace(10, 1e5, 9), logspace(1e3, 1, 9), true, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, root := render(t, Plot{XLabel: "f [Hz]", YLabel: "|Z| [Ω]", X: tc.x,
				Series: []Series{{Name: "|Z|", Y: tc.y}}, LogX: tc.logX, LogY: tc.logY})
			frames := root.find("rect", "frame")
			if len(frames) != 1 {
				t.Fatal("no plot frame")
			}
			fx, fw := frames[0].num(t, "x"), frames[0].num(t, "width")
			fy, fh := frames[0].num(t, "y"), frames[0].num(t, "height")
			// The x axis spans the data exactly (documented on Render).
			xlo, xhi := tc.x[0], tc.x[len(tc.x)-1]
			for _, v := range tc.x {
				xlo, xhi = math.Min(xlo, v), math.Max(xhi, v)
			}
			wantX := func(v float64) float64 {
				if tc.logX {
					return fx + fw*(math.Log10(v)-math.Log10(xlo))/(math.Log10(xhi)-math.Log10(xlo))
				}
				return fx + fw*(v-xlo)/(xhi-xlo)
			}
			wantY := yMapping(t, root, tc.logY)
			lines := root.find("polyline", "")
			if len(lines) != 1 {
				t.Fatalf("%d polylines, want 1", len(lines))
			}
			pts := points(t, lines[0].attr["points"])
			if len(pts) != len(tc.x) {
				t.Fatalf("%d points, want %d", len(pts), len(tc.x))
			}
			for i, p := range pts {
				if wx := wantX(tc.x[i]); math.Abs(p[0]-wx) > 2*svgTol {
					t.Errorf("point %d: x %g, want %g", i, p[0], wx)
				}
				if wy := wantY(tc.y[i]); math.Abs(p[1]-wy) > 3*svgTol {
					t.Errorf("point %d: y %g, want %g", i, p[1], wy)
				}
				if p[1] < fy-svgTol || p[1] > fy+fh+svgTol {
					t.Errorf("point %d outside the frame", i)
				}
			}
		})
	}
}

// TestPlotTickLabels checks the tick labels a reader sees.
func TestPlotTickLabels(t *testing.T) {
	// SI prefixes: SI Brochure, 9th edition (BIPM 2019), Table 7.
	cases := []struct {
		name   string
		x      []float64
		logX   bool
		wantX  []string
		y      []float64
		wantY  []string
		logY   bool
		yFirst string
	}{
		{
			name: "log decades", x: []float64{10, 1e5}, logX: true,
			wantX: []string{"10", "100", "1k", "10k", "100k"},
			// y 0..7.3: step 1, widened to 0..8.
			y: []float64{0, 7.3}, wantY: []string{"0", "1", "2", "3", "4", "5", "6", "7", "8"},
		},
		{
			name: "log milli", x: []float64{1e-3, 1}, logX: true,
			wantX: []string{"1m", "10m", "100m", "1"},
			// y 1.2..9 on a log axis: widened to the 1-2-5 numbers 1..10.
			y: []float64{1.2, 9}, logY: true, wantY: []string{"1", "10"},
		},
		{
			name: "log mega", x: []float64{1e6, 1e9}, logX: true,
			wantX: []string{"1M", "10M", "100M", "1G"},
			y:     []float64{-1, 1}, // y −1..1: range/8 = 0.25, so step 0.5 (0.25 is not a 1-2-5 number).
			wantY: []string{"-1.0", "-0.5", "0", "0.5", "1.0"},
		},
		{
			// Beyond the prefixes p to T: E notation.
			name: "log beyond tera", x: []float64{1e14, 1e17}, logX: true,
			wantX: []string{"100T", "1e+15", "1e+16", "1e+17"},
			y:     []float64{0, 4e-13}, wantY: []string{"0", "5e-14", "1e-13", "1.5e-13", "2e-13", "2.5e-13", "3e-13", "3.5e-13", "4e-13"},
		},
		{
			name: "linear milli", x: []float64{0, 0.008},
			wantX: []string{"0", "1m", "2m", "3m", "4m", "5m", "6m", "7m", "8m"},
			y:     []float64{0, 2500}, wantY: []string{"0", "0.5k", "1.0k", "1.5k", "2.0k", "2.5k"},
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, root := render(t, Plot{XLabel: "x", YLabel: "y", X: tc.x,
				Series: []Series{{Name: "s", Y: tc.y}}, LogX: tc.logX, LogY: tc.logY})
			for _, ax := range []struct {
				class string
				want  []string
			}{{"xtick", tc.wantX}, {"ytick", tc.wantY}} {
				var got []string
				for _, n := range root.find("text", ax.class) {
					got = append(got, n.text)
				}
				if strings.Join(got, " ") != strings.Join(ax.want, " ") {
					t.Errorf("%s labels %q, want %q", ax.class, got, ax.want)
				}
			}
		})
	}
}

// TestPlotLegendAndStyles checks the legend (only with more than one series)
// and that every series has its own black line style (common practice for
// monochrome print).
func TestPlotLegendAndStyles(t *testing.T) {
	x := []float64{1, 2, 3}
	mk := func(n int) []Series {
		s := make([]Series, n)
		for i := range s {
			s[i] = Series{Name: "series " + strconv.Itoa(i+1), Y: []float64{1, float64(i), 3}}
		}
		return s
	}
	cases := []struct {
		name   string
		series []Series
		legend bool
	}{
		{"one series, no legend", mk(1), false},
		{"two series", mk(2), true},
		{"twelve series", mk(12), true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, root := render(t, Plot{Title: "styles", X: x, Series: tc.series})
			legends := root.find("g", "legend")
			if tc.legend != (len(legends) == 1) {
				t.Fatalf("legend present: %v, want %v", len(legends) == 1, tc.legend)
			}
			if tc.legend {
				names := legends[0].find("text", "")
				if len(names) != len(tc.series) {
					t.Fatalf("%d legend names, want %d", len(names), len(tc.series))
				}
				for i, n := range names {
					if n.text != tc.series[i].Name {
						t.Errorf("legend name %q, want %q", n.text, tc.series[i].Name)
					}
				}
			}
			seen := map[string]bool{}
			for _, g := range root.find("g", "series") {
				key := g.attr["stroke-dasharray"] + "/" + g.attr["stroke-width"]
				if seen[key] {
					t.Errorf("two series share the style %q", key)
				}
				seen[key] = true
				if g.attr["stroke"] != "#000" {
					t.Errorf("series stroke %q, want black (styles, not colours, tell series apart)", g.attr["stroke"])
				}
			}
		})
	}
}

// TestPlotEscaping checks that markup characters in text read back intact
// through encoding/xml (XML 1.0 escaping).
func TestPlotEscaping(t *testing.T) {
	p := Plot{Title: `Z <in> & "out"`, XLabel: "f [Hz] <log>", YLabel: "|Z| [Ω] & more",
		X: []float64{1, 2}, Series: []Series{{Name: "a<b", Y: []float64{1, 2}}, {Name: "c&d", Y: []float64{2, 1}}}}
	_, root := render(t, p)
	for _, want := range []string{p.Title, p.XLabel, p.YLabel, "a<b", "c&d"} {
		if !strings.Contains(root.text, want) {
			t.Errorf("text %q lost", want)
		}
	}
}

// TestPlotDegenerate checks flat, single-point and extreme data: the plot
// must have ticks on both axes, every point inside the frame and no
// non-finite coordinate.
func TestPlotDegenerate(t *testing.T) {
	cases := []struct {
		name       string
		x, y       []float64
		logX, logY bool
	}{
		{"constant y", []float64{1, 2, 3}, []float64{230, 230, 230}, false, false},
		{"zero y", []float64{1, 2, 3}, []float64{0, 0, 0}, false, false},
		{"single point", []float64{50}, []float64{1.5}, false, false},
		{"single point on log axes", []float64{50}, []float64{100}, true, true},
		{"nearly constant y", []float64{1, 2}, []float64{1e9, 1e9 + 1e-3}, false, false},
		{"extreme linear range", []float64{-1e280, 1e280}, []float64{-1e280, 1e280}, false, false},
		{"extreme small values", []float64{1e-280, 3e-280}, []float64{-2e-280, 1e-280}, false, false},
		{"extreme log range", []float64{1e-280, 1e280}, []float64{1e280, 1e-280}, true, true},
		{"extreme nearly constant", []float64{1, 2}, []float64{1e-280, 1e-280 * (1 + 2e-9)}, false, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, root := render(t, Plot{X: tc.x, Series: []Series{{Name: "s", Y: tc.y}}, LogX: tc.logX, LogY: tc.logY})
			for _, tk := range []string{"xtick", "ytick"} {
				if n := len(root.find("text", tk)); n > 4*maxLinearIntervals {
					t.Errorf("%d %s labels", n, tk)
				}
			}
			if len(root.find("text", "xtick")) == 0 || len(root.find("text", "ytick")) == 0 {
				t.Error("an axis without tick labels")
			}
			frame := root.find("rect", "frame")[0]
			fy, fh := frame.num(t, "y"), frame.num(t, "height")
			var ys []float64
			for _, l := range root.find("polyline", "") {
				for _, p := range points(t, l.attr["points"]) {
					ys = append(ys, p[1])
				}
			}
			for _, c := range root.find("circle", "") {
				ys = append(ys, c.num(t, "cy"))
			}
			if len(ys) != len(tc.y) {
				t.Fatalf("%d points drawn, want %d", len(ys), len(tc.y))
			}
			for _, y := range ys {
				if y < fy-svgTol || y > fy+fh+svgTol || math.IsNaN(y) {
					t.Errorf("point at y %g outside the frame [%g, %g]", y, fy, fy+fh)
				}
			}
		})
	}
}

// TestPlotErrors checks that bad input gives an error value naming the
// problem, and no drawing.
func TestPlotErrors(t *testing.T) {
	x := []float64{1, 2, 3}
	ok := []Series{{Name: "s", Y: []float64{1, 2, 3}}}
	many := make([]Series, 13)
	for i := range many {
		many[i] = Series{Name: "s", Y: []float64{1, 2, 3}}
	}
	cases := []struct {
		name string
		p    Plot
		want string
	}{
		{"empty X", Plot{Series: []Series{{Name: "s"}}}, "no x values"},
		{"no series", Plot{X: x}, "no series"},
		{"too many series", Plot{X: x, Series: many}, "at most 12"},
		{"short series", Plot{X: x, Series: []Series{{Name: "short", Y: []float64{1, 2}}}}, `"short" has 2 values for 3`},
		{"long series", Plot{X: x, Series: []Series{ok[0], {Name: "long", Y: []float64{1, 2, 3, 4}}}}, `"long" has 4 values`},
		{"log x with zero", Plot{X: []float64{0, 1, 2}, Series: ok, LogX: true}, "x value 1 is 0"},
		{"log x with negative", Plot{X: []float64{1, -2, 3}, Series: ok, LogX: true}, "x value 2 is -2"},
		{"NaN x", Plot{X: []float64{1, math.NaN(), 3}, Series: ok}, "not a finite number"},
		{"infinite x", Plot{X: []float64{1, 2, math.Inf(1)}, Series: ok}, "not a finite number"},
		{"y out of range", Plot{X: x, Series: []Series{{Name: "s", Y: []float64{1, 1e301, 3}}}}, "drawable range"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out, err := tc.p.Render()
			if err == nil {
				t.Fatalf("no error; output %d bytes", len(out))
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not mention %q", err, tc.want)
			}
			if out != "" {
				t.Error("output alongside an error")
			}
		})
	}
}

// TestPlotDeterministic checks that two renders give the same bytes.
func TestPlotDeterministic(t *testing.T) {
	x := logspace(10, 1e5, 200)
	y1, y2 := make([]float64, len(x)), make([]float64, len(x))
	for i, f := range x {
		// A series RLC input impedance (handbook formula
		// Z = R + jωL + 1/(jωC)), magnitude and angle in degrees.
		w := 2 * math.Pi * f
		re, im := 10.0, w*1e-3-1/(w*1e-6)
		y1[i] = math.Hypot(re, im)
		y2[i] = math.Atan2(im, re) * 180 / math.Pi
	}
	y1[50] = math.NaN()
	cases := []struct {
		name string
		p    Plot
	}{
		{"log-log", Plot{Title: "|Z_in|", XLabel: "f [Hz]", YLabel: "|Z| [Ω]", X: x, Series: []Series{{Name: "|Z_in|", Y: y1}}, LogX: true, LogY: true}},
		{"two series", Plot{XLabel: "f [Hz]", YLabel: "value", X: x, Series: []Series{{Name: "|Z|", Y: y1}, {Name: "arg Z", Y: y2}}, LogX: true}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a, err1 := tc.p.Render()
			b, err2 := tc.p.Render()
			if err1 != nil || err2 != nil {
				t.Fatal(err1, err2)
			}
			if a != b {
				t.Error("two renders differ")
			}
			parseSVG(t, a)
		})
	}
}

// BenchmarkPlotRender10k renders a 10,000-point plot with two series.
func BenchmarkPlotRender10k(b *testing.B) {
	const n = 10000
	x := logspace(10, 1e5, n)
	y1, y2 := make([]float64, n), make([]float64, n)
	for i, f := range x {
		w := 2 * math.Pi * f
		re, im := 10.0, w*1e-3-1/(w*1e-6)
		y1[i] = math.Hypot(re, im)
		y2[i] = math.Atan2(im, re) * 180 / math.Pi
	}
	p := Plot{Title: "Input impedance", XLabel: "f [Hz]", YLabel: "value", X: x,
		Series: []Series{{Name: "|Z| [Ω]", Y: y1}, {Name: "arg Z [°]", Y: y2}}, LogX: true}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := p.Render(); err != nil {
			b.Fatal(err)
		}
	}
}
