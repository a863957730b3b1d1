package main

import (
	"fmt"
	"sort"
	"strings"
	"text/tabwriter"
)

// pairResult is one pair of programs timed as whole processes.
type pairResult struct {
	cd, py series
	loads  [2]string
}

// writePair writes the two programs' figures and the ratio of their
// medians; it returns both summaries.
func (b *bench) writePair(r *pairResult, cdName, pyName string) (c, p summary, err error) {
	if c, err = summarize(r.cd); err != nil {
		return
	}
	if p, err = summarize(r.py); err != nil {
		return
	}
	fmt.Fprintf(b.out, "   load average (1, 5, 15 min): %s at the start, %s at the end\n", r.loads[0], r.loads[1])
	tw := tabwriter.NewWriter(b.out, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "   \tprogram\tmedian\tquartiles\tCPU (median)\tmax RSS (median)\tmax RSS (peak)\t\n")
	fmt.Fprintf(tw, "   \t%s\t%s\t%s to %s\t%s\t%s\t%s\t\n", cdName, ms(c.median), ms(c.q1), ms(c.q3), ms(c.cpuMedian), mb(c.rssMedian), mb(c.rssPeak))
	fmt.Fprintf(tw, "   \t%s\t%s\t%s to %s\t%s\t%s\t%s\t\n", pyName, ms(p.median), ms(p.q1), ms(p.q3), ms(p.cpuMedian), mb(p.rssMedian), mb(p.rssPeak))
	tw.Flush()
	fmt.Fprintf(b.out, "   ratio of the medians, calcdoc / script: %.3f; CPU ratio %.3f\n", c.median/p.median, c.cpuMedian/p.cpuMedian)
	return c, p, nil
}

// pair prepares, verifies and times one document against its script.
func (b *bench) pair(name string, p Params) (*pairResult, error) {
	c, err := b.prepare(name, p)
	if err != nil {
		return nil, err
	}
	if err := b.verify(c); err != nil {
		return nil, err
	}
	cd, py, loads, err := b.measure([]*config{c})
	if err != nil {
		return nil, err
	}
	return &pairResult{cd: cd[0], py: py[0], loads: loads}, nil
}

func (b *bench) figure1() (target, error) {
	o := b.o
	fmt.Fprintf(b.out, "\n1. %s statements and a %d-node ladder solve: calcdoc build against the Python + NumPy script, whole processes\n", thousands(o.statements), o.nodes)
	r, err := b.pair("compare", Params{Statements: o.statements, Nodes: o.nodes})
	if err != nil {
		return target{}, err
	}
	c, p, err := b.writePair(r, "calcdoc build", "Python + NumPy script")
	if err != nil {
		return target{}, err
	}
	ratio := c.median / p.median
	aim := "aim of 0.1 met"
	if ratio > aimCompare {
		aim = "aim of 0.1 not met"
	}
	fmt.Fprintf(b.out, "   goal %.2f or less: %s; %s\n", goalCompare, verdict(ratio <= goalCompare), aim)
	return target{fig: "1", what: fmt.Sprintf("%s statements + %d-node solve, whole process, calcdoc / script", thousands(o.statements), o.nodes),
		goal: fmt.Sprintf("≤ %.2f (aim %.1f)", goalCompare, aimCompare), measured: fmt.Sprintf("calcdoc %s, script %s", ms(c.median), ms(p.median)),
		ratio: fmt.Sprintf("%.3f", ratio), verdict: verdict(ratio <= goalCompare), load: loadSpan(r.loads[0], r.loads[1]), command: figureCommand("1")}, nil
}

// figure2and5 measures the -large document once for figures 2 and 5.
func (b *bench) figure2and5() ([]target, error) {
	o := b.o
	fmt.Fprintf(b.out, "\n2, 5. %s statements and a %d-node ladder solve: calcdoc build against the script, and calcdoc's peak memory\n", thousands(o.large), o.nodes)
	r, err := b.pair(fmt.Sprintf("large-%d", o.large), Params{Statements: o.large, Nodes: o.nodes})
	if err != nil {
		return nil, err
	}
	c, p, err := b.writePair(r, "calcdoc build", "Python + NumPy script")
	if err != nil {
		return nil, err
	}
	load := loadSpan(r.loads[0], r.loads[1])
	var out []target
	if o.figures[2] {
		ratio := c.median / p.median
		fmt.Fprintf(b.out, "   figure 2, goal %.1f or less: %s\n", goalLarge, verdict(ratio <= goalLarge))
		out = append(out, target{fig: "2", what: fmt.Sprintf("%s statements, whole process, calcdoc / script", thousands(o.large)),
			goal: fmt.Sprintf("≤ %.1f", goalLarge), measured: fmt.Sprintf("calcdoc %s, script %s", ms(c.median), ms(p.median)),
			ratio: fmt.Sprintf("%.3f", ratio), verdict: verdict(ratio <= goalLarge), load: load, command: figureCommand("2")})
	}
	if o.figures[5] {
		fmt.Fprintf(b.out, "   figure 5: peak memory %s, the largest max RSS of %d runs (median %s); goal %s or less: %s\n",
			mb(c.rssPeak), c.n, mb(c.rssMedian), mb(goalMemory), verdict(c.rssPeak <= goalMemory))
		out = append(out, target{fig: "5", what: fmt.Sprintf("peak memory (max RSS) of calcdoc build, %s statements", thousands(o.large)),
			goal: "≤ " + mb(goalMemory), measured: fmt.Sprintf("%s (largest of %d runs)", mb(c.rssPeak), c.n),
			ratio: "—", verdict: verdict(c.rssPeak <= goalMemory), load: load, command: figureCommand("5")})
	}
	return out, nil
}

func (b *bench) figure3() (target, error) {
	o := b.o
	fmt.Fprintf(b.out, "\n3. A %d-node meshed feeder solve (%s): calcdoc in process (parse, evaluate, draw the sheet) against numpy.linalg.solve of the same system\n",
		o.meshNodes, plural(len(meshTies(o.meshNodes/5)), "tie"))
	r, err := b.solveFigure(o.meshNodes)
	if err != nil {
		return target{}, err
	}
	fmt.Fprintf(b.out, "   the same system: NumPy's %d node voltages equal calcdoc's within %.0e relative (largest difference %.1e)\n", r.nodes, Tolerance, r.maxRel)
	fmt.Fprintf(b.out, "   whole processes, calcdoc build of the document against the script doing the same work:\n")
	wc, wp, err := b.writePair(r.whole, "calcdoc build", "Python + NumPy script")
	if err != nil {
		return target{}, err
	}
	cm, err := Median(r.calcdoc)
	if err != nil {
		return target{}, err
	}
	nm, err := Median(r.numpy)
	if err != nil {
		return target{}, err
	}
	cq1, _ := Quantile(r.calcdoc, 0.25)
	cq3, _ := Quantile(r.calcdoc, 0.75)
	nq1, _ := Quantile(r.numpy, 0.25)
	nq3, _ := Quantile(r.numpy, 0.75)
	ratio := cm / nm
	fmt.Fprintf(b.out, "   in process, %d runs of each in %d alternating rounds; load average %s at the start, %s at the end\n", len(r.calcdoc), solveRounds, r.loadStart, r.loadEnd)
	fmt.Fprintf(b.out, "     calcdoc parse, evaluate and sheet (%s): median %s (quartiles %s to %s)\n", mbBytes(r.sheetBytes), ms(cm), ms(cq1), ms(cq3))
	fmt.Fprintf(b.out, "     numpy.linalg.solve (time.perf_counter): median %s (quartiles %s to %s)\n", ms(nm), ms(nq1), ms(nq3))
	fmt.Fprintf(b.out, "   ratio %.2f; goal %.0f or less: %s\n", ratio, goalSolve, verdict(ratio <= goalSolve))
	return target{fig: "3", what: fmt.Sprintf("%d-node complex solve with its sheet, in process, calcdoc / numpy.linalg.solve", o.meshNodes),
		goal:     fmt.Sprintf("≤ %.0f", goalSolve),
		measured: fmt.Sprintf("calcdoc %s, NumPy %s; whole processes: calcdoc build %s, script %s", ms(cm), ms(nm), ms(wc.median), ms(wp.median)),
		ratio:    fmt.Sprintf("%.2f", ratio), verdict: verdict(ratio <= goalSolve), load: loadSpan(r.whole.loads[0], r.loadEnd), command: figureCommand("3")}, nil
}

func (b *bench) figure4() ([]target, error) {
	o := b.o
	fmt.Fprintf(b.out, "\n4. calcdoc watch, save to page: %d saves (%s) of the last block's route length, after %d untimed; each until the change event and the patch the page then fetches (/_patch) showing the new value\n",
		o.saves, o.watchWrite, watchWarmups)
	var out []target
	for _, n := range o.watchSizes {
		r, err := b.watchFigure(n, o.saves)
		if err != nil {
			return nil, err
		}
		p50, _ := Quantile(r.lat, 0.5)
		p95, _ := Quantile(r.lat, 0.95)
		pmax, _ := Quantile(r.lat, 1)
		fmt.Fprintf(b.out, "   %s statements: p50 %s, p95 %s, max %s; %d change events to a new version and %d to a save being evaluated for %d saves, %d reloads, %d late versions; load average %s at the start, %s at the end\n",
			thousands(n), ms(p50), ms(p95), ms(pmax), r.events, r.pending, len(r.lat), r.reloads, r.late, r.loadStart, r.loadEnd)
		f50, _ := Quantile(r.full, 0.5)
		f95, _ := Quantile(r.full, 0.95)
		w95, _ := Quantile(r.writes, 0.95)
		wmax, _ := Quantile(r.writes, 1)
		fmt.Fprintf(b.out, "     for information, a GET of the whole page (%s) after each save: p50 %s, p95 %s; writing the file (timed in the latency): p95 %s, max %s\n",
			mbBytes(r.pageBytes), ms(f50), ms(f95), ms(w95), ms(wmax))
		t := target{fig: "4", what: fmt.Sprintf("watch save to page p95, %s statements, edit in the last block", thousands(n)),
			measured: fmt.Sprintf("p50 %s, p95 %s, max %s (%d saves, %s)", ms(p50), ms(p95), ms(pmax), len(r.lat), o.watchWrite),
			ratio:    "—", load: loadSpan(r.loadStart, r.loadEnd), command: figureCommand("4")}
		if g, ok := watchGoals[n]; ok {
			t.goal = fmt.Sprintf("≤ %.0f ms", g*1000)
			t.verdict = verdict(p95 <= g)
		} else {
			t.goal, t.verdict = "none at this size", "no goal"
		}
		out = append(out, t)
	}
	return out, nil
}

// extras are the runs that are not targets: statement scaling and the
// ladder alone.
func (b *bench) extras() error {
	o := b.o
	if len(o.scaling) > 0 {
		sizes := dedup(sortedCopy(o.scaling))
		fmt.Fprintf(b.out, "\nStatement scaling: %s statements, each with the %d-node ladder\n", joinInts(sizes), o.nodes)
		var cfgs []*config
		for _, s := range sizes {
			c, err := b.prepare(fmt.Sprintf("statements-%d", s), Params{Statements: s, Nodes: o.nodes})
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
			fmt.Fprintf(b.out, "   time ratio %d/%d statements: %.2f for %.0f× the statements (issue 9's bound: %.1f or less): %s\n",
				sizes[len(sizes)-1], sizes[0], r, f, goalLinearity*f, verdict(r <= goalLinearity*f))
		}
	}
	if len(o.solveNodes) > 0 {
		nodes := dedup(sortedCopy(o.solveNodes))
		fmt.Fprintf(b.out, "\nThe ladder alone (%d statements) with %s nodes\n", ladderStatements, joinInts(nodes))
		var cfgs []*config
		for _, n := range nodes {
			c, err := b.prepare(fmt.Sprintf("nodes-%d", n), Params{Statements: ladderStatements, Nodes: n})
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
	return nil
}

// sortTargets puts the targets in figure order (stable: figure 4's sizes
// stay in the order given).
func sortTargets(ts []target) {
	sort.SliceStable(ts, func(i, j int) bool { return ts[i].fig < ts[j].fig })
}

// thousands writes n with commas between groups of three digits.
func thousands(n int) string {
	s := fmt.Sprint(n)
	if n < 0 {
		return "-" + thousands(-n)
	}
	var parts []string
	for len(s) > 3 {
		parts = append([]string{s[len(s)-3:]}, parts...)
		s = s[:len(s)-3]
	}
	return strings.Join(append([]string{s}, parts...), ",")
}

// mbBytes formats a byte count in megabytes.
func mbBytes(n int) string { return mb(float64(n)) }
