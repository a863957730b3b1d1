package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// Issue 12: a check on (1e200 Ω)²/(1 Ω) = 1e400 Ω, beyond the largest
// binary64 number (about 1.798e308, IEEE 754-2019 section 7.4), used to
// be "satisfied" with exit status 0 and "re": null beside "pass": true.
// Now the overflow is an error at the ^, the check has no verdict, and
// check and values exit 3 (LANGUAGE.md section 4 and section 8).
func TestOverflowedCheckExitsThree(t *testing.T) {
	dir := t.TempDir()
	p := write(t, dir, "big.md", "```calc\nZ = (1e200 Ω)^2 / (1 Ω)\ncheck Z > 1 Ω\n```\n")
	if st, out, errs := runCLI("check", p); st != 3 || !strings.Contains(out+errs, "big.md:2:14: this power overflows") {
		t.Errorf("check: exit %d, output %q %q; want 3 and the error at 2:14", st, out, errs)
	}
	st, out, _ := runCLI("values", p)
	if st != 3 {
		t.Errorf("values: exit %d, want 3", st)
	}
	var vj struct {
		Values []struct {
			Name string `json:"name"`
			Re   any    `json:"re"`
		} `json:"values"`
		Checks []struct {
			Pass *bool `json:"pass"`
		} `json:"checks"`
	}
	if err := json.Unmarshal([]byte(out), &vj); err != nil {
		t.Fatalf("values JSON: %v\n%s", err, out)
	}
	if len(vj.Values) != 0 {
		t.Errorf("values %+v: Z has no value", vj.Values)
	}
	if len(vj.Checks) != 1 || vj.Checks[0].Pass != nil {
		t.Errorf("checks %+v, want one with pass null", vj.Checks)
	}
}
