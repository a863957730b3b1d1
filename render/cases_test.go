package render

import (
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// A sheet with cases: a result line per case marked with its case, a check
// row with each case's verdict and the governing case, per-case counts in
// the summary, and an inline value per case. Values by hand derivation,
// I_k3 = c·U/(√3·Z_k) with c of IEC 60909-0 Table 1: 14.04 kA (max) and
// 8.066 kA (min); the utilisation against 50 kA is 28.07 % and 16.13 %,
// so max governs; casemax names max.
func TestSheetWithCases(t *testing.T) {
	src := "---\ncases: [max, min]\n---\n```calc\nc = {max: 1.10, min: 0.95}\nZ_k = {max: 0.0181 Ω, min: 0.0272 Ω}\n" +
		"I_k3[kA] = c * 400 V / (sqrt(3) * Z_k)\ncheck I_k3 <= 50 kA\ncheck in min: I_k3 >= 9 kA\nI_g = casemax(I_k3)\n```\n\nAt the board: `=I_k3`.\n"
	d := calcdoc.Parse("cases.md", []byte(src), kind.Standard())
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	out, err := Sheet(d, Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	page := string(out)
	for _, want := range []string{
		`data-value="I_k3" data-case="max"><span class="case">max</span>`,
		`<mn>14.04</mn>`, `<mn>8.066</mn>`,
		`data-check="8" data-case="max"><span class="case">max</span>`,
		`utilisation 28.1 % of the limit`,
		`<div class="note">governing case: max</div>`,
		`data-check="9" data-case="min"><span class="case">min</span>`,
		`<li>case max: 1 satisfied, 0 not satisfied</li>`,
		`<li>case min: 1 satisfied, 1 not satisfied</li>`,
		`governing case: casemax: max`,
		`<span class="case">min</span> <math`,
	} {
		if !strings.Contains(page, want) {
			t.Errorf("sheet lacks %q", want)
		}
	}
	if strings.Contains(page, `data-check="9" data-case="max"`) {
		t.Error("check in min: has no row for max")
	}
}

// The formula of a case literal is typeset with each case's name before
// its value, never as an unreadable expression.
func TestCaseLiteralTypeset(t *testing.T) {
	d := calcdoc.Parse("c.md", []byte("---\ncases: [max, min]\n---\n```calc\nc = {max: 1.10, min: 0.95}\n```\n"), kind.Standard())
	out, err := Sheet(d, Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	page := string(out)
	if strings.Contains(page, "merror") || !strings.Contains(page, "<mo>{</mo><mtext>max:\u00a0</mtext><mn>1.10</mn><mo>,</mo><mtext>min:\u00a0</mtext><mn>0.95</mn><mo>}</mo>") {
		t.Error("the case literal is not typeset as {max: 1.10, min: 0.95}")
	}
}
