package main

import (
	"calcdoc/calcdoc/kind"
	"fmt"
	"os"

	"calcdoc/render"
)

func init() {
	commands["verify"] = (*cli).verify
}

// verify re-evaluates the source each sheet carries and confirms the sheet
// still matches it: exit 0 when every sheet (and every sheet of a package)
// matches, 1 when one does not, 2 for a usage error (no file, a file that
// cannot be read, a file that is not a calcdoc sheet or package).
func (c *cli) verify(args []string) int {
	fs := c.flagSet("verify")
	paths, err := parseFlags(fs, args)
	if err != nil {
		return exitUsage
	}
	if len(paths) == 0 {
		return c.usageErr("verify needs at least one SHEET.html")
	}
	st := exitOK
	for _, p := range paths {
		page, err := os.ReadFile(p)
		if err != nil {
			fmt.Fprintf(c.stderr, "calcdoc: %s: cannot read: %v\n", p, err)
			st = max(st, exitUsage)
			continue
		}
		rep, err := render.Verify(page, version, kind.Standard())
		if err != nil { // render.ErrNotSheet
			fmt.Fprintf(c.stderr, "calcdoc: %s: %v\n", p, err)
			st = max(st, exitUsage)
			continue
		}
		c.printReport(p, rep)
		if !rep.OK() {
			st = max(st, exitCheckFail)
		}
	}
	return st
}

// printReport writes one line per sheet and an indented line per
// difference.
func (c *cli) printReport(path string, rep *render.Report) {
	if rep.Package {
		verdict := "matches"
		if !rep.OK() {
			verdict = "DOES NOT MATCH"
		}
		fmt.Fprintf(c.stdout, "%s: package of %d sheets: %s\n", path, len(rep.Sheets), verdict)
		for _, d := range rep.PackageDifferences {
			fmt.Fprintf(c.stdout, "  cover: %s\n", d)
		}
	}
	for _, s := range rep.Sheets {
		name := path
		if rep.Package {
			name = fmt.Sprintf("  sheet %d", s.Index)
		}
		src := s.Path
		if src == "" {
			src = "(no path recorded)"
		}
		if s.Match {
			fmt.Fprintf(c.stdout, "%s: matches its source %s (sha256 %s, built by calcdoc %s)\n", name, src, s.SHA256, s.SheetVersion)
			continue
		}
		fmt.Fprintf(c.stdout, "%s: DOES NOT MATCH its source %s\n", name, src)
		for _, d := range s.Differences {
			fmt.Fprintf(c.stdout, "    %s\n", d)
		}
		if n := s.VersionNote(); n != "" {
			fmt.Fprintf(c.stdout, "    note: %s\n", n)
		}
	}
}
