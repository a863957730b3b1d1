package data

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"

	"calcdoc/expr"
)

// ParseBlock reads the text of a `table NAME` block (src: its lines with
// their positions in the document). Lines that start with # are notes;
// the source: line is required; the first other line is the header row
// (`S [mm²] | R_20 [Ω/km]`) and the lines after it the rows of numbers,
// cells separated by |, an empty cell a gap. With fromFile (`table NAME
// from PATH`) the block holds only notes and the source: line, and the
// rows come from ParseCSV. Every problem is reported at its line and
// column in the document, with the fix; the table is nil when there is
// one.
func ParseBlock(name string, src *expr.Source, fromFile bool) (*Table, expr.ErrorList) {
	t := &Table{Name: name}
	var errs expr.ErrorList
	var srcPos expr.Pos
	off := 0
	header := false
	for _, line := range strings.SplitAfter(src.Text, "\n") {
		start := off
		off += len(line)
		line = strings.TrimRight(line, "\r\n")
		text := strings.TrimSpace(line)
		lead := start + len(line) - len(strings.TrimLeft(line, " \t"))
		at := src.PosAt(lead)
		switch {
		case text == "":
			continue
		case strings.HasPrefix(text, "#"):
			t.Notes = append(t.Notes, strings.TrimSpace(text[1:]))
			continue
		case strings.HasPrefix(text, "source:"):
			s := strings.TrimSpace(text[len("source:"):])
			switch {
			case srcPos.IsValid():
				errs.Add(at, fmt.Sprintf("a second source: line (the first is at line %d): give the sources on one line", srcPos.Line()))
			case s == "":
				errs.Add(at, "the source: line names no source: write where the data come from, e.g. source: IEC 60228:2004, Table 2")
			}
			if !srcPos.IsValid() {
				srcPos, t.Source = at, s
			}
			continue
		}
		if fromFile {
			errs.Add(at, fmt.Sprintf("the rows of the table %s come from its file: the block holds only # notes and the source: line", name))
			continue
		}
		cells, cols := splitCells(line, lead-start)
		pos := make([]expr.Pos, len(cells))
		for i := range cells {
			pos[i] = src.PosAt(start + cols[i])
		}
		if isSeparator(text) {
			errs.Add(at, "a row of dashes is not needed here: the first row is the header, the rows below it are data (delete this row)")
			continue
		}
		if !header {
			header = true
			cs, herrs := parseHeader(cells)
			for i, e := range herrs {
				if e != nil {
					errs.Add(pos[i], e.Error())
				}
			}
			t.Cols = cs
			continue
		}
		if len(t.Cols) == 0 {
			continue // the header failed
		}
		if len(cells) != len(t.Cols) {
			errs.Add(at, fmt.Sprintf("this row has %d cells, the header %d: give one cell a column, separated by |, and leave a cell empty for a gap", len(cells), len(t.Cols)))
			continue
		}
		row := Row{Line: at.Line(), Cells: make([]Cell, len(cells))}
		ok := true
		for i, c := range cells {
			cell, err := parseCell(c, t.Cols[i], i == 0)
			if err != nil {
				errs.Add(pos[i], err.Error())
				ok = false
			}
			row.Cells[i] = cell
		}
		if ok {
			if err := t.appendRow(row); err != nil {
				errs.Add(pos[0], err.Error())
			}
		}
	}
	first := src.PosAt(0)
	if !srcPos.IsValid() {
		errs.Add(first, fmt.Sprintf("the table %s has no source: line: add one that names where the data come from (a standard and its table, a catalogue, a measurement), e.g. source: IEC 60228:2004, Table 2", name))
	}
	if !fromFile && len(errs) == 0 {
		switch {
		case !header:
			errs.Add(first, fmt.Sprintf("the table %s has no header row: write the columns, e.g. S [mm²] | R_20 [Ω/km], then a row of numbers a line", name))
		case len(t.Rows) == 0:
			errs.Add(first, fmt.Sprintf("the table %s has no rows of data under its header", name))
		}
	}
	if len(errs) > 0 {
		errs.Sort()
		return nil, errs
	}
	return t, nil
}

// splitCells splits a row at |: the cells, trimmed, and the byte offset
// in line of each (of its first character, or of where it would be when
// empty).
func splitCells(line string, from int) ([]string, []int) {
	var cells []string
	var offs []int
	start := from
	for i := from; i <= len(line); i++ {
		if i < len(line) && line[i] != '|' {
			continue
		}
		c := line[start:i]
		lead := len(c) - len(strings.TrimLeft(c, " \t"))
		cells = append(cells, strings.TrimSpace(c))
		offs = append(offs, start+lead)
		start = i + 1
	}
	return cells, offs
}

func isSeparator(text string) bool {
	return strings.Trim(text, "-:| \t") == "" && strings.Contains(text, "-")
}

var headerRe = sync.OnceValue(func() *regexp.Regexp { return regexp.MustCompile(`^([^\[\]]*?)\s*(?:\[([^\[\]]*)\])?$`) })

// parseHeader reads the header cells: a name, and its unit in brackets
// (none: plain numbers). errs holds, for each cell, its problem or nil.
func parseHeader(cells []string) ([]Column, []error) {
	cols := make([]Column, len(cells))
	errs := make([]error, len(cells))
	bad := false
	for i, c := range cells {
		col, err := parseColumn(c)
		if err == nil {
			for _, p := range cols[:i] {
				if p.key != "" && p.key == col.key {
					err = fmt.Errorf("the column %s is named twice (as %s and %s): give each column its own name", col.Name, p.Name, col.Name)
				}
			}
		}
		if err != nil {
			errs[i], bad = err, true
			continue
		}
		cols[i] = col
	}
	if bad {
		return nil, errs
	}
	return cols, errs
}

func parseColumn(c string) (Column, error) {
	m := headerRe().FindStringSubmatch(c)
	if c == "" || m == nil || m[1] == "" {
		if c == "" {
			return Column{}, fmt.Errorf("a header cell is empty: give each column a name and, in brackets, its unit, e.g. R_20 [Ω/km]")
		}
		return Column{}, fmt.Errorf("the header %q is not a name and a unit in brackets: write e.g. R_20 [Ω/km], or a name alone for plain numbers", c)
	}
	name := m[1]
	if !isName(name) {
		return Column{}, fmt.Errorf("the column name %q is not a name: a letter, then letters, digits and _ (e.g. R_20), and its unit in brackets after it", name)
	}
	if p := expr.NameProblem(name); p != "" {
		return Column{}, fmt.Errorf("the column name %q: %s", name, p)
	}
	col := Column{Name: name, key: expr.NameKey(name)}
	if strings.Contains(c, "[") {
		text := strings.TrimSpace(m[2])
		if text == "" {
			return Column{}, fmt.Errorf("the brackets after %s hold no unit: give the unit, or leave the brackets out for plain numbers", name)
		}
		u, err := expr.ParseUnit(text)
		if err != nil {
			return Column{}, fmt.Errorf("the unit of %s: %v", name, err)
		}
		col.Unit = u
	}
	return col, nil
}

var numberRe = sync.OnceValue(func() *regexp.Regexp {
	return regexp.MustCompile(`^[+-]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?$`)
})

// parseCell reads one cell of column c: a number, or empty for a gap (a
// key cannot be a gap).
func parseCell(text string, c Column, key bool) (Cell, error) {
	cell := Cell{Text: text}
	if text == "" {
		if key {
			return cell, fmt.Errorf("the key %s of this row is empty: every row needs its key", c.Name)
		}
		cell.Gap = true
		return cell, nil
	}
	if !numberRe().MatchString(text) {
		hint := "write a number such as 0.524 or 1.2e3, with no unit (the header gives it), or leave the cell empty for a gap"
		if numberRe().MatchString(strings.Replace(text, ",", ".", 1)) {
			hint = "write the decimal point as \".\" (" + strings.Replace(text, ",", ".", 1) + ")"
		}
		return cell, fmt.Errorf("%q in column %s is not a number: %s", text, c.Name, hint)
	}
	x, err := strconv.ParseFloat(text, 64)
	if err != nil || math.IsInf(x, 0) {
		return cell, fmt.Errorf("%q in column %s is too large to hold", text, c.Name)
	}
	if u := c.Unit; u != nil {
		x = x*u.Scale + u.Offset
	}
	cell.V = x
	return cell, nil
}

// appendRow adds a row whose key must rise above the last one's.
func (t *Table) appendRow(r Row) error {
	if n := len(t.Rows); n > 0 {
		last := t.Rows[n-1].Cells[0]
		if !(r.Cells[0].V > last.V) {
			what := "is below"
			if r.Cells[0].V == last.V {
				what = "repeats"
			}
			return fmt.Errorf("the key %s%s %s the key %s%s of the row above (line %d): keys rise strictly from row to row (sort the rows, and give each key once)", r.Cells[0].Text, t.Cols[0].unitText(), what, last.Text, t.Cols[0].unitText(), t.Rows[n-1].Line)
		}
	}
	t.Rows = append(t.Rows, r)
	return nil
}

// CSVError is a problem in a CSV file: its path, the line in the file
// and the column (counting fields from 1; 0 for the whole line).
type CSVError struct {
	Path      string
	Line, Col int
	Msg       string
}

func (e *CSVError) Error() string {
	if e.Col > 0 {
		return fmt.Sprintf("%s:%d: column %d: %s", e.Path, e.Line, e.Col, e.Msg)
	}
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", e.Path, e.Line, e.Msg)
	}
	return fmt.Sprintf("%s: %s", e.Path, e.Msg)
}

// ParseCSV reads a table from a CSV file's bytes (RFC 4180,
// comma-separated, the first row the headers written as in a block,
// "S [mm²]"). path is the path the block writes, for the messages. The
// table has no source (the block gives it) and its Path and SHA256 are
// set. The error is a *CSVError.
func ParseCSV(path string, b []byte) (*Table, error) {
	sum := sha256.Sum256(b)
	t := &Table{Path: path, SHA256: hex.EncodeToString(sum[:])}
	fail := func(line, col int, format string, args ...any) (*Table, error) {
		return nil, &CSVError{Path: path, Line: line, Col: col, Msg: fmt.Sprintf(format, args...)}
	}
	if !utf8.Valid(b) {
		return fail(0, 0, "the file is not UTF-8 text: save it as CSV UTF-8")
	}
	b = bytes.TrimPrefix(b, []byte("\ufeff"))
	r := csv.NewReader(bytes.NewReader(b))
	r.FieldsPerRecord = -1
	r.TrimLeadingSpace = true
	first := true
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return fail(pe.Line, 0, "%v (a field holding a comma or a quote is written in double quotes, a quote inside it doubled)", pe.Err)
			}
			return fail(0, 0, "%v", err)
		}
		line, _ := r.FieldPos(0)
		for i := range rec {
			rec[i] = strings.TrimSpace(rec[i])
		}
		if first {
			first = false
			if strings.HasPrefix(rec[0], "#") {
				return fail(line, 1, "a CSV file holds no notes: the first row is the headers (S [mm²],R_20 [Ω/km]); put notes in the table block as # lines")
			}
			cols, errs := parseHeader(rec)
			for i, e := range errs {
				if e != nil {
					return fail(line, i+1, "%v", e)
				}
			}
			t.Cols = cols
			continue
		}
		if len(rec) == 1 && rec[0] == "" && len(t.Cols) > 1 {
			continue // an empty line at the end, say
		}
		if len(rec) != len(t.Cols) {
			return fail(line, 0, "this row has %d fields, the header row %d: give one field a column, and leave a field empty for a gap", len(rec), len(t.Cols))
		}
		row := Row{Line: line, Cells: make([]Cell, len(rec))}
		for i, c := range rec {
			cell, err := parseCell(c, t.Cols[i], i == 0)
			if err != nil {
				return fail(line, i+1, "%v", err)
			}
			row.Cells[i] = cell
		}
		if err := t.appendRow(row); err != nil {
			return fail(line, 1, "%v", err)
		}
	}
	if first {
		return fail(0, 0, "the file is empty: the first row holds the headers, e.g. S [mm²],R_20 [Ω/km]")
	}
	if len(t.Rows) == 0 {
		return fail(0, 0, "the file has a header row and no rows of data")
	}
	return t, nil
}

// FromFile is the table of a `table NAME from PATH` block: the block's
// name, source and notes (block, from ParseBlock with fromFile) with the
// rows of the CSV file at path (ParseCSV of its bytes b).
func FromFile(block *Table, path string, b []byte) (*Table, error) {
	t, err := ParseCSV(path, b)
	if err != nil {
		return nil, err
	}
	t.Name, t.Source, t.Notes = block.Name, block.Source, block.Notes
	return t, nil
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
