package diff

import (
	"math"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// A value with cases is compared case by case: raising only the minimum
// case's impedance from 0.0272 Ω to 0.0300 Ω changes I_k3 in case min
// only. Hand derivation (I = c·U/(√3·Z)): the relative change is
// 0.0272/0.0300 − 1 = −9.333 %. The check in min (I_k3 >= 8 kA) fails:
// 0.95·400/(√3·0.0300) = 7313.3 A, a utilisation 8000/7313.3 = 109.4 %.
func TestDiffPerCase(t *testing.T) {
	doc := func(zmin string) *Snapshot {
		src := "---\ncases: [max, min]\n---\n```calc\nc = {max: 1.10, min: 0.95}\nZ_k = {max: 0.0181 Ω, min: " + zmin + " Ω}\n" +
			"I_k3 = c * 400 V / (sqrt(3) * Z_k)\ncheck in min: I_k3 >= 8 kA\n```\n"
		return Take(calcdoc.Parse("t.md", []byte(src), kind.Standard()))
	}
	changes := Compare("t.md", doc("0.0272"), doc("0.0300"), Options{})
	var got []Change
	for _, c := range changes {
		if c.Item == ItemValue || c.Item == ItemCheck {
			got = append(got, c)
		}
	}
	if len(got) != 3 {
		t.Fatalf("want Z_k, I_k3 and the check changed in case min only, got %+v", got)
	}
	for _, c := range got {
		if c.Case != "min" {
			t.Errorf("change %+v is not in case min", c)
		}
	}
	if ik := got[1]; ik.Name != "I_k3" || !ik.HasRel || math.Abs(ik.Rel-(0.0272/0.0300-1)) > 1e-12 {
		t.Errorf("I_k3 change %+v, want −9.333 %%", ik)
	}
	if ch := got[2]; ch.Item != ItemCheck || ch.New != "fails, utilisation 109.4 %" {
		t.Errorf("check change %+v", ch)
	}
}
