package sweep_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
)

// A sweep whose line reads a value with cases is worked once per case and
// drawn once per case. Hand derivation: Z = R + j·2π·f·L, so at 1 kHz with
// L = 1 mH, |Z| = |10 + j6.2832| = 11.810 Ω in case a and
// |20 + j6.2832| = 20.964 Ω in case b.
func TestSweepPerCase(t *testing.T) {
	src := "---\ncases: [a, b]\n---\n```calc\nR = {a: 10 Ω, b: 20 Ω}\nL = 1 mH\n```\n\n```sweep f = 1 kHz .. 2 kHz 2\nZ = R + j*2*pi*f*L\n```\n"
	d := calcdoc.Parse("t.md", []byte(src), kind.Standard())
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	sw := swSweep(t, d)
	if sw.Case != "a" || len(sw.CaseSweeps) != 1 || sw.CaseSweeps[0].Case != "b" {
		t.Fatalf("want the sweep worked in a and b, got %q and %d more", sw.Case, len(sw.CaseSweeps))
	}
	for k, s := range append(sw.CaseSweeps[:0:0], sw, sw.CaseSweeps[0]) {
		r := []float64{10, 20}[k]
		want := cmplx.Abs(complex(r, 2*math.Pi*1e3*1e-3))
		if got := cmplx.Abs(s.Lines[0].Z[0]); math.Abs(got-want) > 1e-9*want {
			t.Errorf("case %s: |Z(1 kHz)| = %g, want %g", s.Case, got, want)
		}
	}
	sj := d.SweepsJSON()
	if len(sj) != 2 || sj[0].Case != "a" || sj[1].Case != "b" {
		t.Errorf("values JSON: want a sweep entry per case, got %d", len(sj))
	}
	html, err := render.Sheet(d, render.Options{})
	if err != nil {
		t.Fatal(err)
	}
	page := string(html)
	if strings.Count(page, "<div class=\"sweepcase\">") != 2 {
		t.Error("the sheet draws the sweep's table once per case, each under its case's name")
	}
	// one plot of |Z| and one of arg Z, each with a curve per case
	if n := strings.Count(page, "<svg"); n != 2 || !strings.Contains(page, "|Z| (a)") || !strings.Contains(page, "|Z| (b)") || !strings.Contains(page, "one curve per case") {
		t.Errorf("%d plots; want 2, each with a curve per case labelled with its case", n)
	}
}
