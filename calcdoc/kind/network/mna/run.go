package mna

import (
	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/expr"
)

// Block is what Run needs of a network block: its lines, each with its
// position in the document, the tag after the word network on the opening
// line ("" for none) and where it stands, and the position of the opening
// line (where errors of the set as a whole are reported).
type Block struct {
	Lines   []string
	LinePos []expr.Pos
	Tag     string
	TagPos  expr.Pos
	Pos     expr.Pos
}

// Result is the outcome of a network block. Each field is set as far as
// the block got: a netlist whenever the lines were read, a topology when
// it passed Check, the network when its elements were evaluated, the
// solution when it was solved and accepted.
type Result struct {
	Net      *netlist.Netlist
	Topo     *netlist.Topology
	Network  *Network
	Solution *Solution
	// Unavailable is set when an element uses a name whose definition
	// failed above: not a new error (that definition reports itself);
	// the block defines its names as unavailable.
	Unavailable *expr.UnavailableError
}

// Run reads, checks, assembles and solves a network block in env:
// netlist.Parse, netlist.Check, Evaluate, netlist.SourceLoops,
// Network.Assemble and Network.Solve in turn, stopping at the first stage
// with errors. exists reports whether a name is already taken (nil: the
// names env cannot define, as Env.CanDefine decides). The errors are the
// block's, sorted by position; nothing is defined in env (see Defs).
func Run(b Block, env *expr.Env, exists func(name string) bool) (*Result, expr.ErrorList) {
	if exists == nil {
		exists = func(name string) bool { return env.CanDefine(name, expr.Pos{}) != nil }
	}
	r := &Result{}
	n, errs := netlist.Parse(b.Lines, b.LinePos, b.Tag, b.TagPos)
	r.Net = n
	if len(errs) > 0 {
		errs.Sort()
		return r, errs
	}
	t, errs := netlist.Check(n, exists)
	if len(errs) > 0 {
		return r, errs
	}
	r.Topo = t
	nw, errs, un := Evaluate(n, t, env)
	if len(errs) > 0 || un != nil {
		r.Unavailable = un
		return r, errs
	}
	if errs := netlist.SourceLoops(n, t, func(br *netlist.Branch) complex128 {
		for i, x := range n.Branches {
			if x == br {
				return nw.Elem[i].Ratio
			}
		}
		return 1
	}); len(errs) > 0 {
		return r, errs
	}
	r.Network = nw
	nw.Assemble()
	s, err := nw.Solve(b.Pos)
	if err != nil {
		var el expr.ErrorList
		switch e := err.(type) {
		case *expr.Error:
			el = append(el, e)
		case *expr.UnavailableError:
			r.Unavailable = e
		default:
			el = append(el, &expr.Error{Pos: b.Pos, Msg: err.Error()})
		}
		return r, el
	}
	r.Solution = s
	return r, nil
}

// DefKind says what a defined name is.
type DefKind int

// The kinds of defined names.
const (
	DefVoltage DefKind = iota // V_NODE
	DefCurrent                // I_NAME
	DefPower                  // S_NAME
)

// Def is one name the block defines, with its value and the position of
// the node or branch name that defines it.
type Def struct {
	Name  string
	Kind  DefKind
	Value *expr.Scalar // nil when the block was not solved
	Pos   expr.Pos
}

// Defs lists the names the block defines, in order: V_NODE for every node
// but the grounds (in the order the nodes first appear), then I_NAME and
// S_NAME for every branch in the order of the lines. Values are set when
// the block was solved; S_NAME is a complex power, of the apparent kind.
// Without a topology (the lines did not pass Check) only the branch names
// that were read are listed.
func (r *Result) Defs() []Def {
	var out []Def
	n := r.Net
	if n == nil {
		return nil
	}
	s := r.Solution
	if r.Topo != nil {
		for i, nd := range r.Topo.Nodes {
			if r.Topo.Ground[i] {
				continue
			}
			d := Def{Name: n.VoltageName(nd.Name), Kind: DefVoltage, Pos: nd.Pos}
			if s != nil {
				d.Value = &expr.Scalar{Z: s.V[i], Dim: expr.DimVoltage}
			}
			out = append(out, d)
		}
	}
	seen := map[string]bool{}
	for i, b := range n.Branches {
		if seen[b.Key] {
			continue
		}
		seen[b.Key] = true
		di := Def{Name: n.CurrentName(b.Name), Kind: DefCurrent, Pos: b.NamePos}
		ds := Def{Name: n.PowerName(b.Name), Kind: DefPower, Pos: b.NamePos}
		if s != nil {
			di.Value = &expr.Scalar{Z: s.I[i], Dim: expr.DimCurrent}
			ds.Value = &expr.Scalar{Z: s.S[i], Dim: expr.DimPower, Kind: expr.PowerApparent}
		}
		out = append(out, di, ds)
	}
	return out
}
