package diff

import (
	"math"
	"math/cmplx"

	"calcdoc/expr"
)

// Change kinds.
const (
	Added   = "added"
	Removed = "removed"
	Changed = "changed"
	Failed  = "error" // the document does not evaluate at a revision
)

// Items a change is about.
const (
	ItemDocument = "document"
	ItemValue    = "value"
	ItemCheck    = "check"
	ItemFront    = "front"
)

// Change is one change of one document between the two revisions.
type Change struct {
	Doc string // the document's path, as given
	// Case is the case the change belongs to; "" for a value or check
	// with no cases.
	Case string
	Kind string // Added, Removed, Changed or Failed
	Item string // ItemDocument, ItemValue, ItemCheck or ItemFront
	Name string // the value's name, the check's key, the front-matter key
	Role string // Input or Result, for a value
	Old  string // as shown at the from revision ("" when added)
	New  string // as shown at the to revision ("" when removed)
	// Rel is the relative change of a number, (new − old)/|old|, or
	// |new − old|/|old| for a complex one (Magnitude set); HasRel says
	// whether there is one.
	Rel       float64
	HasRel    bool
	Magnitude bool
	// At is the revision label of a Failed change.
	At string
}

// Options tune the comparison.
type Options struct {
	// MinChange hides numeric changes whose relative size is below it
	// (0.001 for --min-change 0.1%); 0 shows every change.
	MinChange float64
}

// same is the relative tolerance below which two numbers are the same
// (rounding noise of evaluation, not a change).
const same = 1e-12

// Compare lists the changes of the document doc from a to b, in a stable
// order: the front matter, then values in the order of b (removed ones
// where they stood in a), then checks.
func Compare(doc string, a, b *Snapshot, o Options) []Change {
	switch {
	case a.Missing && b.Missing:
		return nil
	case a.Missing:
		return []Change{{Doc: doc, Kind: Added, Item: ItemDocument}}
	case b.Missing:
		return []Change{{Doc: doc, Kind: Removed, Item: ItemDocument}}
	}
	var out []Change
	// front matter
	fa := map[string]string{}
	for _, f := range a.Front {
		fa[f.Key] = f.Value
	}
	seen := map[string]bool{}
	for _, f := range b.Front {
		seen[f.Key] = true
		old, ok := fa[f.Key]
		switch {
		case !ok:
			out = append(out, Change{Doc: doc, Kind: Added, Item: ItemFront, Name: f.Key, New: f.Value})
		case old != f.Value:
			out = append(out, Change{Doc: doc, Kind: Changed, Item: ItemFront, Name: f.Key, Old: old, New: f.Value})
		}
	}
	for _, f := range a.Front {
		if !seen[f.Key] {
			out = append(out, Change{Doc: doc, Kind: Removed, Item: ItemFront, Name: f.Key, Old: f.Value})
		}
	}
	out = append(out, compareValues(doc, a.Values, b.Values, o)...)
	out = append(out, compareChecks(doc, a.Checks, b.Checks, o)...)
	return out
}

func compareValues(doc string, a, b []Value, o Options) []Change {
	var out []Change
	old := map[string]Value{}
	for _, v := range a {
		old[v.key()] = v
	}
	inB := map[string]bool{}
	for _, v := range b {
		inB[v.key()] = true
	}
	// removed values go where they stood in a: before the first value of
	// b that followed them there
	ai := 0
	flush := func(stop string) {
		for ai < len(a) && a[ai].key() != stop {
			if !inB[a[ai].key()] {
				v := a[ai]
				out = append(out, Change{Doc: doc, Case: v.Case, Kind: Removed, Item: ItemValue, Name: v.Name, Role: v.Role, Old: v.Text})
			}
			ai++
		}
		if ai < len(a) {
			ai++
		}
	}
	for _, v := range b {
		p, ok := old[v.key()]
		if !ok {
			out = append(out, Change{Doc: doc, Case: v.Case, Kind: Added, Item: ItemValue, Name: v.Name, Role: v.Role, New: v.Text})
			continue
		}
		flush(v.key())
		c := Change{Doc: doc, Case: v.Case, Kind: Changed, Item: ItemValue, Name: v.Name, Role: v.Role, Old: p.Text, New: v.Text}
		if equal, rel, hasRel, mag := measure(p.Value, v.Value); !equal {
			c.Rel, c.HasRel, c.Magnitude = rel, hasRel, mag
			if hasRel && math.Abs(rel) < o.MinChange {
				continue
			}
			out = append(out, c)
		} else if p.Role != v.Role {
			// the number stayed but where it comes from changed (a literal
			// now worked out, or the other way)
			out = append(out, c)
		}
	}
	flush("\x00")
	return out
}

// measure compares two values: whether they are the same, and for two
// numbers of one dimension the relative change.
func measure(a, b expr.Value) (equal bool, rel float64, hasRel, magnitude bool) {
	sa, ok1 := a.(*expr.Scalar)
	sb, ok2 := b.(*expr.Scalar)
	if !ok1 || !ok2 {
		return expr.FormatValue(a, nil, 12) == expr.FormatValue(b, nil, 12), 0, false, false
	}
	if sa.Dim != sb.Dim || sa.Kind != sb.Kind || sa.Sense != sb.Sense || sa.Angle != sb.Angle {
		return false, 0, false, false
	}
	d := cmplx.Abs(sb.Z - sa.Z)
	scale := math.Max(cmplx.Abs(sa.Z), cmplx.Abs(sb.Z))
	if d <= same*scale || d == 0 {
		return true, 0, false, false
	}
	if sa.Z == 0 || cmplx.IsNaN(sa.Z) || cmplx.IsInf(sa.Z) {
		return false, 0, false, false
	}
	if imag(sa.Z) == 0 && imag(sb.Z) == 0 {
		return false, (real(sb.Z) - real(sa.Z)) / math.Abs(real(sa.Z)), true, false
	}
	return false, d / cmplx.Abs(sa.Z), true, true
}

func compareChecks(doc string, a, b []Check, o Options) []Change {
	// match by key, the n-th of a key with the n-th; the rest by order
	pair := make([]int, len(b)) // index in a, or -1
	used := make([]bool, len(a))
	byKey := map[string][]int{}
	for i, c := range a {
		byKey[c.Key+"\x00"+c.Case] = append(byKey[c.Key+"\x00"+c.Case], i)
	}
	for j, c := range b {
		pair[j] = -1
		k := c.Key + "\x00" + c.Case
		if l := byKey[k]; len(l) > 0 {
			pair[j], used[l[0]] = l[0], true
			byKey[k] = l[1:]
		}
	}
	var restA []int
	for i := range a {
		if !used[i] {
			restA = append(restA, i)
		}
	}
	for j := range b {
		if pair[j] < 0 && len(restA) > 0 && a[restA[0]].Case == b[j].Case {
			pair[j], used[restA[0]] = restA[0], true
			restA = restA[1:]
		}
	}
	var out []Change
	for j, c := range b {
		if pair[j] < 0 {
			out = append(out, Change{Doc: doc, Case: c.Case, Kind: Added, Item: ItemCheck, Name: c.Key, New: c.verdict()})
			continue
		}
		p := a[pair[j]]
		ch := Change{Doc: doc, Case: c.Case, Kind: Changed, Item: ItemCheck, Name: c.Key, Old: p.verdict(), New: c.verdict()}
		if p.Evaluated != c.Evaluated || p.Pass != c.Pass || p.HasUtil != c.HasUtil {
			out = append(out, ch)
			continue
		}
		if !c.HasUtil || math.Abs(c.Util-p.Util) <= same*math.Max(math.Abs(c.Util), math.Abs(p.Util)) {
			continue
		}
		if p.Util != 0 {
			ch.Rel, ch.HasRel = (c.Util-p.Util)/math.Abs(p.Util), true
			if math.Abs(ch.Rel) < o.MinChange {
				continue
			}
		}
		out = append(out, ch)
	}
	for _, i := range restA {
		out = append(out, Change{Doc: doc, Case: a[i].Case, Kind: Removed, Item: ItemCheck, Name: a[i].Key, Old: a[i].verdict()})
	}
	return out
}
