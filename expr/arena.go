package expr

// A block's syntax tree is allocated in slabs: one array for each kind of
// node, sized from the block's tokens before parsing (an upper bound for
// most: a name token makes at most one Ident, a number token one Number),
// so that a block of n statements costs a dozen allocations for its
// nodes instead of several for every statement. The nodes live as long as
// the statements do, and so do the slabs; a slab that runs out (or was
// never sized, as for ParseExpr) gives single allocations.

// slab hands out the elements of one allocation.
type slab[T any] struct {
	free  []T
	chunk int // the size of the last chunk alloc made
}

// alloc returns a new zero element, making a chunk when the slab is
// empty: 8 elements first, twice as many each time after, up to limit.
// An environment's slabs grow this way with its statements.
func (s *slab[T]) alloc(limit int) *T {
	if len(s.free) == 0 {
		s.refill(1, limit)
	}
	return s.one()
}

func (s *slab[T]) refill(n, limit int) {
	s.chunk = max(min(limit, 2*s.chunk), 8, n)
	s.free = make([]T, s.chunk)
}

// keep is list for a slab that grows (alloc): a copy of xs of exactly
// its length and capacity, nil for none.
func (s *slab[T]) keep(xs []T, limit int) []T {
	if n := len(xs); n > 0 && len(s.free) < n {
		s.refill(n, limit)
	}
	return s.list(xs)
}

// reserve makes room for n elements.
func (s *slab[T]) reserve(n int) {
	if n > 0 {
		s.free = make([]T, n)
	}
}

// one returns a new zero element.
func (s *slab[T]) one() *T {
	if len(s.free) == 0 {
		return new(T)
	}
	p := &s.free[0]
	s.free = s.free[1:]
	return p
}

// list returns a copy of xs of exactly its length and capacity (nil for
// none), so that appending to it never writes into the slab.
func (s *slab[T]) list(xs []T) []T {
	n := len(xs)
	if n == 0 {
		return nil
	}
	var out []T
	if len(s.free) >= n {
		out = s.free[:n:n]
		s.free = s.free[n:]
	} else {
		out = make([]T, n)
	}
	copy(out, xs)
	return out
}

// arena holds the slabs of one parse.
type arena struct {
	idents   slab[Ident]
	numbers  slab[Number]
	binaries slab[Binary]
	unaries  slab[Unary]
	units    slab[WithUnit]
	parens   slab[Paren]
	calls    slab[Call]
	abss     slab[Abs]
	compares slab[Compare]
	assigns  slab[Assign]
	checks   slab[Check]
	names    slab[*Ident]
	nodes    slab[Node]
	ops      slab[Kind]
}

// size reserves room for the nodes the tokens of a block can make.
func (a *arena) size(toks []Token, mode Mode) {
	var idents, numbers, binaries, unaries, units, parens, calls, bars, cmps, assigns, checks, commas int
	for i, t := range toks {
		switch t.Kind {
		case IDENT:
			if t.Text == "check" {
				checks++
			} else {
				idents++
			}
		case NUMBER:
			numbers++
		case ADD, SUB:
			if i == 0 || prefixBefore(toks[i-1].Kind) {
				unaries++
			} else {
				binaries++
			}
		case MUL, DIV, POW, ANGLE, PAR:
			binaries++
		case BAR:
			bars++
		case UNIT:
			units++
		case LPAREN:
			if i > 0 && toks[i-1].Kind == IDENT {
				calls++
			} else {
				parens++
			}
		case LT, LE, GT, GE, EQ, NE:
			cmps++
		case ASSIGN:
			assigns++
		case COMMA:
			commas++
		}
	}
	if mode != CalcMode {
		assigns, checks = 0, 0
	}
	// the "check" of a check is a keyword, no node; a call's name is an
	// Ident too (counted with the names)
	a.idents.reserve(idents)
	a.numbers.reserve(numbers)
	a.binaries.reserve(binaries + bars/2)
	a.unaries.reserve(unaries)
	a.units.reserve(units)
	a.parens.reserve(parens)
	a.calls.reserve(calls)
	a.abss.reserve(bars / 2)
	a.compares.reserve(min(cmps, checks))
	a.assigns.reserve(assigns)
	a.checks.reserve(checks)
	a.names.reserve(assigns)
	a.nodes.reserve(calls + commas + cmps + checks)
	a.ops.reserve(cmps)
}

// prefixBefore reports whether a + or - after a token of kind k is a
// sign (a Unary node) rather than an operator.
func prefixBefore(k Kind) bool {
	switch k {
	case NUMBER, IDENT, UNIT, RPAREN, RBRACK, RBRACE, BAR, DISPLAY:
		return false
	}
	return true
}

// slabLimit is the largest chunk of an environment's slabs.
const slabLimit = 128

// resultTrace is a Result with its Trace, allocated together.
type resultTrace struct {
	r Result
	t Trace
}

// envMem is what an environment allocates for its statements: the
// results, bindings and trace entries Exec keeps, in slabs, and the
// buffer a statement's trace records into.
type envMem struct {
	results  slab[resultTrace]
	bindings slab[Binding]
	entries  slab[traceEntry]
	traceBuf []traceEntry
	displays map[displayKey]*Display // ChooseDisplay's, by unit and form
}

// memory returns e's slabs, making them.
func (e *Env) memory() *envMem {
	if e.mem == nil {
		e.mem = new(envMem)
	}
	return e.mem
}
