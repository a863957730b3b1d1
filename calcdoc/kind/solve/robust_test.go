package solve

import (
	"fmt"
	"math/cmplx"
	"strings"
	"testing"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// finishes runs f and fails the test if it has not returned within
// limit. The limit is a bound for a hang, far above the time taken, not a
// timing target (the benchmarks measure that).
func finishes(t *testing.T, limit time.Duration, f func()) {
	t.Helper()
	done := make(chan struct{})
	go func() {
		defer close(done)
		f()
	}()
	select {
	case <-done:
	case <-time.After(limit):
		t.Fatalf("did not finish within %v", limit)
	}
}

// realUnknownsDoc is a solve block of n real unknowns x_1 … x_n, each
// given by its own equation x_k = k.
func realUnknownsDoc(n int) string {
	var sb strings.Builder
	sb.WriteString("```solve ")
	for k := 1; k <= n; k++ {
		if k > 1 {
			sb.WriteString(", ")
		}
		fmt.Fprintf(&sb, "x_%d real", k)
	}
	sb.WriteString("\n")
	for k := 1; k <= n; k++ {
		fmt.Fprintf(&sb, "x_%d = %d\n", k, k)
	}
	sb.WriteString("```\n")
	return sb.String()
}

// mixedDoc is the ladder of nc nodes (nc complex unknowns) followed in the
// same block by nr real unknowns y_k = k.
func mixedDoc(nc, nr int) string {
	lad := ladderDoc(nc)
	head := strings.Index(lad, "```solve ")
	eol := head + strings.Index(lad[head:], "\n")
	var hdr, eqs strings.Builder
	for k := 1; k <= nr; k++ {
		fmt.Fprintf(&hdr, ", y_%d real", k)
		fmt.Fprintf(&eqs, "y_%d = %d\n", k, k)
	}
	body := strings.TrimSuffix(lad[eol+1:], "```\n")
	return lad[:eol] + hdr.String() + "\n" + body + eqs.String() + "```\n"
}

// ladderSweep is the node voltages of the ladder of ladderDoc(n) by the
// backward sweep (common practice): from the far end V_n = 1,
// I_n = V_n/Z_p, and towards the source V_{k−1} = V_k + Z_s·I_k with
// I_{k−1} = I_k + V_{k−1}/Z_p, scaled so that the voltage behind the first
// series impedance is V_s. v[k] is node k, v[0] the source.
func ladderSweep(n int) []complex128 {
	v := make([]complex128, n+1)
	v[n] = 1
	i := v[n] / ladderZp
	for k := n; k >= 1; k-- {
		v[k-1] = v[k] + ladderZs*i
		if k-1 >= 1 {
			i += v[k-1] / ladderZp
		}
	}
	scale := complex(ladderVs, 0) / v[0]
	for k := range v {
		v[k] *= scale
	}
	return v
}

// TestSolveSizeLimit: a solve block of at most MaxSolveUnknowns real
// unknowns (a complex unknown counts two) is solved; a larger one is
// refused at once, with an error at the list of unknowns that gives the
// count, the limit and the way out, and its unknowns are not defined.
func TestSolveSizeLimit(t *testing.T) {
	if MaxSolveUnknowns != 1000 {
		t.Fatalf("MaxSolveUnknowns = %d; docs/robustness.md and the cases below state 1000", MaxSolveUnknowns)
	}
	cases := []struct {
		name  string
		src   string
		check func(t *testing.T, d *calcdoc.Document) // for a set that is solved
		count string                                  // for a set refused: how the error counts its unknowns
	}{
		{"500 complex unknowns: solved", ladderDoc(500), func(t *testing.T, d *calcdoc.Document) {
			want := ladderSweep(500)
			got := make([]complex128, 500)
			for k := 1; k <= 500; k++ {
				got[k-1] = valueOf(t, d, fmt.Sprintf("V_%d", k))
			}
			if worst, ok := relClose(got, want[1:], 1e-9); !ok {
				t.Errorf("largest deviation from the backward sweep %.3g relative, want ≤ 1e-9", worst)
			}
		}, ""},
		{"1000 real unknowns: solved", realUnknownsDoc(1000), func(t *testing.T, d *calcdoc.Document) {
			for _, k := range []int{1, 500, 1000} {
				// the equation x_k = k itself
				if got := valueOf(t, d, fmt.Sprintf("x_%d", k)); got != complex(float64(k), 0) {
					t.Errorf("x_%d = %v, want %d", k, got, k)
				}
			}
		}, ""},
		{"498 complex and 4 real unknowns: solved", mixedDoc(498, 4), func(t *testing.T, d *calcdoc.Document) {
			if got := valueOf(t, d, "V_498"); cmplxRel(got, ladderSweep(498)[498]) > 1e-9 {
				t.Errorf("V_498 = %v, backward sweep %v", got, ladderSweep(498)[498])
			}
			if got := valueOf(t, d, "y_4"); got != 4 {
				t.Errorf("y_4 = %v, want 4", got)
			}
		}, ""},
		{"501 complex unknowns: refused", ladderDoc(501), nil, "1002 real unknowns (501 complex)"},
		{"2000 complex unknowns: refused", ladderDoc(2000), nil, "4000 real unknowns (2000 complex)"},
		{"1001 real unknowns: refused", realUnknownsDoc(1001), nil, "1001 real unknowns (1001 real)"},
		{"400 complex and 201 real unknowns: refused", mixedDoc(400, 201), nil, "1001 real unknowns (400 complex and 201 real)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var d *calcdoc.Document
			finishes(t, 2*time.Minute, func() { d = calcdoc.Parse("size.md", []byte(c.src), testKinds) })
			if c.check != nil {
				noErrors(t, d)
				c.check(t, d)
				return
			}
			// the list of unknowns: after "```solve " on the fence's line
			line := 1 + strings.Count(c.src[:strings.Index(c.src, "```solve ")], "\n")
			at := expr.Position{Line: line, Col: len("```solve ") + 1}
			if len(d.Errors) != 1 {
				t.Fatalf("%d errors, want the one of the size: %v", len(d.Errors), firstErrors(d.Errors))
			}
			e := d.Errors[0]
			if e.Pos.Position().InFile() != at {
				t.Errorf("error at %v, want %v (the list of unknowns)", e.Pos, at)
			}
			for _, want := range []string{
				"the set has " + c.count,
				"a solve block takes at most 1000 (such as 500 complex unknowns)",
				"grows as the cube of the count",
				"Split the network into blocks of at most 500 complex unknowns",
			} {
				if !strings.Contains(e.Msg, want) {
					t.Errorf("the error %q does not say %q", e.Msg, want)
				}
			}
			// the unknowns are not defined: a name that uses one is unavailable
			for _, name := range []string{"V_1", "x_1", "y_1"} {
				if bd := d.Env.Lookup(name); bd != nil && !bd.Unavailable {
					t.Errorf("%s is defined, though its set was refused", name)
				}
			}
		})
	}
}

func cmplxRel(got, want complex128) float64 { return cmplx.Abs(got-want) / cmplx.Abs(want) }

func firstErrors(l expr.ErrorList) expr.ErrorList {
	return l[:min(len(l), 5)]
}
