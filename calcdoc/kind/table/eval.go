package table

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"os"
	"strings"
	"unicode"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/table/data"
)

// Result is what a table block gives: the table read, or nil when the
// block has an error.
type Result struct {
	Table *data.Table
}

// evalTable reads the block's argument (NAME, or NAME from PATH), the
// block's lines and, for a file, the file; then defines the table.
func evalTable(b *calcdoc.Block) {
	res := &Result{}
	b.Result = res
	name, rest, _ := strings.Cut(b.Arg, " ")
	rest = strings.TrimSpace(rest)
	if name == "" {
		b.Errorf(b.InfoPos, "a table block needs a name: write ```table NAME (the rows in the block) or ```table NAME from PATH (the rows in a CSV file)")
		return
	}
	if !isName(name) {
		b.Errorf(b.ArgPos, "%q is not a name for a table: a name starts with a letter, then letters, digits and _ (e.g. cu, R_cable)", name)
		return
	}
	var rel string
	relOff := 0
	if rest != "" {
		word, p, _ := strings.Cut(rest, " ")
		if word != "from" {
			b.Errorf(b.ArgAt(len(name)+1+strings.Index(b.Arg[len(name)+1:], rest)), "after the table's name comes nothing, or from PATH (a CSV file relative to the document), not %q", rest)
			return
		}
		rel = strings.TrimSpace(p)
		relOff = strings.LastIndex(b.Arg, rel)
		if rel == "" {
			b.Errorf(b.ArgAt(len(b.Arg)), "from names no file: write the CSV file's path relative to the document, e.g. from data/cu.csv")
			return
		}
	}
	tab, errs := data.ParseBlock(name, b.Source(), rel != "")
	if len(errs) > 0 {
		b.Errors = append(b.Errors, errs...)
		return
	}
	if rel != "" {
		pathPos := b.ArgAt(relOff)
		bytes, disk, err := readFile(b.Doc(), rel)
		if err != nil {
			// recorded, so that the sheet carries the error and verify
			// evaluates it again as it was built
			b.Doc().AddDataFile(&calcdoc.DataFile{Path: rel, Err: err.Error()})
			b.Errorf(pathPos, "%v", err)
			return
		}
		ft, err := data.FromFile(tab, calcdoc.CleanFilePath(rel), bytes)
		if err != nil {
			var ce *data.CSVError
			if errors.As(err, &ce) {
				b.Errorf(pathPos, "in the file %v", err)
			} else {
				b.Errorf(pathPos, "%v", err)
			}
			return
		}
		sum := sha256.Sum256(bytes)
		b.Doc().AddDataFile(&calcdoc.DataFile{Path: rel, SHA256: hex.EncodeToString(sum[:]), Bytes: bytes, Disk: disk})
		tab = ft
	}
	if err := b.Env().DefineTable(name, b.ArgPos, tab); err != nil {
		b.Errors = append(b.Errors, err)
		return
	}
	res.Table = tab
}

// readFile reads the file rel that a block of doc names: the bytes the
// sheet carries when it is verified, else the file on the disk, which
// must lie inside the git repository that holds the document (outside
// git, inside the folder given on the command line).
func readFile(doc *calcdoc.Document, rel string) (b []byte, disk string, err error) {
	if doc.IsCarried() {
		if b, ok := doc.Carried(rel); ok {
			return b, "", nil
		}
		if msg, ok := doc.CarriedError(rel); ok {
			return nil, "", errors.New(msg)
		}
		return nil, "", errors.New(rel + ": the sheet carries no such file: it was built without it")
	}
	root := data.FindRoot(doc.Path, doc.RootFolder())
	if read := doc.Reader(); read != nil {
		p, err := data.ResolveLexical(doc.Path, rel, root)
		if err != nil {
			return nil, "", err
		}
		if b, err = read(p); err != nil {
			return nil, "", errors.New(rel + ": the file cannot be read: " + err.Error())
		}
		return b, "", nil
	}
	disk, err = data.ResolveInside(doc.Path, rel, root)
	if err != nil {
		return nil, "", err
	}
	b, err = os.ReadFile(disk)
	if err != nil {
		return nil, "", errors.New(rel + ": the file cannot be read: " + err.Error())
	}
	return b, disk, nil
}

// isName reports whether s has the shape of a name: a letter, then
// letters, digits and _.
func isName(s string) bool {
	for i, r := range s {
		if !unicode.IsLetter(r) && (i == 0 || r != '_' && !unicode.IsDigit(r)) {
			return false
		}
	}
	return s != ""
}
