package diff

import (
	"math"
	"testing"

	"calcdoc/expr"
)

func volts(z complex128) *expr.Scalar {
	return &expr.Scalar{Z: z, Dim: expr.DimVoltage}
}

// TestMeasure: the relative change of real and complex numbers.
func TestMeasure(t *testing.T) {
	// hand derivation: (240 − 230)/230 = 4.3478 %
	eq, rel, has, mag := measure(volts(230), volts(240))
	if eq || !has || mag || math.Abs(rel-10.0/230) > 1e-15 {
		t.Errorf("230 → 240: %v %v %v %v", eq, rel, has, mag)
	}
	// hand derivation: |(3+4j) − (3+3j)| / |3+4j| = 1/5 = 20 % (a
	// magnitude: a complex change has no sign)
	eq, rel, has, mag = measure(volts(3+4i), volts(3+3i))
	if eq || !has || !mag || math.Abs(rel-0.2) > 1e-15 {
		t.Errorf("3+4j → 3+3j: %v %v %v %v", eq, rel, has, mag)
	}
	// the same within rounding noise (1e-12 relative): no change
	if eq, _, _, _ := measure(volts(230), volts(230*(1+1e-14))); !eq {
		t.Error("rounding noise counted as a change")
	}
	// from zero: a change with no relative size
	if eq, _, has, _ := measure(volts(0), volts(1)); eq || has {
		t.Error("0 → 1")
	}
	// another dimension: a change with no relative size
	if eq, _, has, _ := measure(volts(1), &expr.Scalar{Z: 1}); eq || has {
		t.Error("V → plain number")
	}
}

// TestCheckMatching: by description or text first, then by order; the
// rest added or removed.
func TestCheckMatching(t *testing.T) {
	a := []Check{
		{Key: "breaker", Evaluated: true, Pass: true, Util: 0.5, HasUtil: true},
		{Key: "V_drop <= 4 %", Evaluated: true, Pass: true, Util: 0.5, HasUtil: true},
		{Key: "old text", Evaluated: true, Pass: true},
		{Key: "gone", Evaluated: true, Pass: true},
	}
	b := []Check{
		{Key: "new text", Evaluated: true, Pass: false},                               // pairs with "old text" by order
		{Key: "V_drop <= 4 %", Evaluated: true, Pass: true, Util: 0.5, HasUtil: true}, // unchanged
		{Key: "breaker", Evaluated: true, Pass: true, Util: 0.6, HasUtil: true},       // +20 %
	}
	cs := compareChecks("d.md", a, b, Options{})
	if len(cs) != 3 {
		t.Fatalf("%d changes: %+v", len(cs), cs)
	}
	if c := cs[0]; c.Name != "new text" || c.Old != "holds" || c.New != "fails" {
		t.Errorf("by order: %+v", c)
	}
	// hand derivation: 0.6/0.5 − 1 = +20 %
	if c := cs[1]; c.Name != "breaker" || !c.HasRel || math.Abs(c.Rel-0.2) > 1e-12 {
		t.Errorf("utilisation: %+v", c)
	}
	if c := cs[2]; c.Kind != Removed || c.Name != "gone" {
		t.Errorf("removed: %+v", c)
	}
	// a utilisation change under --min-change is hidden, a verdict change is not
	if cs := compareChecks("d.md", a, b, Options{MinChange: 0.25}); len(cs) != 2 {
		t.Errorf("min-change 25 %%: %+v", cs)
	}
}
