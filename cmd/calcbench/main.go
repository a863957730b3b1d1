// Command calcbench measures calcdoc against issue 20's targets, side by
// side in one run with the program an engineer would write instead: a
// Python script with NumPy doing the same arithmetic and the same network
// solve and writing an HTML table of the results.
//
//	go run ./cmd/calcbench [flags]
//
// It builds the calcdoc binary from this tree once (go build, into a
// temporary folder) and generates calculation documents and their Python
// twins from the same parameters (see Generate). Before timing a pair it
// checks that the two give the same values and check results (every
// value, from `calcdoc values` JSON and from the script's table, within
// a relative 1e-9). Whole processes are timed alternating (calcdoc,
// script, calcdoc, script, ...) after one untimed run of each. Every
// figure gives medians, and the load average at its start and end. The
// figures (select with -figures):
//
//  1. -statements statements with a -nodes node ladder solve: `calcdoc
//     build` against the script, ratio of the medians (goal 0.15 or less,
//     aim 0.1);
//  2. the same at -large statements (goal 0.3 or less);
//  3. a -mesh-nodes meshed feeder solve (meshBranches): calcdoc's
//     in-process time to parse, evaluate and draw its sheet against
//     numpy.linalg.solve of the same dense complex system timed inside
//     Python, medians of -solve-runs, the two solutions compared first
//     (goal 3 or less); both whole processes reported beside it;
//  4. `calcdoc watch` save-to-page latency at each of -watch-sizes
//     statements, an edit in the last block, -saves saves, each until the
//     patch the page's script fetches shows it: p50, p95, max (goal p95
//     50 ms at 1,000 statements, 80 ms at 10,000), and a GET of the whole
//     page for information;
//  5. the peak memory (max RSS) of `calcdoc build` at -large statements,
//     from figure 2's runs (goal 80 MB or less).
//
// The report ends with one summary table: figure, goal, measured, ratio,
// met or missed, load; -markdown prints it as Markdown table rows for
// docs/performance.md.
//
// Flags:
//
//	-figures LIST      the figures to measure (default 1,2,3,4,5)
//	-runs N            timed alternations of whole processes (default 15)
//	-statements N      statements of figure 1's document (default 2000)
//	-nodes N           nodes of its ladder (default 60; figure 2's too)
//	-large N           statements of figures 2 and 5 (default 20000)
//	-mesh-nodes N      nodes of figure 3's meshed feeder (default 500, a multiple of 5)
//	-solve-runs N      in-process runs of figure 3, each side (default 21)
//	-watch-sizes LIST  statement counts of figure 4 (default 1000,10000)
//	-saves N           timed saves of figure 4 at each size (default 40)
//	-watch-write HOW   how figure 4 saves: atomic (a new file renamed over) or inplace
//	-scaling LIST      also: statement scaling runs at these counts (default none)
//	-solve-nodes LIST  also: the ladder alone at these node counts (default none)
//	-markdown          print the summary as Markdown table rows too
//	-python PATH       the Python with NumPy (default /usr/bin/python3)
//	-calcdoc PATH      time this calcdoc binary instead of building one
//	-keep DIR          write the documents, scripts and outputs into DIR and keep them
//	-timeout D         longest time one child process or one save may take (default 5m)
//
// The scripts need Python 3 with NumPy; on Debian, apt-get install
// python3-numpy (which gives /usr/bin/python3 its numpy).
//
// Exit status: 0 when every figure was measured (whether or not it meets
// its goal: the report says); 1 when the two programs disagree on a value
// or a check; 2 for a usage error; 3 when a program cannot be built or
// run.
package main

import (
	"bytes"
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"
)

const (
	exitOK       = 0
	exitMismatch = 1
	exitUsage    = 2
	exitError    = 3
)

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }

// options are the parsed flags.
type options struct {
	figures           map[int]bool
	runs              int
	statements, nodes int
	large             int
	meshNodes         int
	solveRuns         int
	watchSizes        []int
	saves             int
	watchWrite        string
	scaling           []int
	solveNodes        []int
	markdown          bool
	python, calcdoc   string
	keep              string
	timeout           time.Duration
}

// parseList reads a comma-separated list of positive integers; "" is the
// empty list.
func parseList(s string) ([]int, error) {
	var out []int
	for _, f := range strings.Split(s, ",") {
		f = strings.TrimSpace(f)
		if f == "" {
			continue
		}
		n, err := strconv.Atoi(f)
		if err != nil || n <= 0 {
			return nil, fmt.Errorf("%q is not a positive whole number", f)
		}
		out = append(out, n)
	}
	return out, nil
}

func parseOptions(args []string, stderr io.Writer) (*options, error) {
	fs := flag.NewFlagSet("calcbench", flag.ContinueOnError)
	fs.SetOutput(stderr)
	o := &options{}
	var figures, watchSizes, scaling, solveNodes string
	fs.StringVar(&figures, "figures", "1,2,3,4,5", "the figures to measure, comma-separated")
	fs.IntVar(&o.runs, "runs", 15, "timed alternations of whole processes")
	fs.IntVar(&o.statements, "statements", 2000, "statements of figure 1's document")
	fs.IntVar(&o.nodes, "nodes", 60, "nodes of its ladder solve (figure 2's too)")
	fs.IntVar(&o.large, "large", 20000, "statements of figures 2 and 5")
	fs.IntVar(&o.meshNodes, "mesh-nodes", 500, "nodes of figure 3's meshed feeder (a multiple of 5)")
	fs.IntVar(&o.solveRuns, "solve-runs", 21, "in-process runs of figure 3, each side")
	fs.StringVar(&watchSizes, "watch-sizes", "1000,10000", "statement counts of figure 4")
	fs.IntVar(&o.saves, "saves", 40, "timed saves of figure 4 at each size")
	fs.StringVar(&o.watchWrite, "watch-write", "atomic", "how figure 4 saves: atomic (a new file renamed over the old) or inplace")
	fs.StringVar(&scaling, "scaling", "", "also: statement counts for scaling runs, each with the -nodes ladder")
	fs.StringVar(&solveNodes, "solve-nodes", "", "also: node counts for runs of the ladder alone")
	fs.BoolVar(&o.markdown, "markdown", false, "print the summary as Markdown table rows too")
	fs.StringVar(&o.python, "python", "/usr/bin/python3", "the Python with NumPy")
	fs.StringVar(&o.calcdoc, "calcdoc", "", "time this calcdoc binary instead of building one")
	fs.StringVar(&o.keep, "keep", "", "write the generated files into this folder and keep them")
	fs.DurationVar(&o.timeout, "timeout", 5*time.Minute, "longest time one child process or one save may take")
	if err := fs.Parse(args); err != nil {
		return nil, err
	}
	if fs.NArg() > 0 {
		return nil, fmt.Errorf("unexpected argument %q", fs.Arg(0))
	}
	figs, err := parseList(figures)
	if err != nil {
		return nil, fmt.Errorf("-figures: %v", err)
	}
	o.figures = map[int]bool{}
	for _, f := range figs {
		if f > 5 {
			return nil, fmt.Errorf("-figures: there is no figure %d (1 to 5)", f)
		}
		o.figures[f] = true
	}
	if o.watchSizes, err = parseList(watchSizes); err != nil {
		return nil, fmt.Errorf("-watch-sizes: %v", err)
	}
	if o.scaling, err = parseList(scaling); err != nil {
		return nil, fmt.Errorf("-scaling: %v", err)
	}
	if o.solveNodes, err = parseList(solveNodes); err != nil {
		return nil, fmt.Errorf("-solve-nodes: %v", err)
	}
	switch {
	case len(o.figures) == 0 && len(o.scaling) == 0 && len(o.solveNodes) == 0:
		return nil, errors.New("-figures: nothing to measure")
	case o.runs < 1:
		return nil, fmt.Errorf("-runs %d: at least 1", o.runs)
	case o.solveRuns < 1:
		return nil, fmt.Errorf("-solve-runs %d: at least 1", o.solveRuns)
	case o.saves < 1:
		return nil, fmt.Errorf("-saves %d: at least 1", o.saves)
	case o.watchWrite != "atomic" && o.watchWrite != "inplace":
		return nil, fmt.Errorf("-watch-write %q: atomic or inplace", o.watchWrite)
	case o.timeout <= 0:
		return nil, fmt.Errorf("-timeout %v: must be positive", o.timeout)
	}
	// every document must be one the generator can write
	check := []Params{{Statements: o.statements, Nodes: o.nodes}, {Statements: o.large, Nodes: o.nodes},
		{Statements: meshStatements, Nodes: o.meshNodes, Mesh: true}}
	for _, s := range o.scaling {
		check = append(check, Params{Statements: s, Nodes: o.nodes})
	}
	for _, n := range o.solveNodes {
		check = append(check, Params{Statements: ladderStatements, Nodes: n})
	}
	for _, s := range o.watchSizes {
		if s <= headerStatements {
			return nil, fmt.Errorf("-watch-sizes %d: a watch document needs more than %d statements", s, headerStatements)
		}
		check = append(check, Params{Statements: s})
	}
	for _, p := range check {
		if err := p.Validate(); err != nil {
			return nil, err
		}
	}
	return o, nil
}

// config is one generated calculation on disk.
type config struct {
	p                     Params
	dir, doc, script      string
	sheet, table          string // the outputs
	calcdocCmd, pythonCmd []string
}

// bench runs the children.
type bench struct {
	o       *options
	calcdoc string
	work    string
	out     io.Writer
	log     io.Writer
}

// errMismatch marks a disagreement between the two programs.
var errMismatch = errors.New("the two programs disagree")

func run(args []string, stdout, stderr io.Writer) int {
	o, err := parseOptions(args, stderr)
	if err != nil {
		if !errors.Is(err, flag.ErrHelp) {
			fmt.Fprintf(stderr, "calcbench: %v\n", err)
		}
		return exitUsage
	}
	b := &bench{o: o, out: stdout, log: stderr}
	if err := b.main(); err != nil {
		fmt.Fprintf(stderr, "calcbench: %v\n", err)
		if errors.Is(err, errMismatch) {
			return exitMismatch
		}
		return exitError
	}
	return exitOK
}

func (b *bench) main() error {
	o := b.o
	if o.keep != "" {
		if err := os.MkdirAll(o.keep, 0o755); err != nil {
			return err
		}
		b.work = o.keep
	} else {
		d, err := os.MkdirTemp("", "calcbench-")
		if err != nil {
			return err
		}
		defer os.RemoveAll(d)
		b.work = d
	}
	pyv, err := b.pythonVersion()
	if err != nil {
		return err
	}
	if err := b.buildCalcdoc(); err != nil {
		return err
	}
	cdv, _, err := b.capture(b.calcdoc, "version")
	if err != nil {
		return fmt.Errorf("%s version: %v", b.calcdoc, err)
	}
	fmt.Fprintf(b.out, "calcbench %s; %s/%s, %d CPUs; %s (%s); Python %s\n",
		time.Now().UTC().Format("2006-01-02 15:04 UTC"), runtime.GOOS, runtime.GOARCH, runtime.NumCPU(),
		strings.TrimSpace(string(cdv)), runtime.Version(), pyv)
	fmt.Fprintf(b.out, "whole processes: %d timed alternations (calcdoc, script, calcdoc, script, ...) after one untimed run of each, wall time\n", o.runs)
	built := "built by calcbench with CGO_ENABLED=0, as the README installs it"
	if b.o.calcdoc != "" {
		built = "given by -calcdoc"
	}
	fmt.Fprintf(b.out, "calcdoc: %s build -o sheet.html doc.md (%s); script: %s script.py table.html\n", b.calcdoc, built, o.python)
	var targets []target
	if o.figures[1] {
		t, err := b.figure1()
		if err != nil {
			return err
		}
		targets = append(targets, t)
	}
	if o.figures[2] || o.figures[5] {
		ts, err := b.figure2and5()
		if err != nil {
			return err
		}
		targets = append(targets, ts...)
	}
	if o.figures[3] {
		t, err := b.figure3()
		if err != nil {
			return err
		}
		targets = append(targets, t)
	}
	if o.figures[4] {
		ts, err := b.figure4()
		if err != nil {
			return err
		}
		targets = append(targets, ts...)
	}
	if err := b.extras(); err != nil {
		return err
	}
	sortTargets(targets)
	if len(targets) > 0 {
		fmt.Fprintf(b.out, "\nSummary (issue 20's targets; load: the 1-minute load average at the start and at the end of each figure)\n")
		if err := writeSummary(b.out, targets); err != nil {
			return err
		}
		if o.markdown {
			fmt.Fprintln(b.out)
			if err := writeMarkdown(b.out, targets); err != nil {
				return err
			}
		}
	}
	if o.keep != "" {
		fmt.Fprintf(b.out, "\nthe documents, scripts and outputs are in %s\n", o.keep)
	}
	return nil
}

// pythonProbe prints Python's and NumPy's versions and, where
// /proc/self/maps shows them (Linux), the BLAS and LAPACK libraries NumPy
// loaded: numpy.linalg.solve's speed depends on them.
const pythonProbe = `import sys, numpy, numpy.linalg
libs = []
try:
    with open("/proc/self/maps") as f:
        libs = sorted({l.split()[-1] for l in f if "blas" in l.lower() or "lapack" in l.lower()})
except OSError:
    pass
print(sys.version.split()[0], "with NumPy", numpy.__version__, "(" + (", ".join(libs) or "BLAS not seen") + ")")
`

// pythonVersion confirms that the Python has NumPy and returns both
// versions and NumPy's BLAS and LAPACK libraries.
func (b *bench) pythonVersion() (string, error) {
	out, stderr, err := b.capture(b.o.python, "-c", pythonProbe)
	if err != nil {
		return "", fmt.Errorf("the script needs Python 3 with NumPy at %s (on Debian: apt-get install python3-numpy), or give -python PATH: %v\n%s", b.o.python, err, stderr)
	}
	return strings.TrimSpace(string(out)), nil
}

// buildCalcdoc builds the calcdoc binary of this tree into the work
// folder, unless -calcdoc names one.
func (b *bench) buildCalcdoc() error {
	if b.o.calcdoc != "" {
		p, err := filepath.Abs(b.o.calcdoc)
		if err != nil {
			return err
		}
		b.calcdoc = p
		return nil
	}
	bin := filepath.Join(b.work, "calcdoc")
	if runtime.GOOS == "windows" {
		bin += ".exe"
	}
	// as the README installs it: a static binary (no cgo), which starts
	// without the dynamic loader and runs wherever it is copied
	cmd := exec.Command("go", "build", "-o", bin, "calcdoc/cmd/calcdoc")
	cmd.Env = append(os.Environ(), "CGO_ENABLED=0")
	if out, err := cmd.CombinedOutput(); err != nil {
		return fmt.Errorf("go build calcdoc/cmd/calcdoc (run calcbench inside the repository, or give -calcdoc PATH): %v\n%s", err, out)
	}
	b.calcdoc = bin
	return nil
}

// prepare writes the document and the script of p into their own folder.
func (b *bench) prepare(name string, p Params) (*config, error) {
	doc, script, err := Generate(p)
	if err != nil {
		return nil, err
	}
	dir := filepath.Join(b.work, name)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	c := &config{p: p, dir: dir,
		doc: filepath.Join(dir, "doc.md"), script: filepath.Join(dir, "script.py"),
		sheet: filepath.Join(dir, "sheet.html"), table: filepath.Join(dir, "table.html")}
	if err := os.WriteFile(c.doc, []byte(doc), 0o644); err != nil {
		return nil, err
	}
	if err := os.WriteFile(c.script, []byte(script), 0o644); err != nil {
		return nil, err
	}
	c.calcdocCmd = []string{b.calcdoc, "build", "-o", c.sheet, c.doc}
	c.pythonCmd = []string{b.o.python, c.script, c.table}
	return c, nil
}

// verify runs `calcdoc values` on the document and the script once, and
// compares every value and every check result.
func (b *bench) verify(c *config) error {
	js, stderr, err := b.capture(b.calcdoc, "values", c.doc)
	if err != nil && exitCode(err) != 1 { // 1: a check fails, still compared
		return fmt.Errorf("calcdoc values %s: %v\n%s", c.doc, err, stderr)
	}
	cd, err := ParseValuesJSON(js)
	if err != nil {
		return fmt.Errorf("%s: %v", c.doc, err)
	}
	if _, stderr, err := b.capture(c.pythonCmd[0], c.pythonCmd[1:]...); err != nil {
		return fmt.Errorf("%s: %v\n%s", c.script, err, stderr)
	}
	data, err := os.ReadFile(c.table)
	if err != nil {
		return err
	}
	py, err := ParseScriptHTML(data)
	if err != nil {
		return fmt.Errorf("%s: %v", c.script, err)
	}
	if diffs := Compare(cd, py, 10); len(diffs) > 0 {
		fmt.Fprintf(b.out, "   the two programs disagree on %s:\n", c.doc)
		for _, d := range diffs {
			fmt.Fprintf(b.out, "     %s\n", d)
		}
		return errMismatch
	}
	want := c.p.Statements + c.p.Nodes
	if got := len(cd.Values) + len(cd.Checks); got != want {
		return fmt.Errorf("%s: %d values and %d checks, want %d statements and %d unknowns in all", c.doc, len(cd.Values), len(cd.Checks), c.p.Statements, c.p.Nodes)
	}
	names := []string{"I_f1", "S_1"}
	if c.p.Nodes > 0 {
		names = append(names, fmt.Sprintf("V_%d", c.p.Nodes), "I_in")
	}
	fmt.Fprintf(b.out, "   %s statements, %d nodes: both give the same %s and %s (within %.0e relative); in SI units, e.g.\n     calcdoc: %s\n     script:  %s\n",
		thousands(c.p.Statements), c.p.Nodes, plural(len(cd.Values), "value"), plural(len(cd.Checks), "check result"), Tolerance, pick(cd, names...), pick(py, names...))
	return nil
}

// measure runs every configuration's calcdoc build and its script,
// alternating, once untimed and then -runs times; it
// returns the samples and the load averages at the start and at the end.
func (b *bench) measure(cfgs []*config) (cd, py []series, loads [2]string, err error) {
	cd, py = make([]series, len(cfgs)), make([]series, len(cfgs))
	loads[0] = loadAverage()
	for round := -1; round < b.o.runs; round++ {
		for i, c := range cfgs {
			s, err := b.timed(c.calcdocCmd, true)
			if err != nil {
				return nil, nil, loads, err
			}
			if round >= 0 {
				cd[i] = append(cd[i], s)
			}
			s, err = b.timed(c.pythonCmd, false)
			if err != nil {
				return nil, nil, loads, err
			}
			if round >= 0 {
				py[i] = append(py[i], s)
			}
		}
		fmt.Fprint(b.log, ".")
	}
	fmt.Fprintln(b.log)
	loads[1] = loadAverage()
	return cd, py, loads, nil
}

// timed runs one child and measures it. calcdoc's exit status 1 (a check
// fails) is accepted; any other failure is an error.
func (b *bench) timed(argv []string, isCalcdoc bool) (sample, error) {
	ctx, cancel := context.WithTimeout(context.Background(), b.o.timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, argv[0], argv[1:]...)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	start := time.Now()
	err := cmd.Run()
	wall := time.Since(start)
	if err != nil && !(isCalcdoc && exitCode(err) == 1) {
		return sample{}, fmt.Errorf("%s: %v\n%s", strings.Join(argv, " "), err, stderr.Bytes())
	}
	ps := cmd.ProcessState
	return sample{wall: wall, cpu: ps.UserTime() + ps.SystemTime(), rss: maxRSS(ps)}, nil
}

// capture runs a child untimed and returns its output.
func (b *bench) capture(name string, args ...string) (stdout, stderr []byte, err error) {
	ctx, cancel := context.WithTimeout(context.Background(), b.o.timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, name, args...)
	var so, se bytes.Buffer
	cmd.Stdout, cmd.Stderr = &so, &se
	err = cmd.Run()
	return so.Bytes(), se.Bytes(), err
}

func exitCode(err error) int {
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		return ee.ExitCode()
	}
	return -1
}

func (b *bench) reportScaling(cfgs []*config, cd, py []series, loads [2]string, what string, size func(*config) int) error {
	fmt.Fprintf(b.out, "   load average (1, 5, 15 min): %s at the start, %s at the end\n", loads[0], loads[1])
	tw := tabwriter.NewWriter(b.out, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "   \t%s\tcalcdoc median\tquartiles\tper %s\tmax RSS (peak)\tscript median\tratio\t\n", what, strings.TrimSuffix(what, "s"))
	for i, c := range cfgs {
		s, err := summarize(cd[i])
		if err != nil {
			return err
		}
		p, err := summarize(py[i])
		if err != nil {
			return err
		}
		n := size(c)
		fmt.Fprintf(tw, "   \t%d\t%s\t%s to %s\t%.1f µs\t%s\t%s\t%.3f\t\n", n, ms(s.median), ms(s.q1), ms(s.q3),
			s.median/float64(n)*1e6, mb(s.rssPeak), ms(p.median), s.median/p.median)
	}
	return tw.Flush()
}

func plural(n int, what string) string {
	if n == 1 {
		return "1 " + what
	}
	return thousands(n) + " " + what + "s"
}

func contains(xs []int, x int) bool { return indexOf(xs, x) >= 0 }

func indexOf(xs []int, x int) int {
	for i, y := range xs {
		if y == x {
			return i
		}
	}
	return -1
}

func sortedCopy(xs []int) []int {
	s := append([]int(nil), xs...)
	sort.Ints(s)
	return s
}

// dedup removes repeats from a sorted list.
func dedup(xs []int) []int {
	var out []int
	for i, x := range xs {
		if i == 0 || x != xs[i-1] {
			out = append(out, x)
		}
	}
	return out
}

func joinInts(xs []int) string {
	s := make([]string, len(xs))
	for i, x := range xs {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, ", ")
}
