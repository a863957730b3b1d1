package sweep

import (
	"math"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/render"
)

// A sweep over a temperature in °C keeps the mark of an absolute
// temperature (LANGUAGE.md section 4): the variable and a line in °C are
// shown and plotted in °C, (v − 273.15 K) / 1 K, not in K.
func TestSweepOverCelsius(t *testing.T) {
	src := strings.Join([]string{
		"```calc",
		"R_20 = 1 Ω",
		"alpha = 0.00393 / (1 K)",
		"```",
		"```sweep theta = 20 °C .. 90 °C 8",
		"R = R_20 * (1 + alpha * (theta - 20 °C))",
		"theta_2[°C] = theta + 5 K",
		"```",
	}, "\n") + "\n"
	d := calcdoc.Parse("t.md", []byte(src), testKinds)
	if len(d.Errors) > 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	var sw *Sweep
	for _, b := range d.Blocks {
		if s, ok := b.Result.(*Sweep); ok {
			sw = s
		}
	}
	if sw == nil || !sw.AbsTemp {
		t.Fatalf("the sweep variable lost its absolute-temperature mark")
	}
	for _, l := range sw.Lines {
		figs := sweepFigs(sw, l)
		x, y := figs[0].plot.X, figs[0].plot.Series[0].Y
		// hand derivation: the axis runs 20 °C .. 90 °C in steps of 10 °C
		if math.Abs(x[0]-20) > 1e-9 || math.Abs(x[7]-90) > 1e-9 {
			t.Errorf("%s: x axis %v, want 20 .. 90 (°C)", l.Name, x)
		}
		switch l.Name {
		case "R":
			// hand derivation: R = 1 Ω · (1 + 0.00393 · 70) = 1.2751 Ω at 90 °C
			if math.Abs(y[7]-1.2751) > 1e-9 {
				t.Errorf("R at 90 °C plotted %g Ω, want 1.2751", y[7])
			}
		case "theta_2":
			if !l.AbsTemp || math.Abs(y[0]-25) > 1e-9 || figs[0].plot.YLabel != "theta_2 [°C]" {
				t.Errorf("theta_2: abs %v, plotted %g %q, want 25 in °C", l.AbsTemp, y[0], figs[0].plot.YLabel)
			}
		}
	}
	// the sheet's table shows the variable in °C: the first point 20 °C
	html, err := render.Sheet(d, render.Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(html), "<tr><td>1</td><td><math><mn>20.00</mn><mi class=\"u\">°C</mi>") {
		t.Errorf("the sweep table does not show the first point as 20.00 °C")
	}
	// a start in °C and a stop in K is refused
	d = calcdoc.Parse("t.md", []byte("```sweep theta = 20 °C .. 90 K 8\nx = theta - 20 °C\n```\n"), testKinds)
	if len(d.Errors) == 0 || !strings.Contains(d.Errors[0].Msg, "not both temperatures in °C") {
		t.Errorf("mixed ends: %v", d.Errors)
	}
}
