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
	xs := []float64{0, math.Copysign(0, -1), 1, -1, 999.95, 9.9995, 0.00099995, 999999.5,
		1e6, 1e-3, 123456789, 5e-324, math.MaxFloat64, math.Inf(1), math.Inf(-1), math.NaN()}
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
			got, dec := sigDecimals(x, n)
			if math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
				t.Fatalf("roundSig(%v, %d) = %v, strconv gives %v", x, n, got, want)
			}
			if dec != wantDec {
				t.Fatalf("decimals(%v, %d) = %d, strconv gives %d", x, n, dec, wantDec)
			}
			if d := decimalsFor(math.Abs(x), n); d != wantDec {
				t.Fatalf("decimalsFor(%v, %d) = %d, want %d", x, n, d, wantDec)
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
