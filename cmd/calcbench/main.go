// Command calcbench measures calcdoc against the program an engineer
// would write instead: a Python script with NumPy doing the same
// arithmetic and the same network solve and writing an HTML table of the
// results.
//
//	go run ./cmd/calcbench [flags]
//
// It builds the calcdoc binary from this tree once (go build, into a
// temporary folder), generates a calculation document and its Python
// twin from the same parameters (see Generate), checks that the two give
// the same values and check results (every value, from `calcdoc values`
// JSON and from the script's table, within a relative 1e-9), and then
// times both as whole processes, alternating them (calcdoc, script,
// calcdoc, script, ...) after one untimed warm-up run of each. It reports
// the medians, the quartiles, the median CPU time, the peak resident set
// size and the ratio of the medians, with the load average before and
// after each figure. It does, in order:
//
//  1. the comparison: -statements statements with a -nodes node ladder;
//  2. statement scaling: the same document at each count of -scaling (and
//     at -memory), and the ratio of the largest count's time to the
//     smallest's;
//  3. peak memory: the largest RSS of `calcdoc build` at -memory
//     statements;
//  4. solve scaling: the ladder alone at each node count of -solve-nodes.
//
// Flags:
//
//	-runs N            timed alternations per figure (default 15)
//	-compare=false     skip the comparison (figure 1)
//	-statements N      statements of the comparison document (default 2000)
//	-nodes N           nodes of its ladder solve (default 60)
//	-scaling LIST      statement counts for the scaling runs, comma-separated
//	                   (default 2000,5000,10000,20000; "" to skip)
//	-solve-nodes LIST  node counts for the solve runs (default 60,120,300; "" to skip)
//	-memory N          statements at which peak memory is reported (default 20000; 0 to skip)
//	-python PATH       the Python with NumPy (default /usr/bin/python3)
//	-calcdoc PATH      time this calcdoc binary instead of building one
//	-keep DIR          write the documents, scripts and outputs into DIR and keep them
//	-timeout D         longest time one child process may take (default 5m)
//
// The script needs Python 3 with NumPy; on Debian, apt-get install
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

// Goals (issue 9).
const (
	goalRatio     = 0.25 // calcdoc's median time over the script's, at most
	aimRatio      = 0.1
	goalLinearity = 1.1   // time ratio over count ratio, at most (11 for 2,000 to 20,000)
	goalMemory    = 200e6 // bytes of peak RSS at -memory statements, at most
)

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }

// options are the parsed flags.
type options struct {
	runs              int
	compare           bool
	statements, nodes int
	scaling           []int
	solveNodes        []int
	memory            int
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
	var scaling, solveNodes string
	fs.IntVar(&o.runs, "runs", 15, "timed alternations per figure")
	fs.BoolVar(&o.compare, "compare", true, "run the comparison (false: only the scaling, memory and solve figures)")
	fs.IntVar(&o.statements, "statements", 2000, "statements of the comparison document")
	fs.IntVar(&o.nodes, "nodes", 60, "nodes of its ladder solve")
	fs.StringVar(&scaling, "scaling", "2000,5000,10000,20000", "statement counts for the scaling runs (\"\" to skip)")
	fs.StringVar(&solveNodes, "solve-nodes", "60,120,300", "node counts for the solve runs (\"\" to skip)")
	fs.IntVar(&o.memory, "memory", 20000, "statements at which peak memory is reported (0 to skip)")
	fs.StringVar(&o.python, "python", "/usr/bin/python3", "the Python with NumPy")
	fs.StringVar(&o.calcdoc, "calcdoc", "", "time this calcdoc binary instead of building one")
	fs.StringVar(&o.keep, "keep", "", "write the generated files into this folder and keep them")
	fs.DurationVar(&o.timeout, "timeout", 5*time.Minute, "longest time one child process may take")
	if err := fs.Parse(args); err != nil {
		return nil, err
	}
	if fs.NArg() > 0 {
		return nil, fmt.Errorf("unexpected argument %q", fs.Arg(0))
	}
	var err error
	if o.scaling, err = parseList(scaling); err != nil {
		return nil, fmt.Errorf("-scaling: %v", err)
	}
	if o.solveNodes, err = parseList(solveNodes); err != nil {
		return nil, fmt.Errorf("-solve-nodes: %v", err)
	}
	if o.runs < 1 {
		return nil, fmt.Errorf("-runs %d: at least 1", o.runs)
	}
	if o.memory < 0 {
		return nil, fmt.Errorf("-memory %d: 0 (skip) or a statement count", o.memory)
	}
	if o.timeout <= 0 {
		return nil, fmt.Errorf("-timeout %v: must be positive", o.timeout)
	}
	// every document must be one the generator can write
	check := []Params{{o.statements, o.nodes}}
	for _, s := range o.scaling {
		check = append(check, Params{s, o.nodes})
	}
	if o.memory > 0 {
		check = append(check, Params{o.memory, o.nodes})
	}
	for _, n := range o.solveNodes {
		check = append(check, Params{ladderStatements, n})
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
	fmt.Fprintf(b.out, "each figure: %d timed alternations (calcdoc, script, calcdoc, script, ...) after one untimed run of each; whole processes, wall time\n", o.runs)
	fmt.Fprintf(b.out, "calcdoc: %s build -o sheet.html doc.md; script: %s script.py table.html\n", b.calcdoc, o.python)

	// 1. the comparison
	if o.compare {
		cmp, err := b.prepare("compare", Params{o.statements, o.nodes})
		if err != nil {
			return err
		}
		fmt.Fprintf(b.out, "\n1. Comparison: %d statements and a %d-node ladder solve\n", o.statements, o.nodes)
		if err := b.verify(cmp); err != nil {
			return err
		}
		cd, py, loads, err := b.measure([]*config{cmp})
		if err != nil {
			return err
		}
		if err := b.reportComparison(cd[0], py[0], loads); err != nil {
			return err
		}
	}

	// 2. statement scaling, 3. memory
	sizes := append([]int(nil), o.scaling...)
	if o.memory > 0 && !contains(sizes, o.memory) {
		sizes = append(sizes, o.memory)
	}
	sort.Ints(sizes)
	sizes = dedup(sizes)
	if len(sizes) > 0 {
		fmt.Fprintf(b.out, "\n2. Statement scaling: %s statements, each with the %d-node ladder\n", joinInts(sizes), o.nodes)
		var cfgs []*config
		for _, s := range sizes {
			c, err := b.prepare(fmt.Sprintf("statements-%d", s), Params{s, o.nodes})
			if err != nil {
				return err
			}
			if err := b.verify(c); err != nil {
				return err
			}
			cfgs = append(cfgs, c)
		}
		cd, py, loads, err := b.measure(cfgs)
		if err != nil {
			return err
		}
		if err := b.reportScaling(cfgs, cd, py, loads, "statements", func(c *config) int { return c.p.Statements }); err != nil {
			return err
		}
		if len(sizes) >= 2 {
			first, _ := summarize(cd[0])
			last, _ := summarize(cd[len(cd)-1])
			r := last.median / first.median
			f := float64(sizes[len(sizes)-1]) / float64(sizes[0])
			fmt.Fprintf(b.out, "   time ratio %d/%d statements: %.2f for %.0f× the statements (goal: %.1f or less): %s\n",
				sizes[len(sizes)-1], sizes[0], r, f, goalLinearity*f, verdict(r <= goalLinearity*f))
		}
		if o.memory > 0 {
			i := indexOf(sizes, o.memory)
			s, _ := summarize(cd[i])
			fmt.Fprintf(b.out, "\n3. Peak memory of calcdoc build at %d statements: %s (the largest max RSS of %d runs; median %s) (goal: %s or less): %s\n",
				o.memory, mb(s.rssPeak), s.n, mb(s.rssMedian), mb(goalMemory), verdict(s.rssPeak <= goalMemory))
		}
	}

	// 4. solve scaling
	if len(o.solveNodes) > 0 {
		nodes := dedup(sortedCopy(o.solveNodes))
		fmt.Fprintf(b.out, "\n4. Solve scaling: the ladder alone (%d statements) with %s nodes\n", ladderStatements, joinInts(nodes))
		var cfgs []*config
		for _, n := range nodes {
			c, err := b.prepare(fmt.Sprintf("nodes-%d", n), Params{ladderStatements, n})
			if err != nil {
				return err
			}
			if err := b.verify(c); err != nil {
				return err
			}
			cfgs = append(cfgs, c)
		}
		cd, py, loads, err := b.measure(cfgs)
		if err != nil {
			return err
		}
		if err := b.reportScaling(cfgs, cd, py, loads, "nodes", func(c *config) int { return c.p.Nodes }); err != nil {
			return err
		}
	}
	if o.keep != "" {
		fmt.Fprintf(b.out, "\nthe documents, scripts and outputs are in %s\n", o.keep)
	}
	return nil
}

// pythonVersion confirms that the Python has NumPy and returns both
// versions.
func (b *bench) pythonVersion() (string, error) {
	out, stderr, err := b.capture(b.o.python, "-c", "import sys, numpy; print(sys.version.split()[0], 'with NumPy', numpy.__version__)")
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
	cmd := exec.Command("go", "build", "-o", bin, "calcdoc/cmd/calcdoc")
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
	fmt.Fprintf(b.out, "   %d statements, %d nodes: both give the same %s and %s (within %.0e relative); in SI units, e.g.\n     calcdoc: %s\n     script:  %s\n",
		c.p.Statements, c.p.Nodes, plural(len(cd.Values), "value"), plural(len(cd.Checks), "check result"), Tolerance, pick(cd, names...), pick(py, names...))
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

func (b *bench) reportComparison(cd, py series, loads [2]string) error {
	c, err := summarize(cd)
	if err != nil {
		return err
	}
	p, err := summarize(py)
	if err != nil {
		return err
	}
	fmt.Fprintf(b.out, "   load average (1, 5, 15 min): %s at the start, %s at the end\n", loads[0], loads[1])
	tw := tabwriter.NewWriter(b.out, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "   \tprogram\tmedian\tquartiles\tCPU (median)\tmax RSS (median)\t\n")
	fmt.Fprintf(tw, "   \tcalcdoc build\t%s\t%s to %s\t%s\t%s\t\n", ms(c.median), ms(c.q1), ms(c.q3), ms(c.cpuMedian), mb(c.rssMedian))
	fmt.Fprintf(tw, "   \tPython + NumPy script\t%s\t%s to %s\t%s\t%s\t\n", ms(p.median), ms(p.q1), ms(p.q3), ms(p.cpuMedian), mb(p.rssMedian))
	tw.Flush()
	r := c.median / p.median
	aim := "the aim of 0.1 is met"
	if r > aimRatio {
		aim = "the aim of 0.1 is not met"
	}
	fmt.Fprintf(b.out, "   ratio of the medians, calcdoc / script: %.3f (goal: 0.25 or less): %s; %s. CPU ratio: %.3f\n",
		r, verdict(r <= goalRatio), aim, c.cpuMedian/p.cpuMedian)
	return nil
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
	return fmt.Sprintf("%d %ss", n, what)
}

func verdict(ok bool) string {
	if ok {
		return "met"
	}
	return "MISSED"
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
