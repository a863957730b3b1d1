package solve

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// prepare reads the block, checks it and lays out the real form, in the
// nine stages below. It returns false when the set cannot be solved (the
// reason is recorded).
func (r *solveRun) prepare() bool {
	unk, ok := r.readHeader()
	ok, goOn := r.readEquations(ok)
	if !goOn || !r.checkUnknowns(unk, ok) || !r.linkEquations(unk) || !r.layout(unk) {
		return false
	}
	generic, genL, genR, ok := r.checkDimensions(unk)
	if !ok {
		return false
	}
	baseL, baseR, ok := r.evalAtStart(unk)
	if !ok || !r.countReal(baseL, baseR, genL, genR) {
		return false
	}
	r.residualScales(generic)
	return true
}

// readHeader reads the unknowns of the info string (stage 1).
func (r *solveRun) readHeader() (unk []*Unknown, ok bool) {
	b, set := r.b, r.set
	pos := b.ArgPos
	if !pos.IsValid() {
		pos = b.InfoPos.Add(len("solve"))
	}
	unk, herrs := ParseSolveHeader(b.Arg, pos)
	set.Unknowns = unk
	for _, e := range herrs {
		r.headerErr(e)
	}
	return unk, len(herrs) == 0
}

// readEquations reads the lines as equations, whatever the header says,
// so they are shown (stage 2). It says whether the set is still sound and
// whether to go on.
func (r *solveRun) readEquations(ok bool) (sound, goOn bool) {
	b, set := r.b, r.set
	var perrs expr.ErrorList
	stmts := expr.ParseBlock(b.Source(), expr.EquationMode, &perrs)
	per, rest := calcdoc.ErrorsOf(stmts, perrs)
	labels := map[string]*SolveEquation{}
	for k, s := range stmts {
		l := &SolveLine{Stmt: s}
		if _, bad := s.(*expr.BadStmt); bad {
			l.Text = b.Text(s.Pos(), s.End())
		}
		for _, e := range per[k] {
			l.Errs = append(l.Errs, e)
			b.Errors = append(b.Errors, e)
			ok = false
		}
		switch s := s.(type) {
		case *expr.Equation:
			eq := &SolveEquation{Eq: s, Line: s.Pos().Line(), Name: fmt.Sprintf("line %d", s.Pos().Line())}
			if s.Label != nil {
				eq.Name = fmt.Sprintf("%s (line %d)", s.Label.Name, eq.Line)
				if prev := labels[s.Label.Name]; prev != nil {
					e := expr.Errorf(s.Label.Pos(), "the label %s is used twice (also at line %d): give each equation its own label", s.Label.Name, prev.Line)
					l.Errs = append(l.Errs, e)
					b.Errors = append(b.Errors, e)
					ok = false
				} else {
					labels[s.Label.Name] = eq
				}
			}
			l.Equation = eq
			set.Equations = append(set.Equations, eq)
		case *expr.BadStmt:
			ok = false
		}
		set.Lines = append(set.Lines, l)
	}
	for _, e := range rest {
		r.headerErr(e)
		ok = false
	}
	if len(set.Equations) == 0 && ok {
		r.setErr(r.setPos(), "the solve block has no equations: write one equation a line, lhs = rhs (optionally label: lhs = rhs)")
		return ok, false
	}
	return ok, true
}

// checkUnknowns makes sure each unknown is a new name with a usable
// starting value (stage 3).
func (r *solveRun) checkUnknowns(unk []*Unknown, ok bool) bool {
	set := r.set
	for _, u := range unk {
		if bd := r.env.Lookup(u.Name); bd != nil {
			r.headerErr(expr.Errorf(u.Pos, "%s is already defined at line %d: the unknowns of a solve block must be new names (choose another name, e.g. %s_2)", u.Name, bd.Pos.Line(), u.Name))
			ok = false
			continue
		}
		if e := r.env.CanDefine(u.Name, u.Pos); e != nil {
			r.headerErr(e)
			ok = false
			continue
		}
		if u.HasUnit() {
			u.Dim, u.Angle = u.Display.Unit.Dim, u.Display.Unit.Angle && u.Display.Unit.Dim.IsZero()
			u.AbsTemp = u.Display.Unit.Offset != 0
		}
		if u.NearNode != nil {
			v, err := r.env.Eval(u.NearNode, nil)
			if err != nil {
				if ue, isU := err.(*expr.UnavailableError); isU {
					// not a new error: the definition that failed has its own
					if set.Unavailable == nil {
						set.Unavailable = ue
					}
				} else {
					r.headerErr(asExprError(err, u.NearPos))
				}
				ok = false
				continue
			}
			s, isS := v.(*expr.Scalar)
			switch {
			case !isS:
				r.headerErr(expr.Errorf(u.NearPos, "the starting value of %s must be a single value, not %s", u.Name, expr.Describe(v)))
				ok = false
				continue
			case !s.IsFinite():
				r.headerErr(expr.Errorf(u.NearPos, "the starting value of %s is not finite", u.Name))
				ok = false
				continue
			case u.HasUnit() && s.Dim != u.Dim && !(s.Z == 0 && s.Dim.IsZero()):
				r.headerErr(expr.Errorf(u.NearPos, "the starting value %s is %s, but %s[%s] is %s", expr.Describe(s), expr.DimWord(s.Dim), u.Name, u.Display.Unit.Text, expr.DimWord(u.Dim)))
				ok = false
				continue
			case u.Real && !s.IsReal():
				r.headerErr(expr.Errorf(u.NearPos, "%s is marked real, but its starting value %s is complex", u.Name, expr.Describe(s)))
				ok = false
				continue
			}
			if !u.HasUnit() {
				u.Dim, u.Angle, u.AbsTemp = s.Dim, s.Angle, s.AbsTemp
			}
			near := *s
			near.Dim, near.AbsTemp = u.Dim, u.AbsTemp
			if u.Real {
				near.Z = complex(real(near.Z), 0)
			}
			u.Near = &near
		}
	}
	if !ok || len(unk) == 0 {
		return false
	}
	return true
}

// linkEquations finds which unknowns each equation involves (stage 4):
// every equation involves one, and every unknown is in one.
func (r *solveRun) linkEquations(unk []*Unknown) bool {
	set := r.set
	ok := true
	index := map[string]int{}
	for k, u := range unk {
		index[expr.NameKey(u.Name)] = k
	}
	r.eqsOf = make([][]int, len(unk))
	for i, eq := range set.Equations {
		seen := map[int]bool{}
		for _, side := range []expr.Node{eq.Eq.LHS, eq.Eq.RHS} {
			expr.Walk(side, func(n expr.Node) bool {
				if id, isID := n.(*expr.Ident); isID {
					if k, isU := index[id.Key]; isU && !seen[k] {
						seen[k] = true
						eq.Unknowns = append(eq.Unknowns, k)
						r.eqsOf[k] = append(r.eqsOf[k], i)
					}
				}
				return true
			})
		}
		if len(eq.Unknowns) == 0 {
			r.eqErr(eq, expr.Errorf(eq.Eq.Pos(), "this equation involves none of the unknowns (%s): every equation of a solve block must involve one (to check a relation between known values, use check in a calc block)", unknownList(unk)))
			ok = false
		}
	}
	for k, u := range unk {
		if len(r.eqsOf[k]) == 0 {
			r.headerErr(expr.Errorf(u.Pos, "%s appears in no equation: remove it from the list of unknowns, or add an equation that involves it", u.Name))
			ok = false
		}
	}
	if !ok {
		return false
	}
	return true
}

// layout lays out the real form, the starting point and the scales of
// the unknowns (stage 5).
func (r *solveRun) layout(unk []*Unknown) bool {
	set := r.set
	r.unk, r.eqs = unk, set.Equations
	r.loc = make(map[string]expr.Value, len(unk))
	r.vals = make([]*expr.Scalar, len(unk))
	r.col = make([]int, len(unk))
	for k, u := range unk {
		r.vals[k] = &expr.Scalar{Dim: u.Dim, Angle: u.Angle, AbsTemp: u.AbsTemp}
		r.loc[expr.NameKey(u.Name)] = r.vals[k] // keyed as the evaluator looks names up
		r.col[k] = r.n
		scale := 1.0
		var z complex128
		if u.HasUnit() {
			scale = u.Display.Unit.Scale
			if off := u.Display.Unit.Offset; off != 0 {
				// a [°C] unknown with no starting value starts at 0 °C
				// (273.15 K), not at absolute zero, and is scaled by it
				z, scale = complex(off, 0), off
			}
		}
		if u.Near != nil {
			z = u.Near.Z
			if a := cmplx.Abs(z); a > 0 {
				scale = a
			}
		}
		if !(scale > 0) || math.IsInf(scale, 0) {
			scale = 1
		}
		if u.Real {
			r.x0 = append(r.x0, real(z))
			r.xscale = append(r.xscale, scale)
			r.owner = append(r.owner, k)
			r.n++
		} else {
			r.x0 = append(r.x0, real(z), imag(z))
			r.xscale = append(r.xscale, scale, scale)
			r.owner = append(r.owner, k, k)
			r.pairs = append(r.pairs, r.n, r.n+1)
			r.n += 2
		}
	}

	if r.n > MaxSolveUnknowns {
		cu := r.n - len(unk) // each complex unknown counts one more
		var kinds []string
		if cu > 0 {
			kinds = append(kinds, fmt.Sprintf("%d complex", cu))
		}
		if ru := len(unk) - cu; ru > 0 {
			kinds = append(kinds, fmt.Sprintf("%d real", ru))
		}
		r.setErr(r.setPos(), "the set has %d real unknowns (%s), but a solve block takes at most %d (such as %d complex unknowns): the solver works on the full matrix of the set, and its time grows as the cube of the count. Split the network into blocks of at most %d complex unknowns, e.g. reduce each part to an equivalent (Thévenin or Norton) at the nodes where it joins the rest and solve the joined equivalents in a further block",
			r.n, strings.Join(kinds, " and "), MaxSolveUnknowns, MaxSolveUnknowns/2, MaxSolveUnknowns/2)
		return false
	}
	return true
}

// checkDimensions evaluates both sides of every equation at the generic
// point, where no unknown is zero and no two are alike, and checks that
// their dimensions agree (stage 6).
func (r *solveRun) checkDimensions(unk []*Unknown) (generic []float64, genL, genR []expr.Scalar, ok bool) {
	ok = true
	generic = make([]float64, r.n)
	for k, u := range unk {
		c := r.col[k]
		generic[c] = r.sameSide(c, genericFactor(k, 0.6180339887498949)*r.xscale[c])
		if !u.Real {
			generic[c+1] = r.x0[c+1] + genericFactor(k, 0.41421356237309503)*r.xscale[c+1]
		}
	}
	r.setX(generic)
	genL = make([]expr.Scalar, len(r.eqs))
	genR = make([]expr.Scalar, len(r.eqs))
	for i, eq := range r.eqs {
		l, rr, err := r.sides(i)
		if err != nil {
			if !r.evalFailed(eq, err, "", "") {
				return nil, nil, nil, false
			}
			ok = false
			continue
		}
		genL[i], genR[i] = l, rr
		switch {
		case l.Dim == rr.Dim:
			eq.Dim = l.Dim
		case l.Z == 0 && l.Dim.IsZero():
			eq.Dim = rr.Dim
		case rr.Z == 0 && rr.Dim.IsZero():
			eq.Dim = l.Dim
		default:
			msg := fmt.Sprintf("the two sides of this equation have different units: the left side is %s, the right side %s", expr.DimWord(l.Dim), expr.DimWord(rr.Dim))
			if hint := r.unitHint(eq); hint != "" {
				msg += "; " + hint
			}
			r.eqErr(eq, expr.Errorf(eq.Eq.Pos(), "%s", msg))
			ok = false
		}
	}
	if !ok {
		return nil, nil, nil, false
	}
	return generic, genL, genR, true
}

// evalAtStart evaluates both sides of every equation at the starting
// point (stage 7).
func (r *solveRun) evalAtStart(unk []*Unknown) (baseL, baseR []expr.Scalar, ok bool) {
	r.setX(r.x0)
	baseL = make([]expr.Scalar, len(r.eqs))
	baseR = make([]expr.Scalar, len(r.eqs))
	for i, eq := range r.eqs {
		l, rr, err := r.sides(i)
		if err != nil {
			hint := "; give the unknowns starting values with near, e.g. solve " + nearExample(unk[eq.Unknowns[0]])
			r.evalFailed(eq, err, "the equations cannot be evaluated at the starting point ("+startWords(unk)+"): ", hint)
			return nil, nil, false
		}
		baseL[i], baseR[i] = l, rr
	}
	return baseL, baseR, true
}

// countReal finds the equations whose residual is real at every point
// tried, each one real equation, and checks the real counts (stage 8).
func (r *solveRun) countReal(baseL, baseR, genL, genR []expr.Scalar) bool {
	set := r.set
	realValued := make([]bool, len(r.eqs))
	for i := range r.eqs {
		realValued[i] = isRealDiff(baseL[i], baseR[i]) && isRealDiff(genL[i], genR[i])
	}
	rng := rand.New(rand.NewPCG(0x736f6c7665626c6b, 0x7265616c76616c75)) // "solveblk", "realvalu"
	probe := make([]float64, r.n)
	for j := 0; j < SolveProbes; j++ {
		for c := range probe {
			u := 0.5 + rng.Float64()
			if rng.IntN(2) == 0 {
				u = -u
			}
			probe[c] = r.sameSide(c, u*r.xscale[c])
		}
		r.setX(probe)
		for i := range r.eqs {
			if !realValued[i] {
				continue
			}
			l, rr, err := r.sides(i)
			if err != nil {
				continue // a point outside the domain tells nothing
			}
			realValued[i] = isRealDiff(l, rr)
		}
	}

	// the counts
	r.row = make([]int, len(r.eqs))
	for i, eq := range r.eqs {
		eq.RealValued = realValued[i]
		r.row[i] = r.m
		if eq.RealValued {
			r.m++
		} else {
			r.m += 2
		}
	}
	set.RealUnknowns, set.RealEquations = r.n, r.m
	if r.m != r.n {
		r.setErr(r.setPos(), "%s", r.countMessage())
		return false
	}
	return true
}

// residualScales sets the residual scales (stage 9): the largest term of
// each equation at the generic point (1 in SI units where all are zero).
// A term that involves an unknown is not zero there, and one that does
// not has the same value everywhere.
func (r *solveRun) residualScales(generic []float64) {
	r.setX(generic)
	r.rscale = make([]float64, r.m)
	for i, eq := range r.eqs {
		q := 0.0
		for _, t := range terms(eq.Eq.RHS, terms(eq.Eq.LHS, nil)) {
			v, err := r.env.EvalKeyed(t, r.loc, nil)
			if s, isS := v.(*expr.Scalar); err == nil && isS && s.IsFinite() {
				q = math.Max(q, cmplx.Abs(s.Z))
			}
		}
		if !(q > 0) || math.IsInf(q, 0) {
			q = 1
		}
		r.rscale[r.row[i]] = q
		if !eq.RealValued {
			r.rscale[r.row[i]+1] = q
		}
	}
}

// genericFactor is the multiple of its scale by which unknown k departs
// from the starting point at the generic point: 0.5 + frac((k+1)·a), in
// [0.5, 1.5), different for neighbouring unknowns (a irrational).
func genericFactor(k int, a float64) float64 {
	_, f := math.Modf(float64(k+1) * a)
	return 0.5 + f
}

// isRealDiff reports whether lhs − rhs is real: its imaginary part is at
// most RealTol of the larger side.
func isRealDiff(l, r expr.Scalar) bool {
	d := imag(l.Z - r.Z)
	return math.Abs(d) <= RealTol*math.Max(cmplx.Abs(l.Z), cmplx.Abs(r.Z))
}

// terms appends the top-level terms of a sum: a + b − c gives a, b, c.
func terms(n expr.Node, out []expr.Node) []expr.Node {
	switch x := n.(type) {
	case *expr.Binary:
		if x.Op == expr.ADD || x.Op == expr.SUB {
			return terms(x.Y, terms(x.X, out))
		}
	case *expr.Paren:
		return terms(x.X, out)
	case *expr.Unary:
		return terms(x.X, out)
	}
	return append(out, n)
}
