package markup

import "testing"

// single and bare decide where an <mrow> may go (group): MathML Core
// (W3C, 2023), section 3.1.3 "Layout of mrow": an operator's form follows
// from its place among its mrow's children, and a stretchy operator
// stretches over its mrow's other children.
func TestSingleAndBare(t *testing.T) {
	for _, c := range []struct {
		ml          string
		single, bar bool
	}{
		{"<mn>3</mn>", true, true},
		{`<mn>230.0</mn><mi class="u">V</mi>`, false, true},
		{"<msub><mi>Z</mi><mi>c</mi></msub>", true, true},
		{"<mrow><mo>(</mo><mn>1</mn><mo>)</mo></mrow>", true, true},
		{"<mrow><mn>1</mn></mrow><mrow><mn>2</mn></mrow>", false, true},
		{"<msup><mn>10</mn><mn>3</mn></msup><mn>2</mn>", false, true},
		{"<mspace/>", true, true},
		{"<mo>−</mo><mi>j</mi><mn>5</mn>", false, false},
		{"<mn>1</mn><mo>∠</mo><mn>30</mn><mo>°</mo>", false, false},
		{"<mo>(</mo><mn>1</mn><mo>+</mo><mi>j</mi><mn>2</mn><mo>)</mo><mi class=\"u\">Ω</mi>", false, false},
		{"", false, true},
	} {
		if got := single(c.ml); got != c.single {
			t.Errorf("single(%q) = %v, want %v", c.ml, got, c.single)
		}
		if got := bare(c.ml); got != c.bar {
			t.Errorf("bare(%q) = %v, want %v", c.ml, got, c.bar)
		}
	}
}
