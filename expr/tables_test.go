package expr

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// testTable is a table for the engine's tests: keys in one unit, one
// column "R" in another, look-ups of the simplest kind (the real table, with its
// tolerance and its messages, is calcdoc/kind/table/data). It records the
// calls it gets.
type testTable struct {
	keyDim, colDim Dim
	keys, col      []float64
	calls          []string
}

func (t *testTable) row(x *Scalar) int {
	for i, k := range t.keys {
		if math.Abs(k-real(x.Z)) <= RelTol*k {
			return i
		}
	}
	return -1
}

func (t *testTable) Lookup(col string, x *Scalar) (*Scalar, []int, error) {
	t.calls = append(t.calls, "col "+col)
	if col != "R" {
		return nil, nil, fmt.Errorf("no column %s", col)
	}
	if i := t.row(x); i >= 0 {
		return &Scalar{Z: complex(t.col[i], 0), Dim: t.colDim}, []int{i}, nil
	}
	return nil, nil, fmt.Errorf("no row")
}

func (t *testTable) Interp(col string, x *Scalar) (*Scalar, []int, error) {
	t.calls = append(t.calls, "interp "+col)
	v := real(x.Z)
	for i := 0; i+1 < len(t.keys); i++ {
		if t.keys[i] <= v && v <= t.keys[i+1] {
			f := (v - t.keys[i]) / (t.keys[i+1] - t.keys[i])
			return &Scalar{Z: complex(t.col[i]+f*(t.col[i+1]-t.col[i]), 0), Dim: t.colDim}, []int{i, i + 1}, nil
		}
	}
	return nil, nil, fmt.Errorf("outside")
}

func (t *testTable) Up(x *Scalar) (*Scalar, []int, error) {
	t.calls = append(t.calls, "up")
	for i, k := range t.keys {
		if k >= real(x.Z) {
			return &Scalar{Z: complex(k, 0), Dim: t.keyDim}, []int{i}, nil
		}
	}
	return nil, nil, fmt.Errorf("none")
}

func (t *testTable) Down(x *Scalar) (*Scalar, []int, error) {
	t.calls = append(t.calls, "down")
	for i := len(t.keys) - 1; i >= 0; i-- {
		if t.keys[i] <= real(x.Z) {
			return &Scalar{Z: complex(t.keys[i], 0), Dim: t.keyDim}, []int{i}, nil
		}
	}
	return nil, nil, fmt.Errorf("none")
}

// runWithTable runs a block in an Env that holds the table cu.
func runWithTable(text string) (*block, *testTable) {
	tt := &testTable{
		keyDim: DimArea, colDim: DimImpedance.Div(DimLength),
		keys: []float64{1.5e-6, 2.5e-6, 4e-6}, col: []float64{12.1e-3, 7.41e-3, 4.61e-3},
	}
	b := &block{env: NewEnv()}
	if err := b.env.DefineTable("cu", PlaceAt("", 1, 1), tt); err != nil {
		panic(err)
	}
	b.stmts = ParseBlock(NewSource(text, PlaceAt(text, 10, 1)), CalcMode, &b.parse)
	for _, s := range b.stmts {
		b.results = append(b.results, b.env.Exec(s))
	}
	return b, tt
}

// The parser reads "cu.R(x)" as a call of one qualified name, and
// "interp(cu.R, x)" as a call whose first argument is that name.
func TestTableGrammar(t *testing.T) {
	var errs ErrorList
	n, _ := ParseExpr(NewSource("cu.R_20(2.5 mm²) + interp(cu.R_20, x)", Pos{}), &errs)
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	bin := n.(*Binary)
	c := bin.X.(*Call)
	if tab, col, ok := c.Fun.Column(); !ok || tab != "cu" || col != "R_20" || c.Fun.Key != "cu.R_20" {
		t.Errorf("cu.R_20(...) read as %q (%q, %q, %v)", c.Fun.Name, tab, col, ok)
	}
	in := bin.Y.(*Call)
	if id := in.Args[0].(*Ident); id.Dot != 2 || id.Name != "cu.R_20" {
		t.Errorf("interp's first argument read as %q (dot %d)", id.Name, id.Dot)
	}
	// the keys of the parts are each a name's key: "θ.φ" and "theta.phi" are one
	n2, _ := ParseExpr(NewSource("theta.phi(1)", Pos{}), &errs)
	if k := n2.(*Call).Fun.Key; k != "θ.φ" {
		t.Errorf("key %q, want θ.φ", k)
	}
}

func TestTableLookupsInTheEngine(t *testing.T) {
	// 2.5 mm² is a key: the test table gives 7.41 mΩ/m
	b, tt := runWithTable("R_1 = cu.R(2.5 mm²)\nR_2 = interp(cu.R, 2 mm²)\nS_1 = up(cu, 2 mm²)\nS_2 = down(cu, 2 mm²)")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs[0])
	}
	want := []float64{
		7.41e-3,
		// hand derivation: 2 mm² is halfway from 1.5 to 2.5 mm², so
		// (12.1 + 7.41)/2 = 9.755 mΩ/m
		9.755e-3,
		2.5e-6, 1.5e-6,
	}
	for i, w := range want {
		s := b.results[i].Value.(*Scalar)
		if math.Abs(real(s.Z)-w) > 1e-12*w {
			t.Errorf("line %d = %v, want %v", i+1, s.Z, w)
		}
		ls := b.results[i].Trace.Lookups()
		if len(ls) != 1 || ls[0].Table != "cu" || ls[0].Value != s {
			t.Fatalf("line %d: lookups %+v", i+1, ls)
		}
	}
	if got := fmt.Sprint(tt.calls); got != "[col R interp R up down]" {
		t.Errorf("the table got %s", got)
	}
	if l := b.results[1].Trace.Lookups()[0]; l.Func != "interp" || l.Col != "R" || fmt.Sprint(l.Rows) != "[0 1]" {
		t.Errorf("interp recorded as %+v", l)
	}
}

func TestTableLookupErrors(t *testing.T) {
	for _, c := range []struct{ src, want string }{
		{"cu.X(2.5 mm²)", "cu.X(2.5 mm²): no column X"},
		{"cu.R(3 mm²)", "cu.R(3 mm²): no row"},
		{"al.R(3 mm²)", `unknown table "al" (the tables defined above: cu)`},
		{"cu.R(2.5 mm², 1)", "takes one key"},
		{"cu.R", "cu.R is the column R of the table cu: look a value up with cu.R(x)"},
		{"2 * cu", "cu is a table (defined at line 1)"},
		{"interp(cu, 2 mm²)", "interp reads a column of a table: write interp(cu.COLUMN, x)"},
		{"up(cu.R, 2 mm²)", "up gives a key of a table, not of a column: write up(cu, x)"},
		{"up(2, 2 mm²)", "the first argument of up names a table"},
		{"down(cu)", "down takes 2 arguments, down(TABLE, x), not 1"},
		{"x = 1\nup(x, 1)", "x is a value, not a table"},
		{"cu.R([1; 2])", "a key to look up must be a single value"},
		{"cu.R_2 = 3", "is a column of a table (cu.R_2): a name being defined holds no '.'"},
		{"cu = 3", `"cu" is already defined as a table at line 1`},
		{"up = 3", "built-in function"},
	} {
		b, _ := runWithTable(c.src)
		errs := b.allErrors()
		if len(errs) == 0 || !strings.Contains(errs[0].Error(), c.want) {
			t.Errorf("%q: errors %v, want one containing %q", c.src, errs, c.want)
		}
	}
}
