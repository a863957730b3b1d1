package solve

import (
	"math"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
	"calcdoc/render"
)

// A [°C] unknown is an absolute temperature (LANGUAGE.md section 4): it
// keeps the mark, is shown in °C and may be used as one (theta - 20 °C).
// Hand derivation of the heat balance P = (theta − theta_a) / R_th with
// P = 20 W, R_th = 2 K/W, theta_a = 25 °C: theta = 25 °C + 40 K = 65 °C
// = 338.15 K.
func TestSolveCelsiusUnknown(t *testing.T) {
	src := "```calc\nP = 20 W\nR_th = 2 K/W\ntheta_a = 25 °C\n```\n" +
		"```solve theta[°C] real\nP = (theta - theta_a) / R_th\n```\n" +
		"```calc\nrise = theta - 20 °C\n```\n"
	d := calcdoc.Parse("t.md", []byte(src), testKinds)
	if len(d.Errors) > 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	th, _ := d.Env.Lookup("theta").Value.(*expr.Scalar)
	if th == nil || !th.AbsTemp || math.Abs(real(th.Z)-338.15) > 1e-6 {
		t.Fatalf("theta = %+v, want 338.15 K marked absolute", th)
	}
	rise, _ := d.Env.Lookup("rise").Value.(*expr.Scalar)
	if rise == nil || rise.AbsTemp || math.Abs(real(rise.Z)-45) > 1e-6 {
		t.Errorf("rise = %+v, want the difference 45 K", rise)
	}
	html, err := render.Sheet(d, render.Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(html), "<mn>65.00</mn><mi class=\"u\">°C</mi>") {
		t.Errorf("the solved theta is not shown as 65.00 °C")
	}
}
