package render

import (
	"regexp"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
	"calcdoc/render/markup"
	"calcdoc/render/svg"
)

// TestLabelRuns: an expression as a picture's label reads as the sheet
// typesets it (README "How a sheet shows values" and LANGUAGE.md section
// 3: the first _ starts a subscript, spelled Greek names become letters,
// * is shown ·, a conjugate is a raised * after its operand, a power is
// raised). Each expected run list is written out by hand from those rules.
func TestLabelRuns(t *testing.T) {
	B, S, P := svg.ShiftBase, svg.ShiftSub, svg.ShiftSup
	cases := []struct {
		name, src string
		want      []svg.Run
	}{
		{"product of two names", "I_L*Z_c", []svg.Run{{Text: "I", Shift: B}, {Text: "L", Shift: S}, {Text: "·Z", Shift: B}, {Text: "c", Shift: S}}},
		{"Greek subscript", "V_phi", []svg.Run{{Text: "V", Shift: B}, {Text: "φ", Shift: S}}},
		{"Greek name and pi", "2*pi*f*omega", []svg.Run{{Text: "2·π·f·ω", Shift: B}}},
		{"conjugate of a sum", "conj(I_a + I_b)", []svg.Run{{Text: "(I", Shift: B}, {Text: "a", Shift: S}, {Text: " + I", Shift: B}, {Text: "b", Shift: S}, {Text: ")", Shift: B}, {Text: "*", Shift: P}}},
		{"conjugate of a name", "V_a*conj(I_a)", []svg.Run{{Text: "V", Shift: B}, {Text: "a", Shift: S}, {Text: "·I", Shift: B}, {Text: "a", Shift: S}, {Text: "*", Shift: P}}},
		{"power", "Z_s^2", []svg.Run{{Text: "Z", Shift: B}, {Text: "s", Shift: S}, {Text: "2", Shift: P}}},
		{"minus and quotient", "-V_a/2", []svg.Run{{Text: "−V", Shift: B}, {Text: "a", Shift: S}, {Text: "/2", Shift: B}}},
		{"difference", "V_a - V_b", []svg.Run{{Text: "V", Shift: B}, {Text: "a", Shift: S}, {Text: " − V", Shift: B}, {Text: "b", Shift: S}}},
		{"number with exponent and unit", "1e3 V", []svg.Run{{Text: "1×10", Shift: B}, {Text: "3", Shift: P}, {Text: " V", Shift: B}}},
		{"magnitude", "abs(V_a)", []svg.Run{{Text: "|V", Shift: B}, {Text: "a", Shift: S}, {Text: "|", Shift: B}}},
		{"two-part subscript", "V_a_b", []svg.Run{{Text: "V", Shift: B}, {Text: "a,b", Shift: S}}},
		{"parallel", "Z_1 ∥ Z_2", []svg.Run{{Text: "Z", Shift: B}, {Text: "1", Shift: S}, {Text: " ∥ Z", Shift: B}, {Text: "2", Shift: S}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var errs expr.ErrorList
			n, _ := expr.ParseExpr(expr.NewSource(c.src, expr.Pos{}), &errs)
			if len(errs) > 0 {
				t.Fatalf("parse: %v", errs)
			}
			got := markup.LabelRuns(n)
			if len(got) != len(c.want) {
				t.Fatalf("runs %v, want %v", got, c.want)
			}
			for i := range got {
				if got[i] != c.want[i] {
					t.Errorf("run %d %v, want %v (all %v)", i, got[i], c.want[i], got)
				}
			}
		})
	}
}

// TestPhasorLabelsOnTheSheet: on the sheet, a diagram's labels show no raw
// underscore and no *, an expression entry drawn tip to tail is labelled
// typeset, and its arrow starts where the earlier arrow ends.
func TestPhasorLabelsOnTheSheet(t *testing.T) {
	src := "```calc\nV_r = 230 V\nI_L = 40 A∠-30°\nZ_c = (0.5 + j3) Ω\nV_s = V_r + I_L*Z_c\n```\n\n```phasors V_r, I_L*Z_c from V_r, V_s\n```\n"
	doc := calcdoc.Parse("p.md", []byte(src), kind.Standard())
	if len(doc.Errors) > 0 {
		t.Fatalf("errors: %v", doc.Errors)
	}
	out, err := Sheet(doc, Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	s := string(out)
	labels := regexp.MustCompile(`<text class="label"[^>]*>(.*?)</text>`).FindAllStringSubmatch(s, -1)
	if len(labels) != 3 {
		t.Fatalf("%d labels, want 3", len(labels))
	}
	for _, l := range labels {
		text := regexp.MustCompile(`<[^>]*>`).ReplaceAllString(l[1], "")
		if strings.ContainsAny(text, "_*") {
			t.Errorf("label %q shows raw text", text)
		}
	}
	if text := regexp.MustCompile(`<[^>]*>`).ReplaceAllString(labels[1][1], ""); text != "IL·Zc" {
		t.Errorf("label of I_L*Z_c reads %q, want I, L lowered, ·Z, c lowered", text)
	}
	shafts := regexp.MustCompile(`<line class="shaft"[^>]*x1="([-0-9.]+)" y1="([-0-9.]+)"`).FindAllStringSubmatch(s, -1)
	heads := regexp.MustCompile(`<path class="head"[^>]*d="M([-0-9.]+),([-0-9.]+)`).FindAllStringSubmatch(s, -1)
	if len(shafts) != 3 || len(heads) != 3 {
		t.Fatalf("%d shafts, %d heads", len(shafts), len(heads))
	}
	if shafts[1][1] != heads[0][1] || shafts[1][2] != heads[0][2] {
		t.Errorf("the drop starts at (%s, %s), V_r ends at (%s, %s)", shafts[1][1], shafts[1][2], heads[0][1], heads[0][2])
	}
	if heads[1][1] != heads[2][1] || heads[1][2] != heads[2][2] {
		t.Errorf("the drop ends at (%s, %s), V_s at (%s, %s): V_s = V_r + I_L·Z_c", heads[1][1], heads[1][2], heads[2][1], heads[2][2])
	}
}
