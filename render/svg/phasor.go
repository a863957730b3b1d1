package svg

import (
	"fmt"
	"math"
	"strings"
)

// Arrow is one phasor drawn from the origin.
type Arrow struct {
	// Label is plain text shown near the tip, e.g. "V_an". The first '_'
	// starts a subscript: the run of letters, digits and '_' after it is
	// drawn smaller and lowered ("V" with subscript "an"); text after that
	// run returns to the baseline.
	Label string
	// Re and Im are the value in the scale's unit (already converted by the
	// caller), e.g. volts.
	Re, Im float64
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
		if !finite(a.Re) || !finite(a.Im) {
			return nil, fmt.Errorf("svg: phasor diagram: arrow %d (%q) has a non-finite value %g%+gj", i+1, a.Label, a.Re, a.Im)
		}
		m := math.Hypot(a.Re, a.Im)
		if m > maxMagnitude || (m != 0 && m < minPositive) {
			return nil, fmt.Errorf("svg: phasor diagram: arrow %d (%q) has magnitude %g, outside the drawable range [%g, %g]", i+1, a.Label, m, minPositive, maxMagnitude)
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
		L.scales[k].max = math.Max(L.scales[k].max, m)
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
	for i, a := range arrows {
		u := L.scales[L.index[i]].perPixel
		// SVG's y axis points down: the imaginary part is drawn upwards.
		L.ends[i] = [2]float64{phCX + a.Re/u, phCY - a.Im/u}
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
// the largest magnitude M_k = max |Re + j·Im| of its arrows and a ring value
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
// The grid has rings at round values of the primary (first non-zero) scale
// and radial marks every 30°, labelled 0°, 30°, ..., 330° counter-clockwise
// from the positive real axis. The scales are chosen as documented on
// PhasorGeometry: every ring value is a 1-2-5 number, the
// longest arrow of the primary scale reaches 90% of the grid radius, and no
// arrow reaches beyond it. Each scale has its own line style (solid, dashed,
// dotted, dash-dot, long dash, dash-dot-dot: at most six scales), and the
// legend under the grid shows each style with its ring value, e.g.
// "rings: 50 V". Each arrow has a filled arrowhead with its tip at the end
// point and its label beside the tip; a zero arrow is a dot at the centre
// with its label. A non-empty caption is written under the legend.
//
// It returns an error for no arrows, a non-finite Re or Im, a magnitude
// above 1e280 or below 1e-280 (but not zero), or more than six scales.
func PhasorDiagram(arrows []Arrow, caption string) (string, error) {
	L, err := phasorLayout(arrows)
	if err != nil {
		return "", err
	}
	legendTop := phCY + phRadius + phMargin
	capLines := wrapWords(caption, phWrap)
	height := legendTop + phLegendRow*float64(len(L.scales)) + 6
	if len(capLines) > 0 {
		height += phCaptionLn*float64(len(capLines)) + 4
	}
	title := strings.Join(strings.Fields(caption), " ")
	if title == "" {
		labels := make([]string, len(arrows))
		for i, a := range arrows {
			labels[i] = a.Label
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
		th := float64(deg) * math.Pi / 180
		w.raw(`<text`)
		w.attr("x", phCX+(phRadius+14)*math.Cos(th))
		w.attr("y", phCY-(phRadius+14)*math.Sin(th)+phSmallFont*0.35)
		w.raw(`>`)
		w.text(fmt.Sprintf("%d°", deg))
		w.raw("</text>\n")
	}
	w.raw("</g>\n")

	// Arrows.
	zeros := 0
	for i, a := range arrows {
		st := L.scales[L.index[i]].style
		w.raw(`<g class="arrow">` + "\n")
		if L.mags[i] == 0 {
			w.raw(`<circle class="zero"`)
			w.attr("cx", phCX)
			w.attr("cy", phCY)
			w.raw(` r="2.50" fill="#000"/>` + "\n")
			w.raw(`<text class="label" font-size="11"`)
			w.attr("x", phCX+6)
			w.attr("y", phCY-6-float64(zeros)*(phFontSize+2))
			w.raw(`>`)
			writeLabel(&w, a.Label, phFontSize)
			w.raw("</text>\n</g>\n")
			zeros++
			continue
		}
		tx, ty := L.ends[i][0], L.ends[i][1]
		length := math.Hypot(tx-phCX, ty-phCY)
		ux, uy := (tx-phCX)/length, (ty-phCY)/length // unit vector, SVG axes
		head := math.Min(phHeadLen, length/2)
		half := phHeadHalf * head / phHeadLen
		bx, by := tx-ux*head, ty-uy*head // base of the arrowhead
		w.raw(`<line class="shaft" fill="none" stroke="#000"`)
		w.attr("stroke-width", st.width)
		if st.dash != "" {
			w.raw(` stroke-dasharray="` + st.dash + `"`)
		}
		w.attr("x1", phCX)
		w.attr("y1", phCY)
		w.attr("x2", bx)
		w.attr("y2", by)
		w.raw("/>\n")
		w.raw(`<path class="head" fill="#000" stroke="none" d="M`)
		w.num(tx)
		w.raw(",")
		w.num(ty)
		w.raw(" L")
		w.num(bx - uy*half)
		w.raw(",")
		w.num(by + ux*half)
		w.raw(" L")
		w.num(bx + uy*half)
		w.raw(",")
		w.num(by - ux*half)
		w.raw(` Z"/>` + "\n")
		// Label beside the tip, on the counter-clockwise side of the shaft
		// (normal n = u turned by +90° on the page), anchored so that the
		// text runs away from the shaft. Keeping it within the arrow's
		// radius keeps it clear of the angle labels outside the grid.
		nx, ny := uy, -ux
		back := math.Min(phLabelBack, length/2)
		lx, ly := tx-ux*back+nx*phLabelGap, ty-uy*back+ny*phLabelGap
		anchor := "middle"
		switch {
		case nx > 0.3:
			anchor = "start"
		case nx < -0.3:
			anchor = "end"
		}
		switch {
		case ny > 0.3: // text below the anchor point
			ly += phFontSize * 0.8
		case ny >= -0.3: // text centred on the anchor point
			ly += phFontSize * 0.35
		}
		w.raw(`<text class="label" font-size="11" text-anchor="` + anchor + `"`)
		w.attr("x", lx)
		w.attr("y", ly)
		w.raw(`>`)
		writeLabel(&w, a.Label, phFontSize)
		w.raw("</text>\n</g>\n")
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
