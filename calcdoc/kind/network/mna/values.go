package mna

import (
	"math"
	"math/cmplx"
	"math/rand/v2"

	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/expr"
)

// LinearTol is the relative tolerance of the linearity test of a
// controlled source, the tolerance of the affinity test of solve blocks
// (calcdoc/solve LinearTol): at every probe point p,
//
//	|f(p) − c − Σ_k a_k p_k| ≤ 1e-9 · (|c| + Σ_k |a_k p_k| + q),
//
// q the size of the result at the unit probe (1 V or 1 A in every
// quantity it uses), c = f(0) and a_k the change of f for a unit step in
// quantity k.
const LinearTol = 1e-9

// probeSeeds are the seeds of the PCG generator (math/rand/v2) that draws
// the probe points of the linearity test; fixed, so that the test is
// deterministic.
var probeSeeds = [2]uint64{0x6e6574776f726b31, 0x636f6e74726f6c73} // "network1", "controls"

// probeScales are the magnitudes (in V and A) around which the probe
// points lie: the linearity of a controlled source is tested at small and
// at large values, so that a term such as V²/(1 kV) is caught either way.
var probeScales = []float64{1, 1e3, 1e-3}

// Quantity is a node voltage or branch current of the network that a
// controlled source uses.
type Quantity struct {
	Name   string // as the expression writes it (V_A, I_feed, with the tag)
	Node   int    // the node (Topology index), or −1
	Branch int    // the branch (index in Netlist.Branches), or −1
}

// Affine is the value of an element: c + Σ_k A[k]·u_k, u_k the network
// quantities it uses (none for a fixed value).
type Affine struct {
	C    complex128
	Uses []Quantity
	A    []complex128
}

// names of the network: the quantities a controlled source may use, and
// the names it defines that no element may use.
type names struct {
	q       map[string]Quantity // key → quantity
	power   map[string]string   // key of S_NAME → branch name
	grounds map[string]string   // key of V_GROUND → the ground's name
}

func networkNames(n *netlist.Netlist, t *netlist.Topology) *names {
	nm := &names{q: map[string]Quantity{}, power: map[string]string{}, grounds: map[string]string{}}
	for i, nd := range t.Nodes {
		v := n.VoltageName(nd.Name)
		if t.Ground[i] {
			nm.grounds[expr.NameKey(v)] = nd.Name
			continue
		}
		nm.q[expr.NameKey(v)] = Quantity{Name: v, Node: i, Branch: -1}
	}
	for i, b := range n.Branches {
		c := n.CurrentName(b.Name)
		nm.q[expr.NameKey(c)] = Quantity{Name: c, Node: -1, Branch: i}
		nm.power[expr.NameKey(n.PowerName(b.Name))] = b.Name
	}
	return nm
}

// uses lists the network quantities x uses, in the order of their first
// use, and reports a use of a ground's voltage or of a branch power.
func (nm *names) uses(x expr.Node, controlled bool, what string) ([]Quantity, *expr.Error) {
	var out []Quantity
	seen := map[string]bool{}
	var err *expr.Error
	expr.Walk(x, func(n expr.Node) bool {
		id, ok := n.(*expr.Ident)
		if !ok || err != nil {
			return err == nil
		}
		if g, ok := nm.grounds[id.Key]; ok {
			err = expr.Errorf(id.Pos(), "node %s is a ground, at 0 V by definition, so the network defines no %s: write 0 V", g, id.Name)
			return false
		}
		if b, ok := nm.power[id.Key]; ok {
			err = expr.Errorf(id.Pos(), "%s is the complex power of the branch %s, a result of the network: an element's value may not use it (a controlled source uses node voltages and branch currents, linearly)", id.Name, b)
			return false
		}
		q, ok := nm.q[id.Key]
		if !ok {
			return true
		}
		if !controlled {
			err = expr.Errorf(id.Pos(), "the %s uses %s, a quantity of this network: only a source or current value may use the network's voltages and currents (a controlled source); the value of a Z, Y, ratio or couple is fixed", what, id.Name)
			return false
		}
		if !seen[id.Key] {
			seen[id.Key] = true
			out = append(out, q)
		}
		return true
	})
	return out, err
}

// evalError turns an evaluation error into the block's report: an
// *expr.Error is the block's error; an *expr.UnavailableError is kept
// apart (the failed definition reports itself).
type evalErrs struct {
	errs        expr.ErrorList
	unavailable *expr.UnavailableError
}

func (e *evalErrs) add(err error) {
	switch x := err.(type) {
	case *expr.Error:
		e.errs = append(e.errs, x)
	case *expr.UnavailableError:
		if e.unavailable == nil {
			e.unavailable = x
		}
	case expr.ErrorList:
		e.errs = append(e.errs, x...)
	default:
		e.errs = append(e.errs, &expr.Error{Msg: err.Error()})
	}
}

// scalar evaluates x with the given locals and checks that it is one
// finite value of dimension want (angle not allowed).
func scalar(env *expr.Env, x expr.Node, locals map[string]expr.Value, want expr.Dim, what, unit string) (complex128, error) {
	v, err := env.EvalWith(x, locals, nil)
	if err != nil {
		return 0, err
	}
	s, ok := v.(*expr.Scalar)
	switch {
	case !ok:
		return 0, expr.Errorf(x.Pos(), "the %s is %s: it must be a single value in %s", what, expr.Describe(v), unit)
	case s.Dim != want:
		return 0, expr.Errorf(x.Pos(), "the %s is %s, a %s: it must be in %s", what, expr.Describe(s), expr.DimWord(s.Dim), unit)
	case s.Angle:
		return 0, expr.Errorf(x.Pos(), "the %s is %s, an angle: it must be a plain number (a ratio such as 11 kV / 0.4 kV, with its phase shift as ∠-30°)", what, expr.Describe(s))
	case !s.IsFinite():
		return 0, expr.Errorf(x.Pos(), "the %s is not finite", what)
	}
	return s.Z, nil
}

// fixed evaluates an element value that may not use the network's
// quantities.
func fixed(env *expr.Env, nm *names, x expr.Node, want expr.Dim, what, unit string) (complex128, error) {
	if _, e := nm.uses(x, false, what); e != nil {
		return 0, e
	}
	return scalar(env, x, nil, want, what, unit)
}

// quantityDim is the dimension of a network quantity.
func quantityDim(q Quantity) expr.Dim {
	if q.Node >= 0 {
		return expr.DimVoltage
	}
	return expr.DimCurrent
}

// controlled evaluates a source or current value, which may use the
// network's quantities linearly: it returns the affine model of it, built
// from evaluations at the origin and at unit steps and confirmed at probe
// points (see LinearTol). A value that cannot be evaluated at a point, or
// departs from the model, is reported as making the network's equations
// non-linear.
func controlled(env *expr.Env, nm *names, x expr.Node, want expr.Dim, what, unit string) (*Affine, error) {
	uses, e := nm.uses(x, true, what)
	if e != nil {
		return nil, e
	}
	if len(uses) == 0 {
		c, err := scalar(env, x, nil, want, what, unit)
		if err != nil {
			return nil, err
		}
		return &Affine{C: c}, nil
	}
	rng := rand.New(rand.NewPCG(probeSeeds[0], probeSeeds[1]))
	point := func(u []complex128) map[string]expr.Value {
		loc := make(map[string]expr.Value, len(uses))
		for k, q := range uses {
			loc[q.Name] = &expr.Scalar{Z: u[k], Dim: quantityDim(q)}
		}
		return loc
	}
	at := func(u []complex128) (complex128, error) {
		return scalar(env, x, point(u), want, what, unit)
	}
	names := make([]string, len(uses))
	for k, q := range uses {
		names[k] = q.Name
	}
	nonLinear := func(detail string) error {
		return expr.Errorf(x.Pos(), "the %s is not linear in %s%s: a controlled source must be linear in the network's node voltages and branch currents (a constant plus constants times them), or the network's equations are not linear; write it so, or solve the circuit with a solve block",
			what, joinAnd(names), detail)
	}
	// a generic point first, so that an error of units or names is reported as the engine words it
	u := make([]complex128, len(uses))
	for k := range u {
		u[k] = cmplx.Rect(0.5+rng.Float64(), 2*math.Pi*rng.Float64())
	}
	if _, err := at(u); err != nil {
		return nil, err
	}
	zero := make([]complex128, len(uses))
	c, err := at(zero)
	if err != nil {
		return nil, nonLinear(" (it cannot be evaluated where they are all zero: " + err.Error() + ")")
	}
	a := make([]complex128, len(uses))
	q := cmplx.Abs(c)
	for k := range uses {
		zero[k] = 1
		f, err := at(zero)
		zero[k] = 0
		if err != nil {
			return nil, nonLinear(" (it cannot be evaluated at a unit step of " + names[k] + ": " + err.Error() + ")")
		}
		a[k] = f - c
		q = math.Max(q, cmplx.Abs(f))
	}
	for _, sc := range probeScales {
		for j := 0; j < 3; j++ {
			for k := range u {
				u[k] = cmplx.Rect(sc*(0.5+rng.Float64()), 2*math.Pi*rng.Float64())
			}
			f, err := at(u)
			if err != nil {
				return nil, nonLinear(" (it cannot be evaluated at some values of them: " + err.Error() + ")")
			}
			pred, size := c, cmplx.Abs(c)+q
			for k := range u {
				t := a[k] * u[k]
				pred += t
				size += cmplx.Abs(t)
			}
			if !(cmplx.Abs(f-pred) <= LinearTol*size) {
				return nil, nonLinear("")
			}
		}
	}
	return &Affine{C: c, Uses: uses, A: a}, nil
}

func joinAnd(s []string) string {
	switch len(s) {
	case 0:
		return ""
	case 1:
		return s[0]
	}
	out := ""
	for i, x := range s {
		switch {
		case i == 0:
		case i == len(s)-1:
			out += " and "
		default:
			out += ", "
		}
		out += x
	}
	return out
}
