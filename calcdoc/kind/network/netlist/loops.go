package netlist

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"calcdoc/expr"
)

// loopTol is the relative size below which an entry of a reduced
// constraint row counts as zero in SourceLoops. The rows hold ±1 and the
// transformers' ratios; a row that is a combination of the others reduces
// to rounding, of order 1e-16 of the entries.
const loopTol = 1e-9

// SourceLoops finds loops of voltage constraints: ideal voltage sources
// (source without a series Z) and ideal transformers (a winding's voltage
// fixed by the other's). Each is a linear constraint on the node voltages,
// grounds at 0 V:
//
//	source:      V_TO − V_FROM = e
//	transformer: (V_FROM − V_TO) − ratio·(V_FROM2 − V_TO2) = 0
//
// When one constraint is a combination of the others (a loop of sources,
// two sources in parallel, two transformers in parallel with the same
// ratio, or the same voltage fixed twice through a transformer), the
// equations of the network do not determine the currents around the loop
// and are singular; the error names the branches of the smallest such
// combination found and their nodes. A controlled source counts with its
// terminals only (its controlling voltages are values, not topology).
// ratio gives each transformer's ratio (as evaluated; its value decides
// whether two transformers in parallel are a loop). t is the Topology of
// Check.
func SourceLoops(n *Netlist, t *Topology, ratio func(*Branch) complex128) expr.ErrorList {
	var errs expr.ErrorList
	type row struct {
		v    map[int]complex128
		hist []int // the constraints combined in it
	}
	var cons []*Branch
	basis := map[int]*row{} // pivot column → row with 1 there
	var order []int         // pivot columns in the order added
	add := func(r map[int]complex128, i, sign int, f complex128) {
		if !t.Ground[i] {
			r[i] += complex(float64(sign), 0) * f
		}
	}
	for _, b := range n.Branches {
		if !(b.Element == Source && b.SeriesZ == nil) && b.Element != Ratio {
			continue
		}
		k := len(cons)
		cons = append(cons, b)
		v := map[int]complex128{}
		scale := 1.0
		f, tt := t.Index[b.From.Key], t.Index[b.To.Key]
		add(v, f, 1, 1)
		add(v, tt, -1, 1)
		if b.Element == Ratio {
			r := ratio(b)
			scale = math.Max(1, cmplx.Abs(r))
			add(v, t.Index[b.From2.Key], -1, r)
			add(v, t.Index[b.To2.Key], 1, r)
		}
		cur := &row{v: v, hist: []int{k}}
		for _, c := range order {
			x, ok := cur.v[c]
			if !ok || x == 0 {
				continue
			}
			p := basis[c]
			for j, pv := range p.v {
				cur.v[j] -= x * pv
			}
			cur.hist = append(cur.hist, p.hist...)
			for j, w := range cur.v {
				if cmplx.Abs(w) <= loopTol*scale {
					delete(cur.v, j)
				}
			}
		}
		if len(cur.v) == 0 {
			errs = append(errs, loopError(n, cons, cur.hist))
			continue
		}
		// pivot: the largest entry (the smallest column among equals)
		pc, big := -1, 0.0
		for j, w := range cur.v {
			if a := cmplx.Abs(w); a > big || (a == big && j < pc) {
				pc, big = j, a
			}
		}
		pv := cur.v[pc]
		for j := range cur.v {
			cur.v[j] /= pv
		}
		basis[pc] = cur
		order = append(order, pc)
	}
	errs.Sort()
	return errs
}

func loopError(n *Netlist, cons []*Branch, hist []int) *expr.Error {
	seen := map[int]bool{}
	var idx []int
	for _, h := range hist {
		if !seen[h] {
			seen[h] = true
			idx = append(idx, h)
		}
	}
	sort.Ints(idx)
	var bnames []string
	var nodes []Node
	nodeSeen := map[string]bool{}
	addNode := func(nd Node) {
		if !nodeSeen[nd.Key] {
			nodeSeen[nd.Key] = true
			nodes = append(nodes, nd)
		}
	}
	trans := false
	for _, k := range idx {
		b := cons[k]
		bnames = append(bnames, b.Name)
		addNode(b.From)
		addNode(b.To)
		if b.Element == Ratio {
			trans = true
			addNode(b.From2)
			addNode(b.To2)
		}
	}
	last := cons[idx[len(idx)-1]]
	what := "ideal voltage sources"
	if trans {
		what = "ideal voltage sources and transformer windings"
	}
	return &expr.Error{Pos: last.NamePos, Msg: fmt.Sprintf("the %s %s (nodes %s) form a loop: they fix the same voltage more than once, so the current around the loop is not determined; give one of the sources a series impedance (source e, Z z), or remove one of the branches",
		what, joinAnd(bnames), names(nodes))}
}
