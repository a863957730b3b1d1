package render

import (
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
	"calcdoc/render/internal/sheettest"
)

// No shipped example shows a reactive or apparent power in W (IEEE Std
// 1459-2010: reactive power Q in var, apparent power S in VA): every
// example is built, and each named power's row on the sheet and its
// entry in the values JSON are in the unit of its kind, and its kind is
// the one its IEEE 1459 letter symbol (P, Q, S) names.
func TestExamplesShowPowersByKind(t *testing.T) {
	// every example, in subfolders too (examples/plant/...)
	files := sheettest.Examples(t, filepath.Join("..", "examples"))
	rowUnit := regexp.MustCompile(`<mi class="u">([^<]*)</mi>(?:</mrow>)?</math>`)
	powers := 0
	for _, f := range files {
		src, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		doc := calcdoc.Parse(f, src, kind.Standard())
		html, err := Sheet(doc, fixedOptions(src))
		if err != nil {
			t.Fatal(err)
		}
		var vals calcdoc.ValuesJSON
		if err := json.Unmarshal(doc.MarshalValues(), &vals); err != nil {
			t.Fatal(err)
		}
		for _, v := range doc.Values {
			s, ok := v.Value.(*expr.Scalar)
			if !ok || s.Dim != expr.DimPower {
				continue
			}
			powers++
			// IEEE 1459 letter symbols, which the examples follow: P active,
			// Q reactive, S apparent.
			if k, ok := map[byte]expr.PowerKind{'P': expr.PowerActive, 'Q': expr.PowerReactive, 'S': expr.PowerApparent}[v.Name[0]]; ok && s.Kind != k {
				t.Errorf("%s: %s is %v power, but its IEEE 1459 letter says %v", f, v.Name, s.Kind, k)
			}
			want := map[expr.PowerKind]string{expr.PowerActive: "W", expr.PowerReactive: "var", expr.PowerApparent: "VA", expr.PowerNone: "W"}[s.Kind]
			if !s.IsReal() && s.Kind != expr.PowerApparent {
				t.Errorf("%s: %s is complex but %v, not apparent (IEEE 1459: S = P + jQ)", f, v.Name, s.Kind)
			}
			shown := expr.FormatValue(v.Value, v.Display, doc.Digits())
			if !strings.HasSuffix(shown, want) || s.Kind != expr.PowerActive && s.Kind != expr.PowerNone && strings.HasSuffix(shown, "W") {
				t.Errorf("%s: %s (%v power) is shown %q, not in %s", f, v.Name, s.Kind, shown, want)
			}
			for _, vj := range vals.Values {
				if vj.Name == v.Name && vj.Line == v.Pos.Line() {
					if vj.Unit != want {
						t.Errorf("%s: values JSON gives %s the unit %v, want %s", f, v.Name, vj.Unit, want)
					}
					if k, _ := vj.Kind.(string); s.Kind != expr.PowerNone && k != s.Kind.String() {
						t.Errorf("%s: values JSON gives %s the kind %v, want %s", f, v.Name, vj.Kind, s.Kind)
					}
				}
			}
			// the sheet's result row for the name
			re := regexp.MustCompile(`id="L` + itoa(v.Pos.Line()) + `" data-line="` + itoa(v.Pos.Line()) + `">[^\n]*?<div data-value="` + regexp.QuoteMeta(v.Name) + `">(.*?)</div>`)
			m := re.FindSubmatch(html)
			if m == nil {
				continue // a solve unknown or a value in prose: checked through the values JSON
			}
			u := rowUnit.FindSubmatch(m[1])
			if u == nil || !strings.HasSuffix(string(u[1]), want) || s.Kind != expr.PowerActive && s.Kind != expr.PowerNone && strings.HasSuffix(string(u[1]), "W") {
				t.Errorf("%s: the row of %s (%v power) shows the unit %q, want ...%s", f, v.Name, s.Kind, u, want)
			}
		}
	}
	if powers < 10 {
		t.Errorf("only %d powers found in the examples: the test is not looking at them", powers)
	}
}

func itoa(n int) string {
	b, _ := json.Marshal(n)
	return string(b)
}

// A real power of no kind is shown in W with the words "kind not stated"
// on its row, until its line names W, var or VA (LANGUAGE.md section 4);
// a power of a known kind (IEEE 1459) has no such words.
func TestKindNotStatedRow(t *testing.T) {
	src := []byte(strings.Join([]string{"```calc",
		"V = 400 V",
		"P_1 = sqrt(3) * V * 10 A",
		"P_2[kW] = sqrt(3) * V * 10 A",
		"Q_1 = 3 * 50 kvar",
		"sqrt(3) * V * 20 A",
		"```", ""}, "\n"))
	doc := calcdoc.Parse("kinds.md", src, kind.Standard())
	html, err := Sheet(doc, fixedOptions(src))
	if err != nil {
		t.Fatal(err)
	}
	rows := regexp.MustCompile(`(?s)<div class="row[^"]*" id="L(\d+)" data-line="\d+">(.*?)(?:<div class="desc">|</div>\n)`).FindAllSubmatch(html, -1)
	want := map[string]bool{"3": true, "4": false, "5": false, "6": true}
	seen := 0
	for _, r := range rows {
		w, ok := want[string(r[1])]
		if !ok {
			continue
		}
		seen++
		if got := strings.Contains(string(r[2]), "kind not stated"); got != w {
			t.Errorf("line %s: kind not stated = %v, want %v", r[1], got, w)
		}
	}
	if seen != len(want) {
		t.Fatalf("found %d of %d rows", seen, len(want))
	}
}

// A solve unknown that is a power of no kind carries the same words; one
// whose bracket names kW does not (LANGUAGE.md section 4).
func TestKindNotStatedSolve(t *testing.T) {
	for _, tc := range []struct {
		head string
		want bool
	}{{"```solve P near 1 kW", true}, {"```solve P[kW] near 1 kW", false}} {
		src := []byte(tc.head + "\nP / (400 V) = 10 A\n```\n")
		doc := calcdoc.Parse("kinds.md", src, kind.Standard())
		if len(doc.Errors) > 0 {
			t.Fatal(doc.Errors)
		}
		html, err := Sheet(doc, fixedOptions(src))
		if err != nil {
			t.Fatal(err)
		}
		if got := strings.Contains(string(html), "kind not stated"); got != tc.want {
			t.Errorf("%s: kind not stated = %v, want %v", tc.head, got, tc.want)
		}
	}
}
