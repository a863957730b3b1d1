package main

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"
)

// Goals of issue 20.
const (
	goalCompare = 0.15 // figure 1: calcdoc's median over the script's, at most
	aimCompare  = 0.1
	goalLarge   = 0.3  // figure 2: the same at -large statements
	goalSolve   = 3.0  // figure 3: calcdoc in process over numpy.linalg.solve
	goalMemory  = 80e6 // figure 5: bytes of peak RSS at -large statements
	// goalLinearity is the scaling runs' bound (issue 9), reported with
	// them but not a target of the summary: time ratio over count ratio.
	goalLinearity = 1.1
)

// watchGoals are figure 4's goals: the p95 of save-to-page, in seconds,
// by the document's statement count.
var watchGoals = map[int]float64{1000: 0.050, 10000: 0.080}

// target is one line of the summary: a figure, its goal, what was
// measured and whether the goal is met.
type target struct {
	fig      string // "1", "2", "3", "4", "5"
	what     string
	goal     string
	measured string
	ratio    string // "—" when the goal is not a ratio
	verdict  string // "met", "MISSED" or "no goal"
	load     string // the 1-minute load average at the start and at the end
	command  string // the command that measures this figure alone
}

// loadSpan writes the 1-minute load averages of two /proc/loadavg
// readings as "A → B".
func loadSpan(start, end string) string {
	first := func(s string) string {
		if f := strings.Fields(s); len(f) > 0 {
			return f[0]
		}
		return "unknown"
	}
	return first(start) + " → " + first(end)
}

// writeSummary writes the targets as a table of aligned columns.
func writeSummary(w io.Writer, ts []target) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "figure\ttarget\tgoal\tmeasured\tratio\tmet\tload (1 min)")
	for _, t := range ts {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\n", t.fig, t.what, t.goal, t.measured, t.ratio, t.verdict, t.load)
	}
	return tw.Flush()
}

// writeMarkdown writes the targets as the rows of a Markdown table, with
// its header, for docs/performance.md.
func writeMarkdown(w io.Writer, ts []target) error {
	var b strings.Builder
	b.WriteString("| figure | target | goal | measured | ratio | met | load (1 min) | command |\n")
	b.WriteString("| --- | --- | --- | --- | --- | --- | --- | --- |\n")
	for _, t := range ts {
		verdict := t.verdict
		if verdict == "MISSED" {
			verdict = "**missed**"
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s | %s | %s | `%s` |\n", mdCell(t.fig), mdCell(t.what), mdCell(t.goal),
			mdCell(t.measured), mdCell(t.ratio), verdict, mdCell(t.load), t.command)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// mdCell escapes the characters that would end or break a Markdown table
// cell.
func mdCell(s string) string {
	s = strings.ReplaceAll(s, "|", `\|`)
	return strings.ReplaceAll(s, "\n", " ")
}

func verdict(ok bool) string {
	if ok {
		return "met"
	}
	return "MISSED"
}

// figureCommand is the command that measures one figure alone.
func figureCommand(fig string) string { return "go run ./cmd/calcbench -figures " + fig }
