package calcdoc_test

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// caseDoc is LANGUAGE.md section 10's example: the voltage factors
// c_max = 1.10 and c_min = 0.95 are IEC 60909-0:2016 Table 1's for
// low-voltage systems with a +10 % tolerance.
const caseDoc = "---\ncases: [max, min]\n---\n```calc\n" +
	"c = {max: 1.10, min: 0.95}\n" +
	"Z_k = {max: 0.0181 Ω, min: 0.0272 Ω}\n" +
	"I_k3[kA] = c * 400 V / (sqrt(3) * Z_k)\n" +
	"check I_k3 <= 50 kA\n" +
	"check in min: I_k3 >= 9 kA\n" +
	"U = 400 V\n" +
	"```\n"

// Hand derivation, I_k3 = c·U_n/(√3·|Z_k|) (IEC 60909-0 eq. 29):
// max 1.10·400/(√3·0.0181) = 14035.03 A; min 0.95·400/(√3·0.0272) = 8065.92 A.
func TestCasesValuesJSON(t *testing.T) {
	d := parse(t, caseDoc)
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	var out struct {
		Values []map[string]any `json:"values"`
		Checks []map[string]any `json:"checks"`
	}
	js := d.MarshalValues()
	if err := json.Unmarshal(js, &out); err != nil {
		t.Fatal(err)
	}
	var ik map[string]any
	for _, v := range out.Values {
		if v["name"] == "I_k3" {
			ik = v
		}
		if v["name"] == "U" {
			if _, has := v["cases"]; has || v["re"] != 400.0 {
				t.Errorf("U depends on no case: %v", v)
			}
		}
	}
	if _, has := ik["re"]; has {
		t.Errorf("a value with cases has cases in place of re: %v", ik)
	}
	cases := ik["cases"].(map[string]any)
	for name, want := range map[string]float64{"max": 14035.03, "min": 8065.92} {
		c := cases[name].(map[string]any)
		if re := c["re"].(float64); math.Abs(re-want) > 0.01 {
			t.Errorf("I_k3 %s re = %g, want %g", name, re, want)
		}
		if c["shown"] == "" {
			t.Errorf("I_k3 %s has no shown", name)
		}
	}
	if !strings.Contains(string(js), `"max": {`) || strings.Index(string(js), `"max"`) > strings.Index(string(js), `"min"`) {
		t.Errorf("cases in the front matter's order:\n%s", js)
	}
	all := out.Checks[0]
	if all["pass"] != true || all["cases"].(map[string]any)["max"] != true || all["cases"].(map[string]any)["min"] != true {
		t.Errorf("breaking capacity check: %v", all)
	}
	// 8.07 kA < 9 kA: fails in min, and does not apply in max
	min := out.Checks[1]
	mc := min["cases"].(map[string]any)
	if min["pass"] != false || mc["min"] != false {
		t.Errorf("check in min: %v", min)
	}
	if _, has := mc["max"]; has {
		t.Errorf("check in min: has a max entry: %v", min)
	}
	held, failed, _ := d.CaseCheckCounts()
	if held[0] != 1 || failed[0] != 0 || held[1] != 1 || failed[1] != 1 {
		t.Errorf("per-case counts held %v failed %v, want max 1/0 and min 1/1", held, failed)
	}
}

func TestCasesFrontMatterErrors(t *testing.T) {
	for src, want := range map[string]string{
		"---\ncases: [max, max]\n---\n":        "listed twice",
		"---\ncases: [max]\n---\n":             "two or more",
		"---\ncases: max\n---\n":               "two or more",
		"---\ncases: [max, \"a b\"]\n---\n":    "must be a name",
		"```calc\nx = {max: 1, min: 2}\n```\n": "no cases",
	} {
		d := parse(t, src)
		if len(d.Errors) == 0 || !strings.Contains(d.Errors[0].Msg, want) || d.Errors[0].Pos.Line() == 0 {
			t.Errorf("%q: errors %v, want %q with a line", src, d.Errors, want)
		}
	}
}
