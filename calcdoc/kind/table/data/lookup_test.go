package data

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"calcdoc/expr"
)

// r20 is a table with a gap: plain copper and aluminium, class 2, maximum
// DC resistance at 20 °C in Ω/km (IEC 60228:2004, Table 2, written from
// memory; the look-up tests need only some rising keys and numbers).
const text20 = `source: IEC 60228:2004, Table 2
S [mm²] | R_cu [Ω/km] | R_al [Ω/km]
2.5     | 7.41        |
4       | 4.61        |
10      | 1.83        | 3.08
16      | 1.15        | 1.91`

const text40 = "S = up(r20, 6 mm²)\nR = r20.R_cu(S)\nR_6 = interp(r20.R_cu, 6 mm²)\nx = r20.R_al(4 mm²)"

func r20(t *testing.T) *Table {
	t.Helper()
	tab, errs := ParseBlock("r20", expr.NewSource(text20, expr.PlaceAt(text20, 20, 1)), false)
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	return tab
}

func mm2(x float64) *expr.Scalar { return &expr.Scalar{Z: complex(x*1e-6, 0), Dim: expr.DimArea} }

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-12*math.Abs(b) }

func TestLookupExact(t *testing.T) {
	tab := r20(t)
	v, rows, err := tab.Lookup("R_cu", mm2(4))
	if err != nil || !near(real(v.Z), 4.61e-3) || fmt.Sprint(rows) != "[1]" {
		t.Fatalf("R_cu(4 mm²) = %v %v %v", v, rows, err)
	}
	// within 1e-9 relative counts as the key: 4 mm² * (1 + 5e-10)
	if _, rows, err := tab.Lookup("R_cu", mm2(4*(1+5e-10))); err != nil || rows[0] != 1 {
		t.Errorf("4 mm² (1 + 5e-10): %v %v", rows, err)
	}
	// the key column itself
	if v, _, err := tab.Lookup("S", mm2(10)); err != nil || !near(real(v.Z), 10e-6) {
		t.Errorf("S(10 mm²) = %v %v", v, err)
	}
	if v.Dim != expr.DimImpedance.Div(expr.DimLength) {
		t.Errorf("unit %v", v.Dim)
	}
}

// Hand derivations of linear interpolation, y = y0 + (x - x0)/(x1 - x0) ·
// (y1 - y0).
func TestInterp(t *testing.T) {
	tab := r20(t)
	for _, c := range []struct {
		col  string
		x    float64 // mm²
		want float64 // Ω/km
		rows string
	}{
		// 6 mm² between 4 and 10: 4.61 + (2/6)(1.83 - 4.61) = 4.61 - 0.92667 = 3.683333
		{"R_cu", 6, 4.61 + (2.0/6)*(1.83-4.61), "[1 2]"},
		// 13 mm² halfway between 10 and 16: (3.08 + 1.91)/2 = 2.495
		{"R_al", 13, 2.495, "[2 3]"},
		// on a key: the row itself
		{"R_cu", 10, 1.83, "[2]"},
		{"R_cu", 2.5, 7.41, "[0]"},
		{"R_cu", 16, 1.15, "[3]"},
	} {
		v, rows, err := tab.Interp(c.col, mm2(c.x))
		if err != nil || !near(real(v.Z), c.want*1e-3) || fmt.Sprint(rows) != c.rows {
			t.Errorf("interp(%s, %v mm²) = %v %v %v, want %v Ω/km rows %s", c.col, c.x, v, rows, err, c.want, c.rows)
		}
	}
}

func TestUpDown(t *testing.T) {
	tab := r20(t)
	for _, c := range []struct {
		fn   string
		x    float64
		want float64
	}{
		{"up", 5, 10}, {"up", 4, 4}, {"up", 2, 2.5}, {"up", 4 * (1 + 5e-10), 4}, {"up", 16, 16},
		{"down", 5, 4}, {"down", 4, 4}, {"down", 20, 16}, {"down", 4 * (1 - 5e-10), 4}, {"down", 2.5, 2.5},
	} {
		f := tab.Up
		if c.fn == "down" {
			f = tab.Down
		}
		v, rows, err := f(mm2(c.x))
		if err != nil || !near(real(v.Z), c.want*1e-6) || v.Dim != expr.DimArea || len(rows) != 1 {
			t.Errorf("%s(%v mm²) = %v %v %v, want %v mm²", c.fn, c.x, v, rows, err, c.want)
		}
	}
}

func TestLookupErrors(t *testing.T) {
	tab := r20(t)
	amp := &expr.Scalar{Z: 3, Dim: expr.DimCurrent}
	for _, c := range []struct {
		err  error
		want string
	}{
		{second(tab.Lookup("R_cu", mm2(6))), "no row of r20 has the key S = 6 mm²: the nearest keys are 4 mm² and 10 mm² (interp(r20.R_cu, x) interpolates between rows, up(r20, x) gives the next key up)"},
		{second(tab.Lookup("R_cu", mm2(1))), "the nearest keys are 2.5 mm² (the smallest)"},
		{second(tab.Lookup("R_cu", mm2(50))), "the nearest keys are 16 mm² (the largest)"},
		{second(tab.Lookup("R_x", mm2(4))), "the table r20 has no column R_x: its columns are S, R_cu, R_al"},
		{second(tab.Lookup("R_al", mm2(4))), "the row S = 4 mm² (line 23) has a gap in column R_al"},
		{second(tab.Lookup("R_cu", amp)), "the key 3 A is a current, but the table r20 needs an area (its key S is in mm²)"},
		{second(tab.Lookup("R_cu", &expr.Scalar{Z: complex(4e-6, 1e-6), Dim: expr.DimArea})), "is complex"},
		{second(tab.Interp("R_cu", mm2(20))), "S = 20 mm² is outside the range of keys of r20, 2.5 mm² to 16 mm²: interp does not extrapolate"},
		{second(tab.Interp("R_cu", mm2(1))), "outside the range of keys"},
		{second(tab.Interp("R_al", mm2(6))), "the row S = 4 mm² (line 23) has a gap in column R_al"},
		{second(tab.Interp("S", mm2(6))), "S is the key of r20"},
		{second(tab.Up(mm2(20))), "no key of r20 is at or above 20 mm²: the largest is 16 mm²"},
		{second(tab.Down(mm2(2))), "no key of r20 is at or below 2 mm²: the smallest is 2.5 mm²"},
	} {
		if c.err == nil || !strings.Contains(c.err.Error(), c.want) {
			t.Errorf("error %v, want %q", c.err, c.want)
		}
	}
}

func second(_ *expr.Scalar, _ []int, err error) error { return err }

// The table through the engine: a table defined into an Env and looked up
// by the document's syntax, as the table kind will do.
func TestTableInTheEngine(t *testing.T) {
	env := expr.NewEnv()
	if err := env.DefineTable("r20", expr.PlaceAt("", 1, 1), r20(t)); err != nil {
		t.Fatal(err)
	}
	var perrs expr.ErrorList
	stmts := expr.ParseBlock(expr.NewSource(text40, expr.PlaceAt(text40, 40, 1)), expr.CalcMode, &perrs)
	if len(perrs) > 0 {
		t.Fatal(perrs)
	}
	var res []*expr.Result
	for _, s := range stmts {
		res = append(res, env.Exec(s))
	}
	for i, want := range []float64{10e-6, 1.83e-3, (4.61 + (2.0/6)*(1.83-4.61)) * 1e-3} {
		if res[i].Err != nil || !near(real(res[i].Value.(*expr.Scalar).Z), want) {
			t.Errorf("line %d: %v %v, want %v", i+1, res[i].Value, res[i].Err, want)
		}
	}
	if l := res[1].Trace.Lookups(); len(l) != 1 || l[0].Table != "r20" || l[0].Func != "col" || l[0].Col != "R_cu" || l[0].Rows[0] != 2 {
		t.Errorf("lookups %+v", l)
	}
	// the error carries the look-up's position and the table's words
	if e := res[3].Err; e == nil || !strings.Contains(e.Error(), "43:5: r20.R_al(4 mm²): the row S = 4 mm² (line 23) has a gap in column R_al") {
		t.Errorf("error %v", e)
	}
}
