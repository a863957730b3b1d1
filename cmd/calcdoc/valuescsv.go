package main

import (
	"errors"
	"flag"
	"fmt"

	"calcdoc/calcdoc"
)

// sweepSet reports whether --sweep was given.
func sweepSet(fs *flag.FlagSet) bool {
	set := false
	fs.Visit(func(f *flag.Flag) { set = set || f.Name == "sweep" })
	return set
}

// valuesCSV prints the values, or with --sweep the points of one sweep,
// as CSV (LANGUAGE.md section 8); the document's errors go to standard
// error, since CSV has no place for them.
func (c *cli) valuesCSV(fs *flag.FlagSet, doc *calcdoc.Document, csvOn bool, line int) int {
	sweep := sweepSet(fs)
	if sweep && !csvOn {
		return c.usageErr("--sweep %d asks for one sweep's points as CSV: add --csv (values --csv --sweep %d %s)", line, line, doc.Path)
	}
	var err error
	if sweep {
		err = doc.WriteSweepCSV(c.stdout, line)
	} else {
		err = doc.WriteValuesCSV(c.stdout)
	}
	var ns *calcdoc.NoSweepError
	if errors.As(err, &ns) {
		fmt.Fprintf(c.stderr, "calcdoc: %v\n", ns)
		return exitUsage
	}
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: cannot write the CSV: %v\n", err)
		return exitError
	}
	c.printErrors(doc)
	return status(doc, exitOK)
}
