package sweep_test

import (
	"encoding/json"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// TestValuesJSONSense checks the sense of a power factor in the values
// JSON: "sense" and "export" on a power factor, arrays of rows on a vector
// of them, neither field on other values. S = 400 kW + j300 kvar: PF =
// 400/500 = 0.8 (IEEE Std 1459-2010 PF = P/S, hand derivation), lagging
// (P·Q > 0); conj(S) leading; -S lagging, export (P < 0); a real power
// has Q = 0 and no sense word.
func TestValuesJSONSense(t *testing.T) {
	src := "```calc\n" +
		"S_b = (400 + j300) kVA\n" +
		"pf_b = powerfactor(S_b)\n" +
		"pf_c = powerfactor(-S_b)\n" +
		"pf_r = powerfactor(-re(S_b))\n" +
		"pf_v = [pf_b; powerfactor(conj(S_b))]\n" +
		"```\n"
	d := calcdoc.Parse("pf.md", []byte(src), kind.Standard())
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	var js struct {
		Values []map[string]any `json:"values"`
		Sweeps []any            `json:"sweeps"`
	}
	if err := json.Unmarshal(d.MarshalValues(), &js); err != nil {
		t.Fatal(err)
	}
	want := map[string]string{
		"S_b":  `{"name":"S_b","line":2,"re":400000,"im":300000,"unit":"VA","kind":"apparent","shown":"400.0 + j300.0 kVA"}`,
		"pf_b": `{"name":"pf_b","line":3,"re":0.8,"im":0,"unit":"","kind":null,"shown":"0.8000 lagging","sense":"lagging","export":false}`,
		"pf_c": `{"name":"pf_c","line":4,"re":0.8,"im":0,"unit":"","kind":null,"shown":"0.8000 lagging, export","sense":"lagging","export":true}`,
		"pf_r": `{"name":"pf_r","line":5,"re":1,"im":0,"unit":"","kind":null,"shown":"1.000 export","sense":null,"export":true}`,
		"pf_v": `{"name":"pf_v","line":6,"re":[[0.8],[0.8]],"im":[[0],[0]],"unit":[[""],[""]],"kind":[[null],[null]],"shown":"[0.8000 lagging; 0.8000 leading]","sense":[["lagging"],["leading"]],"export":[[false],[false]]}`,
	}
	for _, v := range js.Values {
		name := v["name"].(string)
		got, _ := json.Marshal(v)
		var w map[string]any
		json.Unmarshal([]byte(want[name]), &w)
		wb, _ := json.Marshal(w)
		if string(got) != string(wb) {
			t.Errorf("%s:\n got %s\nwant %s", name, got, wb)
		}
	}
	if js.Sweeps == nil || len(js.Sweeps) != 0 {
		t.Errorf("a document without sweeps has \"sweeps\": %v, want []", js.Sweeps)
	}
}

// TestValuesJSONEverySweepPoint: the JSON lists every point of a sweep,
// far more than the sheet's table shows, and a line with no value at a
// point has null there. The values are the handbook formula of a series
// RLC branch, checked at every point by swZ (sweep_test.go).
func TestValuesJSONEverySweepPoint(t *testing.T) {
	d := swDoc("```sweep f = 10 Hz .. 10 kHz log 300", "Z = R_s + j*2*pi*f*L_s + 1/(j*2*pi*f*C_s)", "1 / (f - 10 Hz)", "```")
	if len(d.Errors) > 0 {
		t.Fatal(d.Errors)
	}
	sw := swSweep(t, d)
	sj := d.ValuesJSON().Sweeps
	if len(sj) != 1 || sj[0].Line != 8 || sj[0].Variable != "f" || sj[0].Unit != "Hz" {
		t.Fatalf("sweeps %+v", sj)
	}
	s := sj[0]
	if len(s.Points) != 300 || len(sw.TableRows()) >= 300 {
		t.Fatalf("%d points, the table shows %d", len(s.Points), len(sw.TableRows()))
	}
	if len(s.Columns) != 2 || s.Columns[0].Text != "Z" || s.Columns[0].Unit != "Ω" || s.Columns[1].Text != "1 / (f - 10 Hz)" || s.Columns[1].Unit != "s" || s.Columns[0].Line != 9 {
		t.Errorf("columns %+v", s.Columns)
	}
	for i, p := range s.Points {
		f := p.X.(float64)
		z := complex(p.Values[0].Re.(float64), p.Values[0].Im.(float64))
		if swRel(real(z), real(swZ(f))) > 1e-12 || swRel(imag(z), imag(swZ(f))) > 1e-12 {
			t.Errorf("point %d: Z %v, handbook %v", i+1, z, swZ(f))
		}
		if gap := p.Values[1].Re == nil && p.Values[1].Im == nil; gap != (i == 0) {
			t.Errorf("point %d (f = %v): 1/(f − 10 Hz) gap %v", i+1, f, gap)
		}
	}
	out := string(d.MarshalValues())
	if !strings.Contains(out, `"re": null`) {
		t.Errorf("a gap is not written as null")
	}
}
