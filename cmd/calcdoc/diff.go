package main

import (
	"fmt"
	"strconv"
	"strings"

	"calcdoc/cmd/internal/build"
	"calcdoc/cmd/internal/diff"
)

func init() { commands["diff"] = (*cli).diff }

// diff compares documents at two git revisions (LANGUAGE.md section 12,
// "What changed"): exit 0 nothing changed, 1 something did, 2 usage, 3 an
// error. With --textconv it prints one file's values for git's textconv
// driver and always exits 0.
func (c *cli) diff(args []string) int {
	fs := c.flagSet("diff")
	from := fs.String("from", "HEAD", "the revision to compare from")
	to := fs.String("to", "", "the revision to compare to (default the working tree)")
	htmlOut := fs.String("html", "", "also write a comparison sheet to this file")
	minChange := fs.String("min-change", "", "hide numeric changes smaller than this, e.g. 0.1%")
	textconv := fs.Bool("textconv", false, "print one file's values as text, for git's textconv diff driver")
	paths, err := parseFlags(fs, args)
	if *textconv {
		if err != nil || len(paths) != 1 {
			fmt.Fprintf(c.stdout, "calcdoc diff --textconv takes one FILE\n")
			return exitOK
		}
		diff.Textconv(c.stdout, paths[0])
		return exitOK
	}
	if err != nil {
		return exitUsage
	}
	if len(paths) == 0 {
		return c.usageErr("diff needs at least one PATH")
	}
	var o diff.Options
	if *minChange != "" {
		p, err := parsePercent(*minChange)
		if err != nil {
			return c.usageErr("--min-change %s: %v", *minChange, err)
		}
		o.MinChange = p
	}
	r, err := diff.Run(paths, *from, *to, o)
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %v\n", err)
		return exitError
	}
	if err := r.WriteText(c.stdout); err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %v\n", err)
		return exitError
	}
	if *htmlOut != "" {
		if err := build.WriteFileAtomic(*htmlOut, r.HTML()); err != nil {
			fmt.Fprintf(c.stderr, "calcdoc: cannot write %s: %v\n", *htmlOut, err)
			return exitError
		}
	}
	switch {
	case r.Failed():
		return exitError
	case r.Changed():
		return exitCheckFail
	}
	return exitOK
}

// parsePercent reads "0.1%" (or "0.1 %") as 0.001.
func parsePercent(s string) (float64, error) {
	t, ok := strings.CutSuffix(strings.TrimSpace(s), "%")
	if !ok {
		return 0, fmt.Errorf("give a percentage, e.g. 0.1%%")
	}
	p, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
	if err != nil || p < 0 || p != p || p > 1e9 {
		return 0, fmt.Errorf("give a non-negative percentage, e.g. 0.1%%")
	}
	return p / 100, nil
}
