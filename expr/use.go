package expr

import (
	"sort"
	"strings"
	"unicode/utf8"
)

// UseName is one name a use statement takes: NAME, NAME as NEW, or NAME
// in CASE as NEW. As and Case are nil when not written.
type UseName struct {
	Name *Ident
	Case *Ident
	As   *Ident
}

// Local is the name the value is defined under in the using document:
// As when given, else Name.
func (u *UseName) Local() *Ident {
	if u.As != nil {
		return u.As
	}
	return u.Name
}

// Use is "use NAME, ... from PATH": values taken by name from another
// document. Path is the path as written (relative to the document),
// PathPos where it starts.
type Use struct {
	span
	desc
	Names   []*UseName
	Path    string
	PathPos Pos
}

// isUseLine reports whether a line of a calc block is a use statement: it
// starts with the word use followed by a space and then not by "=", "[" or
// "(" (so that a name use can still be assigned, use = 3).
func isUseLine(line string) bool {
	t := strings.TrimLeft(line, " \t")
	if !strings.HasPrefix(t, "use") || len(t) < 4 || (t[3] != ' ' && t[3] != '\t') {
		return false
	}
	rest := strings.TrimLeft(t[3:], " \t")
	return rest != "" && rest[0] != '=' && rest[0] != '[' && rest[0] != '('
}

// splitUses takes the use statements out of a calc block's source: each
// line that is one is parsed here (its path is not an expression and is
// never scanned as one) and blanked in the source returned, so that the
// statements around it keep their positions.
func splitUses(src *Source, errs *ErrorList) (*Source, []Stmt) {
	if !strings.Contains(src.Text, "use") {
		return src, nil
	}
	var uses []Stmt
	text := []byte(src.Text)
	changed := false
	for i, start := range src.starts {
		end := len(src.Text)
		if i+1 < len(src.starts) {
			end = src.starts[i+1] - 1
		}
		line := src.Text[start:end]
		if !isUseLine(line) {
			continue
		}
		lead := len(line) - len(strings.TrimLeft(line, " \t"))
		if s := parseUse(src, start+lead, line[lead:], errs); s != nil {
			uses = append(uses, s)
		}
		for k := start; k < end; k++ {
			text[k] = ' '
		}
		changed = true
	}
	if !changed {
		return src, nil
	}
	out := &Source{Text: string(text), Lines: src.Lines, starts: src.starts}
	return out, uses
}

// parseUse reads one use statement, line being the text from "use" on at
// byte offset off of src.
func parseUse(src *Source, off int, line string, errs *ErrorList) Stmt {
	at := func(k int) Pos { return src.PosAt(off + k) }
	body, comment := line, ""
	if k := commentStart(line); k >= 0 {
		body, comment = line[:k], strings.TrimSpace(line[k+1:])
	}
	body = strings.TrimRight(body, " \t\r")
	sp := span{at(0), at(len(body))}
	d := desc{comment}
	bad := func(k int, msg string) Stmt {
		errs.Add(at(k), msg)
		return &BadStmt{span: sp, desc: d}
	}
	fromAt := wordIndex(body, "from")
	if fromAt < 0 {
		return bad(0, "a use statement names the document it takes values from: use NAME, ... from PATH")
	}
	path := strings.TrimSpace(body[fromAt+4:])
	if path == "" {
		return bad(fromAt, "no path after from: name the document relative to this one, e.g. use I_k3 from ../fault/board.md")
	}
	pathOff := fromAt + 4 + strings.Index(body[fromAt+4:], path)
	if strings.ContainsAny(path, " \t") && !strings.HasSuffix(path, ".md") {
		return bad(pathOff, "the path "+path+" holds a space and is not a .md file: name one document, e.g. ../fault/board.md")
	}
	// the names part is scanned as ordinary tokens
	namesText := body[3:fromAt]
	sub := NewSource(namesText, at(3))
	var local ErrorList
	toks := Scan(sub, &local)
	if len(local) > 0 {
		for _, e := range local {
			errs.Add(e.Pos, e.Msg)
		}
		return &BadStmt{span: sp, desc: d}
	}
	p := &parser{src: sub, errs: errs}
	u := &Use{span: sp, desc: d, Path: path, PathPos: at(pathOff)}
	var cur []Token
	flush := func() bool {
		if len(cur) == 0 {
			errs.Add(at(3), "a use statement names at least one value: use NAME, ... from PATH")
			return false
		}
		n, ok := p.useName(cur)
		if !ok {
			return false
		}
		u.Names = append(u.Names, n)
		cur = cur[:0]
		return true
	}
	for _, t := range toks {
		switch t.Kind {
		case NEWLINE, EOF:
			continue
		case COMMA:
			if !flush() {
				return &BadStmt{span: sp, desc: d}
			}
			continue
		}
		cur = append(cur, t)
	}
	if !flush() {
		return &BadStmt{span: sp, desc: d}
	}
	return u
}

// useName reads NAME, NAME as NEW or NAME in CASE as NEW.
func (p *parser) useName(toks []Token) (*UseName, bool) {
	fail := func(t Token, msg string) (*UseName, bool) {
		p.errs.Add(p.pos(t.Off), msg)
		return nil, false
	}
	isWord := func(t Token, w string) bool { return t.Kind == IDENT && t.Text == w }
	name := func(t Token) (*Ident, bool) {
		if t.Kind != IDENT || strings.IndexByte(t.Text, '.') >= 0 {
			return nil, false
		}
		return p.ident(t), true
	}
	n := &UseName{}
	id, ok := name(toks[0])
	if !ok {
		return fail(toks[0], "expected the name of a value after use, found "+tokenWord(toks[0]))
	}
	n.Name = id
	rest := toks[1:]
	if len(rest) >= 2 && isWord(rest[0], "in") {
		c, ok := name(rest[1])
		if !ok {
			return fail(rest[1], "expected the name of a case after in, found "+tokenWord(rest[1]))
		}
		n.Case = c
		rest = rest[2:]
	}
	if len(rest) >= 2 && isWord(rest[0], "as") {
		a, ok := name(rest[1])
		if !ok {
			return fail(rest[1], "expected the new name after as, found "+tokenWord(rest[1]))
		}
		n.As = a
		rest = rest[2:]
	}
	if len(rest) > 0 {
		return fail(rest[0], "unexpected "+tokenWord(rest[0])+" in a use statement: write use NAME, ... from PATH or use NAME as NEW from PATH")
	}
	return n, true
}

func tokenWord(t Token) string {
	if t.Text != "" {
		return "\"" + t.Text + "\""
	}
	return kindNames[t.Kind]
}

// commentStart is the byte offset of the "#" that starts a description
// (at the start or after a space), or -1.
func commentStart(s string) int {
	for i := 0; i < len(s); i++ {
		if s[i] == '#' && (i == 0 || s[i-1] == ' ' || s[i-1] == '\t') {
			return i
		}
	}
	return -1
}

// wordIndex is the byte offset of the first word w standing alone
// (spaces around it) in s, or -1.
func wordIndex(s, w string) int {
	for i := 1; i+len(w) <= len(s); i++ {
		if s[i:i+len(w)] != w {
			continue
		}
		before, _ := utf8.DecodeLastRuneInString(s[:i])
		if before != ' ' && before != '\t' {
			continue
		}
		if i+len(w) < len(s) && s[i+len(w)] != ' ' && s[i+len(w)] != '\t' {
			continue
		}
		return i
	}
	return -1
}

// FuncNames lists the user functions defined, sorted by key.
func (e *Env) FuncNames() []string {
	var out []string
	for _, f := range e.funcs {
		out = append(out, f.Name)
	}
	sort.Strings(out)
	return out
}

// UsePath returns the path a line names when it is a use statement
// (use NAME, ... from PATH), without reading the rest.
func UsePath(line string) (string, bool) {
	line = strings.TrimRight(line, "\r\n")
	if !isUseLine(line) {
		return "", false
	}
	if k := commentStart(line); k >= 0 {
		line = line[:k]
	}
	at := wordIndex(line, "from")
	if at < 0 {
		return "", false
	}
	p := strings.TrimSpace(line[at+4:])
	return p, p != ""
}
