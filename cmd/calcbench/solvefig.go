package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"time"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/build"
	"calcdoc/expr"
)

// Figure 3 sets calcdoc's in-process time for the meshed feeder's
// document (parse, evaluate and draw the sheet, as `calcdoc build` does
// before it stamps and writes) against NumPy's numpy.linalg.solve of the
// same dense complex system, timed inside Python with time.perf_counter.
// The timing script builds the matrix from the same branch list as the
// document's equations (meshMatrixPy); its solution is compared with
// calcdoc's node voltages before either is timed.

// timingScript is the Python that times numpy.linalg.solve of the meshed
// feeder's nodal system. Run as
//
//	python3 timing.py solve OUT.json   the solution, as {"V": [[re, im], ...]}
//	python3 timing.py time RUNS        {"times": [seconds, ...]}: RUNS solves after one untimed
func timingScript(nodes int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "#!/usr/bin/python3\n# Written by calcbench (cmd/calcbench): numpy.linalg.solve of the %d-node meshed\n# feeder's nodal admittance system, the system of its document's solve block.\n", nodes)
	b.WriteString("import json\nimport math\nimport sys\nimport time\n\nimport numpy as np\n\n")
	for _, s := range meshParams {
		b.WriteString(s.py + "\n")
	}
	b.WriteString(meshMatrixPy(nodes))
	b.WriteString(`
if sys.argv[1] == "solve":
    V = np.linalg.solve(Y, b)
    with open(sys.argv[2], "w") as f:
        json.dump({"V": [[v.real, v.imag] for v in V]}, f)
else:
    runs = int(sys.argv[2])
    np.linalg.solve(Y, b)
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        V = np.linalg.solve(Y, b)
        times.append(time.perf_counter() - t0)
    print(json.dumps({"times": times}))
`)
	return b.String()
}

// ParseSolution reads the timing script's solution file.
func ParseSolution(data []byte) ([]complex128, error) {
	var v struct{ V [][]float64 }
	if err := json.Unmarshal(data, &v); err != nil {
		return nil, fmt.Errorf("timing script's solution: %v", err)
	}
	out := make([]complex128, len(v.V))
	for i, p := range v.V {
		if len(p) != 2 || !finite(p[0]) || !finite(p[1]) {
			return nil, fmt.Errorf("timing script's solution: V_%d is not a finite complex number (%v)", i+1, p)
		}
		out[i] = complex(p[0], p[1])
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("timing script's solution: no values")
	}
	return out, nil
}

// ParseTimes reads the timing script's times: seconds, each positive and
// finite.
func ParseTimes(data []byte) ([]float64, error) {
	var v struct{ Times []float64 }
	if err := json.Unmarshal(data, &v); err != nil {
		return nil, fmt.Errorf("timing script's times: %v", err)
	}
	if len(v.Times) == 0 {
		return nil, fmt.Errorf("timing script's times: none")
	}
	for i, t := range v.Times {
		if !finite(t) || t <= 0 {
			return nil, fmt.Errorf("timing script's times: run %d took %v s", i+1, t)
		}
	}
	return v.Times, nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// nodeVoltages returns V_1 ... V_n of an evaluated document.
func nodeVoltages(doc *calcdoc.Document, n int) ([]complex128, error) {
	byName := map[string]complex128{}
	for _, v := range doc.Values {
		if s, ok := v.Value.(*expr.Scalar); ok {
			byName[v.Name] = s.Z
		}
	}
	out := make([]complex128, n)
	for k := 1; k <= n; k++ {
		z, ok := byName[fmt.Sprintf("V_%d", k)]
		if !ok {
			return nil, fmt.Errorf("calcdoc has no value V_%d", k)
		}
		out[k-1] = z
	}
	return out, nil
}

// inProcess parses, evaluates and draws the document at path once, and
// returns the evaluated document, the sheet's size and the time taken.
// The garbage of earlier runs is collected first.
func inProcess(path string, src []byte) (*calcdoc.Document, int, time.Duration, error) {
	runtime.GC()
	start := time.Now()
	doc := calcdoc.Parse(path, src, kind.Standard())
	page, err := build.Sheet(doc, build.Options{Version: "calcbench"})
	took := time.Since(start)
	if err != nil {
		return nil, 0, 0, fmt.Errorf("%s: the sheet cannot be drawn: %v", path, err)
	}
	if len(doc.Errors) > 0 {
		return nil, 0, 0, fmt.Errorf("%s: %v", path, doc.Errors[0])
	}
	return doc, len(page), took, nil
}

// solveRounds is the number of alternating rounds of figure 3's
// in-process timings.
const solveRounds = 3

// solveResult is what figure 3 measured.
type solveResult struct {
	nodes              int
	calcdoc, numpy     []float64 // seconds: in-process runs, NumPy solves
	sheetBytes         int
	whole              *pairResult // whole processes: calcdoc build and the script
	loadStart, loadEnd string
	maxRel             float64 // largest relative difference of the two solutions
}

// solveFigure measures figure 3 on a meshed feeder of n nodes.
func (b *bench) solveFigure(n int) (*solveResult, error) {
	res := &solveResult{nodes: n}
	c, err := b.prepare(fmt.Sprintf("mesh-%d", n), Params{Statements: meshStatements, Nodes: n, Mesh: true})
	if err != nil {
		return nil, err
	}
	if err := b.verify(c); err != nil {
		return nil, err
	}
	timing := filepath.Join(c.dir, "timing.py")
	if err := os.WriteFile(timing, []byte(timingScript(n)), 0o644); err != nil {
		return nil, err
	}
	src, err := os.ReadFile(c.doc)
	if err != nil {
		return nil, err
	}
	// the same system: NumPy's solution against calcdoc's, before timing
	doc, size, _, err := inProcess(c.doc, src)
	if err != nil {
		return nil, err
	}
	res.sheetBytes = size
	cd, err := nodeVoltages(doc, n)
	if err != nil {
		return nil, err
	}
	solPath := filepath.Join(c.dir, "numpy-solution.json")
	if _, stderr, err := b.capture(b.o.python, timing, "solve", solPath); err != nil {
		return nil, fmt.Errorf("%s solve: %v\n%s", timing, err, stderr)
	}
	data, err := os.ReadFile(solPath)
	if err != nil {
		return nil, err
	}
	np, err := ParseSolution(data)
	if err != nil {
		return nil, err
	}
	if len(np) != n {
		return nil, fmt.Errorf("%s: %d node voltages, want %d", timing, len(np), n)
	}
	for k := range cd {
		if !Close(cd[k], np[k]) {
			fmt.Fprintf(b.out, "   calcdoc and numpy.linalg.solve disagree: V_%d = %v against %v (relative difference %.3g)\n", k+1, cd[k], np[k], relDiff(cd[k], np[k]))
			return nil, errMismatch
		}
		res.maxRel = math.Max(res.maxRel, relDiff(cd[k], np[k]))
	}
	res.loadStart = loadAverage()
	// whole processes, alternating, as figure 1
	cds, pys, loads, err := b.measure([]*config{c})
	if err != nil {
		return nil, err
	}
	res.whole = &pairResult{cd: cds[0], py: pys[0], loads: loads}
	// in process and in Python, in alternating rounds so that a change of
	// the machine's load falls on both: one untimed run of calcdoc, then
	// each round's share of -solve-runs of each
	if _, _, _, err := inProcess(c.doc, src); err != nil {
		return nil, err
	}
	per := (b.o.solveRuns + solveRounds - 1) / solveRounds
	for r := 0; r < solveRounds; r++ {
		for i := 0; i < per; i++ {
			_, _, took, err := inProcess(c.doc, src)
			if err != nil {
				return nil, err
			}
			res.calcdoc = append(res.calcdoc, took.Seconds())
		}
		out, stderr, err := b.capture(b.o.python, timing, "time", fmt.Sprint(per))
		if err != nil {
			return nil, fmt.Errorf("%s time: %v\n%s", timing, err, stderr)
		}
		ts, err := ParseTimes(out)
		if err != nil {
			return nil, err
		}
		res.numpy = append(res.numpy, ts...)
	}
	res.loadEnd = loadAverage()
	return res, nil
}
