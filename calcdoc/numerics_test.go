package calcdoc_test

import (
	"calcdoc/calcdoc"
	"encoding/json"
	"strings"
	"testing"
)

// Issue 12: (1e200 Ω)²/(1 Ω) is 1e400 Ω, beyond the largest binary64
// number (about 1.798e308, IEEE 754-2019 section 7.4). It is an error at
// the ^, the check on it has no verdict ("pass": null), and no value is
// written as null (LANGUAGE.md section 4).
func TestOverflowNeverPasses(t *testing.T) {
	cases := []struct {
		name  string
		lines []string
		// line and column of the one error
		line, col int
		msg       string
	}{
		{"check on an overflowed name", []string{"Z = (1e200 Ω)^2 / (1 Ω)", "check Z > 1 Ω"}, 4, 14, "this power overflows"},
		{"check on an overflowed expression", []string{"check (1e200 Ω)^2 / (1 Ω) > 1 Ω"}, 4, 16, "this power overflows"},
		// 1e-170·1e-170 = 1e-340 rounds to 0 (IEEE 754-2019 section 7.5)
		{"check on an underflowed product", []string{"check 1e-170 Ω * 1e-170 < 1 Ω"}, 4, 16, "this product underflows"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := "# t\n\n```calc\n" + strings.Join(c.lines, "\n") + "\n```\n"
			d := parse(t, src)
			if len(d.Errors) != 1 {
				t.Fatalf("errors %v, want one", d.Errors)
			}
			if e := d.Errors[0]; e.Pos.Line() != c.line || e.Pos.Col() != c.col || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("error %v, want at %d:%d containing %q", e, c.line, c.col, c.msg)
			}
			var vj struct {
				Values []map[string]any `json:"values"`
				Checks []struct {
					Pass *bool `json:"pass"`
				} `json:"checks"`
			}
			if err := json.Unmarshal(d.MarshalValues(), &vj); err != nil {
				t.Fatal(err)
			}
			if len(vj.Checks) != 1 || vj.Checks[0].Pass != nil {
				t.Errorf("checks %+v, want one with pass null", vj.Checks)
			}
			for _, v := range vj.Values {
				if v["re"] == nil || v["im"] == nil {
					t.Errorf("value %v written with null", v)
				}
			}
		})
	}
}

// A line whose display unit is of another dimension defines nothing: a
// later line that uses the name is "not evaluated", not a second error,
// and the values JSON has no such name (issue 12).
func TestFailedDisplayUnitDefinesNothing(t *testing.T) {
	// 230 V / 10 A = 23 Ω (hand derivation), not a current
	d := parse(t, "# t\n\n```calc\ne[A] = 230 V / 10 A\nf = 2 * e\ncheck e > 1 Ω\n```\n")
	if len(d.Errors) != 1 || d.Errors[0].Pos.Line() != 4 || !strings.Contains(d.Errors[0].Msg, "the unit A is a current") {
		t.Fatalf("errors %v, want one at line 4 about the unit", d.Errors)
	}
	for _, v := range d.Values {
		if v.Name == "e" || v.Name == "f" {
			t.Errorf("%s is defined (%v) though its line, or a line it uses, has an error", v.Name, v.Value)
		}
	}
	if len(d.Checks) != 1 || d.Checks[0].Result != nil {
		t.Errorf("the check on e has a verdict: %+v", d.Checks)
	}
	var stmts []*calcdoc.Stmt
	for _, b := range d.Blocks {
		if r, ok := b.Result.([]*calcdoc.Stmt); ok {
			stmts = append(stmts, r...)
		}
	}
	if len(stmts) != 3 || stmts[1].Unavailable == nil || stmts[1].Unavailable.Name != "e" {
		t.Errorf("f's line is not marked as using the failed e: %+v", stmts)
	}
}
