package calcdoc_test

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
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

// use across cases: a used value with cases maps onto this sheet's cases
// of the same names (here given in the other order), and "use NAME in
// CASE as NEW" takes one case. Values: the hand derivation of
// TestCasesValuesJSON (14035.03 A at max, 8065.92 A at min).
func TestCasesUse(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{
		"board.md": caseDoc,
		"user.md": "---\ncases: [min, max]\n---\n```calc\n" +
			"use I_k3 from board.md\n" +
			"use I_k3 in max as I_max from board.md\n" +
			"I_2 = I_k3 / 2\n" +
			"```\n",
		"nocase.md": "```calc\nuse I_k3 from board.md\n```\n",
		"other.md":  "---\ncases: [hi, lo]\n---\n```calc\nuse I_k3 in mid as I_x from board.md\n```\n",
	})
	d, err := calcdoc.NewLoader(kinds, dir).Load(filepath.Join(dir, "user.md"))
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	half := d.Env.Lookup("I_2").Cases
	// this sheet's order: min first
	if len(half) != 2 || math.Abs(real(half[0].(*expr.Scalar).Z)-8065.92/2) > 0.01 || math.Abs(real(half[1].(*expr.Scalar).Z)-14035.03/2) > 0.01 {
		t.Errorf("I_2 per case = %v, want 4032.96 (min) and 7017.52 (max)", half)
	}
	im := d.Env.Lookup("I_max")
	if im.Cases != nil || math.Abs(real(im.Value.(*expr.Scalar).Z)-14035.03) > 0.01 {
		t.Errorf("I_max = %v (cases %v), want 14035.03 with no cases", im.Value, im.Cases)
	}
	// the record a built sheet carries (for verify) keeps the cases
	recs := calcdoc.UseRecords(d)
	sheets, _, err := calcdoc.RecordedSheets(calcdoc.MarshalUseRecords(recs))
	if err != nil {
		t.Fatal(err)
	}
	sh, err := sheets.Sheet(d, "board.md")
	if err != nil {
		t.Fatal(err)
	}
	if rv := sh.Lookup("I_k3"); len(sh.Cases) != 2 || rv == nil || len(rv.Cases) != 2 || math.Abs(real(rv.Cases[1].(*expr.Scalar).Z)-8065.92) > 0.01 {
		t.Errorf("recorded sheet: cases %v, I_k3 %+v", sh.Cases, rv)
	}
	for name, want := range map[string]string{
		"nocase.md": "cases [max, min], but this sheet has no cases",
		"other.md":  "has no case \"mid\": its cases are max, min",
	} {
		errs := useErr(t, map[string]string{"board.md": caseDoc, name: map[string]string{
			"nocase.md": "```calc\nuse I_k3 from board.md\n```\n",
			"other.md":  "---\ncases: [hi, lo]\n---\n```calc\nuse I_k3 in mid as I_x from board.md\n```\n"}[name]}, name)
		if len(errs) == 0 || !strings.Contains(errs[0].Msg, want) {
			t.Errorf("%s: errors %v, want %q", name, errs, want)
		}
	}
}

// The values CSV of a document with cases has a case column; I_k3's rows
// carry the hand-derived values of TestCasesValuesJSON.
func TestCasesValuesCSV(t *testing.T) {
	d := parse(t, caseDoc)
	var b strings.Builder
	if err := d.WriteValuesCSV(&b); err != nil {
		t.Fatal(err)
	}
	csv := b.String()
	for _, want := range []string{"name,line,case,re,im,unit,shown", "I_k3,7,max,14035.03", "I_k3,7,min,8065.92", "U,10,,400,0,V,"} {
		if !strings.Contains(csv, want) {
			t.Errorf("CSV lacks %q:\n%s", want, csv)
		}
	}
}
