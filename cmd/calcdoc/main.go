// Command calcdoc evaluates calculation documents (Markdown files with
// calc, solve, phasors and sweep blocks) and writes HTML calculation
// sheets. See the README for the language and the commands.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/build"
)

// version is calcdoc's version; a release build may set it with
// -ldflags "-X main.version=...".
var version = "0.1.0"

// Exit statuses (LANGUAGE.md section 8).
const (
	exitOK        = 0
	exitCheckFail = 1
	exitUsage     = 2
	exitError     = 3
)

const usage = `calcdoc: calculation sheets from Markdown documents

usage:
  calcdoc build [-o OUT] PATH...       an HTML sheet for each document
  calcdoc check PATH...                evaluate only, print a summary
  calcdoc values PATH                  JSON of one document's values, checks and errors
  calcdoc values --csv [--sweep LINE] PATH
                                       the values, or one sweep's points, as CSV
  calcdoc watch [--addr HOST:PORT] [--allow-host NAME]... [-o OUT] PATH...
                                       rebuild on every save and serve a live preview
  calcdoc package [-o FILE] [--pdf FILE] PATH...
                                       one stamped calculation package
  calcdoc verify [--signers FILE] SHEET.html...
                                       confirm that every byte of a sheet or package
                                       is what calcdoc writes from the inputs it
                                       carries, and check its signatures
  calcdoc sign --key KEY --role checked|approved [--signers FILE] [--principal NAME] SHEET.html...
                                       sign issued sheets or packages with an SSH key
  calcdoc diff [--from REV] [--to REV] [--html FILE] [--min-change P%] PATH...
                                       the values and checks that changed between
                                       two git revisions (default HEAD and the
                                       working tree)
  calcdoc diff --textconv FILE         one file's values as text, for git's
                                       textconv diff driver
  calcdoc lsp                          a language server for editors (LSP over
                                       standard input and output)
  calcdoc version

A PATH that is a folder means every .md file below it that holds an
evaluated block (calc, solve, phasors, sweep, network, table), wherever it
stands. Exit status: 0 all evaluated and every check holds, 1 a check
fails, 3 a document has an error, 2 a usage error. verify: 0 every sheet
matches its source and every signature holds, 1 one does not, 2 a usage
error. sign: 0 signed, 1 the file does not verify or the signer is not
allowed the role, 2 a usage error, 3 signing failed. diff: 0 nothing
changed, 1 something changed, 2 a usage error, 3 an error; --textconv
always 0.
`

type cli struct {
	stdout, stderr io.Writer
}

func main() {
	tuneGC() // gc.go: off below a soft memory limit
	c := &cli{stdout: os.Stdout, stderr: os.Stderr}
	os.Exit(c.run(os.Args[1:]))
}

// commands maps each subcommand to its function; other files add to it.
var commands = map[string]func(c *cli, args []string) int{}

func init() {
	commands["build"] = (*cli).build
	commands["check"] = (*cli).check
	commands["values"] = (*cli).values
	commands["version"] = func(c *cli, args []string) int {
		fmt.Fprintf(c.stdout, "calcdoc %s\n", version)
		return exitOK
	}
}

func (c *cli) run(args []string) int {
	if len(args) == 0 {
		fmt.Fprint(c.stderr, usage)
		return exitUsage
	}
	switch args[0] {
	case "-h", "--help", "help":
		fmt.Fprint(c.stdout, usage)
		return exitOK
	case "--version", "-version":
		args[0] = "version"
	}
	fn, ok := commands[args[0]]
	if !ok {
		fmt.Fprintf(c.stderr, "calcdoc: unknown command %q\n\n%s", args[0], usage)
		return exitUsage
	}
	return fn(c, args[1:])
}

func (c *cli) usageErr(format string, args ...any) int {
	fmt.Fprintf(c.stderr, "calcdoc: "+format+"\n", args...)
	fmt.Fprintf(c.stderr, "run 'calcdoc help' for usage\n")
	return exitUsage
}

// flagSet returns a flag set that reports errors as usage errors.
func (c *cli) flagSet(name string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(c.stderr)
	return fs
}

// parseFlags parses flags that may stand before or among the paths.
func parseFlags(fs *flag.FlagSet, args []string) ([]string, error) {
	var paths []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return paths, nil
		}
		if rest[0] == "--" {
			return append(paths, rest[1:]...), nil
		}
		paths = append(paths, rest[0])
		args = rest[1:]
	}
}

// status folds one document's outcome into the exit status.
func status(doc *calcdoc.Document, st int) int {
	switch {
	case len(doc.Errors) > 0:
		return exitError
	case doc.FailedChecks() > 0 && st != exitError:
		return exitCheckFail
	}
	return st
}

// printErrors writes each error as file:line:col: message.
func (c *cli) printErrors(doc *calcdoc.Document) {
	for _, e := range doc.Errors {
		fmt.Fprintln(c.stderr, e.Report(""))
	}
	for _, e := range doc.Warnings {
		fmt.Fprintln(c.stderr, e.Report("warning"))
	}
}

// sheetOptions are the options of a built sheet: stamped and carrying its
// source.
func sheetOptions(doc *calcdoc.Document) build.Options { return build.Stamped(doc, version) }

// inputs parses the flags of a command that takes PATHs and collects its
// documents; st is exitOK, or the usage status to return.
func (c *cli) inputs(fs *flag.FlagSet, args []string) (inputs []build.Input, st int) {
	paths, err := parseFlags(fs, args)
	if err != nil {
		return nil, exitUsage
	}
	if len(paths) == 0 {
		return nil, c.usageErr("%s needs at least one PATH", fs.Name())
	}
	inputs, err = build.Collect(paths, kind.Standard())
	if err != nil {
		return nil, c.usageErr("%v", err)
	}
	return inputs, exitOK
}

func (c *cli) build(args []string) int {
	fs := c.flagSet("build")
	out := fs.String("o", "", "output folder, or the output file for one document")
	inputs, st0 := c.inputs(fs, args)
	if st0 != exitOK {
		return st0
	}
	single := *out != "" && build.OutIsFile(*out)
	if single && len(inputs) != 1 {
		return c.usageErr("-o %s names one file, but there are %d documents: give a folder", *out, len(inputs))
	}
	// evaluate, draw and write on every core, a used document first;
	// report in the order of the inputs
	stamper := build.NewStamper(version)
	stamper.Prefetch(inputs) // git runs while the documents are evaluated
	werr := make([]error, len(inputs))
	targets := make([]string, len(inputs))
	evald := build.EvaluateDraw(build.NewLoader(kind.Standard(), inputs), inputs, 0, func(i int, doc *calcdoc.Document, pre *build.Predraw) {
		in := inputs[i]
		targets[i] = build.Target(*out, in.Path, in.Rel)
		opt := stamper.Stamped(doc)
		opt.Predrawn = pre // blocks drawn on a second core while doc was evaluated
		werr[i] = build.Write(doc, opt, in.Path, targets[i], nil)
	})
	st := exitOK
	for i, ev := range evald {
		in, doc, target := ev.Input, ev.Doc, targets[i]
		if ev.Err != nil {
			fmt.Fprintf(c.stderr, "calcdoc: %v\n", ev.Err)
			st = max(st, exitUsage)
			continue
		}
		c.printErrors(doc)
		var re *build.RenderError
		var we *build.WriteError
		switch err := werr[i]; {
		case errors.As(err, &re):
			fmt.Fprintf(c.stderr, "%s: cannot render: %v\n", in.Path, err)
			st = exitError
			continue
		case errors.Is(err, build.ErrOverSource):
			fmt.Fprintf(c.stderr, "%s: refusing to write the sheet over its source\n", in.Path)
			st = exitUsage
			continue
		case errors.As(err, &we) && we.Folder:
			fmt.Fprintf(c.stderr, "calcdoc: %v\n", err)
			st = exitError
			continue
		case err != nil:
			fmt.Fprintf(c.stderr, "calcdoc: cannot write %s: %v\n", target, err)
			st = exitError
			continue
		}
		fmt.Fprintf(c.stdout, "%s -> %s: %s\n", in.Path, target, summaryLine(doc))
		st = status(doc, st)
	}
	return st
}

// summaryLine says how a document evaluated.
func summaryLine(doc *calcdoc.Document) string {
	held, failed, _ := doc.CheckCounts()
	s := fmt.Sprintf("%s, %s (%d satisfied, %d not satisfied), %s", counted(len(doc.Values), "value"), counted(len(doc.Checks), "check"), held, failed, counted(len(doc.Errors), "error"))
	if len(doc.Warnings) > 0 {
		s += fmt.Sprintf(", %d warnings", len(doc.Warnings))
	}
	return s
}

func (c *cli) check(args []string) int {
	inputs, st0 := c.inputs(c.flagSet("check"), args)
	if st0 != exitOK {
		return st0
	}
	st := exitOK
	for _, ev := range build.Evaluate(build.NewLoader(kind.Standard(), inputs), inputs, 0, nil) {
		doc := ev.Doc
		if ev.Err != nil {
			fmt.Fprintf(c.stderr, "calcdoc: %v\n", ev.Err)
			st = max(st, exitUsage)
			continue
		}
		fmt.Fprintf(c.stdout, "%s: %s\n", doc.Path, summaryLine(doc))
		for _, ch := range doc.Checks {
			if ch.Result != nil && !ch.Result.Pass {
				p := ch.Pos.Position() // file and line: a check is a whole line
				if fc := ch.FailedCases(doc.Front.Cases); len(fc) > 0 {
					fmt.Fprintf(c.stdout, "%s:%d: check not satisfied in case %s: %s\n", p.Filename, p.Line, strings.Join(fc, ", "), ch.Text)
					continue
				}
				fmt.Fprintf(c.stdout, "%s:%d: check not satisfied: %s\n", p.Filename, p.Line, ch.Text)
			}
		}
		for _, e := range doc.Errors {
			fmt.Fprintln(c.stdout, e.Report(""))
		}
		for _, e := range doc.Warnings {
			fmt.Fprintln(c.stdout, e.Report("warning"))
		}
		st = status(doc, st)
	}
	return st
}

func (c *cli) values(args []string) int {
	fs := c.flagSet("values")
	csvOut := fs.Bool("csv", false, "print the values as CSV instead of JSON")
	sweepLine := fs.Int("sweep", 0, "with --csv: print the points of the sweep that starts at this line")
	paths, err := parseFlags(fs, args)
	if err != nil {
		return exitUsage
	}
	if len(paths) != 1 {
		return c.usageErr("values takes exactly one document")
	}
	info, err := os.Stat(paths[0])
	if err != nil {
		return c.usageErr("%s: no such file", paths[0])
	}
	if info.IsDir() || filepath.Ext(paths[0]) != ".md" {
		return c.usageErr("%s: values takes one .md document, not a folder", paths[0])
	}
	doc, err := calcdoc.NewLoader(kind.Standard(), filepath.Dir(paths[0])).Load(paths[0])
	if err != nil {
		return c.usageErr("%v", err)
	}
	if *csvOut || sweepSet(fs) {
		return c.valuesCSV(fs, doc, *csvOut, *sweepLine)
	}
	c.stdout.Write(doc.MarshalValues())
	return status(doc, exitOK)
}

// counted is "1 value", "2 values".
func counted(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}
