package phasors

import (
	"math"
	"strings"
	"testing"
)

// A phasor diagram whose entries read a value with cases is drawn once per
// case. Hand derivation: I = V/Z with V = 230 V and Z = {a: 10 Ω,
// b: (8 + j6) Ω}: 23 A at 0° and 23 A at −36.87° (atan(6/8)).
func TestPhasorsPerCase(t *testing.T) {
	page, d := picSheet(t, "---", "cases: [a, b]", "---", "```calc", "V = 230 V", "Z = {a: 10 Ω, b: (8 + j6) Ω}", "I = V / Z", "```", "",
		"```phasors V, I", "```")
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	var res *Phasors
	for _, b := range d.Blocks {
		if r, ok := b.Result.(*Phasors); ok {
			res = r
		}
	}
	if res == nil || res.Case != "a" || len(res.CaseDiagrams) != 1 || res.CaseDiagrams[0].Case != "b" {
		t.Fatalf("want a diagram for a and one for b, got %+v", res)
	}
	ib := res.CaseDiagrams[0].Items[1].Value.Z
	if math.Abs(real(ib)-18.4) > 1e-9 || math.Abs(imag(ib)+13.8) > 1e-9 {
		t.Errorf("I in case b = %v, want 18.4 − j13.8 A (23 A at −36.87°)", ib)
	}
	if n := strings.Count(page, "<figure class=\"phasors\""); n != 2 {
		t.Errorf("%d phasor figures, want one per case", n)
	}
}
