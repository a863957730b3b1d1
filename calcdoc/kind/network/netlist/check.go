package netlist

import (
	"fmt"
	"sort"
	"strings"

	"calcdoc/expr"
)

// Topology is what Check learns of a netlist that passes it: the nodes,
// which are grounds, and the galvanically separate parts.
type Topology struct {
	// Nodes lists the nodes in the order they first appear in the block
	// (grounds included); Index maps a node key to its place there.
	Nodes []Node
	Index map[string]int
	// Ground[i] reports whether node i is a ground.
	Ground []bool
	// Part[i] is the galvanically separate part of node i (0, 1, ...,
	// numbered in the order of the nodes).
	Part []int
	// Parts is the number of parts.
	Parts int
}

// unionFind over node indices.
type unionFind []int

func newUnionFind(n int) unionFind {
	u := make(unionFind, n)
	for i := range u {
		u[i] = i
	}
	return u
}

func (u unionFind) find(i int) int {
	for u[i] != i {
		u[i] = u[u[i]]
		i = u[i]
	}
	return i
}

func (u unionFind) union(a, b int) { u[u.find(a)] = u.find(b) }

// windings returns the node pairs a branch joins galvanically: one pair,
// or two for a transformer (its windings, which are not joined to each
// other).
func (b *Branch) windings() [][2]Node {
	if b.Element == Ratio {
		return [][2]Node{{b.From, b.To}, {b.From2, b.To2}}
	}
	return [][2]Node{{b.From, b.To}}
}

// names lists node names for a message: "A, B and C".
func names(ns []Node) string {
	var s []string
	for _, n := range ns {
		s = append(s, n.Name)
	}
	return joinAnd(s)
}

func joinAnd(s []string) string {
	switch len(s) {
	case 0:
		return ""
	case 1:
		return s[0]
	}
	const most = 12
	if len(s) > most {
		return strings.Join(s[:most], ", ") + fmt.Sprintf(" and %d more", len(s)-most)
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

// Check checks a parsed netlist as a whole (LANGUAGE.md section 11):
// repeated branch names, a branch from a node to itself, couplings of
// branches that are not two different Z branches (or a pair coupled
// twice), grounds repeated or on no branch, names the block would define
// that exist already (exists reports whether a name is taken, compared as
// the engine compares names; nil: none is), a node connected by one branch
// only, a galvanically separate part with no ground or with more than one,
// and a cut set of current sources. Every error names the nodes or
// branches concerned and says how to put it right. The loops of voltage
// sources and transformer windings, which depend on the transformers'
// ratios, are checked by SourceLoops. The Topology is nil when there are
// errors.
func Check(n *Netlist, exists func(name string) bool) (*Topology, expr.ErrorList) {
	var errs expr.ErrorList
	if len(n.Branches) == 0 {
		at := n.TagPos
		if len(n.Lines) > 0 {
			switch x := n.Lines[0].(type) {
			case *Ground:
				at = x.Pos
			case *Couple:
				at = x.Pos
			case *Note:
				at = x.Pos
			}
		}
		errs.Add(at, "the network has no branches: write one branch a line, NAME: FROM -> TO ELEMENT, and a ground NODE line")
		return nil, errs
	}
	// branch names
	seen := map[string]*Branch{}
	for _, b := range n.Branches {
		if f := seen[b.Key]; f != nil {
			errs.Add(b.NamePos, fmt.Sprintf("the branch name %s is used twice (first at line %d): each branch has a name of its own (parallel branches between the same nodes are allowed, under different names)", b.Name, f.NamePos.Line()))
			continue
		}
		seen[b.Key] = b
		for _, w := range b.windings() {
			if w[0].Key == w[1].Key {
				errs.Add(w[1].Pos, fmt.Sprintf("the branch %s goes from node %s to the same node: a branch joins two different nodes", b.Name, w[0].Name))
			}
		}
	}
	// couplings
	pairs := map[[2]string]*Couple{}
	for _, c := range n.Couples {
		a, b := seen[c.AKey], seen[c.BKey]
		switch {
		case a == nil:
			errs.Add(c.APos, fmt.Sprintf("there is no branch %s in this network to couple: a coupling names two Z branches of the block", c.A))
			continue
		case b == nil:
			errs.Add(c.BPos, fmt.Sprintf("there is no branch %s in this network to couple: a coupling names two Z branches of the block", c.B))
			continue
		case a == b:
			errs.Add(c.BPos, fmt.Sprintf("a branch cannot be coupled with itself: couple %s with another Z branch", c.A))
			continue
		case a.Element != Impedance:
			errs.Add(c.APos, fmt.Sprintf("%s is a %s: a mutual impedance couples two Z branches", c.A, a.Element.Noun()))
			continue
		case b.Element != Impedance:
			errs.Add(c.BPos, fmt.Sprintf("%s is a %s: a mutual impedance couples two Z branches", c.B, b.Element.Noun()))
			continue
		}
		k := [2]string{a.Key, b.Key}
		if k[0] > k[1] {
			k[0], k[1] = k[1], k[0]
		}
		if f := pairs[k]; f != nil {
			errs.Add(c.Pos, fmt.Sprintf("%s and %s are coupled twice (first at line %d): write one couple line with their whole mutual impedance", c.A, c.B, f.Pos.Line()))
			continue
		}
		pairs[k] = c
	}

	// nodes, in the order of their first appearance
	t := &Topology{Index: map[string]int{}}
	addNode := func(nd Node) int {
		if i, ok := t.Index[nd.Key]; ok {
			return i
		}
		t.Index[nd.Key] = len(t.Nodes)
		t.Nodes = append(t.Nodes, nd)
		return len(t.Nodes) - 1
	}
	degree := map[int][]*Branch{}
	for _, b := range n.Branches {
		for _, w := range b.windings() {
			i, j := addNode(w[0]), addNode(w[1])
			degree[i] = append(degree[i], b)
			degree[j] = append(degree[j], b)
		}
	}
	t.Ground = make([]bool, len(t.Nodes))
	groundAt := map[int]*Ground{}
	for _, g := range n.Grounds {
		i, ok := t.Index[g.Node.Key]
		if !ok {
			errs.Add(g.Node.Pos, fmt.Sprintf("no branch of the network joins the ground node %s: name a node of the network (or add its branches)", g.Node.Name))
			continue
		}
		if f := groundAt[i]; f != nil {
			errs.Add(g.Node.Pos, fmt.Sprintf("%s is named a ground twice (first at line %d): delete one of the two lines", g.Node.Name, f.Pos.Line()))
			continue
		}
		groundAt[i] = g
		t.Ground[i] = true
	}

	// names that exist already
	if exists != nil {
		for i, nd := range t.Nodes {
			if t.Ground[i] {
				continue
			}
			if v := n.VoltageName(nd.Name); exists(v) {
				errs.Add(nd.Pos, fmt.Sprintf("%s is already defined, and the network would define it as the voltage of node %s: rename the node, or tag the network (```network TAG) so that its names end in _TAG", v, nd.Name))
			}
		}
		for _, b := range n.Branches {
			for _, v := range []string{n.CurrentName(b.Name), n.PowerName(b.Name)} {
				if exists(v) {
					errs.Add(b.NamePos, fmt.Sprintf("%s is already defined, and the network would define it for the branch %s: rename the branch, or tag the network (```network TAG) so that its names end in _TAG", v, b.Name))
				}
			}
		}
	}
	if len(errs) > 0 {
		errs.Sort()
		return nil, errs
	}

	// nodes with one branch
	for i, nd := range t.Nodes {
		if bs := degree[i]; len(bs) == 1 {
			errs.Add(nd.Pos, fmt.Sprintf("node %s is connected by one branch only (%s): no current can flow through it; connect the node to the network with a second branch, or remove %s", nd.Name, bs[0].Name, bs[0].Name))
		}
	}

	// galvanically separate parts and their grounds
	uf := newUnionFind(len(t.Nodes))
	for _, b := range n.Branches {
		for _, w := range b.windings() {
			uf.union(t.Index[w[0].Key], t.Index[w[1].Key])
		}
	}
	t.Part = make([]int, len(t.Nodes))
	partOf := map[int]int{}
	for i := range t.Nodes {
		r := uf.find(i)
		p, ok := partOf[r]
		if !ok {
			p = len(partOf)
			partOf[r] = p
		}
		t.Part[i] = p
	}
	t.Parts = len(partOf)
	for p := 0; p < t.Parts; p++ {
		var members, grounds []Node
		var gLines []*Ground
		for i, nd := range t.Nodes {
			if t.Part[i] != p {
				continue
			}
			members = append(members, nd)
			if t.Ground[i] {
				grounds = append(grounds, nd)
				gLines = append(gLines, groundAt[i])
			}
		}
		switch {
		case len(grounds) == 0:
			what := "the network"
			if t.Parts > 1 {
				what = "the part of the network"
			}
			errs.Add(members[0].Pos, fmt.Sprintf("%s made of nodes %s has no ground: add a line ground NODE naming one of them (each galvanically separate part, such as a transformer's secondary, has its own ground)", what, names(members)))
		case len(grounds) > 1:
			sort.SliceStable(gLines, func(a, b int) bool { return gLines[a].Pos.Before(gLines[b].Pos) })
			grounds = grounds[:0]
			for _, g := range gLines {
				grounds = append(grounds, g.Node)
			}
			errs.Add(gLines[1].Pos, fmt.Sprintf("nodes %s are all grounds of one connected part of the network (nodes %s): a part has one ground, the reference of its voltages; keep one ground line and delete the others", names(grounds), names(members)))
		}
	}
	if len(errs) > 0 {
		errs.Sort()
		return nil, errs
	}

	// cut sets of current sources: without the current sources, every
	// node must still reach its part's ground
	uc := newUnionFind(len(t.Nodes))
	for _, b := range n.Branches {
		if b.Element == Current {
			continue
		}
		for _, w := range b.windings() {
			uc.union(t.Index[w[0].Key], t.Index[w[1].Key])
		}
	}
	grounded := map[int]bool{}
	for i := range t.Nodes {
		if t.Ground[i] {
			grounded[uc.find(i)] = true
		}
	}
	reported := map[int]bool{}
	for i := range t.Nodes {
		r := uc.find(i)
		if grounded[r] || reported[r] {
			continue
		}
		reported[r] = true
		var members []Node
		in := map[string]bool{}
		for k, nd := range t.Nodes {
			if uc.find(k) == r {
				members = append(members, nd)
				in[nd.Key] = true
			}
		}
		var cut []string
		for _, b := range n.Branches {
			if b.Element == Current && in[b.From.Key] != in[b.To.Key] {
				cut = append(cut, b.Name)
			}
		}
		what := "nodes " + names(members) + " are"
		if len(members) == 1 {
			what = "node " + members[0].Name + " is"
		}
		srcs := "the current sources " + joinAnd(cut)
		if len(cut) == 1 {
			srcs = "the current source " + cut[0]
		}
		errs.Add(members[0].Pos, fmt.Sprintf("%s joined to the rest of the network only through %s (a cut set of current sources): their currents are fixed, so the voltages there are not determined; add a Z or Y branch from there to the rest of the network", what, srcs))
	}
	if len(errs) > 0 {
		errs.Sort()
		return nil, errs
	}
	return t, nil
}
