package expr

import (
	"math"
	"strings"
	"testing"
)

// runCases runs a calc block in an environment with the given cases.
func runCases(text string, cases ...string) *block {
	b := &block{env: NewEnv()}
	b.env.Cases = cases
	b.stmts = ParseBlock(NewSource(text, Pos{}), CalcMode, &b.parse)
	for _, s := range b.stmts {
		b.results = append(b.results, b.env.Exec(s))
	}
	return b
}

// The voltage factors c_max = 1.10 and c_min = 0.95 are those of
// IEC 60909-0:2016 Table 1 for low-voltage systems with a tolerance of
// +10 %. Hand derivation of the initial symmetrical short-circuit current
// I_k3 = c·U_n / (√3·|Z_k|) (IEC 60909-0, equation 29):
//
//	max: 1.10 · 400 / (1.7320508 · 0.0181) = 440 / 0.0313501 = 14035.03 A
//	min: 0.95 · 400 / (1.7320508 · 0.0272) = 380 / 0.0471118 = 8065.92 A
func TestCasesFaultCurrentPerCase(t *testing.T) {
	b := runCases(`c = {max: 1.10, min: 0.95}
Z_k = {max: 0.0181 Ω, min: 0.0272 Ω}
U_n = 400 V
I_k3[kA] = c * U_n / (sqrt(3) * Z_k)
check I_k3 <= 50 kA
check in min: I_k3 >= 5 kA
check in max: I_k3 <= 10 kA
I_gov = casemax(I_k3)
I_low = casemin(I_k3)`, "max", "min")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs)
	}
	if b.results[2].Cases != nil {
		t.Errorf("U_n depends on no case, got cases %v", b.results[2].Cases)
	}
	r := b.results[3]
	if len(r.Cases) != 2 {
		t.Fatalf("I_k3: want 2 case values, got %v", r.Cases)
	}
	for k, want := range []float64{14035.03, 8065.92} {
		got := real(r.Cases[k].(*Scalar).Z)
		if math.Abs(got-want) > 0.01 {
			t.Errorf("I_k3 case %d = %g, want %g (hand derivation)", k, got, want)
		}
	}
	all := b.results[4]
	if all.CaseChecks[0] == nil || all.CaseChecks[1] == nil || !all.Check.Pass {
		t.Errorf("breaking capacity 50 kA holds in both cases: %+v", all)
	}
	// governing: the highest utilisation, 14.04/50 at max against 8.07/50
	if all.Governing != "max" {
		t.Errorf("governing case %q, want max", all.Governing)
	}
	onlyMin := b.results[5]
	if onlyMin.CaseChecks[0] != nil || onlyMin.CaseChecks[1] == nil || !onlyMin.Check.Pass || onlyMin.Governing != "min" {
		t.Errorf("check in min: applies to min only: %+v", onlyMin)
	}
	// 14.04 kA > 10 kA: fails at max
	fail := b.results[6]
	if fail.Check.Pass || fail.CaseChecks[1] != nil {
		t.Errorf("check in max: I_k3 <= 10 kA must fail at max only: %+v", fail)
	}
	if got := real(b.results[7].Value.(*Scalar).Z); math.Abs(got-14035.03) > 0.01 || b.results[7].Cases != nil {
		t.Errorf("casemax = %g (cases %v), want 14035.03 with no cases", got, b.results[7].Cases)
	}
	if g := b.results[7].Trace.Governing(); len(g) != 1 || g[0] != "casemax: max" {
		t.Errorf("casemax names %v, want the max case", g)
	}
	if got := real(b.results[8].Value.(*Scalar).Z); math.Abs(got-8065.92) > 0.01 {
		t.Errorf("casemin = %g, want 8065.92", got)
	}
	if g := b.results[8].Trace.Governing(); len(g) != 1 || g[0] != "casemin: min" {
		t.Errorf("casemin names %v, want the min case", g)
	}
}

// Matrices, user functions and complex values work per case with no
// change to them. Hand derivation: Z = R + jX with R = {a: 3, b: 6},
// X = 4; |Z| = 5 and sqrt(36+16) = 7.2111; f(Z) = 2·Z.
func TestCasesThroughFunctionsAndMatrices(t *testing.T) {
	b := runCases(`R = {a: 3 Ω, b: 6 Ω}
Z = R + j4 Ω
f(x) = 2 * x
M = [Z, 1 Ω; 0 Ω, f(Z)]
m = abs(M(2, 2))
big = casemax(Z)`, "a", "b")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs)
	}
	m := b.results[4].Cases
	if len(m) != 2 || math.Abs(real(m[0].(*Scalar).Z)-10) > 1e-12 || math.Abs(real(m[1].(*Scalar).Z)-2*math.Sqrt(52)) > 1e-12 {
		t.Errorf("abs(2Z) per case: %v, want 10 and 14.422", m)
	}
	// by magnitude for a complex value: |6+4j| = 7.21 > |3+4j| = 5
	if z := b.results[5].Value.(*Scalar).Z; z != complex(6, 4) {
		t.Errorf("casemax(Z) = %v, want 6+4j", z)
	}
}

func TestCasesErrors(t *testing.T) {
	for _, c := range []struct {
		text, want string
		cases      []string
	}{
		{"x = {max: 1, min: 2}", "this document has no cases", nil},
		{"x = {max: 1}", "case min is missing", []string{"max", "min"}},
		{"x = {max: 1, min: 2, mid: 3}", "unknown case \"mid\"", []string{"max", "min"}},
		{"x = {max: 1, max: 2}", "case \"max\" is given twice", []string{"max", "min"}},
		{"x = {max: 1 V, min: 2 A}", "must share unit", []string{"max", "min"}},
		{"x = {max: 1 deg, min: 2}", "angle", []string{"max", "min"}},
		{"x = {max: 1 kW, min: 2 kvar}", "power kinds", []string{"max", "min"}},
		{"check in mid: 1 < 2", "unknown case \"mid\"", []string{"max", "min"}},
		{"check in max: 1 < 2", "no cases", nil},
		{"x = {max: 1, min: 0}\ny = 1 / x", "in case min", []string{"max", "min"}},
		{"casemax = 3", "cannot be redefined", []string{"max", "min"}},
	} {
		b := runCases(c.text, c.cases...)
		errs := b.allErrors()
		if len(errs) == 0 {
			t.Errorf("%q: no error, want %q", c.text, c.want)
			continue
		}
		if !strings.Contains(errs[0].Error(), c.want) || errPos(errs[0]).Line() == 0 {
			t.Errorf("%q: error %q, want %q with a position", c.text, errs[0], c.want)
		}
	}
}

// Case names are labels in their own namespace: max and min stay
// functions.
func TestCaseNamesBesideFunctions(t *testing.T) {
	b := runCases("x = {max: max(1, 2), min: min(1, 2)}\ny = x + 1", "max", "min")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs)
	}
	c := b.results[1].Cases
	if real(c[0].(*Scalar).Z) != 3 || real(c[1].(*Scalar).Z) != 2 {
		t.Errorf("y per case = %v, want 3 and 2", c)
	}
}
