package data

import (
	"testing"

	"calcdoc/expr"
)

// The look-up line writes names as the sheet typesets them: a spelled
// Greek part as its letter (LANGUAGE.md section 3), the rest as written.
func TestLookupTextGreekNames(t *testing.T) {
	src := expr.NewSource("source: test\ntheta_0 [K] | alpha_cu [K^-1]\n20 | 0.5", expr.Pos{})
	tab, errs := ParseBlock("tc", src, false)
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	x := tab.Key(0)
	v, rows, err := tab.Lookup("alpha_cu", x)
	if err != nil {
		t.Fatal(err)
	}
	got := tab.LookupText(expr.Lookup{Table: "tc", Func: "col", Col: "alpha_cu", X: x, Value: v, Rows: rows}, 4)
	want := "tc: θ_0 = 20 K → α_cu = 0.5 K⁻¹ (row 1)"
	if got != want {
		t.Errorf("got %q, want %q", got, want)
	}
}
