package expr

import (
	"fmt"
	"sort"
	"strconv"
	"strings"
	"sync"
	"unicode/utf8"
)

// A position in calcdoc is a byte offset in a file (the way go/token
// keeps them): nodes, tokens and errors carry a Pos, and a Pos is turned
// into a line and a column only when it is shown, by File.Position, the
// one converter. A column counts characters (runes), not bytes; a tab is
// one character.

// File is one source file: its name as given, its text (a column is
// counted over it) and the byte offset at which each of its lines starts.
// A line ends at "\n" (a "\r\n" is one line end: the "\r" stands at the
// end of its line). A File is safe for use by several goroutines.
type File struct {
	name  string
	text  string
	lines []int // byte offset of each line start
	order int   // place in its FileSet, from 1 (0: in none)

	mu   sync.Mutex
	memo struct{ off, line, col int } // the last position computed (line from 0; col 0: none)
}

// NewFile makes a file of its own (in no FileSet) from its name and text.
func NewFile(name, text string) *File {
	f := &File{name: name, text: text, lines: []int{0}}
	for i := 0; i < len(text); i++ {
		if text[i] == '\n' {
			f.lines = append(f.lines, i+1)
		}
	}
	return f
}

// FileSet is the set of files a document is read from, in the order they
// were added; positions in different files of a set sort in that order.
type FileSet struct {
	mu    sync.Mutex
	files []*File
}

// AddFile adds a file to the set.
func (s *FileSet) AddFile(name, text string) *File {
	f := NewFile(name, text)
	s.mu.Lock()
	s.files = append(s.files, f)
	f.order = len(s.files)
	s.mu.Unlock()
	return f
}

// Files returns the files of the set in the order they were added.
func (s *FileSet) Files() []*File {
	s.mu.Lock()
	defer s.mu.Unlock()
	return append([]*File(nil), s.files...)
}

// Name is the file's name as given ("" for a text of its own, such as an
// expression parsed alone).
func (f *File) Name() string { return f.name }

// Size is the file's length in bytes.
func (f *File) Size() int { return len(f.text) }

// Text is the file's text.
func (f *File) Text() string { return f.text }

// LineCount is the number of lines of the file.
func (f *File) LineCount() int { return len(f.lines) }

// Pos is the position of byte offset off of the file.
func (f *File) Pos(off int) Pos { return Pos{File: f, Off: max(0, min(off, len(f.text)))} }

// LineStart is the position of the first character of line n (from 1).
func (f *File) LineStart(n int) Pos {
	n = max(1, min(n, len(f.lines)))
	return Pos{File: f, Off: f.lines[n-1]}
}

// line returns the index (from 0) of the line holding byte offset off.
func (f *File) line(off int) int {
	return max(0, sort.Search(len(f.lines), func(i int) bool { return f.lines[i] > off })-1)
}

// Position converts a byte offset of the file into its line and column
// (both from 1; the column counts characters). It is the one place where
// an offset becomes a line and a column. Offsets asked in increasing order
// along one line are counted on from the last one, so that the positions
// of every token of a long line cost time linear in its length.
func (f *File) Position(off int) Position {
	off = max(0, min(off, len(f.text)))
	i := f.line(off)
	f.mu.Lock()
	defer f.mu.Unlock()
	var col int
	if m := f.memo; m.col > 0 && m.line == i && m.off <= off {
		col = m.col + utf8.RuneCountInString(f.text[m.off:off])
	} else {
		col = 1 + utf8.RuneCountInString(f.text[f.lines[i]:off])
	}
	f.memo.off, f.memo.line, f.memo.col = off, i, col
	return Position{Filename: f.name, Line: i + 1, Col: col}
}

// Pos is a position in a source file: the file and a byte offset in it.
// The zero Pos is "no position". Line, Col and Position resolve it.
type Pos struct {
	File *File
	Off  int
}

// IsValid reports whether p names a real position.
func (p Pos) IsValid() bool { return p.File != nil }

// Position is the line and column of p (the zero Position when p is not
// valid).
func (p Pos) Position() Position {
	if p.File == nil {
		return Position{}
	}
	return p.File.Position(p.Off)
}

// Line is the line of p, from 1 (0 when p is not valid).
func (p Pos) Line() int {
	if p.File == nil {
		return 0
	}
	return p.File.line(p.Off) + 1
}

// Col is the column of p, from 1, counted in characters (0 when p is not
// valid).
func (p Pos) Col() int { return p.Position().Col }

// Add is the position n bytes after p (in the same file).
func (p Pos) Add(n int) Pos {
	if p.File == nil {
		return p
	}
	return p.File.Pos(p.Off + n)
}

// LineStart is the position of the first character of p's line.
func (p Pos) LineStart() Pos {
	if p.File == nil {
		return p
	}
	return Pos{File: p.File, Off: p.File.lines[p.File.line(p.Off)]}
}

// Before reports whether p comes strictly before q: no position comes
// first, then the files in the order of their set (by name when they are
// in none), then the offsets (also of two texts of one file: the same
// place in the set and the same name).
func (p Pos) Before(q Pos) bool {
	if p.File != q.File {
		switch {
		case p.File == nil || q.File == nil:
			return p.File == nil
		case p.File.order != q.File.order:
			return p.File.order < q.File.order
		case p.File.name != q.File.name:
			return p.File.name < q.File.name
		}
		// two texts of one file (an incremental evaluation keeps the
		// positions of the blocks above the first change in the text
		// before it): by offset
	}
	return p.Off < q.Off
}

// String is p as a message about its own file names it: "line:col"
// (Position.String without the file's name), or "-".
func (p Pos) String() string { return p.Position().InFile().String() }

// Position is a resolved position: the file's name, the line and the
// column (both from 1; the column counts characters). The zero Position is
// "no position".
type Position struct {
	Filename string
	Line     int
	Col      int
}

// IsValid reports whether p names a real position.
func (p Position) IsValid() bool { return p.Line > 0 }

// String is "file:line:col", or "line:col" when the file has no name, or
// "-" when p is not valid. It is the one place a position is written.
func (p Position) String() string {
	if !p.IsValid() {
		return "-"
	}
	s := strconv.Itoa(p.Line) + ":" + strconv.Itoa(p.Col)
	if p.Filename != "" {
		s = p.Filename + ":" + s
	}
	return s
}

// InFile is p without its file's name: the position as the sheet of that
// file shows it ("line:col").
func (p Position) InFile() Position {
	p.Filename = ""
	return p
}

// Place lays lines out in a file of their own, each at the line and
// column of at (earlier lines blank, the columns before it spaces), and
// returns the position of each: for reading a piece of text as if it
// stood where a document has it (tests, and tools that hold lines
// without their file). at must be in increasing order of line.
func Place(lines []string, at []Position) []Pos {
	var b strings.Builder
	offs := make([]int, len(lines))
	line := 1
	for i, l := range lines {
		p := Position{Line: line, Col: 1}
		if i < len(at) {
			p = at[i]
		}
		if i > 0 {
			b.WriteByte('\n')
			line++
		}
		for ; line < p.Line; line++ {
			b.WriteByte('\n')
		}
		b.WriteString(strings.Repeat(" ", max(0, p.Col-1)))
		offs[i] = b.Len()
		b.WriteString(l)
	}
	f := NewFile("", b.String())
	out := make([]Pos, len(lines))
	for i, o := range offs {
		out[i] = f.Pos(o)
	}
	return out
}

// PlaceAt is the position of text laid out in a file of its own with its
// first line at line and col and its later lines at column 1 of the lines
// that follow (Place with text's lines).
func PlaceAt(text string, line, col int) Pos {
	lines := strings.Split(text, "\n")
	at := make([]Position, len(lines))
	for i := range at {
		at[i] = Position{Line: line + i, Col: 1}
	}
	at[0].Col = col
	return Place(lines, at)[0]
}

// Error is one problem found in a document, at a position, in words an
// engineer understands. Fix, where not empty, says how to put it right.
type Error struct {
	Pos Pos
	Msg string
}

// Error is "file:line:col: message" (without the file when it has no name,
// and the message alone without a position).
func (e *Error) Error() string { return e.Report("") }

// Report is the error as the command writes it, with a label before the
// message when label is not "": "file:line:col: warning: message".
func (e *Error) Report(label string) string {
	msg := e.Msg
	if label != "" {
		msg = label + ": " + msg
	}
	if e.Pos.IsValid() {
		return e.Pos.Position().String() + ": " + msg
	}
	return msg
}

// InFile is the error as the sheet of its own file shows it:
// "line:col: message".
func (e *Error) InFile() string {
	if e.Pos.IsValid() {
		return e.Pos.Position().InFile().String() + ": " + e.Msg
	}
	return e.Msg
}

// Errorf makes an *Error at pos.
func Errorf(pos Pos, format string, args ...any) *Error {
	return &Error{Pos: pos, Msg: fmt.Sprintf(format, args...)}
}

// ErrorList is a list of errors, sorted by position with Sort.
type ErrorList []*Error

// MaxErrors is the largest number of errors a list takes through Add, so
// that one reading (of a block, an expression or the front matter) of a
// long line of characters outside the language costs no more than its
// length and is reported on a sheet of a readable size.
const MaxErrors = 100

// Add appends an error to a list of fewer than MaxErrors errors (however
// they were put there). The error that would be the list's MaxErrors+1st
// is replaced by one, at its position, saying that the rest are not
// reported; later ones are dropped.
func (l *ErrorList) Add(pos Pos, msg string) {
	switch n := len(*l); {
	case n < MaxErrors:
		*l = append(*l, &Error{Pos: pos, Msg: msg})
	case n == MaxErrors:
		*l = append(*l, &Error{Pos: pos, Msg: fmt.Sprintf("more than %d errors here: the rest are not reported (correct these first)", MaxErrors)})
	}
}

// Sort orders the list by position; errors at the same position keep their order.
func (l ErrorList) Sort() {
	sort.SliceStable(l, func(i, j int) bool { return l[i].Pos.Before(l[j].Pos) })
}

// Err returns the list as an error, or nil when it is empty.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	return l
}

func (l ErrorList) Error() string {
	var b strings.Builder
	for i, e := range l {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(e.Error())
	}
	return b.String()
}
