package lsp

import (
	"crypto/sha256"
	"fmt"
	"net/url"
	"path/filepath"
	"runtime"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// evaluate evaluates generation gen of a document and publishes its
// diagnostics, unless a newer change came meanwhile (its budget is
// stopped then, so the evaluation ends early). The documents open in the
// editor that use it are evaluated again when its values moved.
func (s *Server) evaluate(st *docState, gen int64) {
	defer func() {
		// a panic of a kind is a bug: say so in the editor's log, and
		// keep serving
		if p := recover(); p != nil {
			s.conn.notify("window/logMessage", map[string]any{"type": 1, "message": fmt.Sprintf("calcdoc: evaluating %s failed (a bug): %v", st.path, p)})
		}
	}()
	s.mu.Lock()
	if st.closed || st.gen != gen {
		s.mu.Unlock()
		return
	}
	src := st.text.b
	budget := expr.NewBudget(expr.DefaultBudget)
	st.budget = budget
	// the unsaved text of every open document, for use statements
	open := make(map[string][]byte, len(s.docs))
	for _, o := range s.docs {
		open[calcdoc.RealPath(o.path)] = o.text.b
	}
	root := s.rootFor(st.path)
	enc := s.enc
	hook := s.debounced
	s.mu.Unlock()
	if hook != nil {
		hook(st.uri)
	}

	var roots []string
	if root != "" {
		roots = append(roots, root)
	}
	loader := calcdoc.NewLoader(s.kinds, roots...)
	loader.SetOverlay(func(real string) ([]byte, bool) {
		b, ok := open[real]
		return b, ok
	})
	doc := calcdoc.ParseWith(st.path, src, s.kinds, calcdoc.Inputs{Root: root, Budget: budget, Sheets: loader.Sheets(st.path)})
	t := newText(src)
	diags := diagnostics(doc, t, enc)
	uses := map[string]bool{}
	for _, u := range doc.Uses {
		if u.Sheet != nil && u.Sheet.Doc != nil {
			uses[calcdoc.RealPath(u.Sheet.Doc.Path)] = true
		}
	}
	me := calcdoc.RealPath(st.path)

	s.mu.Lock()
	if st.closed || st.gen != gen || budget.Stopped() {
		s.mu.Unlock()
		return
	}
	st.doc, st.dtext, st.uses = doc, t, uses
	version := st.version
	// the open documents that use this one are evaluated again when its
	// values moved; the fingerprint (the values JSON) is made only when
	// there are such documents (it costs about as much as the evaluation)
	var users []*docState
	for _, o := range s.docs {
		if o != st && o.uses[me] {
			users = append(users, o)
		}
	}
	if len(users) == 0 {
		st.fp = "" // not known: the next document that uses it is told
	}
	s.mu.Unlock()
	if len(users) > 0 {
		sum := sha256.Sum256(doc.MarshalValues())
		s.mu.Lock()
		if st.gen == gen && st.fp != string(sum[:]) {
			for _, o := range users {
				if !o.closed {
					s.scheduleLocked(o)
				}
			}
			st.fp = string(sum[:])
		}
		s.mu.Unlock()
	}
	s.conn.notify("textDocument/publishDiagnostics", map[string]any{"uri": st.uri, "version": version, "diagnostics": diags})
}

// rootFor is the workspace folder when it holds path, else "" (the
// document's own folder); s.mu is held.
func (s *Server) rootFor(path string) string {
	if s.root == "" {
		return ""
	}
	rel, err := filepath.Rel(s.root, path)
	if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return ""
	}
	return s.root
}

// Diagnostic is an LSP diagnostic.
type Diagnostic struct {
	Range    Range  `json:"range"`
	Severity int    `json:"severity"`
	Source   string `json:"source"`
	Message  string `json:"message"`
	// Data is the certain fix of the error, for the code action
	// request, or nil.
	Data *fixData `json:"data,omitempty"`
}

// LSP DiagnosticSeverity.
const (
	sevError   = 1
	sevWarning = 2
)

// diagnostics are the document's errors (with the fix their message
// gives), its warnings, and its checks that do not hold, with the
// utilisation when the check has one. An error of the work budget is
// among the errors.
func diagnostics(d *calcdoc.Document, t *text, enc string) []Diagnostic {
	out := []Diagnostic{}
	bom := bomLen(t.b)
	add := func(e *expr.Error, sev int) {
		msg := e.Msg
		off := 0
		if e.Pos.File == d.File {
			off = e.Pos.Off + bom
		} else if e.Pos.IsValid() {
			msg = e.Pos.Position().String() + ": " + msg // in another file
		}
		dg := Diagnostic{Range: t.rng(off, wordEnd(t.b, off), enc), Severity: sev, Source: "calcdoc", Message: msg}
		if e.Pos.File == d.File {
			dg.Data = certainFix(msg, t, off, enc)
		}
		out = append(out, dg)
	}
	for _, e := range d.Errors {
		add(e, sevError)
	}
	for _, e := range d.Warnings {
		add(e, sevWarning)
	}
	for _, c := range d.Checks {
		if c.Result == nil || c.Result.Pass || c.Pos.File != d.File {
			continue
		}
		off := c.Pos.Off + bom
		msg := "check not satisfied: " + c.Text
		if c.Result.HasUtil {
			msg += fmt.Sprintf(" (utilisation %.1f %%)", 100*c.Result.Utilisation)
		}
		out = append(out, Diagnostic{Range: t.rng(off, stmtEnd(t.b, off), enc), Severity: sevWarning, Source: "calcdoc", Message: msg})
	}
	return out
}

// wordEnd is the end of the name or number that starts at off, or the
// end of the character there when none does (a range of at least one
// character, within the line).
func wordEnd(b []byte, off int) int {
	i := off
	for i < len(b) {
		r, w := decodeRune(b[i:])
		if !isNameRune(r) && r != '.' {
			break
		}
		i += w
	}
	if i == off && off < len(b) && b[off] != '\n' && b[off] != '\r' {
		_, w := decodeRune(b[off:])
		i += w
	}
	return i
}

// stmtEnd is the end of the line at off, before a comment.
func stmtEnd(b []byte, off int) int {
	i := off
	for i < len(b) && b[i] != '\n' && b[i] != '\r' && b[i] != '#' {
		i++
	}
	for i > off && (b[i-1] == ' ' || b[i-1] == '\t') {
		i--
	}
	return i
}

// uriPath is the file path of a file URI.
func uriPath(uri string) (string, error) {
	u, err := url.Parse(uri)
	if err != nil {
		return "", fmt.Errorf("the URI %q cannot be read: %v", uri, err)
	}
	if u.Scheme != "file" {
		return "", fmt.Errorf("the URI %q is not a file: calcdoc reads file: URIs", uri)
	}
	p := u.Path
	if runtime.GOOS == "windows" {
		p = strings.TrimPrefix(p, "/") // file:///C:/x is C:/x
		if u.Host != "" {
			p = `\\` + u.Host + `\` + p // a share
		}
	}
	return filepath.FromSlash(p), nil
}

// pathURI is the file URI of a path.
func pathURI(path string) string {
	if a, err := filepath.Abs(path); err == nil {
		path = a
	}
	p := filepath.ToSlash(path)
	if !strings.HasPrefix(p, "/") {
		p = "/" + p // C:/x
	}
	return (&url.URL{Scheme: "file", Path: p}).String()
}
