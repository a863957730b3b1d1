package calcdoc

import (
	"calcdoc/expr"
	"os"
	"path"
	"strings"
)

// Inputs say where a document's blocks read the files they name (a
// table's CSV file, `table NAME from PATH`).
type Inputs struct {
	// Root is the folder given on the command line: outside git, a file a
	// block names must lie inside it. "" stands for the document's own
	// folder.
	Root string
	// Carried are files by the path the block writes (with /), as a sheet
	// carries them: a block reads these bytes instead of the disk, so that
	// verify evaluates a sheet from the sheet alone.
	Carried map[string][]byte
	// Failed are the files a sheet records that its build could not
	// read, by path, with the error it gave: a block gets the same error,
	// so that a sheet with such an error evaluates again as it was built.
	Failed map[string]string
	// Budget is the work budget the evaluation spends (nil: the default,
	// expr.DefaultBudget), which the caller may stop from another
	// goroutine.
	Budget *expr.Budget
	// Sheets give the documents that use statements name (nil: a loader
	// of the document's own; a build shares one, and verify gives the
	// values a built sheet carries).
	Sheets Sheets
	// Read, when set, reads the files that blocks name (a table's CSV) in
	// place of the disk: it gets the file's absolute path, resolved
	// without the disk (ResolveLexical), and returns its bytes. diff uses
	// it to read a document's files at a git revision.
	Read func(path string) ([]byte, error)
	// AfterBlock, when set, is called with each block right after its
	// evaluation, on the goroutine that evaluates the document, in
	// document order: the block's Result, Errors and DrawErrors are then
	// final, and the document's names (Env) hold everything defined up to
	// the block's end and nothing below it. The sheet writer draws blocks
	// from it while the rest is evaluated (render.Predraw). It must not
	// change the document.
	AfterBlock func(b *Block)

	// sum is the hex SHA-256 of the source when the caller made it (the
	// loader keys its documents by it): the document keeps it
	// (SourceSHA256) instead of hashing the same bytes again.
	sum string
}

// DataFile is one file the document's blocks read.
type DataFile struct {
	Path   string // as the block writes it, with /
	SHA256 string // lower-case hex SHA-256 of Bytes
	Bytes  []byte
	// Disk is the file read, its links followed; "" for a carried file.
	Disk string
	// Err is why the file could not be read ("" when it was): such a
	// file has no bytes and no hash.
	Err string
}

// ParseWith is Parse with the document's inputs.
func ParseWith(path string, src []byte, reg *Registry, in Inputs) *Document {
	return parse(path, src, reg, in)
}

// LoadWith is Load with the document's inputs.
func LoadWith(path string, reg *Registry, in Inputs) (*Document, error) {
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return parse(path, src, reg, in), nil
}

// RootFolder is the folder given on the command line, or the document's
// folder when none was given.
func (d *Document) RootFolder() string {
	if d.inputs.Root != "" {
		return d.inputs.Root
	}
	dir, _ := path.Split(strings.ReplaceAll(d.Path, `\`, "/"))
	if dir == "" {
		return "."
	}
	return dir
}

// Carried returns the bytes a sheet carries for the file a block names
// (the path as written), and whether it carries them; a document read
// from the disk carries none.
func (d *Document) Carried(rel string) ([]byte, bool) {
	if d.inputs.Carried == nil {
		return nil, false
	}
	b, ok := d.inputs.Carried[CleanFilePath(rel)]
	return b, ok
}

// CarriedError returns the error a sheet records for a file its build
// could not read, and whether it records one.
func (d *Document) CarriedError(rel string) (string, bool) {
	msg, ok := d.inputs.Failed[CleanFilePath(rel)]
	return msg, ok
}

// Reader is the function that reads the files the document's blocks
// name in place of the disk (Inputs.Read), or nil.
func (d *Document) Reader() func(path string) ([]byte, error) { return d.inputs.Read }

// IsCarried reports whether the document was given the files it reads
// (verify), rather than reading the disk.
func (d *Document) IsCarried() bool { return d.inputs.Carried != nil }

// CleanFilePath is the key a file is recorded and carried under: the
// path as written, with / as separator, cleaned.
func CleanFilePath(rel string) string {
	return path.Clean(strings.ReplaceAll(rel, `\`, "/"))
}

// AddDataFile records a file a block read; a file read twice is recorded
// once.
func (d *Document) AddDataFile(f *DataFile) {
	f.Path = CleanFilePath(f.Path)
	for _, g := range d.DataFiles {
		if g.Path == f.Path {
			return
		}
	}
	d.DataFiles = append(d.DataFiles, f)
}
