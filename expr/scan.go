package expr

import (
	"fmt"
	"sort"
	"strconv"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"
)

// Source is the text of one block (or one line) and where each of its lines
// stands in its file, so that every position is a position in the .md
// file. Each line of Text stands verbatim in the file at its position.
type Source struct {
	Text   string
	Lines  []Pos // position in the file of the first character of each line of Text
	starts []int
}

// NewSource builds a Source whose text stands in the file at first (its
// later lines at the start of the lines that follow). When first is not
// valid, the text is a file of its own (named "").
func NewSource(text string, first Pos) *Source {
	if !first.IsValid() {
		first = NewFile("", text).Pos(0)
	}
	s := &Source{Text: text}
	s.index()
	s.Lines = make([]Pos, len(s.starts))
	for i, st := range s.starts {
		s.Lines[i] = first.Add(st)
	}
	return s
}

// NewSourceLines builds a Source from lines already split, each with its
// position in the file (where the line stands verbatim). Without a
// position for every line, the lines are a file of their own.
func NewSourceLines(lines []string, pos []Pos) *Source {
	if len(pos) < len(lines) {
		return NewSource(strings.Join(lines, "\n"), Pos{})
	}
	text, ok := inFile(lines, pos)
	if !ok {
		text = strings.Join(lines, "\n")
	}
	s := &Source{Text: text, Lines: append([]Pos(nil), pos[:len(lines)]...)}
	s.index()
	return s
}

// inFile returns the lines joined by line breaks as a piece of their
// file's text, with no copy, when they stand in it so: one after the
// other, each followed by "\n" (the text of a fenced block outside a
// list or a quotation). The names and numbers parsed from the source
// keep pieces of it, so a copy would stay alive as long as they do.
func inFile(lines []string, pos []Pos) (string, bool) {
	if len(lines) == 0 || pos[0].File == nil {
		return "", false
	}
	f := pos[0].File
	for i, l := range lines {
		p := pos[i]
		end := p.Off + len(l)
		if p.File != f || end > len(f.text) || f.text[p.Off:end] != l {
			return "", false
		}
		if i+1 < len(lines) && (pos[i+1].Off != end+1 || end >= len(f.text) || f.text[end] != '\n') {
			return "", false
		}
	}
	last := len(lines) - 1
	return f.text[pos[0].Off : pos[last].Off+len(lines[last])], true
}

func (s *Source) index() {
	s.starts = make([]int, 1, strings.Count(s.Text, "\n")+1)
	for i := 0; i < len(s.Text); i++ {
		if s.Text[i] == '\n' {
			s.starts = append(s.starts, i+1)
		}
	}
}

// PosAt converts a byte offset into Text to a position in the file.
func (s *Source) PosAt(off int) Pos {
	p, _ := s.posNear(off, 0)
	return p
}

// posNear is PosAt that looks at line hint first (the line of the last
// position asked for, when positions come in order, as the parser asks
// for them), and returns the line it found.
func (s *Source) posNear(off, hint int) (Pos, int) {
	off = max(0, min(off, len(s.Text)))
	i := hint
	if i < 0 || i >= len(s.starts) || s.starts[i] > off || i+1 < len(s.starts) && s.starts[i+1] <= off {
		i = max(0, sort.Search(len(s.starts), func(i int) bool { return s.starts[i] > off })-1)
	}
	if i >= len(s.Lines) {
		return Pos{}, i
	}
	return s.Lines[i].Add(off - s.starts[i]), i
}

// Kind is the kind of a token.
type Kind int

// Token kinds.
const (
	EOF Kind = iota
	NEWLINE
	COMMENT // "#" to the end of the line; Text is what follows "#"
	NUMBER  // 12, 0.5, 1e-3, and imaginary literals j4, j0.5
	IDENT
	UNIT // a unit after a number or ")": V, kA, Ω/km, °
	ADD  // +
	SUB  // -
	MUL  // *
	DIV  // /
	POW  // ^
	ANGLE
	PAR // ∥ (and || in operator position, see the parser)
	BAR // |
	LPAREN
	RPAREN
	LBRACK
	RBRACK
	COMMA
	SEMI
	ASSIGN // =
	COLON
	LT
	LE
	GT
	GE
	EQ
	NE
	DISPLAY // "[kA polar]" directly after a name, a number, a unit or ")": Text is what the brackets hold
	ILLEGAL
	LBRACE // { of a case literal
	RBRACE // }
)

var kindNames = map[Kind]string{
	EOF: "end of line", NEWLINE: "end of line", COMMENT: "comment", NUMBER: "number", IDENT: "name",
	UNIT: "unit", ADD: "+", SUB: "-", MUL: "*", DIV: "/", POW: "^", ANGLE: "∠", PAR: "∥", BAR: "|",
	LPAREN: "(", RPAREN: ")", LBRACK: "[", RBRACK: "]", COMMA: ",", SEMI: ";", ASSIGN: "=",
	COLON: ":", DISPLAY: "display bracket", LT: "<", LE: "<=", GT: ">", GE: ">=", EQ: "==", NE: "!=", ILLEGAL: "illegal character",
	LBRACE: "{", RBRACE: "}",
}

func (k Kind) String() string { return kindNames[k] }

// IsComparison reports whether k is one of the comparisons of a check.
func (k Kind) IsComparison() bool { return k >= LT && k <= NE }

// Token is one token, with its byte span in the Source text.
type Token struct {
	Kind        Kind
	Text        string
	Off, End    int     // byte offsets in Source.Text
	Num         float64 // NUMBER: the value (the imaginary part for an imaginary literal)
	Imag        bool    // NUMBER: an imaginary literal such as j4
	SpaceBefore bool
}

// Limits that keep every input bounded.
const (
	MaxNumberLen = 64  // characters in one numeric literal
	MaxDepth     = 200 // nesting of parentheses, brackets and operators
	MaxTokens    = 1 << 20
)

// Scan splits src into tokens. Every line break is a NEWLINE token; the
// parser joins lines while a parenthesis or bracket is open. Errors
// (an illegal character, a number out of range) are added to errs and
// scanning goes on.
func Scan(src *Source, errs *ErrorList) []Token {
	// about one token for every four bytes of a calc block: room for
	// them all at once instead of growing (and copying) the slice
	return scanInto(src, errs, make([]Token, 0, len(src.Text)/4+8))
}

// scanInto is Scan appending to buf[:0].
func scanInto(src *Source, errs *ErrorList, buf []Token) []Token {
	sc := scanner{src: src, text: src.Text, errs: errs, toks: buf[:0]}
	return sc.run()
}

// scratch is what one ParseBlock uses and drops: the tokens and the
// statements cut from them. Nothing parsed keeps a token (names and
// numbers keep strings of the source text), so the buffers go back to
// scratchPool, cleared, for the next block.
type scratch struct {
	toks  []Token
	stmts [][]Token
}

var scratchPool = sync.Pool{New: func() any { return new(scratch) }}

// release clears the buffers (they must not keep a source text alive)
// and returns them to the pool; a buffer grown very large is dropped.
func (sc *scratch) release() {
	if cap(sc.toks) > 1<<16 {
		sc.toks = nil
	}
	if cap(sc.stmts) > 1<<14 {
		sc.stmts = nil
	}
	// only the used part: what lies beyond it was cleared before
	clear(sc.toks)
	clear(sc.stmts)
	sc.toks, sc.stmts = sc.toks[:0], sc.stmts[:0]
	scratchPool.Put(sc)
}

type scanner struct {
	src  *Source
	text string
	off  int
	errs *ErrorList
	toks []Token
}

func (s *scanner) errAt(off int, msg string) { s.errs.Add(s.src.PosAt(off), msg) }

func (s *scanner) peekRune(off int) (rune, int) {
	if off >= len(s.text) {
		return -1, 0
	}
	return utf8.DecodeRuneInString(s.text[off:])
}

func isLetter(r rune) bool {
	return r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= 0x80 && unicode.IsLetter(r)
}
func isDigit(r rune) bool { return r >= '0' && r <= '9' }

// unitStart reports whether r may begin a unit.
func unitStart(r rune) bool { return isLetter(r) || r == '°' || r == '%' || r == 'Ω' }

func (s *scanner) emit(t Token) { s.toks = append(s.toks, t) }

func (s *scanner) last() Kind {
	if len(s.toks) == 0 {
		return NEWLINE
	}
	return s.toks[len(s.toks)-1].Kind
}

func (s *scanner) run() []Token {
	for s.off < len(s.text) {
		if len(s.toks) > MaxTokens {
			s.errAt(s.off, "too many tokens in one block")
			break
		}
		start := s.off
		r, w := s.peekRune(s.off)
		space := false
		if r == ' ' || r == '\t' || r == '\r' {
			for r == ' ' || r == '\t' || r == '\r' {
				s.off += w
				r, w = s.peekRune(s.off)
			}
			space = true
			start = s.off
			if r == -1 {
				break
			}
		}
		// A unit may follow a number or ")" directly or after one space, and
		// a second unit may follow an angle unit ("16∠-40° A").
		if unitStart(r) && s.unitAllowed(space, start) {
			s.scanUnit(start, space)
			continue
		}
		switch {
		case r == '\n':
			s.off += w
			s.emit(Token{Kind: NEWLINE, Off: start, End: s.off})
		case r == '#':
			end := strings.IndexByte(s.text[s.off:], '\n')
			if end < 0 {
				end = len(s.text)
			} else {
				end += s.off
			}
			s.emit(Token{Kind: COMMENT, Text: strings.TrimSpace(s.text[s.off+1 : end]), Off: start, End: end, SpaceBefore: space})
			s.off = end
		case isDigit(r) || r == '.' && s.nextIsDigit(s.off+1):
			s.scanNumber(start, false, space)
		case r == 'j' && (s.nextIsDigit(s.off+1) || s.byteAt(s.off+1) == '.' && s.nextIsDigit(s.off+2)):
			s.off++
			s.scanNumber(start, true, space)
		case startsName(r):
			s.scanName(start, space)
		default:
			s.off += w
			k := ILLEGAL
			switch r {
			case '+':
				k = ADD
			case '-', '−':
				k = SUB
			case '*', '·', '×':
				k = MUL
			case '/':
				k = DIV
				if s.byteAt(s.off) == '_' {
					s.off++
					k = ANGLE
				}
			case '^':
				k = POW
			case '∠':
				k = ANGLE
			case '∥':
				k = PAR
			case '|':
				k = BAR
			case '(':
				k = LPAREN
			case ')':
				k = RPAREN
			case '[':
				k = LBRACK
				if !space && s.displayAllowed() {
					if end := strings.IndexAny(s.text[s.off:], "]\n"); end >= 0 && s.text[s.off+end] == ']' {
						s.emit(Token{Kind: DISPLAY, Text: strings.TrimSpace(s.text[s.off : s.off+end]), Off: start, End: s.off + end + 1})
						s.off += end + 1
						continue
					}
				}
			case ']':
				k = RBRACK
			case '{':
				k = LBRACE
			case '}':
				k = RBRACE
			case ',':
				k = COMMA
			case ';':
				k = SEMI
			case ':':
				k = COLON
			case '=':
				k = ASSIGN
				if s.byteAt(s.off) == '=' {
					s.off++
					k = EQ
				}
			case '<':
				k = LT
				if s.byteAt(s.off) == '=' {
					s.off++
					k = LE
				}
			case '>':
				k = GT
				if s.byteAt(s.off) == '=' {
					s.off++
					k = GE
				}
			case '!':
				if s.byteAt(s.off) == '=' {
					s.off++
					k = NE
				}
			case '≤':
				k = LE
			case '≥':
				k = GE
			case '≠':
				k = NE
			case '°':
				// "°" after a name or a closing parenthesis with no space
				k = UNIT
			}
			if k == ILLEGAL {
				msg := "unexpected character " + strconv.QuoteRune(r)
				if r == utf8.RuneError && w == 1 {
					msg = "invalid UTF-8 in the source"
				} else if r == '!' {
					msg = "unexpected \"!\" (write != for \"not equal\")"
				} else if hint, ok := charHints[r]; ok {
					msg += " (" + hint + ")"
				}
				s.errAt(start, msg)
			}
			t := Token{Kind: k, Text: s.text[start:s.off], Off: start, End: s.off, SpaceBefore: space}
			s.emit(t)
		}
	}
	return s.toks
}

// charHints name the notation for characters met outside the places
// where they are read.
var charHints = map[rune]string{
	'√': "write sqrt(x) for a square root",
	'²': "² is read only inside a unit, as in mm²: write ^2 for a power",
	'³': "³ is read only inside a unit, as in m³: write ^3 for a power",
	'÷': "write / to divide",
	'≈': "a check compares with ==, which holds within a relative tolerance of 1e-9",
	'₀': "a subscript is written with _, as in V_0",
	'₁': "a subscript is written with _, as in V_1",
	'₂': "a subscript is written with _, as in V_2",
	'₃': "a subscript is written with _, as in V_3",
}

// displayAllowed reports whether a "[" here opens a display bracket: it
// follows a value directly (LANGUAGE.md: a "[" that follows a value is
// never an index).
func (s *scanner) displayAllowed() bool {
	switch s.last() {
	case IDENT, NUMBER, UNIT, RPAREN:
		return true
	case BAR:
		// only after a closing bar, "|I|[kA]": an odd number of bars on the
		// line so far means the last one opens, as in "|[3; 4]|"
		n := 0
		for i := len(s.toks) - 1; i >= 0 && s.toks[i].Kind != NEWLINE; i-- {
			if s.toks[i].Kind == BAR {
				n++
			}
		}
		return n%2 == 0
	}
	return false
}

func (s *scanner) byteAt(off int) byte {
	if off < len(s.text) {
		return s.text[off]
	}
	return 0
}

func (s *scanner) nextIsDigit(off int) bool { return off < len(s.text) && isDigit(rune(s.text[off])) }

// unitAllowed reports whether a unit may start here: after a number or a
// closing parenthesis (directly or after one space), or after an angle
// unit (after one space).
func (s *scanner) unitAllowed(space bool, start int) bool {
	if len(s.toks) == 0 {
		return false
	}
	prev := s.toks[len(s.toks)-1]
	if space && start-prev.End != 1 {
		return false // more than one space ends it
	}
	switch prev.Kind {
	case NUMBER, RPAREN:
		return true
	case UNIT:
		if !space {
			return false
		}
		u := prev.Text
		return u == "°" || u == "deg" || u == "rad"
	case IDENT:
		// only "°" directly after a name
		r, _ := s.peekRune(start)
		return !space && r == '°'
	}
	return false
}

// scanName reads a name. A name holding a character that
// names may not hold (checkName) is reported there and becomes an ILLEGAL
// token, so that its statement is not evaluated.
func (s *scanner) scanName(start int, space bool) {
	ascii := true
	dot := -1
	for s.off < len(s.text) {
		if c := s.text[s.off]; c < utf8.RuneSelf {
			if c == '.' && dot < 0 {
				// a column of a table, "cu.R_20" (LANGUAGE.md section 9)
				if r, _ := s.peekRune(s.off + 1); startsName(r) {
					dot = s.off - start
					s.off++
					continue
				}
			}
			if !(isLetter(rune(c)) || isDigit(rune(c)) || c == '_') {
				break
			}
			s.off++
			continue
		}
		r, w := s.peekRune(s.off)
		if !inName(r) {
			break
		}
		ascii = false
		s.off += w
	}
	text := s.text[start:s.off]
	t := Token{Kind: IDENT, Text: text, Off: start, End: s.off, SpaceBefore: space}
	if !ascii {
		off, msg := checkName(text)
		if dot >= 0 {
			if off, msg = checkName(text[:dot]); off < 0 {
				off, msg = checkName(text[dot+1:])
				if off >= 0 {
					off += dot + 1
				}
			}
		}
		if off >= 0 {
			s.errAt(start+off, msg)
			t.Kind = ILLEGAL
			s.emit(t)
			return
		}
	}
	s.emit(t)
}

func (s *scanner) scanUnit(start int, space bool) {
	for s.off < len(s.text) {
		r, w := s.peekRune(s.off)
		switch {
		case unitStart(r) || r == 'µ' || r == 'μ' || r == '²' || r == '³':
			s.off += w
		case r == '^':
			s.off += w
			if c := s.byteAt(s.off); c == '-' || c == '+' {
				s.off++
			}
			for s.nextIsDigit(s.off) {
				s.off++
			}
		case r == '·' || r == '*' || r == '/' || r == '⋅':
			// a joiner only when a unit symbol follows directly
			r2, _ := s.peekRune(s.off + w)
			if !unitStart(r2) {
				goto done
			}
			s.off += w
		default:
			goto done
		}
	}
done:
	if c := s.byteAt(s.off); (c == '_' || isDigit(rune(c))) && s.off > start && lastIsLetter(s.text[start:s.off]) {
		s.unitRunsOn(start, space)
		return
	}
	s.emit(Token{Kind: UNIT, Text: s.text[start:s.off], Off: start, End: s.off, SpaceBefore: space})
}

func lastIsLetter(s string) bool {
	r, _ := utf8.DecodeLastRuneInString(s)
	return isLetter(r)
}

// unitRunsOn reports a unit followed directly by "_" or a digit: "2Z_s"
// (a number times a name, which needs *) or "16 mm2" (a power of the unit,
// written ² or ^2). The whole word becomes one ILLEGAL token.
func (s *scanner) unitRunsOn(start int, space bool) {
	unitEnd := s.off
	for s.off < len(s.text) {
		r, w := s.peekRune(s.off)
		if !inName(r) {
			break
		}
		s.off += w
	}
	word := s.text[start:s.off]
	digits := s.text[unitEnd:s.off]
	before := ")"
	if p := s.toks[len(s.toks)-1]; p.Kind == NUMBER {
		before = p.Text
	}
	times := before + "*" + word
	if before == ")" {
		times = "(...)*" + word
	}
	unit := s.text[start:unitEnd]
	if _, err := ParseUnit(unit); err == nil && (digits == "2" || digits == "3") {
		sup, power := "²", "squared"
		if digits == "3" {
			sup, power = "³", "cubed"
		}
		s.errAt(start, fmt.Sprintf("%q is not a unit: write %s%s or %s^%s for %s %s (or %s to multiply by a name %s)", word, unit, sup, unit, digits, unit, power, times, word))
	} else {
		s.errAt(start, fmt.Sprintf("%q after a number is read as a unit, and a unit holds no \"_\" or digits: to multiply by the name %s, write %s", word, word, times))
	}
	s.emit(Token{Kind: ILLEGAL, Text: word, Off: start, End: s.off, SpaceBefore: space})
}

func (s *scanner) scanNumber(start int, imag bool, space bool) {
	numStart := s.off
	for s.nextIsDigit(s.off) {
		s.off++
	}
	if s.byteAt(s.off) == '.' && s.nextIsDigit(s.off+1) {
		s.off++
		for s.nextIsDigit(s.off) {
			s.off++
		}
	} else if s.byteAt(s.off) == '.' && !s.nextIsDigit(s.off+1) && s.byteAt(s.off+1) != '.' {
		s.off++ // "12." is 12
	}
	if c := s.byteAt(s.off); c == 'e' || c == 'E' {
		o := s.off + 1
		if c2 := s.byteAt(o); c2 == '+' || c2 == '-' {
			o++
		}
		if s.nextIsDigit(o) {
			s.off = o
			for s.nextIsDigit(s.off) {
				s.off++
			}
		}
	}
	text := s.text[numStart:s.off]
	t := Token{Kind: NUMBER, Text: s.text[start:s.off], Off: start, End: s.off, Imag: imag, SpaceBefore: space}
	// A number that cannot be read is an ILLEGAL token, so that the
	// statement holding it is not evaluated with a made-up value.
	if len(text) > MaxNumberLen {
		s.errAt(start, "number too long (more than 64 characters)")
		t.Kind = ILLEGAL
	} else {
		v, err := strconv.ParseFloat(text, 64)
		if err != nil {
			s.errAt(start, "number "+text+" is out of range")
			t.Kind = ILLEGAL
		} else if mant, _, _ := strings.Cut(strings.ToLower(text), "e"); v == 0 && strings.ContainsAny(mant, "123456789") {
			// a non-zero literal below 2⁻¹⁰⁷⁴ would read as 0 (IEEE 754
			// underflow): nothing that is not its value is a value
			s.errAt(start, "number "+text+" underflows: it is not zero, but below 4.9e-324, the smallest number calcdoc can hold")
			t.Kind = ILLEGAL
		}
		t.Num = v
	}
	s.emit(t)
}
