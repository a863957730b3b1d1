package sweep

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/internal/svgread"
	"calcdoc/render"
)

// picSheet evaluates a document made of lines and writes its sheet.
func picSheet(t testing.TB, lines ...string) (string, *calcdoc.Document) {
	t.Helper()
	d := calcdoc.Parse("pictures_test.md", []byte(strings.Join(lines, "\n")+"\n"), testKinds)
	out, err := render.Sheet(d, render.Options{Version: "test"})
	if err != nil {
		t.Fatalf("Sheet: %v", err)
	}
	return string(out), d
}

// the SVG readers these tests share with the phasors kind's
var (
	picSVGs = svgread.SVGs
	picNum  = svgread.Num
)

type picElement = svgread.Element

func picParse(t *testing.T, s string) []picElement { return svgread.Parse(t, s) }

var picCalc = []string{
	"```calc",
	"V_a = 230 V",       // 2
	"I_a = 10 A∠-30°",   // 3
	"V_b = 11 kV",       // 4
	"I_b = 1.5 kA∠-25°", // 5
	"R_s = 5 Ω",         // 6
	"L_s = 20 mH",       // 7
	"C_s = 4.7 µF",      // 8
	"```",
	"",
}

func picDoc(block ...string) []string {
	return append(append([]string{}, picCalc...), block...)
}

func TestPictureSVGParsesAsXML(t *testing.T) {
	page, d := picSheet(t, picDoc(
		"```phasors V_a, I_a, I_a * 2 + I_a",
		"Branch a & its <current>",
		"```",
		"",
		"```sweep f = 100 Hz .. 10 kHz log 60",
		"Z_s = R_s + j*2*pi*f*L_s + 1/(j*2*pi*f*C_s)",
		"X_s = im(Z_s)",
		"q = 1/(f - 100 Hz)",
		"```")...)
	if len(d.Errors) != 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	svgs := picSVGs(page)
	// one diagram; |Z_s| and arg Z_s; X_s; q
	if len(svgs) != 5 {
		t.Fatalf("%d SVG elements, want 5", len(svgs))
	}
	for i, s := range svgs {
		els := picParse(t, s)
		if els[0].Attr["viewBox"] == "" {
			t.Errorf("svg %d has no viewBox", i)
		}
	}
	if !strings.Contains(page, "<figcaption>Branch a &amp; its &lt;current&gt;") {
		t.Errorf("caption not escaped into the figcaption")
	}
}

// picPoints parses the points of the first polyline of an SVG.
func picPoints(t *testing.T, els []picElement) [][2]float64 {
	for _, e := range els {
		if e.Name != "polyline" {
			continue
		}
		var out [][2]float64
		for _, p := range strings.Fields(e.Attr["points"]) {
			x, y, _ := strings.Cut(p, ",")
			out = append(out, [2]float64{picNum(t, x), picNum(t, y)})
		}
		return out
	}
	t.Fatal("no polyline")
	return nil
}

func TestSweepPlotMinimumAtResonance(t *testing.T) {
	// Series RLC branch: R = 5 Ω, L = 20 mH, C = 4.7 µF. Its |Z| is
	// smallest at the resonance f0 = 1/(2π√(LC)) (handbook formula),
	// 519.1 Hz.
	f0 := 1 / (2 * math.Pi * math.Sqrt(20e-3*4.7e-6))
	cases := []struct {
		name    string
		head    string
		n       int
		a, z    float64
		log     bool
		thinned bool // more points than the plot draws one by one
	}{
		{"log", "```sweep f = 100 Hz .. 10 kHz log 401", 401, 100, 1e4, true, false},
		{"linear", "```sweep f = 300 Hz .. 800 Hz 101", 101, 300, 800, false, false},
		{"log, thinned", "```sweep f = 100 Hz .. 10 kHz log 10000", 10000, 100, 1e4, true, true},
		{"linear, thinned", "```sweep f = 300 Hz .. 800 Hz 5001", 5001, 300, 800, false, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			page, d := picSheet(t, picDoc(c.head, "Z_s = R_s + j*2*pi*f*L_s + 1/(j*2*pi*f*C_s)", "```")...)
			if len(d.Errors) != 0 {
				t.Fatalf("errors: %v", d.Errors)
			}
			svgs := picSVGs(page)
			if len(svgs) != 2 {
				t.Fatalf("%d plots, want magnitude and angle", len(svgs))
			}
			pts := picPoints(t, picParse(t, svgs[0]))
			if (len(pts) != c.n) != c.thinned || len(pts) > c.n {
				t.Fatalf("%d points plotted for %d points (thinned: %v)", len(pts), c.n, c.thinned)
			}
			// The lowest points of the curve (largest SVG y). Coordinates
			// are written with two decimals, so near a flat minimum several
			// points may share the lowest y: f0 must lie within one grid step
			// of the run of them.
			bottom := pts[0][1]
			for _, p := range pts {
				bottom = math.Max(bottom, p[1])
			}
			lo, hi := math.Inf(1), math.Inf(-1)
			for _, p := range pts {
				if p[1] == bottom {
					lo, hi = math.Min(lo, p[0]), math.Max(hi, p[0])
				}
			}
			// where f0 lies on the x axis, which spans the sweep exactly
			x0, x1 := pts[0][0], pts[len(pts)-1][0]
			fr := (f0 - c.a) / (c.z - c.a)
			if c.log {
				fr = math.Log(f0/c.a) / math.Log(c.z/c.a)
			}
			want := x0 + (x1-x0)*fr
			step := (x1 - x0) / float64(c.n-1)
			if want < lo-step-0.01 || want > hi+step+0.01 {
				t.Errorf("plotted minimum at x = %.2f .. %.2f, f0 at %.2f: more than one grid step (%.3f) apart", lo, hi, want, step)
			}
			if hi-lo > 2 {
				t.Errorf("the lowest points spread over %.2f units: the minimum is not located", hi-lo)
			}
		})
	}
}

func TestPictureThinning(t *testing.T) {
	nan := math.NaN()
	const cols = 50
	mk := func(n int, f func(i int) float64) ([]float64, []float64) {
		x, y := make([]float64, n), make([]float64, n)
		for i := range x {
			x[i] = 10 * math.Pow(1e4, float64(i)/float64(n-1))
			y[i] = f(i)
		}
		return x, y
	}
	type series struct {
		name string
		n    int
		f    func(i int) float64
		log  bool
	}
	cases := []series{
		{"short: every point", 100, func(i int) float64 { return float64(i % 7) }, true},
		{"smooth", 5000, func(i int) float64 { return math.Sin(float64(i) / 300) }, true},
		{"noisy", 5000, func(i int) float64 { return math.Sin(float64(i*i) * 0.37) }, false},
		{"one spike", 5000, func(i int) float64 {
			if i == 2345 {
				return 1e6
			}
			return 1
		}, true},
		{"gaps", 5000, func(i int) float64 {
			if i%997 < 3 || i > 4990 {
				return nan
			}
			return float64(i % 13)
		}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x, y := mk(c.n, c.f)
			col := plotColumnsOf(x, c.log, cols)
			idx := thinIndices(col, y)
			if col == nil {
				if len(idx) != c.n {
					t.Fatalf("a short series kept %d of %d points", len(idx), c.n)
				}
				return
			}
			kept := map[int]bool{}
			for k, i := range idx {
				if k > 0 && i <= idx[k-1] {
					t.Fatalf("indices not increasing at %d", k)
				}
				kept[i] = true
			}
			// Brute force over the columns, each computed here from its
			// definition (equal widths in log x or x): every run of finite
			// points in a column keeps its first, smallest, largest and last
			// point; every run of gaps keeps its first point.
			colOf := func(i int) int {
				f := (x[i] - x[0]) / (x[c.n-1] - x[0])
				if c.log {
					f = math.Log(x[i]/x[0]) / math.Log(x[c.n-1]/x[0])
				}
				return min(cols-1, int(f*cols))
			}
			for i := 0; i < c.n; {
				j := i
				if math.IsNaN(y[i]) {
					for j < c.n && math.IsNaN(y[j]) {
						j++
					}
					if !kept[i] {
						t.Errorf("gap run from %d not kept", i)
					}
					i = j
					continue
				}
				lo, hi := i, i
				for j < c.n && !math.IsNaN(y[j]) && colOf(j) == colOf(i) {
					if y[j] < y[lo] {
						lo = j
					}
					if y[j] > y[hi] {
						hi = j
					}
					j++
				}
				for _, k := range []int{i, lo, hi, j - 1} {
					if !kept[k] {
						t.Fatalf("point %d (first, min, max or last of the run %d..%d) dropped", k, i, j-1)
					}
				}
				i = j
			}
			if len(idx) >= c.n/2 {
				t.Errorf("kept %d of %d points", len(idx), c.n)
			}
		})
	}
}

func TestSweepAxisLabels(t *testing.T) {
	page, d := picSheet(t, picDoc("```sweep f = 100 Hz .. 10 kHz log 30",
		"Z_s = R_s + j*2*pi*f*L_s + 1/(j*2*pi*f*C_s)",
		"Z_k[kΩ] = Z_s",
		"phi = arg(Z_s)",
		"|Z_s|",
		"```")...)
	if len(d.Errors) != 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	type labels struct{ x, y string }
	want := []labels{
		{"f [Hz]", "|Z_s| [Ω]"}, {"f [Hz]", "arg Z_s [°]"},
		{"f [Hz]", "|Z_k| [kΩ]"}, {"f [Hz]", "arg Z_k [°]"},
		{"f [Hz]", "phi [°]"},
		{"f [Hz]", "|Z_s| [Ω]"},
	}
	svgs := picSVGs(page)
	if len(svgs) != len(want) {
		t.Fatalf("%d plots, want %d", len(svgs), len(want))
	}
	for i, s := range svgs {
		var got labels
		for _, e := range picParse(t, s) {
			switch e.Attr["class"] {
			case "xlabel":
				got.x = e.Text
			case "ylabel":
				got.y = e.Text
			}
		}
		if got != want[i] {
			t.Errorf("plot %d labels %+v, want %+v", i, got, want[i])
		}
	}
	// |Z_s| runs from 5 Ω to about 1.26 kΩ, over two decades: a log
	// axis, ticked at the decades 10, 100, 1k; its angle is linear.
	var ticks []string
	for _, e := range picParse(t, svgs[0]) {
		if e.Attr["class"] == "ytick" {
			ticks = append(ticks, e.Text)
		}
	}
	if strings.Join(ticks, " ") != "10 100 1k" {
		t.Errorf("|Z_s| y ticks %q, want the decades 10 100 1k", ticks)
	}
}

func TestPictureLogY(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		name string
		y    []float64
		want bool
	}{
		{"two decades", []float64{1, 50, 100}, true},
		{"under two decades", []float64{1, 50, 99.9}, false},
		{"a zero", []float64{0, 1, 1000}, false},
		{"a negative value", []float64{-1, 1, 1000}, false},
		{"gaps ignored", []float64{nan, 2, 500, nan}, true},
		{"all gaps", []float64{nan, nan}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := useLogY(c.y); got != c.want {
				t.Errorf("useLogY(%v) = %v, want %v", c.y, got, c.want)
			}
		})
	}
}

func TestSweepSheetTableAndGaps(t *testing.T) {
	// y = 1/(x − 1) at x = 0, 0.5, 1, 1.5, 2: no value at x = 1.
	page, d := picSheet(t, picDoc("```sweep x = 0 .. 2 5", "y = 1/(x - 1)", "```")...)
	if len(d.Errors) != 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	for _, want := range []string{
		`<td class="gap">no value</td>`,
		"y has no value at 1 of the 5 points (the first at x = 1.000); at x = 1.000: division by zero",
		"first gap of y",
		"The table shows 5 of the 5 points",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("sheet lacks %q", want)
		}
	}
	els := picParse(t, picSVGs(page)[0])
	n := 0
	for _, e := range els {
		if e.Name == "polyline" {
			n++
		}
	}
	if n != 2 {
		t.Errorf("%d polylines, want 2 (the line broken at the gap)", n)
	}
}

func TestSweepErrorsInPlace(t *testing.T) {
	cases := []struct {
		name, head, line, want string
	}{
		{"header", "```sweep f = 10 kHz .. 100 Hz", "y = f", "line 11, col 24:"},
		{"line", "```sweep f = 1 Hz .. 2 Hz 3", "y = f + 1 V", "line 12, col 7:"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			page, d := picSheet(t, picDoc(c.head, c.line, "```")...)
			if len(d.Errors) != 1 {
				t.Fatalf("errors: %v", d.Errors)
			}
			i := strings.Index(page, `<div class="block sweep"`)
			if i < 0 || !strings.Contains(page[i:], `<span class="at">`+c.want+`</span>`) {
				t.Errorf("error %q not shown in the block", c.want)
			}
			if len(picSVGs(page)) != 0 {
				t.Errorf("a failed sweep has a plot")
			}
		})
	}
}

// BenchmarkSweepBuild10k is the goal: a 10,000-point sweep of a
// three-line block, whole build (calcdoc.Parse + Sheet), 100 ms or less.
func BenchmarkSweepBuild10k(b *testing.B) {
	src := []byte(strings.Join(picDoc(
		"```sweep f = 10 Hz .. 100 kHz log 10000",
		"Z_s = R_s + j*2*pi*f*L_s + 1/(j*2*pi*f*C_s)",
		"I_s = 230 V / Z_s",
		"S_s = 230 V * conj(I_s)",
		"```"), "\n"))
	b.ReportAllocs()
	var size int
	for b.Loop() {
		d := calcdoc.Parse("bench.md", src, testKinds)
		if len(d.Errors) != 0 {
			b.Fatal(d.Errors)
		}
		out, err := render.Sheet(d, render.Options{Version: "bench"})
		if err != nil || !bytes.Contains(out, []byte("<polyline")) {
			b.Fatal(err)
		}
		size = len(out)
	}
	b.ReportMetric(float64(size)/1e6, "MB/sheet")
}
