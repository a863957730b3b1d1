package sweep_test

import (
	"math"
	"math/cmplx"
	"sort"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/calcdoc/kind/sweep"
	"calcdoc/expr"
)

// swRLC is a series RLC branch of our own: R = 5 Ω, L = 20 mH, C = 4.7 µF
// (lines 1-6, then a blank line); the sweep block follows from line 8.
var swRLC = []string{
	"```calc",
	"R_s = 5 Ω",
	"L_s = 20 mH",
	"C_s = 4.7 µF",
	"f_1 = 50 Hz",
	"```",
}

const (
	swR = 5.0
	swL = 20e-3
	swC = 4.7e-6
)

// swZ is the impedance of a series RLC branch at frequency f, the handbook
// formula Z = R + j(ωL − 1/(ωC)), ω = 2πf.
func swZ(f float64) complex128 {
	w := 2 * math.Pi * f
	return complex(swR, w*swL-1/(w*swC))
}

// swF0 is the resonance frequency of the branch, the handbook formula
// f0 = 1/(2π√(LC)).
var swF0 = 1 / (2 * math.Pi * math.Sqrt(swL*swC))

func swDoc(block ...string) *calcdoc.Document {
	lines := append(append([]string{}, swRLC...), "")
	lines = append(lines, block...)
	return calcdoc.Parse("sweep_test.md", []byte(strings.Join(lines, "\n")+"\n"), kind.Standard())
}

func swSweep(t *testing.T, d *calcdoc.Document) *sweep.Sweep {
	t.Helper()
	for _, b := range d.Blocks {
		if b.Kind == "sweep" {
			return b.Result.(*sweep.Sweep)
		}
	}
	t.Fatal("no sweep block")
	return nil
}

func swRel(a, b float64) float64 {
	if a == b {
		return 0
	}
	return math.Abs(a-b) / math.Max(math.Abs(a), math.Abs(b))
}

// swArgMin returns the index of the smallest Plot value of line l.
func swArgMin(l *sweep.SweepLine) int {
	lo, _ := l.Extremes()
	return lo
}

func TestSweepSeriesRLC(t *testing.T) {
	cases := []struct {
		name   string
		header string
		n      int
		log    bool
		a, z   float64
	}{
		{"log spacing", "```sweep f = 100 Hz .. 10 kHz log 401", 401, true, 100, 1e4},
		{"linear spacing", "```sweep f = 400 Hz .. 700 Hz 61", 61, false, 400, 700},
		{"default points", "```sweep f = 0.5*f_1*10 .. 20*f_1", sweep.DefaultSweepPoints, false, 250, 1000},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := swDoc(c.header,
				"omega = 2*pi*f                 # angular frequency",
				"Z_s = R_s + j*omega*L_s + 1/(j*omega*C_s)",
				"|Z_s|",
				"```")
			if len(d.Errors) != 0 {
				t.Fatalf("errors: %v", d.Errors)
			}
			sw := swSweep(t, d)
			if sw.N != c.n || sw.Log != c.log || len(sw.X) != c.n || sw.Dim != expr.DimFrequency {
				t.Fatalf("N %d log %v len %d dim %v", sw.N, sw.Log, len(sw.X), sw.Dim)
			}
			if sw.X[0] != c.a || sw.X[c.n-1] != c.z {
				t.Errorf("ends %g .. %g, want exactly %g .. %g", sw.X[0], sw.X[c.n-1], c.a, c.z)
			}
			// the grid: evenly spaced values, or evenly spaced logarithms
			// (the definition of linear and logarithmic spacing)
			for i, x := range sw.X {
				tt := float64(i) / float64(c.n-1)
				want := c.a + (c.z-c.a)*tt
				if c.log {
					want = c.a * math.Pow(c.z/c.a, tt)
				}
				if swRel(x, want) > 1e-13 {
					t.Fatalf("X[%d] = %g, want %g", i, x, want)
				}
			}
			if len(sw.Lines) != 3 {
				t.Fatalf("%d lines", len(sw.Lines))
			}
			z, mag := sw.Lines[1], sw.Lines[2]
			if !z.Complex || mag.Complex || z.Dim != expr.DimImpedance || mag.Dim != expr.DimImpedance {
				t.Errorf("Z complex %v dim %v; |Z| complex %v dim %v", z.Complex, z.Dim, mag.Complex, mag.Dim)
			}
			for i, f := range sw.X {
				want := swZ(f)
				if cmplx.Abs(z.Z[i]-want) > 1e-12*cmplx.Abs(want) {
					t.Fatalf("Z at %g Hz = %v, want %v", f, z.Z[i], want)
				}
				// |Z| = √(R² + (ωL − 1/(ωC))²), the handbook magnitude
				if wm := math.Hypot(swR, imag(want)); swRel(real(mag.Z[i]), wm) > 1e-12 || imag(mag.Z[i]) != 0 {
					t.Fatalf("|Z| at %g Hz = %v, want %g", f, mag.Z[i], wm)
				}
			}
			// The smallest |Z| lies at the resonance f0 = 1/(2π√(LC)),
			// within one step of the grid (a ratio step on a log grid).
			for _, l := range []*sweep.SweepLine{z, mag} {
				i := swArgMin(l)
				if c.log {
					step := math.Log(c.z/c.a) / float64(c.n-1)
					if d := math.Abs(math.Log(sw.X[i] / swF0)); d > step {
						t.Errorf("minimum at %g Hz, %g log-steps from f0 = %g Hz", sw.X[i], d/step, swF0)
					}
				} else {
					step := (c.z - c.a) / float64(c.n-1)
					if d := math.Abs(sw.X[i] - swF0); d > step {
						t.Errorf("minimum at %g Hz, %g Hz from f0 = %g Hz (step %g Hz)", sw.X[i], d, swF0, step)
					}
				}
			}
			// the sweep's names stay local to the block
			for _, name := range []string{"f", "omega", "Z_s"} {
				if d.Env.Lookup(name) != nil {
					t.Errorf("%s was defined in the document's names", name)
				}
			}
		})
	}
}

func TestSweepNamesStayLocal(t *testing.T) {
	// A later block may define the sweep variable and the block's names.
	d := swDoc("```sweep f = 1 Hz .. 2 Hz 3", "X = 2*pi*f*L_s", "```", "",
		"```calc", "f = 60 Hz", "X = 2*pi*f*L_s", "```")
	if len(d.Errors) != 0 {
		t.Fatalf("errors: %v", d.Errors)
	}
	if b := d.Env.Lookup("X"); b == nil || b.Pos.Line() != 14 {
		t.Fatalf("X should be defined by the calc block at line 14, got %+v", b)
	}
}

func TestSweepHeaderVariants(t *testing.T) {
	cases := []struct {
		name   string
		arg    string
		n      int
		log    bool
		a, z   float64
		angle  bool
		noGrid bool
	}{
		{"plain", "x = 1 .. 10", 50, false, 1, 10, false, false},
		{"points", "x = 1 .. 10 200", 200, false, 1, 10, false, false},
		{"log", "x = 1 .. 10 log", 50, true, 1, 10, false, false},
		{"log and points", "x = 1 .. 10 log 30", 30, true, 1, 10, false, false},
		{"points and log", "x = 1 .. 10 30 log", 30, true, 1, 10, false, false},
		{"number in the stop", "x = 0 .. 2 * 5", 50, false, 0, 10, false, false},
		{"parenthesised stop and points", "x = 0 .. (2) 5", 5, false, 0, 2, false, false},
		{"units", "f = 10 Hz .. 100 kHz log 200", 200, true, 10, 1e5, false, false},
		{"negative range", "x = -5 .. -1 3", 3, false, -5, -1, false, false},
		{"names above", "f = f_1 .. 2*f_1 2", 2, false, 50, 100, false, false},
		{"angle", "theta = 0° .. 90° 4", 4, false, 0, math.Pi / 2, true, false},
		{"cap", "x = 0 .. 1 10000", 10000, false, 0, 1, false, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := swDoc("```sweep "+c.arg, "y = 2", "```")
			if len(d.Errors) != 0 {
				t.Fatalf("errors: %v", d.Errors)
			}
			sw := swSweep(t, d)
			if sw.N != c.n || sw.Log != c.log || sw.Angle != c.angle || len(sw.X) != c.n {
				t.Errorf("N %d log %v angle %v len %d, want %d %v %v", sw.N, sw.Log, sw.Angle, len(sw.X), c.n, c.log, c.angle)
			}
			if swRel(sw.X[0], c.a) > 1e-15 || swRel(sw.X[len(sw.X)-1], c.z) > 1e-15 {
				t.Errorf("range %g .. %g, want %g .. %g", sw.X[0], sw.X[len(sw.X)-1], c.a, c.z)
			}
		})
	}
}

func TestSweepHeaderErrors(t *testing.T) {
	// The sweep header is on line 8; its argument starts at column 10.
	cases := []struct {
		name string
		line string
		col  int
		msg  string
	}{
		{"variable already defined", "```sweep R_s = 1 Ω .. 2 Ω", 10, "must be a new name"},
		{"variable is a built-in", "```sweep sqrt = 1 .. 2", 10, "built-in"},
		{"not a name", "```sweep 2f = 1 .. 2", 10, "not a name"},
		{"start above stop", "```sweep f = 10 kHz .. 100 Hz", 24, "must be below its stop"},
		{"start equals stop", "```sweep f = 1 kHz .. 1 kHz", 23, "must be below its stop"},
		{"log from zero", "```sweep f = 0 Hz .. 1 kHz log", 14, "start above zero"},
		{"log from below zero", "```sweep x = -1 .. 1 log", 14, "start above zero"},
		{"points above the cap", "```sweep f = 1 Hz .. 1 kHz 10001", 28, "at most 10000"},
		{"points far above the cap", "```sweep f = 1 Hz .. 1 kHz 99999999999999999999", 28, "at most 10000"},
		{"one point", "```sweep f = 1 Hz .. 1 kHz 1", 28, "at least 2"},
		{"points not whole", "```sweep f = 1 Hz .. 1 kHz 2.5", 28, "whole number"},
		{"units differ", "```sweep f = 1 Hz .. 1 kV", 22, "differ in unit"},
		{"no range", "```sweep f = 1 Hz to 1 kHz", 13, `no ".."`},
		{"no equals sign", "```sweep f from 1 Hz", 10, `no "="`},
		{"no header", "```sweep", 4, "needs its range"},
		{"no start", "```sweep f = .. 1 kHz", 14, "no start"},
		{"complex start", "```sweep x = j1 .. 2", 14, "must be real"},
		{"undefined stop", "```sweep f = 1 Hz .. f_max", 22, `unknown name "f_max"`},
		{"unit bracket", "```sweep f = 1 Hz .. 2 Hz[kHz]", 26, "no unit bracket"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := swDoc(c.line, "y = 2", "```")
			var errs []*expr.Error
			for _, e := range d.Errors {
				if e.Pos.Line() >= 8 {
					errs = append(errs, e)
				}
			}
			if len(errs) != 1 {
				t.Fatalf("want one error, got %v", errs)
			}
			if e := errs[0]; e.Pos.Position().InFile() != (expr.Position{Line: 8, Col: c.col}) || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("error %v, want at 8:%d containing %q", e, c.col, c.msg)
			}
			if sw := swSweep(t, d); sw.X != nil {
				t.Errorf("a sweep with a bad header has points")
			}
		})
	}
}

func TestSweepRangeUnavailable(t *testing.T) {
	// f_bad's definition fails (line 2 of the calc block): a sweep whose
	// range uses it is not evaluated, and that is not a second error.
	d := calcdoc.Parse("sweep_test.md", []byte(strings.Join([]string{
		"```calc", "f_bad = 1 Hz + 1 V", "```", "",
		"```sweep f = 1 Hz .. f_bad", "y = f", "```"}, "\n")), kind.Standard())
	if len(d.Errors) != 1 || d.Errors[0].Pos.Line() != 2 {
		t.Fatalf("want only the error of line 2, got %v", d.Errors)
	}
	sw := swSweep(t, d)
	if sw.X != nil || sw.Unavailable == nil || sw.Unavailable.Name != "f_bad" {
		t.Errorf("X %v unavailable %v", sw.X, sw.Unavailable)
	}
}

func TestSweepNoLines(t *testing.T) {
	d := swDoc("```sweep f = 1 Hz .. 2 Hz", "# only a note", "```")
	if len(d.Errors) != 1 || d.Errors[0].Pos.Position().InFile() != (expr.Position{Line: 8, Col: 4}) || !strings.Contains(d.Errors[0].Msg, "no line to evaluate") {
		t.Errorf("errors %v, want one at 8:4 saying the block has no line", d.Errors)
	}
}

func TestSweepLineErrors(t *testing.T) {
	cases := []struct {
		name  string
		lines []string
		line  int
		col   int
		msg   string
		unav  int // the line (the block's lines start at 9) that is unavailable, 0 for none
	}{
		{"assigns the sweep variable", []string{"f = 2 Hz"}, 9, 1, "is the sweep variable", 0},
		{"name defined above", []string{"R_s = 2 Ω"}, 9, 1, "already defined", 0},
		{"name twice in the block", []string{"a = f", "a = 2*f"}, 10, 1, "already defined in this block", 0},
		{"function", []string{"g(x) = x"}, 9, 1, "no function definitions", 0},
		{"check", []string{"check f > 0 Hz"}, 9, 1, "no checks", 0},
		{"unit mismatch", []string{"y = f + 1 V", "w = y * 2"}, 9, 7, "cannot add", 10},
		{"used before its line", []string{"y = z", "z = f"}, 9, 5, `unknown name "z"`, 0},
		{"display of another unit", []string{"y[V] = f"}, 9, 2, "the unit V is a voltage", 0},
		// issue 12: a failed display unit defines nothing, so w is not evaluated
		{"display of another unit, used below", []string{"y[V] = f", "w = y * 2"}, 9, 2, "the unit V is a voltage", 10},
		{"not a single value", []string{"[f; f]"}, 9, 1, "a sweep line must give a single value", 0},
		// 1e300·1e300 = 1e600 exceeds the largest binary64 number, about
		// 1.8e308 (IEEE 754-2019 section 7.4, overflow): an error at the
		// first *, at every point
		{"never finite", []string{"y = 1e300 * 1e300 * f"}, 9, 11, "this product overflows", 0},
		{"several names", []string{"a, b = [f; f]", "c = a"}, 9, 1, "assigns one name", 10},
		{"parse error", []string{"y = (f", "w = y * 2"}, 9, 5, "unclosed parenthesis", 10},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			block := append([]string{"```sweep f = 1 Hz .. 2 Hz 3"}, c.lines...)
			d := swDoc(append(block, "```")...)
			if len(d.Errors) != 1 {
				t.Fatalf("want one error, got %v", d.Errors)
			}
			if e := d.Errors[0]; e.Pos.Position().InFile() != (expr.Position{Line: c.line, Col: c.col}) || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("error %v, want at %d:%d containing %q", e, c.line, c.col, c.msg)
			}
			sw := swSweep(t, d)
			for _, l := range sw.Lines {
				ln := l.Stmt.Pos().Line()
				if (l.Unavailable != nil) != (ln == c.unav) {
					t.Errorf("line %d: unavailable %v", ln, l.Unavailable)
				}
			}
		})
	}
}

func TestSweepGaps(t *testing.T) {
	// x = 0, 0.5, 1, 1.5, 2. Closed forms: y = 1/(x − 1) (undefined at
	// x = 1), w = 2y, big = 1e300·10^(10x) (beyond the largest float64,
	// about 1.8e308, from x = 1 on: IEEE 754 overflow to infinity).
	d := swDoc("```sweep x = 0 .. 2 5",
		"y = 1/(x - 1)",
		"w = y * 2",
		"big = 1e300 * 10^(10*x)",
		"```")
	// (the plot of big cannot be drawn: that is the drawing's error,
	// DrawErrors, not the evaluation's)
	if errs := evalErrors(d); len(errs) != 0 {
		t.Fatalf("a gap is not a document error: %v", errs)
	}
	sw := swSweep(t, d)
	y, w, big := sw.Lines[0], sw.Lines[1], sw.Lines[2]
	cases := []struct {
		name   string
		l      *sweep.SweepLine
		want   []float64 // NaN: a gap
		gapErr string
	}{
		{"error at a point", y, []float64{-1, -2, math.NaN(), 2, 1}, "division by zero"},
		{"follows a gap above", w, []float64{-2, -4, math.NaN(), 4, 2}, ""},
		// not finite from x = 1 on: an error at the point, naming the
		// operator, never a silent gap
		{"not finite", big, []float64{1e300, 1e305, math.NaN(), math.NaN(), math.NaN()}, "this product overflows"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			gaps := 0
			for i, want := range c.want {
				got := c.l.Z[i]
				if math.IsNaN(want) {
					gaps++
					if !cmplx.IsNaN(got) {
						t.Errorf("point %d: %v, want a gap", i, got)
					}
					continue
				}
				if swRel(real(got), want) > 1e-15 || imag(got) != 0 {
					t.Errorf("point %d: %v, want %g", i, got, want)
				}
			}
			if c.l.Gaps != gaps || !c.l.OK() {
				t.Errorf("gaps %d ok %v, want %d gaps", c.l.Gaps, c.l.OK(), gaps)
			}
			if c.gapErr == "" {
				if c.l.GapErr != nil {
					t.Errorf("unexpected gap error %v", c.l.GapErr)
				}
			} else if c.l.GapErr == nil || !strings.Contains(c.l.GapErr.Error(), c.gapErr) || c.l.GapAt != 2 {
				t.Errorf("gap error %v at %d, want %q at point 2", c.l.GapErr, c.l.GapAt, c.gapErr)
			}
		})
	}
}

func TestSweepTableRows(t *testing.T) {
	cases := []struct {
		name   string
		header string
		all    bool
	}{
		{"few points: all", "```sweep f = 100 Hz .. 10 kHz log 20", true},
		{"many points: a subset", "```sweep f = 100 Hz .. 10 kHz log 999", false},
		{"linear", "```sweep f = 300 Hz .. 900 Hz 301", false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := swDoc(c.header,
				"Z_s = R_s + j*2*pi*f*L_s + 1/(j*2*pi*f*C_s)",
				"X_s = im(Z_s)",
				"q = 1/(f - 500 Hz)",
				"```")
			sw := swSweep(t, d)
			rows := sw.TableRows()
			if !sort.IntsAreSorted(rows) {
				t.Fatalf("rows not sorted: %v", rows)
			}
			for i := 1; i < len(rows); i++ {
				if rows[i] == rows[i-1] {
					t.Fatalf("row %d twice", rows[i])
				}
			}
			if c.all {
				if len(rows) != sw.N {
					t.Fatalf("%d rows for %d points", len(rows), sw.N)
				}
				return
			}
			has := map[int]bool{}
			for _, r := range rows {
				has[r] = true
			}
			must := []int{0, sw.N - 1}
			for _, l := range sw.Lines {
				// the extremes, found here by a plain scan of the values
				lo, hi := 0, 0
				for i := range l.Z {
					if l.Plot(i) < l.Plot(lo) {
						lo = i
					}
					if l.Plot(i) > l.Plot(hi) {
						hi = i
					}
				}
				must = append(must, lo, hi)
			}
			for _, m := range must {
				if !has[m] {
					t.Errorf("row %d missing from %v", m, rows)
				}
			}
			if max := sweep.SweepTableRows + 3*len(sw.Lines); len(rows) > max || len(rows) < sweep.SweepTableRows {
				t.Errorf("%d rows, want %d to %d", len(rows), sweep.SweepTableRows, max)
			}
		})
	}
}

func BenchmarkSweepEval10k(b *testing.B) {
	src := []byte(strings.Join(append(append([]string{}, swRLC...), "",
		"```sweep f = 10 Hz .. 100 kHz log 10000",
		"Z_s = R_s + j*2*pi*f*L_s + 1/(j*2*pi*f*C_s)",
		"I_s = 230 V / Z_s",
		"S_s = 230 V * conj(I_s)",
		"```"), "\n"))
	b.ReportAllocs()
	for b.Loop() {
		d := calcdoc.Parse("bench.md", src, kind.Standard())
		if len(d.Errors) != 0 {
			b.Fatal(d.Errors)
		}
	}
}

// evalErrors are the document's errors less those of pictures that cannot
// be drawn.
func evalErrors(d *calcdoc.Document) []*expr.Error {
	drawn := map[*expr.Error]bool{}
	for _, b := range d.Blocks {
		for _, e := range b.DrawErrors {
			drawn[e] = true
		}
	}
	var out []*expr.Error
	for _, e := range d.Errors {
		if !drawn[e] {
			out = append(out, e)
		}
	}
	return out
}
