package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"slices"
	"syscall"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/build"
	"calcdoc/render/pack"
	"calcdoc/render/pdf"

	"go.yaml.in/yaml/v3"
)

func init() {
	commands["package"] = (*cli).pack
}

// SpecName is the package file that a folder given as the only PATH may
// hold.
const specName = "package.yaml"

// defaultPackage is where the package's HTML goes without -o.
const defaultPackage = "package.html"

// printPDF prints an HTML file to PDF and readPDF reads a PDF's text
// back, page by page; the tests replace them.
var (
	printPDF = pdf.Print
	readPDF  = pdf.PDFText
)

// packageSpec is a package file (YAML): the package's title block and
// its sheets, paths relative to the file's folder.
type packageSpec struct {
	calcdoc.TitleBlock `yaml:",inline"`
	Sheets             []string `yaml:"sheets"`
}

// readSpec reads a package file. Every key must be known: a misspelt key
// is an error, not a silent default.
func readSpec(path string) (*packageSpec, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot read the package file: %v", path, err)
	}
	var spec packageSpec
	dec := yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	if err := dec.Decode(&spec); err != nil && !errors.Is(err, io.EOF) {
		return nil, fmt.Errorf("%s: %v (known keys: title, project, client, number, revision, date, prepared, checked, approved, paper, revisions, sheets)", path, err)
	}
	if spec.Date != "" && !calcdoc.ValidDate(spec.Date) {
		return nil, fmt.Errorf("%s: date %q is not a date written YYYY-MM-DD", path, spec.Date)
	}
	for _, r := range spec.Revisions {
		if r.Date != "" && !calcdoc.ValidDate(r.Date) {
			return nil, fmt.Errorf("%s: revision %s: date %q is not a date written YYYY-MM-DD", path, r.Rev, r.Date)
		}
	}
	if spec.Paper != "" && spec.Paper != "a4" && spec.Paper != "letter" {
		return nil, fmt.Errorf("%s: paper %q must be a4 or letter", path, spec.Paper)
	}
	return &spec, nil
}

func (c *cli) pack(args []string) int {
	fs := c.flagSet("package")
	out := fs.String("o", "", "the package's HTML file (default "+defaultPackage+" in the current folder)")
	pdfOut := fs.String("pdf", "", "also print the package to this PDF file with headless Chromium")
	specPath := fs.String("spec", "", "package file (YAML): title block and the list of sheets")
	title := fs.String("title", "", "package title")
	project := fs.String("project", "", "project name")
	client := fs.String("client", "", "client")
	number := fs.String("number", "", "package number")
	revision := fs.String("revision", "", "package revision")
	date := fs.String("date", "", "date of the package's revision, YYYY-MM-DD")
	paths, err := parseFlags(fs, args)
	if err != nil {
		return exitUsage
	}
	if *date != "" && !calcdoc.ValidDate(*date) {
		return c.usageErr("--date %q is not a date written YYYY-MM-DD", *date)
	}

	// the package file: --spec, or package.yaml in the one folder given
	spec := &packageSpec{}
	auto := false
	if *specPath == "" && len(paths) == 1 {
		if fi, err := os.Stat(paths[0]); err == nil && fi.IsDir() {
			if fi, err := os.Stat(filepath.Join(paths[0], specName)); err == nil && fi.Mode().IsRegular() {
				*specPath = filepath.Join(paths[0], specName)
				auto = true
			}
		}
	}
	if *specPath != "" {
		if spec, err = readSpec(*specPath); err != nil {
			return c.usageErr("%v", err)
		}
	}
	var sheetPaths []string
	switch {
	case len(spec.Sheets) > 0 && len(paths) > 0 && !auto:
		return c.usageErr("%s lists the sheets: give no PATH as well", *specPath)
	case len(spec.Sheets) > 0:
		for _, s := range spec.Sheets {
			if !filepath.IsAbs(s) {
				s = filepath.Join(filepath.Dir(*specPath), s)
			}
			sheetPaths = append(sheetPaths, s)
		}
	case len(paths) == 0:
		return c.usageErr("package needs at least one PATH, or a package file (--spec) that lists the sheets")
	default:
		sheetPaths = paths
	}
	inputs, err := build.Collect(sheetPaths, kind.Standard())
	if err != nil {
		return c.usageErr("%v", err)
	}
	seen := map[string]string{}
	for _, in := range inputs {
		abs, _ := filepath.Abs(in.Path)
		if first, dup := seen[abs]; dup {
			return c.usageErr("%s is in the package twice (also as %s)", in.Path, first)
		}
		seen[abs] = in.Path
	}

	target := *out
	if target == "" {
		target = defaultPackage
	}
	for _, in := range inputs {
		if build.SameFile(target, in.Path) || (*pdfOut != "" && build.SameFile(*pdfOut, in.Path)) {
			return c.usageErr("refusing to write the package over its source %s", in.Path)
		}
	}
	if *pdfOut != "" && build.SameFile(*pdfOut, target) {
		return c.usageErr("--pdf %s and the HTML package are the same file", *pdfOut)
	}

	stamper := build.NewStamper(version)
	stamper.Prefetch(inputs) // git runs while the documents are evaluated
	var docs []*calcdoc.Document
	for _, ev := range build.Evaluate(build.NewLoader(kind.Standard(), inputs), inputs, 0, nil) {
		if ev.Err != nil {
			fmt.Fprintf(c.stderr, "calcdoc: %v\n", ev.Err)
			return exitUsage
		}
		docs = append(docs, ev.Doc)
	}
	// a used sheet goes before its first user (packuses.go)
	docs, moved, missing := orderUses(docs)
	for _, m := range missing {
		fmt.Fprintf(c.stderr, "calcdoc: warning: %s\n", m)
	}
	for _, m := range moved {
		fmt.Fprintf(c.stdout, "%s\n", m)
	}

	info := pack.Info{TitleBlock: spec.TitleBlock, Moved: moved}
	info.Title, info.Project, info.Client = pick(*title, spec.Title), pick(*project, spec.Project), pick(*client, spec.Client)
	info.Number, info.Revision, info.Date = pick(*number, spec.Number), pick(*revision, spec.Revision), pick(*date, spec.Date)
	if info.Project == "" {
		info.Project = common(docs, func(fm calcdoc.FrontMatter) string { return fm.Project })
	}
	if info.Client == "" {
		info.Client = common(docs, func(fm calcdoc.FrontMatter) string { return fm.Client })
	}
	if info.Paper == "" {
		info.Paper = docs[0].Front.Paper
	}

	st := exitOK
	sheets := make([]pack.Sheet, len(docs))
	numbers := map[string]string{}
	for i, doc := range docs {
		c.printErrors(doc)
		fmt.Fprintf(c.stdout, "sheet %d: %s: %s\n", i+1, doc.Path, summaryLine(doc))
		if n := doc.Front.Number; n != "" {
			if first, dup := numbers[n]; dup {
				fmt.Fprintf(c.stderr, "%s: warning: document number %s is also the number of %s\n", doc.Path, n, first)
			}
			numbers[n] = doc.Path
		}
		sheets[i] = pack.Sheet{Doc: doc, Options: stamper.Stamped(doc)}
		st = status(doc, st)
	}
	page, err := pack.Package(info, sheets, version)
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: cannot render the package: %v\n", err)
		return exitError
	}
	if err := os.MkdirAll(filepath.Dir(target), 0o755); err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %v\n", err)
		return exitError
	}
	hashes := make([]string, len(sheets))
	for i, s := range sheets {
		hashes[i] = s.Options.Stamp.SHA256
	}
	if *pdfOut == "" {
		if err := build.WriteFileAtomic(target, page); err != nil {
			fmt.Fprintf(c.stderr, "calcdoc: cannot write %s: %v\n", target, err)
			return exitError
		}
		fmt.Fprintf(c.stdout, "package -> %s: %d sheets, package sha256 %s\n", target, len(sheets), pack.Hash(hashes))
		return st
	}
	if pst := c.packagePair(info, sheets, page, target, *pdfOut); pst != exitOK {
		return max(st, pst)
	}
	fmt.Fprintf(c.stdout, "package -> %s: %d sheets, package sha256 %s\n", target, len(sheets), pack.Hash(hashes))
	fmt.Fprintf(c.stdout, "%s -> %s\n", target, *pdfOut)
	return st
}

// packagePair writes the package's HTML and its PDF as one pair
// (build.Pair): both are made as temporary files and renamed into place
// together at the end, so the HTML and the PDF beside it are always of
// one run. On SIGINT or SIGTERM the browser's process group is killed and
// both old files are left as they were, as they are when printing fails.
// Without a browser the HTML is written alone when there is no PDF it
// would then disagree with. It returns the exit status.
func (c *cli) packagePair(info pack.Info, sheets []pack.Sheet, page []byte, target, pdfPath string) int {
	// signals are caught from before the temporary files are made, so
	// that an interrupted run removes them
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	pair, recovered, err := build.NewPair(target, pdfPath)
	if recovered {
		fmt.Fprintf(c.stderr, "calcdoc: note: an earlier run was stopped between putting %s and %s in place; that pair is now completed\n", target, pdfPath)
	}
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: cannot write %s and %s: %v\n", target, pdfPath, err)
		return exitError
	}
	defer pair.Abort() // a no-op once committed: the temporary files are gone
	if err := os.WriteFile(pair.TmpHTML, page, 0o600); err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: cannot write %s: %v\n", target, err)
		return exitError
	}
	err = c.printPackage(ctx, info, sheets, pair.TmpHTML, pair.TmpPDF, pdfPath)
	switch {
	case ctx.Err() != nil:
		fmt.Fprintf(c.stderr, "calcdoc: interrupted while printing: nothing written, %s and %s are left as they were\n", target, pdfPath)
		return exitError
	case errors.Is(err, pdf.ErrNoChromium):
		if _, serr := os.Stat(pdfPath); serr == nil {
			fmt.Fprintf(c.stderr, "calcdoc: no PDF written: %v; nothing written, so that %s and %s stay a pair\n", err, target, pdfPath)
			return exitUsage
		}
		if rerr := os.Rename(pair.TmpHTML, pair.HTML); rerr != nil {
			fmt.Fprintf(c.stderr, "calcdoc: cannot write %s: %v\n", target, rerr)
			return exitError
		}
		fmt.Fprintf(c.stderr, "calcdoc: no PDF written: %v; the HTML package is in %s\n", err, target)
		return exitUsage
	case err != nil:
		fmt.Fprintf(c.stderr, "calcdoc: no PDF written: %v; %s and %s are left as they were\n", err, target, pdfPath)
		return exitError
	}
	if err := pair.Commit(); err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: cannot put %s and %s in place: %v\n", target, pdfPath, err)
		return exitError
	}
	return exitOK
}

// printPackage prints the package's HTML file htmlPath to pdfPath. Where
// pdftotext can read the PDF back, it finds the page on which each sheet
// starts, writes the package again with those pages in its contents and
// prints it once more (the contents keep room for the numbers, so no page
// moves); otherwise the contents go without page numbers, and it says so.
// shownPDF is the PDF's name in messages.
func (c *cli) printPackage(ctx context.Context, info pack.Info, sheets []pack.Sheet, htmlPath, pdfPath, shownPDF string) error {
	if err := printPDF(ctx, htmlPath, pdfPath); err != nil {
		return err
	}
	pages, err := readPDF(ctx, pdfPath)
	if err != nil {
		if ctx.Err() != nil {
			return ctx.Err()
		}
		fmt.Fprintf(c.stderr, "calcdoc: note: the contents have no page numbers: %v\n", err)
		return nil
	}
	starts, ok := pack.SheetStartPages(pages, len(sheets))
	if !ok {
		fmt.Fprintf(c.stderr, "calcdoc: note: the contents have no page numbers: the sheets' first pages were not found in the printed text\n")
		return nil
	}
	info.StartPages = starts
	page, err := pack.Package(info, sheets, version)
	if err != nil {
		return err
	}
	if err := os.WriteFile(htmlPath, page, 0o600); err != nil {
		return fmt.Errorf("cannot write %s: %v", htmlPath, err)
	}
	if err := printPDF(ctx, htmlPath, pdfPath); err != nil {
		return err
	}
	if pages, err := readPDF(ctx, pdfPath); err == nil {
		if again, ok := pack.SheetStartPages(pages, len(sheets)); !ok || !slices.Equal(again, starts) {
			fmt.Fprintf(c.stderr, "calcdoc: warning: the sheets moved when the contents got their page numbers: check the contents of %s\n", shownPDF)
		}
	}
	return ctx.Err()
}

// pick returns the first of the values that is not "".
func pick(vals ...string) string {
	for _, v := range vals {
		if v != "" {
			return v
		}
	}
	return ""
}

// common returns the value every document has, or "" when they differ.
func common(docs []*calcdoc.Document, get func(calcdoc.FrontMatter) string) string {
	v := get(docs[0].Front)
	for _, d := range docs[1:] {
		if get(d.Front) != v {
			return ""
		}
	}
	return v
}
