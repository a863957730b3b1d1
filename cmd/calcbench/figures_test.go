package main

import (
	"bytes"
	"fmt"
	"math/cmplx"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// numpyPython returns Debian's /usr/bin/python3 when it has NumPy, else
// "". Without it a test skips, unless CALCDOC_REQUIRE_BROWSER=1 (as in CI,
// which installs python3-numpy).
func numpyPython(t *testing.T) string {
	t.Helper()
	if exec.Command("/usr/bin/python3", "-c", "import numpy").Run() == nil {
		return "/usr/bin/python3"
	}
	if os.Getenv("CALCDOC_REQUIRE_BROWSER") == "1" {
		t.Fatal("/usr/bin/python3 with numpy is needed (apt-get install python3-numpy) and CALCDOC_REQUIRE_BROWSER=1")
	}
	t.Skip("no /usr/bin/python3 with numpy (apt-get install python3-numpy)")
	return ""
}

// meshNeighbours is the meshed feeder's topology written out again from
// the description in meshBranches' doc comment, not from its list: for
// node k of an n-node feeder, each neighbour (0 is the source) with the
// name of the impedance between them.
func meshNeighbours(n, k int) map[int]string {
	t := n / 5
	nb := map[int]string{}
	if k <= t { // trunk
		nb[k-1] = "Z_s"
		if k < t {
			nb[k+1] = "Z_s"
		}
		nb[t+4*(k-1)+1] = "Z_l"
		return nb
	}
	trunk, pos := (k-t-1)/4+1, (k-t-1)%4+1 // lateral of trunk node trunk, position 1 to 4
	if pos == 1 {
		nb[trunk] = "Z_l"
	} else {
		nb[k-1] = "Z_l"
	}
	if pos < 4 {
		nb[k+1] = "Z_l"
	} else {
		for a := 5; a+10 <= t; a += 20 { // ties (5, 15), (25, 35), ...
			end := func(tr int) int { return t + 4*tr }
			if trunk == a {
				nb[end(a+10)] = "Z_t"
			}
			if trunk == a+10 {
				nb[end(a)] = "Z_t"
			}
		}
	}
	return nb
}

// TestMeshKCL: the solved node voltages of the generated meshed feeder
// satisfy Kirchhoff's current law at every node (hand derivation: the
// currents leaving node k through its load, V_k/Z_p, and through each
// branch to a neighbour j, (V_k − V_j)/Z, sum to zero, V_0 = V_s being the
// source), with the neighbours taken from meshNeighbours.
func TestMeshKCL(t *testing.T) {
	for _, n := range []int{5, 100, 500} {
		t.Run(fmt.Sprintf("%d nodes", n), func(t *testing.T) {
			doc, _, err := Generate(Params{Statements: meshStatements, Nodes: n, Mesh: true})
			if err != nil {
				t.Fatal(err)
			}
			d := calcdoc.Parse("mesh.md", []byte(doc), kind.Standard())
			if len(d.Errors) > 0 {
				t.Fatal(d.Errors[0])
			}
			v, err := nodeVoltages(d, n)
			if err != nil {
				t.Fatal(err)
			}
			z := map[string]complex128{}
			for _, name := range []string{"V_s", "Z_s", "Z_l", "Z_t", "Z_p"} {
				z[name] = value(t, d, name)
			}
			volt := func(j int) complex128 {
				if j == 0 {
					return z["V_s"]
				}
				return v[j-1]
			}
			ties := 0
			for k := 1; k <= n; k++ {
				sum := volt(k) / z["Z_p"]
				scale := cmplx.Abs(sum)
				for j, name := range meshNeighbours(n, k) {
					i := (volt(k) - volt(j)) / z[name]
					sum += i
					scale += cmplx.Abs(i)
					if name == "Z_t" {
						ties++
					}
				}
				if cmplx.Abs(sum) > 1e-9*scale {
					t.Errorf("node %d: the currents leaving sum to %v A (of %g A)", k, sum, scale)
				}
			}
			if want := 2 * len(meshTies(n/5)); ties != want {
				t.Errorf("%d tie ends, want %d", ties, want)
			}
		})
	}
	if got := fmt.Sprint(meshTies(100)); got != "[[5 15] [25 35] [45 55] [65 75] [85 95]]" {
		t.Errorf("the ties of 500 nodes: %s", got)
	}
}

// TestMeshAgainstNumPy: the timing script's numpy.linalg.solve gives the
// node voltages calcdoc's solve block gives (within Tolerance), and its
// timing mode reports one time a run.
func TestMeshAgainstNumPy(t *testing.T) {
	py := numpyPython(t)
	const n = 100
	doc, _, err := Generate(Params{Statements: meshStatements, Nodes: n, Mesh: true})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "doc.md")
	if err := os.WriteFile(path, []byte(doc), 0o644); err != nil {
		t.Fatal(err)
	}
	d, size, _, err := inProcess(path, []byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	if size == 0 {
		t.Error("an empty sheet")
	}
	cd, err := nodeVoltages(d, n)
	if err != nil {
		t.Fatal(err)
	}
	script := filepath.Join(dir, "timing.py")
	if err := os.WriteFile(script, []byte(timingScript(n)), 0o644); err != nil {
		t.Fatal(err)
	}
	sol := filepath.Join(dir, "solution.json")
	if out, err := exec.Command(py, script, "solve", sol).CombinedOutput(); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	data, err := os.ReadFile(sol)
	if err != nil {
		t.Fatal(err)
	}
	np, err := ParseSolution(data)
	if err != nil {
		t.Fatal(err)
	}
	if len(np) != n {
		t.Fatalf("NumPy gives %d voltages, want %d", len(np), n)
	}
	for k := range cd {
		if !Close(cd[k], np[k]) {
			t.Errorf("V_%d: calcdoc %v, NumPy %v", k+1, cd[k], np[k])
		}
	}
	out, err := exec.Command(py, script, "time", "3").Output()
	if err != nil {
		t.Fatal(err)
	}
	ts, err := ParseTimes(out)
	if err != nil {
		t.Fatal(err)
	}
	if len(ts) != 3 {
		t.Errorf("%d times for 3 runs", len(ts))
	}
}

// TestParseScriptOutputs: the timing script's JSON is read exactly, and
// output that cannot be used is an error.
func TestParseScriptOutputs(t *testing.T) {
	v, err := ParseSolution([]byte(`{"V": [[6327.240655, -21.53805509], [0.5, 0.0]]}`))
	if err != nil || len(v) != 2 || v[0] != complex(6327.240655, -21.53805509) || v[1] != 0.5 {
		t.Errorf("ParseSolution = %v, %v", v, err)
	}
	ts, err := ParseTimes([]byte(`{"times": [0.0123, 0.0119, 0.0131]}` + "\n"))
	if err != nil || fmt.Sprint(ts) != "[0.0123 0.0119 0.0131]" {
		t.Errorf("ParseTimes = %v, %v", ts, err)
	}
	bad := map[string]func() error{
		"a solution that is not JSON":  func() error { _, err := ParseSolution([]byte("Traceback")); return err },
		"an empty solution":            func() error { _, err := ParseSolution([]byte(`{"V": []}`)); return err },
		"a value with one part":        func() error { _, err := ParseSolution([]byte(`{"V": [[1.0]]}`)); return err },
		"a value that is not a number": func() error { _, err := ParseSolution([]byte(`{"V": [[1.0, "nan"]]}`)); return err },
		"no times":                     func() error { _, err := ParseTimes([]byte(`{"times": []}`)); return err },
		"a time of zero":               func() error { _, err := ParseTimes([]byte(`{"times": [0.01, 0]}`)); return err },
		"a negative time":              func() error { _, err := ParseTimes([]byte(`{"times": [-0.01]}`)); return err },
		"times that are not JSON":      func() error { _, err := ParseTimes([]byte("12 ms")); return err },
	}
	for name, f := range bad {
		t.Run(name, func(t *testing.T) {
			if f() == nil {
				t.Error("no error")
			}
		})
	}
}

// TestWatchDoc: the watch document's edit changes only the last route
// length, and shows() reads the value from the result cell of its row
// whatever the number's digits after the point.
func TestWatchDoc(t *testing.T) {
	d, err := newWatchDoc(1000)
	if err != nil {
		t.Fatal(err)
	}
	a, b := d.edit(41), d.edit(42)
	if len(a) != len(b) || strings.Count(a, "\n") != strings.Count(d.src, "\n") {
		t.Fatal("the edit changes more than one number")
	}
	diff := 0
	for i := range a {
		if a[i] != b[i] {
			diff++
		}
	}
	if diff != 1 {
		t.Errorf("%d bytes differ between two edits, want 1", diff)
	}
	if !strings.Contains(a, d.name+" = 41 m") || strings.LastIndex(a, "```calc") > strings.Index(a, d.name+" = 41 m") {
		t.Errorf("the edited line %s = 41 m is not in the last calc block", d.name)
	}
	doc := calcdoc.Parse("w.md", []byte(a), kind.Standard())
	if len(doc.Errors) > 0 || len(doc.Values)+len(doc.Checks) != 1000 {
		t.Errorf("%d errors, %d values and checks; want none and 1000", len(doc.Errors), len(doc.Values)+len(doc.Checks))
	}
	row := func(v string) string {
		return `<div class="r" data-value="` + d.name + `" data-line="9"><math><mrow><mo>=</mo><mn>` + v + `</mn><mi>m</mi></mrow></math></div><div class="desc">route length 12</div>`
	}
	for _, c := range []struct {
		page string
		v    int
		want bool
	}{
		{row("41.00"), 41, true},
		{row("41"), 41, true},
		{row("41.50"), 41, false},
		{row("42.00"), 41, false},
		{row("141.0"), 41, false},
		{"<p>no row</p>", 41, false},
	} {
		if got := d.shows(c.page, c.v); got != c.want {
			t.Errorf("shows(%q, %d) = %v, want %v", c.page, c.v, got, c.want)
		}
	}
	for s := 0; s < 200; s++ {
		if editValue(s) == editValue(s+1) {
			t.Fatalf("saves %d and %d write the same value", s, s+1)
		}
	}
}

// buildCalcdoc builds the calcdoc command of this tree for a test.
func buildCalcdocBinary(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "calcdoc")
	if out, err := exec.Command("go", "build", "-o", bin, "calcdoc/cmd/calcdoc").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// TestWatchDriver runs the watch figure's driver against a real `calcdoc
// watch` child process on a small document, with both ways of saving:
// every save is seen through the event stream and shown by the patch the
// page's script fetches (never by a reload: the version before is always
// the one shown), one latency and one whole-page GET a timed save.
func TestWatchDriver(t *testing.T) {
	if testing.Short() {
		t.Skip("builds calcdoc and runs calcdoc watch")
	}
	bin := buildCalcdocBinary(t)
	d, err := newWatchDoc(60)
	if err != nil {
		t.Fatal(err)
	}
	for _, how := range []string{"atomic", "inplace"} {
		t.Run(how, func(t *testing.T) {
			r, err := runWatch(bin, t.TempDir(), d, 3, how, time.Minute)
			if err != nil {
				t.Fatal(err)
			}
			if len(r.lat) != 3 || len(r.full) != 3 || len(r.writes) != 3 || r.events < 3 || r.statements != 60 {
				t.Errorf("%d latencies, %d page GETs, %d writes, %d events, %d statements; want 3, 3, 3, at least 3, 60", len(r.lat), len(r.full), len(r.writes), r.events, r.statements)
			}
			for i := range r.writes {
				if !(r.writes[i] > 0 && r.writes[i] <= r.lat[i]) {
					t.Errorf("save %d: writing took %v of a latency of %v", i, r.writes[i], r.lat[i])
				}
			}
			if r.reloads != 0 || r.pageBytes == 0 {
				t.Errorf("%d reloads, a page of %d bytes; want none, and the page", r.reloads, r.pageBytes)
			}
			for i, l := range r.lat {
				if !(l > 0) || !(r.full[i] > 0) {
					t.Errorf("save %d: latency %v, page GET %v", i, l, r.full[i])
				}
			}
		})
	}
	// a folder calcdoc cannot watch is an error, not a hang
	if _, err := startWatch(bin, filepath.Join(t.TempDir(), "missing"), time.Minute); err == nil {
		t.Error("no error for a missing folder")
	}
}

// TestSummary: the summary table and its Markdown rows hold every target
// with its goal, measurement, ratio, verdict, load and command, and cells
// that hold a | stay one cell.
func TestSummary(t *testing.T) {
	ts := []target{
		{fig: "4", what: "watch p95, 1,000 statements", goal: "≤ 50 ms", measured: "p50 20 ms, p95 31 ms", ratio: "—", verdict: verdict(true), load: loadSpan("1.10 1.00 0.90", "1.30 1.00 0.90"), command: figureCommand("4")},
		{fig: "1", what: "2,000 statements | 60 nodes", goal: "≤ 0.15 (aim 0.1)", measured: "calcdoc 62.5 ms, script 232 ms", ratio: "0.269", verdict: verdict(false), load: loadSpan("2.00", ""), command: figureCommand("1")},
	}
	sortTargets(ts)
	if ts[0].fig != "1" {
		t.Fatalf("not in figure order: %v", ts)
	}
	var plain, md bytes.Buffer
	if err := writeSummary(&plain, ts); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(plain.String()), "\n")
	if len(lines) != 3 || !strings.HasPrefix(lines[0], "figure") {
		t.Fatalf("summary:\n%s", plain.String())
	}
	for _, want := range []string{"0.269", "MISSED", "2.00 → unknown", "met", "1.10 → 1.30", "p95 31 ms"} {
		if !strings.Contains(plain.String(), want) {
			t.Errorf("the summary lacks %q:\n%s", want, plain.String())
		}
	}
	if err := writeMarkdown(&md, ts); err != nil {
		t.Fatal(err)
	}
	rows := strings.Split(strings.TrimSpace(md.String()), "\n")
	if len(rows) != 4 {
		t.Fatalf("Markdown:\n%s", md.String())
	}
	cell := regexp.MustCompile(`(?:[^|\\]|\\.)+`)
	for i, r := range rows {
		if !strings.HasPrefix(r, "| ") || !strings.HasSuffix(r, " |") {
			t.Errorf("row %d is not a table row: %s", i, r)
		}
		if n := len(cell.FindAllString(strings.Trim(r, "|"), -1)); n != 8 {
			t.Errorf("row %d has %d cells, want 8: %s", i, n, r)
		}
	}
	if !strings.Contains(rows[2], "**missed**") || !strings.Contains(rows[2], "`go run ./cmd/calcbench -figures 1`") || !strings.Contains(rows[2], `2,000 statements \| 60 nodes`) {
		t.Errorf("figure 1's row: %s", rows[2])
	}
	for n, want := range map[int]string{0: "0", 999: "999", 1000: "1,000", 20000: "20,000", 1234567: "1,234,567"} {
		if got := thousands(n); got != want {
			t.Errorf("thousands(%d) = %q, want %q", n, got, want)
		}
	}
}
