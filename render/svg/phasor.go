package svg

import (
	"fmt"
	"math"
	"strings"
)

// Arrow is one phasor, drawn from the origin or from a given tail.
type Arrow struct {
	// Label is plain text shown near the tip, e.g. "V_an". The first '_'
	// starts a subscript: the run of letters, digits and '_' after it is
	// drawn smaller and lowered ("V" with subscript "an"); text after that
	// run returns to the baseline. Runs, when given, is the label instead,
	// already split into baseline, subscript and superscript text.
	Label string
	Runs  []Run
	// Re and Im are the value in the scale's unit (already converted by the
	// caller), e.g. volts.
	Re, Im float64
	// X0 and Y0 are the arrow's tail in the scale's unit (zero: the
	// origin), e.g. the tip of another arrow of the scale to draw a sum
	// tip to tail.
	X0, Y0 float64
	// Scale is the scale key and unit label, e.g. "V" or "A". Arrows with
	// the same Scale share a scale.
	Scale string
}

// Layout of a phasor diagram, in SVG user units (1 user unit = 1 px at the
// diagram's natural size).
const (
	phWidth     = 360.0 // width of the drawing
	phRadius    = 130.0 // radius R of the polar grid
	phMargin    = 30.0  // space between the grid and the edges, for angle labels
	phCX        = phWidth / 2
	phCY        = phMargin + phRadius
	phFill      = 0.9 // the longest arrow of the primary scale reaches phFill·R
	phMinRings  = 2.0 // ring count limits of the primary scale, see phasorLayout
	phMaxRings  = 8.0
	phHeadLen   = 9.0  // arrowhead length
	phHeadHalf  = 3.5  // arrowhead half-width at its base
	phLabelGap  = 8.0  // distance of a label from its shaft
	phLabelBack = 14.0 // distance of a label back from its tip
	phFontSize  = 11.0
	phSmallFont = 9.0
	phLegendRow = 16.0
	phCaptionLn = 14.0
	phWrap      = 56 // caption characters per line
)

// phScale is one scale of a diagram.
type phScale struct {
	key      string
	max      float64 // largest arrow magnitude on this scale
	ringD    int     // ring value = ringD·10^ringE, in the scale's unit
	ringE    int
	perPixel float64 // units per pixel
	style    style
}

// phLayout is the computed geometry of a diagram.
type phLayout struct {
	rho    float64 // ring spacing in pixels
	rings  int     // number of rings drawn (at rho, 2·rho, ... ≤ R)
	scales []phScale
	index  []int // arrow i uses scales[index[i]]
	tails  [][2]float64
	ends   [][2]float64
	mags   []float64
}

// phasorLayout validates the arrows and computes the scales and end points
// by the rule documented on PhasorGeometry.
func phasorLayout(arrows []Arrow) (*phLayout, error) {
	if len(arrows) == 0 {
		return nil, fmt.Errorf("svg: phasor diagram: no arrows")
	}
	L := &phLayout{index: make([]int, len(arrows)), mags: make([]float64, len(arrows))}
	byKey := map[string]int{}
	for i, a := range arrows {
		label := a.Label
		if len(a.Runs) > 0 {
			label = plainText(a.Runs)
		}
		if !finite(a.Re) || !finite(a.Im) || !finite(a.X0) || !finite(a.Y0) {
			return nil, fmt.Errorf("svg: phasor diagram: arrow %d (%q) has a non-finite value %g%+gj (tail %g%+gj)", i+1, label, a.Re, a.Im, a.X0, a.Y0)
		}
		m := math.Hypot(a.Re, a.Im)
		if m > maxMagnitude || (m != 0 && m < minPositive) {
			return nil, fmt.Errorf("svg: phasor diagram: arrow %d (%q) has magnitude %g, outside the drawable range [%g, %g]", i+1, label, m, minPositive, maxMagnitude)
		}
		// the furthest the arrow reaches from the centre: its tail or tip
		reach := math.Max(m, math.Max(math.Hypot(a.X0, a.Y0), math.Hypot(a.X0+a.Re, a.Y0+a.Im)))
		if reach > maxMagnitude {
			return nil, fmt.Errorf("svg: phasor diagram: arrow %d (%q) reaches magnitude %g from its tail, beyond %g", i+1, label, reach, maxMagnitude)
		}
		k, ok := byKey[a.Scale]
		if !ok {
			if len(L.scales) == len(lineStyles) {
				return nil, fmt.Errorf("svg: phasor diagram: more than %d scales (one per unit); line styles could no longer be told apart", len(lineStyles))
			}
			k = len(L.scales)
			byKey[a.Scale] = k
			L.scales = append(L.scales, phScale{key: a.Scale, style: lineStyles[k]})
		}
		L.index[i] = k
		L.mags[i] = m
		L.scales[k].max = math.Max(L.scales[k].max, reach)
	}

	primary := -1
	for k, s := range L.scales {
		if s.max > 0 {
			primary = k
			break
		}
	}
	if primary < 0 {
		L.rho = phRadius / 5
		for k := range L.scales {
			L.scales[k].ringD, L.scales[k].ringE = 1, 0
		}
	} else {
		mp := L.scales[primary].max
		bestScore := -1.0
		var bestD, bestE int
		// Candidates from the largest v_p (fewest rings) down.
		for d, e := niceFloor(mp / phMinRings); mp/val125(d, e) <= phMaxRings*(1+1e-12); d, e = prev125(d, e) {
			vp := val125(d, e)
			score := 1.0
			for k, s := range L.scales {
				if k == primary || s.max == 0 {
					continue
				}
				need := s.max * vp / mp
				f := need / val125(niceCeil(need))
				score = math.Min(score, f)
			}
			if score >= bestScore { // ties go to the smaller v_p
				bestScore, bestD, bestE = score, d, e
			}
		}
		vp := val125(bestD, bestE)
		L.rho = phFill * phRadius * vp / mp
		for k, s := range L.scales {
			switch {
			case k == primary:
				L.scales[k].ringD, L.scales[k].ringE = bestD, bestE
			case s.max == 0:
				L.scales[k].ringD, L.scales[k].ringE = 1, 0
			default:
				L.scales[k].ringD, L.scales[k].ringE = niceCeil(s.max * vp / mp)
			}
		}
	}
	for k := range L.scales {
		L.scales[k].perPixel = val125(L.scales[k].ringD, L.scales[k].ringE) / L.rho
	}
	L.rings = int(math.Floor(phRadius/L.rho + 1e-9))

	L.ends = make([][2]float64, len(arrows))
	L.tails = make([][2]float64, len(arrows))
	for i, a := range arrows {
		u := L.scales[L.index[i]].perPixel
		// SVG's y axis points down: the imaginary part is drawn upwards.
		L.tails[i] = [2]float64{phCX + a.X0/u, phCY - a.Y0/u}
		L.ends[i] = [2]float64{phCX + (a.X0+a.Re)/u, phCY - (a.Y0+a.Im)/u}
	}
	return L, nil
}

// PhasorGeometry returns the geometry PhasorDiagram draws for the same
// arrows, in the SVG's user coordinates: the centre (cx, cy) of the polar
// grid, the end point of each arrow (x = cx + Re/u, y = cy − Im/u, u the
// arrow's scale in units per pixel; SVG's y axis points down), and each
// scale's units per pixel keyed by Arrow.Scale. A zero arrow ends at the
// centre. For arrows PhasorDiagram rejects, it returns zeros and nil.
//
// The scales: they are taken in the order of their first arrow; scale k has
// the largest magnitude M_k its arrows reach (the largest of |Re + j·Im|
// and the magnitudes of each arrow's tail X0 + j·Y0 and tip, so an arrow
// drawn tip to tail stays on the grid) and a ring value
// v_k of the form d·10^e, d ∈ {1, 2, 5}. All scales share the ring spacing ρ
// pixels, so scale k draws v_k units per ρ pixels (u_k = v_k/ρ units per
// pixel), and the rings are the circles of radius n·ρ ≤ R, n = 1, 2, ...,
// where R is the radius of the grid (130 user units).
//
// The primary scale p is the first scale with M_p > 0. For each candidate
// ring value v_p with 2 ≤ M_p/v_p ≤ 8, ρ = 0.9·R·v_p/M_p, so the longest
// arrow of the primary scale reaches exactly 90% of R; every other scale
// with M_k > 0 takes the smallest v_k ≥ M_k·v_p/M_p, so its longest arrow
// reaches at most 90% of R. Of the candidates, the one whose least-filled
// other scale reaches furthest is chosen (ties: the smaller v_p, that is
// more rings). A scale whose arrows are all zero gets v_k = 1; if every
// arrow is zero, ρ = R/5.
func PhasorGeometry(arrows []Arrow) (cx, cy float64, ends [][2]float64, scales map[string]float64) {
	L, err := phasorLayout(arrows)
	if err != nil {
		return 0, 0, nil, nil
	}
	scales = make(map[string]float64, len(L.scales))
	for _, s := range L.scales {
		scales[s.key] = s.perPixel
	}
	return phCX, phCY, L.ends, scales
}

// PhasorDiagram draws the arrows from a common origin on one polar grid and
// returns the <svg> element.
//
// An arrow with a tail (X0, Y0) starts there instead of at the centre, so
// a sum drawn tip to tail: its end point is the tail plus the value.
// The grid has rings at round values of the primary (first non-zero) scale
// and radial marks every 30°, labelled 0°, 30°, ..., 330° counter-clockwise
// from the positive real axis. The scales are chosen as documented on
// PhasorGeometry: every ring value is a 1-2-5 number, the
// longest arrow of the primary scale reaches 90% of the grid radius, and no
// arrow reaches beyond it. Each scale has its own line style (solid, dashed,
// dotted, dash-dot, long dash, dash-dot-dot: at most six scales), and the
// legend under the grid shows each style with its ring value, e.g.
// "rings: 50 V". Each arrow has a filled arrowhead with its tip at the end
// point; a zero arrow is a dot at its tail (the centre) with its label.
// Labels are placed by placeLabels: near their tip where they clash with
// no other label and no arrow, else further away with a thin leader line
// to the tip. A non-empty caption is written under the legend.
//
// It returns an error for no arrows, a non-finite Re or Im, a magnitude
// above 1e280 or below 1e-280 (but not zero), or more than six scales.
func PhasorDiagram(arrows []Arrow, caption string) (string, error) {
	L, err := phasorLayout(arrows)
	if err != nil {
		return "", err
	}
	geo, runs, spots := layoutLabels(L, arrows)
	legendTop := phCY + phRadius + phMargin
	for _, sp := range spots {
		if sp.spill {
			legendTop = math.Max(legendTop, sp.box.y1+phLegendRow/2)
		}
	}
	capLines := wrapWords(caption, phWrap)
	height := legendTop + phLegendRow*float64(len(L.scales)) + 6
	if len(capLines) > 0 {
		height += phCaptionLn*float64(len(capLines)) + 4
	}
	title := strings.Join(strings.Fields(caption), " ")
	if title == "" {
		labels := make([]string, len(arrows))
		for i := range arrows {
			labels[i] = plainText(runs[i])
		}
		title = "Phasor diagram: " + strings.Join(labels, ", ")
	}

	var w writer
	w.b = make([]byte, 0, 8192)
	svgOpen(&w, phWidth, height, title)

	// Polar grid.
	w.raw(`<g class="grid" fill="none" stroke="#888" stroke-width="0.5">` + "\n")
	for n := 1; n <= L.rings; n++ {
		w.raw(`<circle class="ring"`)
		w.attr("cx", phCX)
		w.attr("cy", phCY)
		w.attr("r", float64(n)*L.rho)
		w.raw("/>\n")
	}
	for deg := 0; deg < 360; deg += 30 {
		th := float64(deg) * math.Pi / 180
		w.raw(`<line class="spoke"`)
		w.attr("x1", phCX)
		w.attr("y1", phCY)
		w.attr("x2", phCX+phRadius*math.Cos(th))
		w.attr("y2", phCY-phRadius*math.Sin(th))
		if deg%90 == 0 {
			w.raw(` stroke="#444"`)
		}
		w.raw("/>\n")
	}
	w.raw("</g>\n")
	w.raw(`<g class="angles" font-size="9" text-anchor="middle" fill="#000">` + "\n")
	for deg := 0; deg < 360; deg += 30 {
		x, y := angleLabelAt(deg)
		w.raw(`<text`)
		w.attr("x", x)
		w.attr("y", y)
		w.raw(`>`)
		w.text(fmt.Sprintf("%d°", deg))
		w.raw("</text>\n")
	}
	w.raw("</g>\n")

	// Arrows, each with its label.
	for i, g := range geo {
		w.raw(`<g class="arrow">` + "\n")
		if g.zero {
			w.raw(`<circle class="zero"`)
			w.attr("cx", g.tail[0])
			w.attr("cy", g.tail[1])
			w.raw(` r="2.50" fill="#000"/>` + "\n")
			writeSpot(&w, spots[i], runs[i])
			w.raw("</g>\n")
			continue
		}
		st := L.scales[L.index[i]].style
		w.raw(`<line class="shaft" fill="none" stroke="#000"`)
		w.attr("stroke-width", st.width)
		if st.dash != "" {
			w.raw(` stroke-dasharray="` + st.dash + `"`)
		}
		w.attr("x1", g.tail[0])
		w.attr("y1", g.tail[1])
		w.attr("x2", g.base[0])
		w.attr("y2", g.base[1])
		w.raw("/>\n")
		w.raw(`<path class="head" fill="#000" stroke="none" d="M`)
		for k, p := range [3][2]float64{g.tip, g.c1, g.c2} {
			if k > 0 {
				w.raw(" L")
			}
			w.num(p[0])
			w.raw(",")
			w.num(p[1])
		}
		w.raw(` Z"/>` + "\n")
		writeSpot(&w, spots[i], runs[i])
		w.raw("</g>\n")
	}
	// Legend: one row per scale, its line style and its ring value.
	w.raw(`<g class="legend" font-size="11">` + "\n")
	for k, s := range L.scales {
		y := legendTop + phLegendRow*float64(k) + 8
		w.raw(`<line fill="none" stroke="#000"`)
		w.attr("stroke-width", s.style.width)
		if s.style.dash != "" {
			w.raw(` stroke-dasharray="` + s.style.dash + `"`)
		}
		w.attr("x1", 20)
		w.attr("y1", y-4)
		w.attr("x2", 56)
		w.attr("y2", y-4)
		w.raw("/>\n")
		w.raw(`<text class="scale"`)
		w.attr("x", 64)
		w.attr("y", y)
		w.raw(`>`)
		text := "rings: " + plainNumber(s.ringD, s.ringE)
		if s.key != "" {
			text += " " + s.key
		}
		w.text(text)
		w.raw("</text>\n")
	}
	w.raw("</g>\n")

	if len(capLines) > 0 {
		y := legendTop + phLegendRow*float64(len(L.scales)) + 6 + phCaptionLn
		w.raw(`<text class="caption" font-size="11" text-anchor="middle"`)
		w.attr("x", phCX)
		w.attr("y", y)
		w.raw(`>`)
		for i, line := range capLines {
			w.raw(`<tspan`)
			w.attr("x", phCX)
			if i > 0 {
				w.attr("dy", phCaptionLn)
			}
			w.raw(`>`)
			w.text(line)
			w.raw(`</tspan>`)
		}
		w.raw("</text>\n")
	}
	w.raw("</svg>\n")
	return w.String(), nil
}

// CheckPhasors returns the error PhasorDiagram would return for the
// arrows, without drawing them.
func CheckPhasors(arrows []Arrow) error {
	_, err := phasorLayout(arrows)
	return err
}

// arrowGeo is an arrow as drawn, in user units: tail, tip, the base of
// the arrowhead and its two corners; zero for a dot (a zero value).
type arrowGeo struct {
	tail, tip, base, c1, c2 [2]float64
	zero                    bool
}

// arrowGeometry computes every arrow's drawn geometry.
func arrowGeometry(L *phLayout) []arrowGeo {
	geo := make([]arrowGeo, len(L.ends))
	for i := range geo {
		g := &geo[i]
		g.tail, g.tip = L.tails[i], L.ends[i]
		ox, oy, tx, ty := g.tail[0], g.tail[1], g.tip[0], g.tip[1]
		length := math.Hypot(tx-ox, ty-oy)
		if L.mags[i] == 0 || length == 0 {
			g.zero = true
			continue
		}
		ux, uy := (tx-ox)/length, (ty-oy)/length // unit vector, SVG axes
		head := math.Min(phHeadLen, length/2)
		half := phHeadHalf * head / phHeadLen
		bx, by := tx-ux*head, ty-uy*head
		g.base = [2]float64{bx, by}
		g.c1 = [2]float64{bx - uy*half, by + ux*half}
		g.c2 = [2]float64{bx + uy*half, by - ux*half}
	}
	return geo
}

// geoSegs are the segments labels keep clear of: every shaft and the
// edges of every arrowhead, and a cross over each dot.
func geoSegs(geo []arrowGeo) []seg {
	var segs []seg
	for _, g := range geo {
		if g.zero {
			x, y := g.tail[0], g.tail[1]
			segs = append(segs, seg{x - 2.5, y, x + 2.5, y}, seg{x, y - 2.5, x, y + 2.5})
			continue
		}
		segs = append(segs, seg{g.tail[0], g.tail[1], g.tip[0], g.tip[1]},
			seg{g.tip[0], g.tip[1], g.c1[0], g.c1[1]}, seg{g.tip[0], g.tip[1], g.c2[0], g.c2[1]},
			seg{g.c1[0], g.c1[1], g.c2[0], g.c2[1]})
	}
	return segs
}

// angleLabelAt is the anchor (middle of the baseline) of the grid's label
// of the angle deg.
func angleLabelAt(deg int) (float64, float64) {
	th := float64(deg) * math.Pi / 180
	return phCX + (phRadius+14)*math.Cos(th), phCY - (phRadius+14)*math.Sin(th) + phSmallFont*0.35
}

// angleBoxes are the boxes of the grid's angle labels.
func angleBoxes() []box {
	var out []box
	for deg := 0; deg < 360; deg += 30 {
		x, y := angleLabelAt(deg)
		out = append(out, angleLabelBox(fmt.Sprintf("%d°", deg), x, y, phSmallFont))
	}
	return out
}

// writeSpot writes a placed label and its leader line.
func writeSpot(w *writer, sp labelSpot, runs []Run) {
	if sp.leader {
		w.raw(`<line class="leader" stroke="#000" stroke-width="0.5"`)
		w.attr("x1", sp.lx)
		w.attr("y1", sp.ly)
		w.attr("x2", sp.mx)
		w.attr("y2", sp.my)
		w.raw("/>\n")
	}
	w.raw(`<text class="label" font-size="11"`)
	w.attr("x", sp.box.x0)
	w.attr("y", sp.box.y0+sp.base)
	w.raw(`>`)
	writeRuns(w, runs, phFontSize)
	w.raw("</text>\n")
}

// layoutLabels computes the drawn geometry of the arrows, their labels as
// runs, and where each label goes.
func layoutLabels(L *phLayout, arrows []Arrow) ([]arrowGeo, [][]Run, []labelSpot) {
	geo := arrowGeometry(L)
	runs := make([][]Run, len(arrows))
	reqs := make([]labelReq, len(arrows))
	for i, a := range arrows {
		runs[i] = runsOf(a)
		lw, lh, lb := labelSize(runs[i], phFontSize)
		reqs[i] = labelReq{w: lw, h: lh, base: lb, tail: L.tails[i], tip: L.ends[i]}
	}
	spots := placeLabels(reqs, geoSegs(geo), angleBoxes(), box{2, 2, phWidth - 2, phCY + phRadius + phMargin - 2})
	return geo, runs, spots
}
