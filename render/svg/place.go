package svg

import (
	"math"
	"unicode/utf8"
)

// box is an axis-aligned rectangle in user units, x0 < x1, y0 < y1.
type box struct{ x0, y0, x1, y1 float64 }

func (b box) inflate(d float64) box { return box{b.x0 - d, b.y0 - d, b.x1 + d, b.y1 + d} }

// overlap is the area b and c share.
func (b box) overlap(c box) float64 {
	w := math.Min(b.x1, c.x1) - math.Max(b.x0, c.x0)
	h := math.Min(b.y1, c.y1) - math.Max(b.y0, c.y0)
	if w <= 0 || h <= 0 {
		return 0
	}
	return w * h
}

func (b box) within(c box) bool { return b.x0 >= c.x0 && b.y0 >= c.y0 && b.x1 <= c.x1 && b.y1 <= c.y1 }

// seg is a line segment from (x0, y0) to (x1, y1).
type seg struct{ x0, y0, x1, y1 float64 }

// hits reports whether the segment meets the box (Liang–Barsky clipping:
// the segment's parameter range inside each slab of the box).
func (b box) hits(s seg) bool {
	t0, t1 := 0.0, 1.0
	dx, dy := s.x1-s.x0, s.y1-s.y0
	clip := func(p, q float64) bool { // inside where p·t <= q
		if p == 0 {
			return q >= 0
		}
		r := q / p
		if p < 0 {
			t0 = math.Max(t0, r)
		} else {
			t1 = math.Min(t1, r)
		}
		return t0 <= t1
	}
	return clip(-dx, s.x0-b.x0) && clip(dx, b.x1-s.x0) && clip(-dy, s.y0-b.y0) && clip(dy, b.y1-s.y0)
}

// nearest is the point of the box nearest to p.
func (b box) nearest(x, y float64) (float64, float64) {
	return math.Min(math.Max(x, b.x0), b.x1), math.Min(math.Max(y, b.y0), b.y1)
}

// labelReq is a label to place: its size, and the arrow it belongs to
// (tail and tip; equal for a zero arrow, which is a dot).
type labelReq struct {
	w, h, base float64
	tail, tip  [2]float64
}

// labelSpot is where a label is drawn: its box, the baseline's distance
// from the box's top, and the leader line from its arrow to the box when
// the box stands away from the arrow (leader false otherwise).
type labelSpot struct {
	box    box
	base   float64
	leader bool
	lx, ly float64 // the leader's start, on the arrow
	mx, my float64 // the leader's end, on the box
	along  bool    // beside the arrow's shaft rather than around its tip
	spill  bool    // placed below the grid: no free spot was found
}

// Clearances of label placement, in user units.
const (
	labelPad    = 1.0 // labels keep this far from each other
	segPad      = 1.5 // and from every arrow
	leaderFrom  = 6.0 // a label further than this from its point gets a leader line
	spillRowGap = 4.0
)

// Label placement distances from the anchor point and directions (every
// 15°), and the points along an arrow that may also carry its label.
var (
	placeDists = []float64{3, 7, 12, 18, 26, 36, 48, 62, 78, 96, 116, 140}
	alongT     = []float64{0.5, 0.65, 0.35, 0.8, 0.2}
)

const placeDirs = 24

// crowded is the number of labels above which the labels are placed in
// one pass, without revisiting (a diagram that crowded is slow to improve
// and no longer legible anyway).
const crowded = 40

// maxSearched is the number of labels placed by search: the labels of any
// further arrows are set below the grid (a diagram of that many arrows is
// a table's job).
const maxSearched = 100

// Costs of a candidate spot: a clash with a label, an arrow or the edge of
// the drawing is "hard" (a spot with one is never kept if any spot
// without one exists); covering an angle label of the grid is worse than
// any distance; then nearer is better, and a leader line that crosses
// another label costs a little, and so does a spot beside the shaft.
const (
	hardCost  = 1e9
	angleCost = 1e5
	crossCost = 200
	alongCost = 30 // beside the shaft reads less clearly than at the tip
)

// placeLabels places the labels one after the other, each at the cheapest
// of its candidate spots given those placed so far, then revisits every
// label (each against all the others) until no label moves or four
// rounds have passed (no revisiting above crowded labels). Candidate spots are boxes around the arrow's tip at
// the distances placeDists in placeDirs directions, and beside the arrow
// at the fractions alongT of its length. A label that still clashes with
// another label, an arrow or the drawing's edge is set in rows below
// bounds (spill), with a leader line to its arrow. The result is
// deterministic: candidates are tried in a fixed order and ties keep the
// first.
func placeLabels(reqs []labelReq, segs []seg, soft []box, bounds box) []labelSpot {
	spots := make([]labelSpot, len(reqs))
	placed := make([]bool, len(reqs))
	// the bounding box of each segment, to skip the exact test quickly
	segBox := make([]box, len(segs))
	for k, s := range segs {
		segBox[k] = box{math.Min(s.x0, s.x1), math.Min(s.y0, s.y1), math.Max(s.x0, s.x1), math.Max(s.y0, s.y1)}
	}
	// costOf is the cost of spot sp for label i; it stops counting once
	// the cost reaches limit (the spot cannot win then). hard reports a
	// clash with the edge, a label or an arrow.
	costOf := func(i int, sp labelSpot, limit float64) (cost float64, hard bool) {
		b := sp.box
		cost = math.Hypot(sp.mx-sp.lx, sp.my-sp.ly)
		if sp.along {
			cost += alongCost
		}
		if !b.within(bounds) {
			cost += hardCost
			hard = true
		}
		if cost >= limit {
			return cost, hard
		}
		bs := b.inflate(segPad)
		for k, s := range segs {
			if bs.overlap(segBox[k].inflate(0.01)) > 0 && bs.hits(s) {
				cost += hardCost
				hard = true
				if cost >= limit {
					return cost, hard
				}
			}
		}
		bi := b.inflate(labelPad)
		for j := range reqs {
			if j == i || !placed[j] {
				continue
			}
			if a := bi.overlap(spots[j].box); a > 0 {
				cost += hardCost * (1 + a)
				hard = true
				if cost >= limit {
					return cost, hard
				}
			}
			if sp.leader && spots[j].box.hits(seg{sp.lx, sp.ly, sp.mx, sp.my}) {
				cost += crossCost
			}
		}
		for _, a := range soft {
			if b.overlap(a) > 0 {
				cost += angleCost
			}
		}
		return cost, hard
	}
	best := func(i int) (labelSpot, bool) {
		var bestSp labelSpot
		bestCost, bestHard := math.Inf(1), true
		for _, sp := range candidates(reqs[i]) {
			// while the best spot clashes, any spot that clashes is as bad
			// (its label is set below the grid): stop at its first clash
			limit := bestCost
			if bestHard {
				limit = math.Min(limit, hardCost)
			}
			if c, h := costOf(i, sp, limit); c < bestCost && (!h || bestHard) {
				bestSp, bestCost, bestHard = sp, c, h
			}
		}
		return bestSp, bestHard
	}
	for i := range reqs {
		if i < maxSearched {
			spots[i], _ = best(i)
		} else {
			spots[i] = labelSpot{box: box{-1, -1, 0, 0}} // set below the grid
		}
		placed[i] = i < maxSearched
	}
	rounds := 4
	if len(reqs) > crowded {
		rounds = 0
	}
	for round := 0; round < rounds; round++ {
		moved := false
		for i := range reqs {
			if i >= maxSearched {
				break
			}
			sp, _ := best(i)
			if sp.box != spots[i].box {
				spots[i], moved = sp, true
			}
		}
		if !moved {
			break
		}
	}
	// Spill what still clashes, in order, into rows below bounds.
	x, y, rowH := bounds.x0+4, bounds.y1+spillRowGap, 0.0
	for i := range reqs {
		if _, hard := costOf(i, spots[i], math.Inf(1)); !hard {
			continue
		}
		r := reqs[i]
		if x > bounds.x0+4 && x+r.w > bounds.x1-4 {
			x, y, rowH = bounds.x0+4, y+rowH+spillRowGap, 0
		}
		b := box{x, y, x + r.w, y + r.h}
		mx, my := b.nearest(r.tip[0], r.tip[1])
		spots[i] = labelSpot{box: b, base: r.base, leader: true, lx: r.tip[0], ly: r.tip[1], mx: mx, my: my, spill: true}
		x += r.w + 3*spillRowGap
		rowH = math.Max(rowH, r.h)
	}
	return spots
}

// candidates are the spots tried for a label, in a fixed order.
func candidates(r labelReq) []labelSpot {
	ux, uy := r.tip[0]-r.tail[0], r.tip[1]-r.tail[1]
	length := math.Hypot(ux, uy)
	if length > 0 {
		ux, uy = ux/length, uy/length
	} else {
		ux, uy = 1, 0
	}
	at := func(px, py, vx, vy, d float64) labelSpot {
		// the box whose support point in direction v lies at distance d
		// from p along v
		ext := math.Abs(vx)*r.w/2 + math.Abs(vy)*r.h/2
		cx, cy := px+vx*(d+ext), py+vy*(d+ext)
		b := box{cx - r.w/2, cy - r.h/2, cx + r.w/2, cy + r.h/2}
		sp := labelSpot{box: b, base: r.base, lx: px, ly: py}
		sp.mx, sp.my = b.nearest(px, py)
		sp.leader = d > leaderFrom
		return sp
	}
	out := make([]labelSpot, 0, len(placeDists)*placeDirs+4*len(alongT))
	th0 := math.Atan2(uy, ux)
	for _, d := range placeDists {
		for k := 0; k < placeDirs; k++ {
			// from the arrow's own direction, alternately either side
			step := (k + 1) / 2
			if k%2 == 1 {
				step = -step
			}
			th := th0 + float64(step)*2*math.Pi/placeDirs
			out = append(out, at(r.tip[0], r.tip[1], math.Cos(th), math.Sin(th), d))
		}
		if length > 0 && d <= 7 {
			for _, t := range alongT {
				px, py := r.tail[0]+t*(r.tip[0]-r.tail[0]), r.tail[1]+t*(r.tip[1]-r.tail[1])
				for _, sp := range []labelSpot{at(px, py, uy, -ux, d), at(px, py, -uy, ux, d)} {
					sp.along = true
					out = append(out, sp)
				}
			}
		}
	}
	return out
}

// angleLabelBox is the box of the grid's angle label text at (x, y)
// (text-anchor middle, y its baseline) at font size fs.
func angleLabelBox(text string, x, y, fs float64) box {
	w := float64(utf8.RuneCountInString(text)) * advance * fs
	return box{x - w/2, y - ascent*fs, x + w/2, y + descent*fs}
}
