package svg

import (
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"testing"
)

// polar is a test phasor given as magnitude and angle in degrees.
type polar struct {
	label string
	mag   float64
	deg   float64
	scale string
}

// arrowsOf converts the polar test values with math/cmplx.Rect (the Go
// standard library), so Re and Im do not come from the code under test.
func arrowsOf(ps []polar) []Arrow {
	out := make([]Arrow, len(ps))
	for i, p := range ps {
		z := cmplx.Rect(p.mag, p.deg*math.Pi/180)
		out[i] = Arrow{Label: p.label, Re: real(z), Im: imag(z), Scale: p.scale}
	}
	return out
}

// is125 reports whether v is d·10^e with d in {1, 2, 5} (to 1e-9 relative).
func is125(v float64) bool {
	if !(v > 0) {
		return false
	}
	e := math.Floor(math.Log10(v))
	m := v / math.Pow(10, e)
	for _, d := range []float64{1, 2, 5, 10} {
		if math.Abs(m-d) <= 1e-9*d {
			return true
		}
	}
	return false
}

// parsePathStart returns the first point of a path's d attribute "Mx,y ...".
func parsePathStart(t *testing.T, d string) (float64, float64) {
	t.Helper()
	f := strings.Fields(d)
	if len(f) == 0 || !strings.HasPrefix(f[0], "M") {
		t.Fatalf("path d=%q does not start with M", d)
	}
	xy := strings.Split(strings.TrimPrefix(f[0], "M"), ",")
	if len(xy) != 2 {
		t.Fatalf("path d=%q: bad first point", d)
	}
	x, err1 := strconv.ParseFloat(xy[0], 64)
	y, err2 := strconv.ParseFloat(xy[1], 64)
	if err1 != nil || err2 != nil {
		t.Fatalf("path d=%q: bad first point", d)
	}
	return x, y
}

// The SVG coordinates are written with two decimals, so a parsed coordinate
// is within 0.005 of the exact one; allow for the float rounding on top.
const svgTol = 0.0051

var phasorCases = []struct {
	name  string
	in    []polar
	rings map[string]string // expected legend text per scale, from the rule in phasorLayout
}{
	{
		// A balanced positive-sequence set, 230 V phase voltage (common
		// practice: V_bn lags V_an by 120°, V_cn leads it by 120°).
		name: "balanced 230 V set",
		in: []polar{
			{"V_an", 230, 0, "V"},
			{"V_bn", 230, -120, "V"},
			{"V_cn", 230, 120, "V"},
		},
		// M = 230: candidates 100 V (2.3 rings) and 50 V (4.6 rings), both
		// in [2, 8]; with one scale the smaller wins.
		rings: map[string]string{"V": "rings: 50 V"},
	},
	{
		name: "voltages and a lagging current",
		in: []polar{
			{"V_an", 230, 0, "V"},
			{"V_bn", 230, -120, "V"},
			{"V_cn", 230, 120, "V"},
			{"I_a", 10, -30, "A"},
		},
		// Candidate 100 V: the current needs ≥ 10·100/230 = 4.35 A per ring,
		// so 5 A, reaching 0.9·4.35/5 = 78% of R. Candidate 50 V: ≥ 2.17 A,
		// so 5 A, reaching 39%. 100 V wins.
		rings: map[string]string{"V": "rings: 100 V", "A": "rings: 5 A"},
	},
	{
		name: "current only, third quadrant",
		in:   []polar{{"I_f", 1595, -146.31, "A"}, {"I_n", 400, 200, "A"}},
		// M = 1595: candidates 500 (3.19) and 200 (7.975); 200 wins.
		rings: map[string]string{"A": "rings: 200 A"},
	},
	{
		name: "zero arrow among others",
		in:   []polar{{"V_1", 1, 45, "pu"}, {"V_0", 0, 0, "pu"}, {"V_2", 0.25, -90, "pu"}},
		// M = 1: candidates 0.5 (2 rings), 0.2 (5), 0.1 (10: too many).
		rings: map[string]string{"pu": "rings: 0.2 pu"},
	},
	{
		name: "all zero",
		in:   []polar{{"I_0", 0, 0, "A"}, {"V_0", 0, 0, "V"}},
		// Every arrow zero: ρ = R/5 and a ring value of 1 per scale.
		rings: map[string]string{"A": "rings: 1 A", "V": "rings: 1 V"},
	},
	{
		// The ends of the drawable range, on two scales: no overflow.
		name: "extreme magnitudes",
		in:   []polar{{"V_big", 1e280, 30, "V"}, {"I_tiny", 1e-280, -60, "A"}},
		// M_V = 1e280: candidates 5e279 (2) and 2e279 (5); 1e279 would give
		// 10 rings. The current needs 1e-280·v/1e280 per ring: 5e-281 → 5e-281
		// (90%) or 2e-281 → 2e-281 (90%): a tie, and the smaller v wins.
		// Ring values beyond 10^±6 are written in E notation.
		rings: map[string]string{"V": "rings: 2e279 V", "A": "rings: 2e-281 A"},
	},
	{
		name: "four scales",
		in: []polar{
			{"V_s", 11000, 10, "V"},
			{"I_s", 52.5, -25, "A"},
			{"Z_L", 4.2, 70, "Ω"},
			{"S", 1.0e6, 35, "VA"},
		},
		// M_V = 11000: candidates 5000 (2.2), 2000 (5.5). With 2000 V the
		// needs are 9.545 A, 0.7636 Ω, 181818 VA → 10, 1, 200000: reaching
		// 0.9·(0.9545, 0.7636, 0.9091); worst 0.687. With 5000 V: 23.86 A →
		// 50 (0.477), 1.909 Ω → 2 (0.954), 454545 VA → 500000 (0.909); worst
		// 0.429. 2000 V wins.
		rings: map[string]string{"V": "rings: 2000 V", "A": "rings: 10 A", "Ω": "rings: 1 Ω", "VA": "rings: 200000 VA"},
	},
}

// TestPhasorArrowEnds checks where each arrow ends. Sources: the expected
// point is the polar-to-Cartesian conversion x = r·cos θ, y = r·sin θ
// (common practice), placed in SVG user space, whose y axis points down
// (W3C SVG 1.1, section 7.3 "The initial coordinate system"); the test
// values are converted with math/cmplx.Rect. The scale is cross-checked
// against what the sheet's reader sees: the legend's ring value over the
// radius of the first ring. Ring values must be 1-2-5 numbers (common
// practice for chart scales, and the brief).
func TestPhasorArrowEnds(t *testing.T) {
	for _, tc := range phasorCases {
		t.Run(tc.name, func(t *testing.T) {
			arrows := arrowsOf(tc.in)
			cx, cy, ends, scales := PhasorGeometry(arrows)
			if len(ends) != len(arrows) {
				t.Fatalf("PhasorGeometry gave %d end points for %d arrows", len(ends), len(arrows))
			}
			out, err := PhasorDiagram(arrows, "Test diagram")
			if err != nil {
				t.Fatal(err)
			}
			root := parseSVG(t, out)
			checkRoot(t, root)
			checkSelfContained(t, out)

			// Radius of the grid: the length of the radial marks.
			spokes := root.find("line", "spoke")
			if len(spokes) != 12 {
				t.Fatalf("%d radial marks, want 12 (every 30°)", len(spokes))
			}
			R := math.Hypot(spokes[0].num(t, "x2")-spokes[0].num(t, "x1"), spokes[0].num(t, "y2")-spokes[0].num(t, "y1"))
			if math.Abs(spokes[0].num(t, "x1")-cx) > svgTol || math.Abs(spokes[0].num(t, "y1")-cy) > svgTol {
				t.Errorf("spokes start at (%s, %s), centre is (%g, %g)", spokes[0].attr["x1"], spokes[0].attr["y1"], cx, cy)
			}

			// The legend must state each scale truthfully: ring value over
			// the radius of the first ring is the scale in units per pixel.
			rings := root.find("circle", "ring")
			if len(rings) == 0 {
				t.Fatal("no rings")
			}
			r1 := rings[0].num(t, "r")
			legend := root.find("text", "scale")
			if len(legend) != len(tc.rings) {
				t.Fatalf("%d legend rows, want %d", len(legend), len(tc.rings))
			}
			for _, row := range legend {
				f := strings.Fields(row.text) // "rings:", value, unit
				if len(f) != 3 {
					t.Fatalf("legend row %q", row.text)
				}
				if want := tc.rings[f[2]]; row.text != want {
					t.Errorf("legend row %q, want %q", row.text, want)
				}
				v, err := strconv.ParseFloat(f[1], 64)
				if err != nil || !is125(v) {
					t.Errorf("legend ring value %q is not a 1-2-5 number", f[1])
				}
				u := scales[f[2]]
				if math.Abs(v/r1-u) > 1e-3*u {
					t.Errorf("scale %s: legend says %g per %g px = %g/px, geometry says %g/px", f[2], v, r1, v/r1, u)
				}
			}
			for n, c := range rings {
				if got, want := c.num(t, "r"), float64(n+1)*r1; math.Abs(got-want) > 2*svgTol*float64(n+1) {
					t.Errorf("ring %d radius %g, want %g (evenly spaced)", n+1, got, want)
				}
				if c.num(t, "r") > R+svgTol {
					t.Errorf("ring %d radius %g beyond the grid radius %g", n+1, c.num(t, "r"), R)
				}
			}

			groups := root.find("g", "arrow")
			if len(groups) != len(arrows) {
				t.Fatalf("%d arrow groups, want %d", len(groups), len(arrows))
			}
			longest := map[string]float64{}
			for i, p := range tc.in {
				u := scales[p.scale]
				r := p.mag / u
				th := p.deg * math.Pi / 180
				// Expected end point: SVG's y axis points down.
				wx, wy := cx+r*math.Cos(th), cy-r*math.Sin(th)
				if math.Abs(ends[i][0]-wx) > 1e-9*R || math.Abs(ends[i][1]-wy) > 1e-9*R {
					t.Errorf("%s: PhasorGeometry end (%g, %g), want (%g, %g)", p.label, ends[i][0], ends[i][1], wx, wy)
				}
				longest[p.scale] = math.Max(longest[p.scale], r)
				g := groups[i]
				if p.mag == 0 {
					dots := g.find("circle", "zero")
					if len(dots) != 1 {
						t.Fatalf("%s: zero arrow without its dot", p.label)
					}
					if math.Abs(dots[0].num(t, "cx")-cx) > svgTol || math.Abs(dots[0].num(t, "cy")-cy) > svgTol {
						t.Errorf("%s: dot at (%s, %s), want the centre", p.label, dots[0].attr["cx"], dots[0].attr["cy"])
					}
				} else {
					heads := g.find("path", "head")
					shafts := g.find("line", "shaft")
					if len(heads) != 1 || len(shafts) != 1 {
						t.Fatalf("%s: want one shaft and one arrowhead", p.label)
					}
					hx, hy := parsePathStart(t, heads[0].attr["d"])
					if math.Abs(hx-wx) > svgTol || math.Abs(hy-wy) > svgTol {
						t.Errorf("%s: arrowhead tip (%g, %g) in the SVG, want (%g, %g)", p.label, hx, hy, wx, wy)
					}
					sh := shafts[0]
					if math.Abs(sh.num(t, "x1")-cx) > svgTol || math.Abs(sh.num(t, "y1")-cy) > svgTol {
						t.Errorf("%s: shaft starts at (%s, %s), want the centre (%g, %g)", p.label, sh.attr["x1"], sh.attr["y1"], cx, cy)
					}
					// The shaft runs from the centre towards the tip.
					sx, sy := sh.num(t, "x2")-cx, sh.num(t, "y2")-cy
					ls := math.Hypot(sx, sy)
					if ls <= 0 || ls > r+svgTol {
						t.Errorf("%s: shaft length %g, arrow length %g", p.label, ls, r)
					}
					if cross := sx*math.Sin(-th) - sy*math.Cos(th); math.Abs(cross) > 2*svgTol {
						t.Errorf("%s: shaft not along %g° (off by %g px)", p.label, p.deg, cross)
					}
				}
				if labels := g.find("text", "label"); len(labels) != 1 || !strings.Contains(labels[0].text, strings.ReplaceAll(p.label, "_", "")) {
					t.Errorf("%s: label missing", p.label)
				}
			}
			// Fit: no arrow beyond 90% of the radius, and the first scale with
			// a non-zero arrow reaches exactly 90% (the brief: "~90%").
			primary := ""
			for _, p := range tc.in {
				if p.mag > 0 {
					primary = p.scale
					break
				}
			}
			for k, l := range longest {
				if l > 0.9*R+svgTol {
					t.Errorf("scale %s: longest arrow %g px beyond 0.9·R = %g", k, l, 0.9*R)
				}
				if k == primary && math.Abs(l-0.9*R) > svgTol {
					t.Errorf("primary scale %s: longest arrow %g px, want 0.9·R = %g", k, l, 0.9*R)
				}
			}
		})
	}
}

// TestPhasorLabelsAndText checks the text of a diagram: subscripts as
// LANGUAGE.md section 3 states them ("The first `_` starts a subscript"),
// the angle labels every 30°, XML escaping (the text must read back through
// encoding/xml, per XML 1.0), and caption wrapping at spaces.
func TestPhasorLabelsAndText(t *testing.T) {
	cases := []struct {
		name     string
		arrows   []Arrow
		caption  string
		wantSub  string // text of the subscript tspan of the first label, "" for none
		wantText []string
	}{
		{
			name:     "subscript",
			arrows:   []Arrow{{Label: "V_an", Re: 230, Scale: "V"}},
			wantSub:  "an",
			wantText: []string{"0°", "30°", "90°", "330°"},
		},
		{
			name:    "no subscript",
			arrows:  []Arrow{{Label: "S", Re: 3, Im: 4, Scale: "kVA"}},
			caption: "Complex power",
		},
		{
			name:     "escaping",
			arrows:   []Arrow{{Label: "I_<1>&", Re: 1, Scale: "A & <B>"}},
			caption:  `load "A" < load 'B' & more`,
			wantText: []string{`load "A" < load 'B' & more`, "rings: 0.2 A & <B>"},
		},
		{
			name:     "subscript then tail",
			arrows:   []Arrow{{Label: "|V_LL| max", Re: 400, Scale: "V"}},
			wantSub:  "LL",
			wantText: []string{"|V", "| max"},
		},
		{
			name:    "long caption wraps",
			arrows:  []Arrow{{Label: "I_1", Re: 1, Scale: "A"}},
			wantSub: "1",
			caption: "Feeder F3 at the end of the cable run, phase currents during the " +
				"assumed single line to earth fault on phase a, source side",
			wantText: []string{"Feeder F3"},
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out, err := PhasorDiagram(tc.arrows, tc.caption)
			if err != nil {
				t.Fatal(err)
			}
			root := parseSVG(t, out)
			checkRoot(t, root)
			labels := root.find("text", "label")
			if len(labels) == 0 {
				t.Fatal("no label")
			}
			spans := labels[0].find("tspan", "")
			if tc.wantSub == "" {
				if len(spans) != 0 {
					t.Errorf("unexpected tspan in label %q", labels[0].text)
				}
			} else {
				if len(spans) == 0 || spans[0].text != tc.wantSub {
					t.Fatalf("label %q: want subscript %q", labels[0].text, tc.wantSub)
				}
				if fs := spans[0].num(t, "font-size"); fs >= phFontSize {
					t.Errorf("subscript font-size %g not smaller than %g", fs, phFontSize)
				}
				if dy := spans[0].num(t, "dy"); dy <= 0 {
					t.Errorf("subscript dy %g does not lower it", dy)
				}
			}
			all := root.text
			for _, want := range tc.wantText {
				if !strings.Contains(all, want) {
					t.Errorf("text %q missing", want)
				}
			}
			caps := root.find("text", "caption")
			if tc.caption == "" && len(caps) != 0 {
				t.Errorf("caption element for an empty caption")
			}
			if tc.caption != "" {
				if len(caps) != 1 {
					t.Fatalf("%d caption elements, want 1", len(caps))
				}
				got := strings.Join(strings.Fields(caps[0].text), " ")
				// Lines are split at spaces, so joined with single spaces
				// they give the caption back.
				var parts []string
				for _, sp := range caps[0].find("tspan", "") {
					parts = append(parts, sp.text)
				}
				if len([]rune(tc.caption)) > phWrap && len(parts) < 2 {
					t.Errorf("caption of %d characters not wrapped", len([]rune(tc.caption)))
				}
				for _, part := range parts {
					if n := len([]rune(part)); n > phWrap {
						t.Errorf("caption line of %d characters, more than %d", n, phWrap)
					}
				}
				if strings.Join(parts, " ") != strings.Join(strings.Fields(tc.caption), " ") || got == "" {
					t.Errorf("caption %q, want %q", strings.Join(parts, " "), tc.caption)
				}
			}
		})
	}
}

// TestPhasorLineStyles checks that scales differ in line style and are all
// drawn in black, so black-and-white print tells them apart (common
// practice for monochrome technical drawings).
func TestPhasorLineStyles(t *testing.T) {
	var arrows []Arrow
	units := []string{"V", "A", "Ω", "VA", "S", "W"}
	for i, u := range units {
		arrows = append(arrows, Arrow{Label: "x_" + u, Re: float64(i + 1), Im: 1, Scale: u})
	}
	out, err := PhasorDiagram(arrows, "")
	if err != nil {
		t.Fatal(err)
	}
	root := parseSVG(t, out)
	seen := map[string]string{}
	for i, sh := range root.find("line", "shaft") {
		d := sh.attr["stroke-dasharray"]
		if prev, ok := seen[d]; ok {
			t.Errorf("scales %s and %s share the dash pattern %q", prev, units[i], d)
		}
		seen[d] = units[i]
		if sh.attr["stroke"] != "#000" {
			t.Errorf("arrow %d: stroke %q, want black", i, sh.attr["stroke"])
		}
	}
	if len(seen) != len(units) {
		t.Errorf("%d distinct styles for %d scales", len(seen), len(units))
	}
}

// TestPhasorErrors checks that bad input gives an error value naming the
// problem, and no drawing.
func TestPhasorErrors(t *testing.T) {
	seven := make([]Arrow, 7)
	for i := range seven {
		seven[i] = Arrow{Label: "x", Re: 1, Scale: strconv.Itoa(i)}
	}
	cases := []struct {
		name   string
		arrows []Arrow
		want   string
	}{
		{"no arrows", nil, "no arrows"},
		{"NaN real part", []Arrow{{Label: "V_a", Re: math.NaN(), Scale: "V"}}, "non-finite"},
		{"infinite imaginary part", []Arrow{{Label: "V_a", Re: 1, Im: math.Inf(-1), Scale: "V"}}, "non-finite"},
		{"NaN after a good arrow", []Arrow{{Label: "V_a", Re: 1, Scale: "V"}, {Label: "I_a", Im: math.NaN(), Scale: "A"}}, "arrow 2"},
		{"too many scales", seven, "more than 6 scales"},
		{"magnitude too large", []Arrow{{Label: "x", Re: 1e281, Scale: "V"}}, "drawable range"},
		{"magnitude too small", []Arrow{{Label: "x", Re: 1e-281, Scale: "V"}}, "drawable range"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out, err := PhasorDiagram(tc.arrows, "c")
			if err == nil {
				t.Fatalf("no error; output %d bytes", len(out))
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not mention %q", err, tc.want)
			}
			if out != "" {
				t.Errorf("output alongside an error")
			}
			cx, cy, ends, scales := PhasorGeometry(tc.arrows)
			if cx != 0 || cy != 0 || ends != nil || scales != nil {
				t.Errorf("PhasorGeometry returned geometry for rejected input")
			}
		})
	}
}

// TestPhasorDeterministic checks that two renders give the same bytes.
func TestPhasorDeterministic(t *testing.T) {
	for _, tc := range phasorCases {
		t.Run(tc.name, func(t *testing.T) {
			a, err1 := PhasorDiagram(arrowsOf(tc.in), "caption")
			b, err2 := PhasorDiagram(arrowsOf(tc.in), "caption")
			if err1 != nil || err2 != nil {
				t.Fatal(err1, err2)
			}
			if a != b {
				t.Error("two renders differ")
			}
		})
	}
}
