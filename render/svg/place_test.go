package svg

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// Reference predicates for the geometric tests, written independently of
// the placement code (hand derivation, standard computational geometry):
// two closed rectangles intersect iff their x ranges and their y ranges
// both overlap; a segment meets a rectangle iff an end point is inside it
// or it crosses one of the rectangle's four edges, two segments crossing
// iff each one's end points lie on opposite sides (or on) the other's line
// (signs of the cross products, "orientation").
func refBoxesMeet(a, b box) bool {
	return a.x0 <= b.x1 && b.x0 <= a.x1 && a.y0 <= b.y1 && b.y0 <= a.y1
}

func orient(ax, ay, bx, by, cx, cy float64) float64 {
	return (bx-ax)*(cy-ay) - (by-ay)*(cx-ax)
}

func refSegsCross(p, q seg) bool {
	d1 := orient(q.x0, q.y0, q.x1, q.y1, p.x0, p.y0)
	d2 := orient(q.x0, q.y0, q.x1, q.y1, p.x1, p.y1)
	d3 := orient(p.x0, p.y0, p.x1, p.y1, q.x0, q.y0)
	d4 := orient(p.x0, p.y0, p.x1, p.y1, q.x1, q.y1)
	return d1*d2 <= 0 && d3*d4 <= 0 && !(d1 == 0 && d2 == 0 && d3 == 0 && d4 == 0)
}

func refSegMeetsBox(s seg, b box) bool {
	in := func(x, y float64) bool { return x >= b.x0 && x <= b.x1 && y >= b.y0 && y <= b.y1 }
	if in(s.x0, s.y0) || in(s.x1, s.y1) {
		return true
	}
	for _, e := range []seg{{b.x0, b.y0, b.x1, b.y0}, {b.x1, b.y0, b.x1, b.y1}, {b.x1, b.y1, b.x0, b.y1}, {b.x0, b.y1, b.x0, b.y0}} {
		if refSegsCross(s, e) {
			return true
		}
	}
	return false
}

// TestReferencePredicatesAgree: the placement's own box–segment test
// (Liang–Barsky) agrees with the orientation-based reference on random
// segments and boxes (fixed seed), so the property tests below check the
// placement against an independent predicate.
func TestReferencePredicatesAgree(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 1))
	for k := 0; k < 20000; k++ {
		x0, y0 := r.Float64()*100, r.Float64()*100
		b := box{x0, y0, x0 + 1 + r.Float64()*30, y0 + 1 + r.Float64()*20}
		s := seg{r.Float64() * 140, r.Float64() * 140, r.Float64() * 140, r.Float64() * 140}
		if b.hits(s) != refSegMeetsBox(s, b) {
			t.Fatalf("box %+v, segment %+v: hits %v, reference %v", b, s, b.hits(s), refSegMeetsBox(s, b))
		}
	}
}

// closeSet is a generated set of phasors that crowd together: n arrows of
// magnitudes 0.7 to 1.0 of one another within ±spread degrees of a common
// angle, labels like V_1 ... V_n (some longer), on one or two scales.
func closeSet(r *rand.Rand, n int, spread float64) []Arrow {
	centre := r.Float64() * 360
	twoScales := r.IntN(3) == 0
	names := []string{"V_%d", "I_L%d", "V_an%d", "S_%d", "E_s%d"}
	arrows := make([]Arrow, n)
	for i := range arrows {
		z := cmplx.Rect(230*(0.7+0.3*r.Float64()), (centre+spread*(2*r.Float64()-1))*math.Pi/180)
		a := Arrow{Label: fmt.Sprintf(names[r.IntN(len(names))], i+1), Re: real(z), Im: imag(z), Scale: "V"}
		if twoScales && i%2 == 1 {
			a.Scale, a.Re, a.Im = "A", a.Re/20, a.Im/20
		}
		arrows[i] = a
	}
	return arrows
}

// checkLabels asserts the placement's properties: no two label boxes meet,
// no label box meets a segment of any arrow (shaft or head edge, or a
// dot), every label box lies inside the drawing.
func checkLabels(t *testing.T, name string, arrows []Arrow) {
	t.Helper()
	L, err := phasorLayout(arrows)
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	geo, _, spots := layoutLabels(L, arrows)
	segs := geoSegs(geo)
	for i, a := range spots {
		if a.box.x0 < 0 || a.box.x1 > phWidth || a.box.y0 < 0 {
			t.Errorf("%s: label %q at %+v outside the drawing", name, arrows[i].Label, a.box)
		}
		for j := i + 1; j < len(spots); j++ {
			if refBoxesMeet(a.box, spots[j].box) {
				t.Errorf("%s: labels %q and %q overlap: %+v, %+v", name, arrows[i].Label, arrows[j].Label, a.box, spots[j].box)
			}
		}
		for k, s := range segs {
			if refSegMeetsBox(s, a.box) {
				t.Errorf("%s: label %q at %+v meets segment %d %+v", name, arrows[i].Label, a.box, k, s)
			}
		}
	}
}

// TestLabelsNeverOverlap: for generated sets of close phasors (fixed seed),
// no two label boxes intersect and no label box intersects an arrow.
func TestLabelsNeverOverlap(t *testing.T) {
	r := rand.New(rand.NewPCG(2026, 12))
	for k := 0; k < 300; k++ {
		n := 2 + r.IntN(9)
		spread := []float64{0.5, 3, 10, 40}[r.IntN(4)]
		checkLabels(t, fmt.Sprintf("set %d (%d arrows within ±%g°)", k, n, spread), closeSet(r, n, spread))
	}
	// too many to fit around their tips: the rest are set below the grid,
	// still clear of every label and arrow
	checkLabels(t, "crowded, 150 arrows", closeSet(r, 150, 180))
}

// TestLabelsOfTheBlot: the case of the issue, V_1, V_2, V_3 within a
// degree and a volt of one another (they printed as one blot), a
// three-phase set with zero sequence dot, and a sum drawn tip to tail.
func TestLabelsOfTheBlot(t *testing.T) {
	rect := func(m, deg float64) (float64, float64) {
		z := cmplx.Rect(m, deg*math.Pi/180)
		return real(z), imag(z)
	}
	var blot []Arrow
	for i, p := range [][2]float64{{230, 0}, {231, 0.5}, {229, -0.5}} {
		re, im := rect(p[0], p[1])
		blot = append(blot, Arrow{Label: fmt.Sprintf("V_%d", i+1), Re: re, Im: im, Scale: "V"})
	}
	checkLabels(t, "V_1, V_2, V_3", blot)
	set := []Arrow{{Label: "V_0", Scale: "V"}}
	for i, deg := range []float64{0, -120, 120} {
		re, im := rect(230, deg)
		set = append(set, Arrow{Label: "V_" + string(rune('a'+i)), Re: re, Im: im, Scale: "V"})
	}
	checkLabels(t, "three phases and a zero", set)
	// V_s = V_r + I·Z drawn tip to tail: V_r, I·Z from V_r, V_s
	vr := complex(230, 0)
	iz := cmplx.Rect(12, 80*math.Pi/180)
	sum := []Arrow{
		{Label: "V_r", Re: real(vr), Im: imag(vr), Scale: "V"},
		{Runs: []Run{{Text: "I"}, {Text: "L", Shift: ShiftSub}, {Text: "·Z"}, {Text: "c", Shift: ShiftSub}}, Re: real(iz), Im: imag(iz), X0: real(vr), Y0: imag(vr), Scale: "V"},
		{Label: "V_s", Re: real(vr + iz), Im: imag(vr + iz), Scale: "V"},
	}
	checkLabels(t, "a sum tip to tail", sum)
}

// TestTipToTail: an arrow with a tail starts at that point and ends at the
// tail plus its value, on the same scale as the arrow from the origin
// whose tip it starts at. Reference: hand vector addition, checked by
// math/cmplx: (3 + j4) + (1 − j2) = 4 + j2, and the chain continues,
// (4 + j2) + (−2 − j1) = 2 + j1.
func TestTipToTail(t *testing.T) {
	a := complex(3, 4)
	b := complex(1, -2)
	c := complex(-2, -1)
	if a+b != complex(4, 2) || a+b+c != complex(2, 1) {
		t.Fatal("hand sums disagree with complex arithmetic")
	}
	arrows := []Arrow{
		{Label: "a", Re: real(a), Im: imag(a), Scale: "V"},
		{Label: "b", Re: real(b), Im: imag(b), X0: real(a), Y0: imag(a), Scale: "V"},
		{Label: "c", Re: real(c), Im: imag(c), X0: real(a + b), Y0: imag(a + b), Scale: "V"},
	}
	L, err := phasorLayout(arrows)
	if err != nil {
		t.Fatal(err)
	}
	u := L.scales[0].perPixel
	px := func(z complex128) [2]float64 { return [2]float64{phCX + real(z)/u, phCY - imag(z)/u} }
	near := func(p, q [2]float64) bool { return math.Hypot(p[0]-q[0], p[1]-q[1]) < 1e-9 }
	for i, want := range []struct{ tail, tip complex128 }{{0, a}, {a, a + b}, {a + b, a + b + c}} {
		if !near(L.tails[i], px(want.tail)) || !near(L.ends[i], px(want.tip)) {
			t.Errorf("arrow %s: tail %v tip %v, want %v and %v", arrows[i].Label, L.tails[i], L.ends[i], px(want.tail), px(want.tip))
		}
	}
	if L.tails[1] != L.ends[0] || L.tails[2] != L.ends[1] {
		t.Errorf("a tail is not exactly at the earlier tip")
	}
	// the furthest point, |a| = 5, reaches 90% of the grid radius
	if r := math.Hypot(L.ends[0][0]-phCX, L.ends[0][1]-phCY); math.Abs(r-phFill*phRadius) > 1e-9 {
		t.Errorf("|a| drawn %g px, want %g", r, phFill*phRadius)
	}
	out, err := PhasorDiagram(arrows, "")
	if err != nil {
		t.Fatal(err)
	}
	root := parseSVG(t, out)
	shafts := root.find("line", "shaft")
	if len(shafts) != 3 {
		t.Fatalf("%d shafts, want 3", len(shafts))
	}
	if x, y := shafts[1].num(t, "x1"), shafts[1].num(t, "y1"); math.Abs(x-px(a)[0]) > svgTol || math.Abs(y-px(a)[1]) > svgTol {
		t.Errorf("shaft of b starts at (%g, %g), want the tip of a %v", x, y, px(a))
	}
}

// TestTipToTailFits: a chain that reaches further than any single arrow
// is scaled so its furthest tip stays on the grid: 3 + j0 then 3 + j0 from
// it reaches 6 (hand sum), which is drawn at 90% of the radius.
func TestTipToTailFits(t *testing.T) {
	L, err := phasorLayout([]Arrow{{Label: "a", Re: 3, Scale: "A"}, {Label: "b", Re: 3, X0: 3, Scale: "A"}})
	if err != nil {
		t.Fatal(err)
	}
	if r := L.ends[1][0] - phCX; math.Abs(r-phFill*phRadius) > 1e-9 {
		t.Errorf("tip of the chain at %g px, want %g", r, phFill*phRadius)
	}
}

// TestLabelWidthCovers: the estimated label width is at least the width
// the text takes in DejaVu Sans, the usual sans-serif face of a Linux
// browser, whose advances (in em, from memory of its metrics, so rounded)
// are V 0.684, I 0.295, Z 0.685, S 0.635, W 0.989, digits 0.636, a 0.613,
// n 0.634, m 0.974, · 0.318, φ 0.712 (estimated).
func TestLabelWidthCovers(t *testing.T) {
	cases := []struct {
		name string
		runs []Run
		em   float64 // width in DejaVu Sans, base-size em (small runs ×0.75)
	}{
		{"V_1", []Run{{Text: "V"}, {Text: "1", Shift: ShiftSub}}, 0.684 + 0.75*0.636},
		{"I_L·Z_c", []Run{{Text: "I"}, {Text: "L", Shift: ShiftSub}, {Text: "·Z"}, {Text: "c", Shift: ShiftSub}}, 0.295 + 0.75*0.557 + 0.318 + 0.685 + 0.75*0.55},
		{"W_mn", []Run{{Text: "W"}, {Text: "mn", Shift: ShiftSub}}, 0.989 + 0.75*(0.974+0.634)},
		{"S_φa", []Run{{Text: "S"}, {Text: "φa", Shift: ShiftSub}}, 0.635 + 0.75*(0.712+0.613)},
	}
	for _, c := range cases {
		w, h, base := labelSize(c.runs, phFontSize)
		if w < c.em*phFontSize {
			t.Errorf("%s: estimated width %g px, the text takes %g px", c.name, w, c.em*phFontSize)
		}
		if h < phFontSize || base <= 0 || base >= h {
			t.Errorf("%s: height %g, baseline %g", c.name, h, base)
		}
	}
}
