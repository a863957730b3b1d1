package expr

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// The table-driven and single-formatting helpers of format.go must give
// exactly what Go's strconv and math.Pow give (reference: the standard
// library, the definitions they replace).
func TestFormatHelpersMatchStrconv(t *testing.T) {
	r := rand.New(rand.NewPCG(20, 20))
	xs := []float64{0, math.Copysign(0, -1), 1, -1, 999.95, 999999.5, 9999995, 0.0009999995, 0.00099999999999999995,
		999999.999999999, 99999.9999999999, 0.000999999999999999, 9.9995, 0.00099995, 999999.5,
		1e6, 1e-3, 123456789, 5e-324, math.MaxFloat64, math.Inf(1), math.Inf(-1), math.NaN()}
	for _, th := range []float64{1e6, 1e-3, 1e2, 1e3, 1e4, 1e5, 1e7, 1e15, 1e16} {
		for _, v := range []float64{th, math.Nextafter(th, 0), math.Nextafter(th, 2*th)} {
			xs = append(xs, v, -v, v*(1-1e-15), v*(1-1e-14), v*(1-5e-16))
		}
	}
	for range 20000 {
		x := math.Float64frombits(r.Uint64())
		if r.IntN(2) == 0 {
			x = (r.Float64() - 0.5) * math.Pow(10, float64(r.IntN(40)-20))
		}
		xs = append(xs, x)
	}
	for _, x := range xs {
		for n := 2; n <= 15; n++ {
			s := strconv.FormatFloat(x, 'e', n-1, 64)
			want := x
			if x != 0 && !math.IsInf(x, 0) && !math.IsNaN(x) {
				want, _ = strconv.ParseFloat(s, 64)
			}
			wantDec := n - 1
			if a := math.Abs(x); a != 0 {
				sa := strconv.FormatFloat(a, 'e', n-1, 64)
				e, _ := strconv.Atoi(sa[strings.IndexByte(sa, 'e')+1:])
				wantDec = max(n-1-e, 0)
			}
			got := roundSig(x, n)
			var buf [40]byte
			_, e := eForm(buf[:], x, n)
			dec := decimalsOf(x, n, e)
			if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
				t.Fatalf("roundSig(%v, %d) = %v, strconv gives %v", x, n, got, want)
			}
			if dec != wantDec {
				t.Fatalf("decimals(%v, %d) = %d, strconv gives %d", x, n, dec, wantDec)
			}
			if d := decimalsFor(math.Abs(x), n); d != wantDec {
				t.Fatalf("decimalsFor(%v, %d) = %d, want %d", x, n, d, wantDec)
			}
			// the exponent form test by the exponent alone, against the
			// rounded value read back by strconv
			a := math.Abs(want)
			wantExp := a != 0 && (a >= 1e6 || a >= math.Pow(10, float64(n)) || a < 1e-3)
			if got := expForm(x, e, n); got != wantExp {
				t.Fatalf("expForm(%v, %d, %d) = %v, strconv's rounded %v says %v", x, e, n, got, want, wantExp)
			}
			if !math.IsInf(x, 0) {
				if got, want := fmtNum(x, n), fmtNumStrconv(x, n); got != want {
					t.Fatalf("fmtNum(%v, %d) = %q, by strconv alone %q", x, n, got, want)
				}
			}
		}
	}
	for k := -60; k <= 60; k++ {
		if got, want := pow10(k), math.Pow(10, float64(k)); got != want {
			t.Errorf("pow10(%d) = %v, math.Pow gives %v", k, got, want)
		}
	}
}

// isGreekName holds exactly the keys of greekNames.
func TestIsGreekNameIsTheTable(t *testing.T) {
	for k := range greekNames {
		if !isGreekName(k) {
			t.Errorf("isGreekName(%q) = false", k)
		}
	}
	n := 0
	for _, p := range []string{"alpha", "beta", "gamma", "delta", "epsilon", "zeta", "eta", "theta", "iota",
		"kappa", "lambda", "mu", "nu", "xi", "pi", "rho", "sigma", "tau", "upsilon", "phi", "chi", "psi",
		"omega", "Gamma", "Delta", "Theta", "Lambda", "Xi", "Pi", "Sigma", "Phi", "Psi", "Omega",
		"Alpha", "omicron", "P", "p", "", "alphas", "Mu", "Tau"} {
		_, in := greekNames[p]
		if isGreekName(p) != in {
			t.Errorf("isGreekName(%q) = %v, table says %v", p, !in, in)
		}
		if in {
			n++
		}
	}
	if n != len(greekNames) {
		t.Errorf("the list above names %d of the table's %d names", n, len(greekNames))
	}
	for _, c := range []struct {
		name string
		want bool
	}{{"V_phi", true}, {"phi", true}, {"x_1", false}, {"alpha_beta", true}, {"_pi_", true}, {"pin", false}, {"a__mu", true}, {"", false}, {"S_3phase", false}} {
		if got := hasGreekPart(c.name); got != c.want {
			t.Errorf("hasGreekPart(%q) = %v, want %v", c.name, got, c.want)
		}
	}
}

// fmtNum's exponent form is strconv's 'e' form with the exponent's
// leading zeros and plus sign dropped (reference: strconv.FormatFloat).
func TestFmtNumExponentForm(t *testing.T) {
	for _, c := range []struct {
		x    float64
		n    int
		want string
	}{{1.234e-15, 4, "1.234e-15"}, {74364, 4, "7.436e4"}, {1e6, 4, "1.000e6"}, {0.0001234, 4, "1.234e-4"},
		{-2.5e300, 3, "-2.50e300"}, {999.96, 4, "1000"} /* rounds to 1.000e3: four whole digits fit, no decimals */, {12.5, 4, "12.50"}, {-0.0000001, 2, "-1.0e-7"}} {
		if got := fmtNum(c.x, c.n); got != c.want {
			t.Errorf("fmtNum(%v, %d) = %q, want %q", c.x, c.n, got, c.want)
		}
	}
}

// fmtNumStrconv is fmtNum as strconv alone defines it: round to n
// figures, read back, and choose the form from that value.
func fmtNumStrconv(x float64, n int) string {
	a := 0.0
	if x != 0 && !math.IsNaN(x) {
		a, _ = strconv.ParseFloat(strconv.FormatFloat(x, 'e', n-1, 64), 64)
		a = math.Abs(a)
	} else {
		a = math.Abs(x)
	}
	if a != 0 && (a >= 1e6 || a >= math.Pow(10, float64(n)) || a < 1e-3) {
		s := strconv.FormatFloat(x, 'e', n-1, 64)
		i := strings.IndexByte(s, 'e')
		e, _ := strconv.Atoi(s[i+1:])
		return s[:i] + "e" + strconv.Itoa(e)
	}
	dec := n - 1
	if x != 0 {
		s := strconv.FormatFloat(math.Abs(x), 'e', n-1, 64)
		e, _ := strconv.Atoi(s[strings.IndexByte(s, 'e')+1:])
		dec = max(n-1-e, 0)
	}
	s := strconv.FormatFloat(x, 'f', dec, 64)
	if strings.HasPrefix(s, "-") && strings.Trim(s[1:], "0.") == "" {
		s = s[1:]
	}
	return s
}

// TestBuiltinShape holds the built-in names to the shape isBuiltinKey
// tests first (no '_', no capital ASCII letter).
func TestBuiltinShape(t *testing.T) {
	n := 0
	for _, m := range []map[string]bool{keysOf(builtins), keysOf(constants), reserved} {
		for k := range m {
			n++
			if !builtinShaped(k) {
				t.Errorf("built-in %q holds '_' or a capital letter: isBuiltinKey would miss it", k)
			}
			if !isBuiltinKey(k) || !IsBuiltin(k) {
				t.Errorf("isBuiltinKey(%q) = false", k)
			}
		}
	}
	if n < 30 {
		t.Errorf("only %d built-in names seen", n)
	}
	for _, k := range []string{"V_1", "Sqrt", "S_pi", "I_f1", "Z"} {
		if isBuiltinKey(k) {
			t.Errorf("isBuiltinKey(%q) = true", k)
		}
	}
}

func keysOf[V any](m map[string]V) map[string]bool {
	out := map[string]bool{}
	for k := range m {
		out[k] = true
	}
	return out
}

// Reserve gives room and changes nothing else: the names defined after
// it are found, a second definition is refused, and an environment that
// holds names keeps them (common practice: a capacity hint is no content).
func TestReserveKeepsNames(t *testing.T) {
	e := NewEnv()
	e.Reserve(100)
	for _, n := range []string{"a", "phi", "V_1"} {
		if err := e.Define(&Binding{Name: n, Value: &Scalar{Z: 1}}); err != nil {
			t.Fatal(err)
		}
	}
	e.Reserve(1000) // holds names: nothing happens
	if e.Lookup("φ") == nil || e.Lookup("a") == nil || e.Lookup("V_1") == nil {
		t.Fatal("a name defined after Reserve is lost")
	}
	if e.Define(&Binding{Name: "a", Value: &Scalar{Z: 2}}) == nil {
		t.Error("a second definition of a is accepted")
	}
	if got := e.Names(); len(got) != 3 || got[0] != "a" || got[2] != "V_1" {
		t.Errorf("Names() = %v", got)
	}
}
