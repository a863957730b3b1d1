package calcdoc

import (
	"math"
	"testing"

	"calcdoc/expr"
)

// TestSameValue: the values two saves give a name count as equal only bit
// for bit, with the same dimension and flags. The sums are IEEE 754
// double arithmetic (hand derivation: 0.1 + 0.2 rounds to
// 0.30000000000000004, the double next above 0.3; 2·5 is exactly 10).
func TestSameValue(t *testing.T) {
	sc := func(z complex128, d expr.Dim) *expr.Scalar { return &expr.Scalar{Z: z, Dim: d} }
	a, b := 0.1, 0.2 // variables: no constant folding at exact precision
	two, five := 2.0, 5.0
	negZero := math.Copysign(0, -1)
	nan := math.NaN()
	cases := []struct {
		what string
		x, y expr.Value
		same bool
	}{
		{"2·5 V and 10 V", sc(complex(two*five, 0), expr.DimVoltage), sc(10, expr.DimVoltage), true},
		{"0.1 + 0.2 and 0.3", sc(complex(a+b, 0), expr.Dim{}), sc(0.3, expr.Dim{}), false},
		{"10 V and 10 A", sc(10, expr.DimVoltage), sc(10, expr.DimCurrent), false},
		{"+0 and −0", sc(0, expr.Dim{}), sc(complex(negZero, 0), expr.Dim{}), false},
		{"a NaN and itself", sc(complex(nan, 0), expr.Dim{}), sc(complex(nan, 0), expr.Dim{}), true},
		{"an angle and a number", &expr.Scalar{Z: 1, Angle: true}, &expr.Scalar{Z: 1}, false},
		{"none and none", nil, nil, true},
		{"none and 0", nil, sc(0, expr.Dim{}), false},
		{"a scalar and a 1×1 matrix", sc(1, expr.Dim{}), &expr.Matrix{Rows: 1, Cols: 1, E: []expr.Scalar{{Z: 1}}}, false},
		{"equal matrices", &expr.Matrix{Rows: 1, Cols: 2, E: []expr.Scalar{{Z: 1}, {Z: 2i}}}, &expr.Matrix{Rows: 1, Cols: 2, E: []expr.Scalar{{Z: 1}, {Z: 2i}}}, true},
		{"a matrix transposed", &expr.Matrix{Rows: 1, Cols: 2, E: []expr.Scalar{{Z: 1}, {Z: 2i}}}, &expr.Matrix{Rows: 2, Cols: 1, E: []expr.Scalar{{Z: 1}, {Z: 2i}}}, false},
		{"a matrix with residue bounds and one without", &expr.Matrix{Rows: 1, Cols: 1, E: []expr.Scalar{{Z: 1}}, Resid: []float64{0}}, &expr.Matrix{Rows: 1, Cols: 1, E: []expr.Scalar{{Z: 1}}}, false},
	}
	for _, c := range cases {
		if got := sameValue(c.x, c.y); got != c.same {
			t.Errorf("%s: same %v, want %v", c.what, got, c.same)
		}
	}
}

// TestSameBinding: a final binding counts as unchanged only with the same
// name as written, display and value, at the same place.
func TestSameBinding(t *testing.T) {
	v := func() *expr.Scalar { return &expr.Scalar{Z: 230, Dim: expr.DimVoltage} }
	kV, err := expr.ParseUnit("kV")
	if err != nil {
		t.Fatal(err)
	}
	base := &expr.Binding{Name: "U_1", Value: v()}
	cases := []struct {
		what string
		y    *expr.Binding
		same bool
	}{
		{"the same", &expr.Binding{Name: "U_1", Value: v()}, true},
		{"another spelling of the name", &expr.Binding{Name: "U_01", Value: v()}, false},
		{"a display unit", &expr.Binding{Name: "U_1", Value: v(), Display: &expr.Display{Text: "kV", Unit: kV}}, false},
		{"unavailable", &expr.Binding{Name: "U_1", Unavailable: true}, false},
		{"values in cases", &expr.Binding{Name: "U_1", Value: v(), Cases: []expr.Value{v(), v()}}, false},
		{"absent", nil, false},
	}
	for _, c := range cases {
		if got := sameBinding(base, c.y); got != c.same {
			t.Errorf("%s: same %v, want %v", c.what, got, c.same)
		}
	}
	if !sameBinding(nil, nil) {
		t.Error("two absent names: not the same")
	}
}
