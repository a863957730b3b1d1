package netlist

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"

	"calcdoc/expr"
)

// lineUsage is the form of the lines, quoted in messages.
const lineUsage = "a network line is a branch `NAME: FROM -> TO ELEMENT` (ELEMENT one of Z, Y, source, current, ratio), `ground NODE`, `couple NAME_A, NAME_B Z z_m` or a `# note`"

// Parse reads the lines of a network block, each with its position in
// the document, into a netlist. tag is the word after "network" on the
// block's opening line ("" for none) and tagPos where it stands. A line
// that cannot be read gives an error (with its position and the fix in
// words) and is left out of the netlist; the other lines are still read.
// Parse checks the form of each line only: Check checks the netlist as a
// whole.
func Parse(lines []string, pos []expr.Pos, tag string, tagPos expr.Pos) (*Netlist, expr.ErrorList) {
	var errs expr.ErrorList
	n := &Netlist{Tag: tag, TagPos: tagPos}
	if tag != "" {
		checkTag(tag, tagPos, &errs)
	}
	if len(pos) < len(lines) {
		pos = expr.Place(lines, nil) // lines without their file: at column 1 of lines 1, 2, ...
	}
	for i, text := range lines {
		parseLine(n, text, pos[i], &errs)
	}
	return n, errs
}

func checkTag(tag string, at expr.Pos, errs *expr.ErrorList) {
	for _, r := range tag {
		if !(isWordRune(r)) {
			errs.Add(at, fmt.Sprintf("the network tag %q holds %q: a tag is written in letters, digits and _ (it is appended to every name the block defines, as in V_A_%s)", tag, string(r), "pos"))
			return
		}
	}
	if msg := expr.NameProblem("x_" + tag); msg != "" {
		errs.Add(at, "the network tag: "+msg)
	}
}

// line is one line being read: its text without the note, and where it
// stands.
type line struct {
	s    string
	base expr.Pos
	errs *expr.ErrorList
}

func (l *line) pos(off int) expr.Pos {
	off = max(0, min(off, len(l.s)))
	return l.base.Add(off)
}

func (l *line) errorf(off int, format string, args ...any) {
	l.errs.Add(l.pos(off), fmt.Sprintf(format, args...))
}

func (l *line) space(off int) int {
	for off < len(l.s) && (l.s[off] == ' ' || l.s[off] == '\t' || l.s[off] == '\r') {
		off++
	}
	return off
}

// isWordRune reports whether r belongs to a name or node word: a letter,
// a digit, "_", a combining mark or an invisible character (the last so
// that the engine's name check names it).
func isWordRune(r rune) bool {
	return r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.In(r, unicode.Mn, unicode.Mc, unicode.Me, unicode.Cf)
}

// word returns the word at off and the offset after it.
func (l *line) word(off int) (string, int) {
	end := off
	for end < len(l.s) {
		r, w := utf8.DecodeRuneInString(l.s[end:])
		if !isWordRune(r) {
			break
		}
		end += w
	}
	return l.s[off:end], end
}

// arrow returns the offset after "->" or "→" at off, or -1.
func (l *line) arrow(off int) int {
	switch {
	case strings.HasPrefix(l.s[off:], "->"):
		return off + 2
	case strings.HasPrefix(l.s[off:], "→"):
		return off + len("→")
	}
	return -1
}

func allDigits(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

// node reads a node name at off (spaces skipped first); ok is false after
// an error.
func (l *line) node(off int, what string) (Node, int, bool) {
	off = l.space(off)
	w, end := l.word(off)
	if w == "" {
		got := "the end of the line"
		if off < len(l.s) {
			r, _ := utf8.DecodeRuneInString(l.s[off:])
			got = fmt.Sprintf("%q", string(r))
		}
		l.errorf(off, "%s is missing here (found %s): a node is a name such as B or bus_2, or a whole number such as 3", what, got)
		return Node{}, off, false
	}
	if !allDigits(w) {
		r, _ := utf8.DecodeRuneInString(w)
		if !unicode.IsLetter(r) {
			l.errorf(off, "the node %q is neither a name nor a whole number: a node is a name such as B or bus_2, or a whole number such as 3", w)
			return Node{}, end, false
		}
		if msg := expr.NameProblem(w); msg != "" {
			l.errorf(off, "%s", msg)
			return Node{}, end, false
		}
	}
	return Node{Name: w, Key: expr.NameKey(w), Pos: l.pos(off)}, end, true
}

// name reads a branch name at off.
func (l *line) name(off int, what string) (string, int, bool) {
	w, end := l.word(off)
	switch {
	case w == "":
		l.errorf(off, "%s is missing here: a branch name is a name such as feed or T_1", what)
		return "", end, false
	case allDigits(w):
		l.errorf(off, "the branch name %q is a number: a branch name is a name, so that I_NAME and S_NAME are names (write b%s, say)", w, w)
		return "", end, false
	}
	if r, _ := utf8.DecodeRuneInString(w); !unicode.IsLetter(r) {
		l.errorf(off, "the branch name %q does not start with a letter: a branch name is a name such as feed or T_1", w)
		return "", end, false
	}
	if msg := expr.NameProblem(w); msg != "" {
		l.errorf(off, "%s", msg)
		return "", end, false
	}
	return w, end, true
}

func parseLine(n *Netlist, text string, at expr.Pos, errs *expr.ErrorList) {
	comment := ""
	if k := strings.IndexByte(text, '#'); k >= 0 {
		comment = strings.TrimSpace(text[k+1:])
		text = text[:k]
	}
	l := &line{s: strings.TrimRight(text, " \t\r"), base: at, errs: errs}
	off := l.space(0)
	if off == len(l.s) {
		if comment != "" {
			nt := &Note{Text: comment, Pos: at}
			n.Notes = append(n.Notes, nt)
			n.Lines = append(n.Lines, nt)
		}
		return
	}
	w, end := l.word(off)
	colon := l.space(end)
	if w != "" && colon < len(l.s) && l.s[colon] == ':' {
		if b := l.branch(off, comment); b != nil {
			n.Branches = append(n.Branches, b)
			n.Lines = append(n.Lines, b)
		}
		return
	}
	switch w {
	case "ground":
		nd, e, ok := l.node(end, "the ground node")
		if !ok {
			return
		}
		if e = l.space(e); e < len(l.s) {
			l.errorf(e, "a ground line names one node: write one `ground NODE` line for each galvanically separate part")
			return
		}
		g := &Ground{Node: nd, Comment: comment, Pos: at}
		n.Grounds = append(n.Grounds, g)
		n.Lines = append(n.Lines, g)
	case "couple":
		if c := l.couple(end, comment); c != nil {
			n.Couples = append(n.Couples, c)
			n.Lines = append(n.Lines, c)
		}
	case "network":
		l.errorf(off, "the tag of a network goes on its opening line, after the word network (```network TAG), not inside the block")
	case "":
		l.errorf(off, "%s", lineUsage)
	default:
		l.errorf(off, "%q is not a network line: %s; a branch name is followed by \":\"", w, lineUsage)
	}
}

// branch reads "NAME: FROM -> TO ELEMENT ..." from off.
func (l *line) branch(off int, comment string) *Branch {
	name, end, ok := l.name(off, "the branch name")
	if !ok {
		return nil
	}
	b := &Branch{Name: name, Key: expr.NameKey(name), NamePos: l.pos(off), Comment: comment, Pos: l.base}
	end = l.space(end) + 1 // the colon
	if b.From, end, ok = l.node(end, "the node the branch starts from (FROM in NAME: FROM -> TO ELEMENT)"); !ok {
		return nil
	}
	end = l.space(end)
	a := l.arrow(end)
	if a < 0 {
		l.errorf(end, "an arrow -> is missing after the node %s: a branch is written NAME: FROM -> TO ELEMENT", b.From.Name)
		return nil
	}
	if b.To, end, ok = l.node(a, "the node the branch goes to (TO in NAME: FROM -> TO ELEMENT)"); !ok {
		return nil
	}
	end = l.space(end)
	ew, eend := l.word(end)
	b.ElemPos = l.pos(end)
	switch ew {
	case "Z":
		b.Element = Impedance
	case "Y":
		b.Element = Admittance
	case "source":
		b.Element = Source
	case "current":
		b.Element = Current
	case "ratio":
		b.Element = Ratio
	case "":
		l.errorf(end, "the branch %s has no element: write Z, Y, source, current or ratio and its value after %s -> %s", name, b.From.Name, b.To.Name)
		return nil
	default:
		l.errorf(end, "%q is not an element: the element of a branch is Z (impedance), Y (admittance), source (voltage source), current (current source) or ratio (ideal transformer); the element word, not the branch name, says what a branch is", ew)
		return nil
	}
	rest := eend
	switch b.Element {
	case Impedance, Admittance, Current:
		b.Value = l.expr(rest, len(l.s), b.Element.Noun()+" of "+name)
	case Source:
		commas := l.topCommas(rest)
		stop := len(l.s)
		if len(commas) > 0 {
			stop = commas[0]
		}
		b.Value = l.expr(rest, stop, "voltage of the source "+name)
		if len(commas) > 1 {
			l.errorf(commas[1], "a source takes its voltage and at most one series impedance: NAME: FROM -> TO source e, Z z")
			return nil
		}
		if len(commas) == 1 {
			zo := l.space(commas[0] + 1)
			zw, ze := l.word(zo)
			if zw != "Z" {
				l.errorf(zo, "after the comma a source takes its series impedance, written Z z (as in source 11 kV, Z (0.2 + j1.5) Ω)")
				return nil
			}
			b.SeriesZ = l.expr(ze, len(l.s), "series impedance of the source "+name)
		}
	case Ratio:
		to, ok2 := l.ratioTail(rest)
		if !ok2 {
			return nil
		}
		b.Value = l.expr(rest, to, "ratio of the transformer "+name)
		e := to + len("to") + 1
		if b.From2, e, ok = l.node(e, "the first node of the second winding (FROM2 in ratio r to FROM2 -> TO2)"); !ok {
			return nil
		}
		a := l.arrow(l.space(e))
		if a < 0 {
			l.errorf(l.space(e), "an arrow -> is missing in the second winding: write ratio r to FROM2 -> TO2")
			return nil
		}
		if b.To2, _, ok = l.node(a, "the second node of the second winding (TO2 in ratio r to FROM2 -> TO2)"); !ok {
			return nil
		}
	}
	if b.Value == nil || (b.Element == Source && len(l.topCommas(rest)) == 1 && b.SeriesZ == nil) {
		return nil
	}
	return b
}

// topCommas returns the offsets of the commas at off and after that lie
// outside parentheses and brackets.
func (l *line) topCommas(off int) []int {
	var out []int
	depth := 0
	for i := off; i < len(l.s); i++ {
		switch l.s[i] {
		case '(', '[':
			depth++
		case ')', ']':
			depth--
		case ',':
			if depth == 0 {
				out = append(out, i)
			}
		}
	}
	return out
}

// ratioTail finds "to" in "ratio r to FROM2 -> TO2": the last word "to"
// outside parentheses that is followed by a node, an arrow and a node to
// the end of the line. It returns its offset.
func (l *line) ratioTail(off int) (int, bool) {
	depth := 0
	best := -1
	for i := off; i < len(l.s); i++ {
		switch c := l.s[i]; c {
		case '(', '[':
			depth++
		case ')', ']':
			depth--
		case 't':
			if depth != 0 || !strings.HasPrefix(l.s[i:], "to") || i == off {
				continue
			}
			if p := l.s[i-1]; p != ' ' && p != '\t' {
				continue
			}
			if i+2 < len(l.s) && l.s[i+2] != ' ' && l.s[i+2] != '\t' {
				continue
			}
			if l.windingFollows(i + 2) {
				best = i
			}
		}
	}
	if best < 0 {
		l.errorf(l.space(off), "a transformer is written NAME: FROM -> TO ratio r to FROM2 -> TO2 (its second winding after the word to), as in tx: P -> N ratio 11 kV / 0.4 kV to S -> n")
		return 0, false
	}
	return best, true
}

// windingFollows reports whether "FROM2 -> TO2" and the end of the line
// follow off.
func (l *line) windingFollows(off int) bool {
	o := l.space(off)
	w, e := l.word(o)
	if w == "" {
		return false
	}
	a := l.arrow(l.space(e))
	if a < 0 {
		return false
	}
	o = l.space(a)
	w, e = l.word(o)
	return w != "" && l.space(e) == len(l.s)
}

// expr parses s[from:to] as one expression.
func (l *line) expr(from, to int, what string) expr.Node {
	text := l.s[from:to]
	lead := len(text) - len(strings.TrimLeft(text, " \t"))
	text = strings.TrimSpace(text)
	from += lead
	if text == "" {
		l.errorf(from, "the %s has no value: write an expression after the element word", what)
		return nil
	}
	var errs expr.ErrorList
	x, disp := expr.ParseExpr(expr.NewSource(text, l.pos(from)), &errs)
	if len(errs) > 0 {
		for _, e := range errs {
			l.errs.Add(e.Pos, e.Msg)
		}
		return nil
	}
	if disp != nil {
		l.errs.Add(disp.Pos(), fmt.Sprintf("the %s takes no display bracket: the sheet shows it in the unit it is written in", what))
		return nil
	}
	return x
}

// couple reads "couple A, B Z expression" after the word couple.
func (l *line) couple(off int, comment string) *Couple {
	c := &Couple{Comment: comment, Pos: l.base}
	o := l.space(off)
	a, e, ok := l.name(o, "the first branch of the coupling (couple NAME_A, NAME_B Z z_m)")
	if !ok {
		return nil
	}
	c.A, c.AKey, c.APos = a, expr.NameKey(a), l.pos(o)
	e = l.space(e)
	if e >= len(l.s) || l.s[e] != ',' {
		l.errorf(e, "a comma is missing after %s: a coupling is written couple NAME_A, NAME_B Z z_m", a)
		return nil
	}
	o = l.space(e + 1)
	bname, e, ok := l.name(o, "the second branch of the coupling (couple NAME_A, NAME_B Z z_m)")
	if !ok {
		return nil
	}
	c.B, c.BKey, c.BPos = bname, expr.NameKey(bname), l.pos(o)
	o = l.space(e)
	zw, ze := l.word(o)
	if zw != "Z" {
		l.errorf(o, "the mutual impedance of a coupling is written Z z_m after the two branch names: couple %s, %s Z z_m", a, bname)
		return nil
	}
	c.Value = l.expr(ze, len(l.s), "mutual impedance of "+a+" and "+bname)
	if c.Value == nil {
		return nil
	}
	return c
}
