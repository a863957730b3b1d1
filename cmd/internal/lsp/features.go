package lsp

import (
	"encoding/json"
	"fmt"
	"sort"
	"strings"

	"calcdoc/calcdoc"
	"calcdoc/expr"

	"github.com/yuin/goldmark/ast"
)

type positionParams struct {
	TextDocument docID    `json:"textDocument"`
	Position     Position `json:"position"`
}

// view is a document's last evaluation, with the text it was read from.
type view struct {
	doc *calcdoc.Document
	t   *text
	bom int
	enc string
}

// docOff is the document offset of an LSP position.
func (v *view) docOff(p Position) int { return v.t.offset(p, v.enc) - v.bom }

// rng is the range between two document offsets.
func (v *view) rng(from, to int) Range { return v.t.rng(from+v.bom, to+v.bom, v.enc) }

// viewOf is the last evaluation of the document at uri, or nil when it is
// not open or not evaluated yet.
func (s *Server) viewOf(uri string) *view {
	s.mu.Lock()
	defer s.mu.Unlock()
	st := s.docs[uri]
	if st == nil || st.doc == nil {
		return nil
	}
	return &view{doc: st.doc, t: st.dtext, bom: bomLen(st.dtext.b), enc: s.enc}
}

// at is the view of a request's document and the name under its
// position with its document offsets, or nil.
func (s *Server) at(raw json.RawMessage) (*view, string, int, int, error) {
	var p positionParams
	if err := params(raw, &p); err != nil {
		return nil, "", 0, 0, err
	}
	v := s.viewOf(p.TextDocument.URI)
	if v == nil {
		return nil, "", 0, 0, nil
	}
	off := v.docOff(p.Position)
	if !inEvaluated(v.doc, off) {
		return v, "", off, off, nil
	}
	w, a, b := wordAt(v.doc.Text, off)
	return v, w, a, b, nil
}

// hover: a value as shown, its SI unit, how it is shown (bracket or
// default, form), the line that defines it and its description; a use
// says where the value comes from.
func (s *Server) hover(raw json.RawMessage) (any, error) {
	v, word, a, b, err := s.at(raw)
	if v == nil || word == "" {
		return nil, err
	}
	t, ok := resolve(v.doc, word, a)
	if !ok {
		return nil, nil
	}
	var md strings.Builder
	switch {
	case t.value != nil:
		nv := t.value
		fmt.Fprintf(&md, "**%s** = %s\n\n", nv.Name, expr.FormatValue(nv.Value, nv.Display, v.doc.Digits()))
		if sc, ok := nv.Value.(*expr.Scalar); ok {
			if u := expr.CoherentUnit(sc.Dim); u != "" {
				fmt.Fprintf(&md, "SI unit: %s · ", u)
			} else {
				md.WriteString("a plain number · ")
			}
		}
		md.WriteString(shownAs(nv.Display) + "\n\n")
		st := stmtIndex(v.doc)[nv.Pos.Off]
		line := nv.Pos.Line()
		if st != nil {
			fmt.Fprintf(&md, "line %d: `%s`\n", line, strings.TrimSpace(st.Text))
			if d := strings.TrimSpace(st.Stmt.Desc()); d != "" {
				fmt.Fprintf(&md, "\n%s\n", d)
			}
		} else {
			fmt.Fprintf(&md, "defined on line %d\n", line)
		}
		if u, ub := useOf(v.doc, nv.Pos.Off); u != nil && u.Sheet != nil {
			from := u.Rel
			if ub.Value != nil {
				from += fmt.Sprintf(", line %d", ub.Value.Line)
			}
			if ub.Name != ub.Local {
				from += " (named " + ub.Name + " there)"
			}
			fmt.Fprintf(&md, "\nfrom %s\n", from)
		}
	case t.fn != nil:
		fmt.Fprintf(&md, "**%s**(%s): a function of this document, line %d", t.fn.Name, strings.Join(t.fn.Params, ", "), t.fn.Pos.Line())
	case t.table != nil:
		fmt.Fprintf(&md, "**%s**: a table, line %d", tableName(t.table), t.table.InfoPos.Line())
	case t.built:
		fmt.Fprintf(&md, "**%s**: built in", word)
	}
	return map[string]any{
		"contents": map[string]any{"kind": "markdown", "value": strings.TrimSpace(md.String())},
		"range":    v.rng(a, b),
	}, nil
}

// shownAs says how a value is shown: by its line's bracket, or by the
// default unit and form.
func shownAs(d *expr.Display) string {
	if d == nil {
		return "shown in the default unit, polar or rectangular by its dimension"
	}
	form := map[expr.Form]string{expr.FormAuto: "polar or rectangular by its dimension", expr.FormPolar: "polar", expr.FormRect: "rectangular"}[d.Form]
	if d.Text != "" {
		return fmt.Sprintf("shown as [%s], %s", strings.Trim(d.Text, "[] "), form)
	}
	return "shown " + form
}

// InlayHint is an LSP inlay hint.
type InlayHint struct {
	Position    Position `json:"position"`
	Label       string   `json:"label"`
	PaddingLeft bool     `json:"paddingLeft"`
}

// inlayHint: after each statement of a calc block that has a value, the
// value as the sheet shows it; after each check, whether it holds and its
// utilisation.
func (s *Server) inlayHint(raw json.RawMessage) (any, error) {
	var p struct {
		TextDocument docID `json:"textDocument"`
		Range        Range `json:"range"`
	}
	if err := params(raw, &p); err != nil {
		return nil, err
	}
	v := s.viewOf(p.TextDocument.URI)
	if v == nil {
		return []InlayHint{}, nil
	}
	from, to := v.docOff(p.Range.Start), v.docOff(p.Range.End)
	out := []InlayHint{}
	for _, b := range v.doc.Blocks {
		stmts, _ := b.Result.([]*calcdoc.Stmt)
		for _, st := range stmts {
			if st.Res == nil || st.Res.Err != nil || st.Use != nil {
				continue
			}
			end := st.Stmt.End()
			if end.File != v.doc.File || end.Off < from || end.Off > to {
				continue
			}
			var label string
			switch {
			case st.Res.Check != nil:
				label = "✗ not satisfied"
				if st.Res.Check.Pass {
					label = "✓ holds"
				}
				if st.Res.Check.HasUtil {
					label += fmt.Sprintf(", utilisation %.1f %%", 100*st.Res.Check.Utilisation)
				}
			case st.Res.Value != nil:
				label = "= " + expr.FormatValue(st.Res.Value, st.Res.Display, v.doc.Digits())
			default:
				continue
			}
			out = append(out, InlayHint{Position: v.rng(end.Off, end.Off).Start, Label: label, PaddingLeft: true})
		}
	}
	return out, nil
}

// Location is an LSP location.
type Location struct {
	URI   string `json:"uri"`
	Range Range  `json:"range"`
}

// definition: a name to its definition in this document, a name a use
// statement takes to its definition in the other document, a table or a
// column of one to its block, a function to its line.
func (s *Server) definition(raw json.RawMessage) (any, error) {
	v, word, a, _, err := s.at(raw)
	if v == nil || word == "" {
		return nil, err
	}
	// the path of a use statement: the start of the document it names
	for _, b := range v.doc.Blocks {
		stmts, _ := b.Result.([]*calcdoc.Stmt)
		for _, st := range stmts {
			u, ok := st.Stmt.(*expr.Use)
			if !ok || st.Use == nil || st.Use.Sheet == nil || st.Use.Sheet.Doc == nil || u.PathPos.File != v.doc.File {
				continue
			}
			if a >= u.PathPos.Off && a < u.PathPos.Off+len(u.Path) {
				return Location{URI: s.uriOf(st.Use.Sheet.Doc.Path)}, nil
			}
		}
	}
	uri := s.uriOf(v.doc.Path)
	t, ok := resolve(v.doc, word, a)
	if !ok {
		return nil, nil
	}
	here := func(off, n int) any { return Location{URI: uri, Range: v.rng(off, off+n)} }
	switch {
	case t.value != nil:
		nv := t.value
		if u, ub := useOf(v.doc, nv.Pos.Off); u != nil && u.Sheet != nil && u.Sheet.Doc != nil {
			other := u.Sheet.Doc
			key := expr.NameKey(ub.Name)
			for _, ov := range other.Values {
				if expr.NameKey(ov.Name) == key && ov.Pos.File == other.File {
					ot := newText(other.Source)
					bom := bomLen(other.Source)
					return Location{URI: s.uriOf(other.Path), Range: ot.rng(ov.Pos.Off+bom, ov.Pos.Off+bom+len(ov.Name), v.enc)}, nil
				}
			}
		}
		return here(nv.Pos.Off, len(nv.Name)), nil
	case t.fn != nil:
		return here(t.fn.Pos.Off, len(t.fn.Name)), nil
	case t.table != nil:
		return here(t.table.ArgPos.Off, len(tableName(t.table))), nil
	}
	return nil, nil
}

// uriOf is the URI of the document at path: the URI the editor opened it
// under when it is open (an editor may spell a URI its own way), else
// its file URI.
func (s *Server) uriOf(path string) string {
	real := calcdoc.RealPath(path)
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, o := range s.docs {
		if calcdoc.RealPath(o.path) == real {
			return o.uri
		}
	}
	return pathURI(path)
}

// CompletionItem is an LSP completion item.
type CompletionItem struct {
	Label  string `json:"label"`
	Kind   int    `json:"kind"`
	Detail string `json:"detail,omitempty"`
}

// LSP CompletionItemKind.
const (
	ciFunction = 3
	ciVariable = 6
	ciUnit     = 11
	ciStruct   = 22
)

// completion: the names defined above the cursor (with their values),
// the functions and tables defined above it, the built-in functions and
// the units.
func (s *Server) completion(raw json.RawMessage) (any, error) {
	var p positionParams
	if err := params(raw, &p); err != nil {
		return nil, err
	}
	out := []CompletionItem{}
	seen := map[string]int{}
	add := func(c CompletionItem) {
		if i, ok := seen[c.Label]; ok {
			out[i] = c // a later definition above the cursor is in force
			return
		}
		seen[c.Label] = len(out)
		out = append(out, c)
	}
	if v := s.viewOf(p.TextDocument.URI); v != nil {
		off := v.docOff(p.Position)
		for _, nv := range v.doc.Values {
			if nv.Pos.File == v.doc.File && nv.Pos.Off < off {
				add(CompletionItem{Label: nv.Name, Kind: ciVariable, Detail: expr.FormatValue(nv.Value, nv.Display, v.doc.Digits())})
			}
		}
		for _, n := range v.doc.Env.FuncNames() {
			if f := v.doc.Env.LookupFunc(n); f != nil && f.Pos.File == v.doc.File && f.Pos.Off < off {
				add(CompletionItem{Label: f.Name, Kind: ciFunction, Detail: f.Name + "(" + strings.Join(f.Params, ", ") + ")"})
			}
		}
		for _, b := range v.doc.Blocks {
			if n := tableName(b); n != "" && b.InfoPos.Off < off {
				add(CompletionItem{Label: n, Kind: ciStruct, Detail: "table"})
			}
		}
	}
	for _, n := range expr.BuiltinNames() {
		add(CompletionItem{Label: n, Kind: ciFunction, Detail: "built-in function"})
	}
	for _, u := range expr.UnitSymbols() {
		if _, ok := seen[u]; !ok {
			add(CompletionItem{Label: u, Kind: ciUnit, Detail: "unit"})
		}
	}
	return map[string]any{"isIncomplete": false, "items": out}, nil
}

// DocumentSymbol is an LSP document symbol.
type DocumentSymbol struct {
	Name           string            `json:"name"`
	Detail         string            `json:"detail,omitempty"`
	Kind           int               `json:"kind"`
	Range          Range             `json:"range"`
	SelectionRange Range             `json:"selectionRange"`
	Children       []*DocumentSymbol `json:"children,omitempty"`
	level          int
	end            int // document offset of the end of what it holds
}

// LSP SymbolKind.
const (
	skNamespace = 3
	skFunction  = 12
	skVariable  = 13
	skStruct    = 23
)

// documentSymbol: the headings, each holding the names defined under it
// (values, functions, tables) and the headings below it.
func (s *Server) documentSymbol(raw json.RawMessage) (any, error) {
	var p struct {
		TextDocument docID `json:"textDocument"`
	}
	if err := params(raw, &p); err != nil {
		return nil, err
	}
	v := s.viewOf(p.TextDocument.URI)
	if v == nil {
		return []*DocumentSymbol{}, nil
	}
	d := v.doc
	type item struct {
		off int
		sym *DocumentSymbol
	}
	var items []item
	ast.Walk(d.Markdown, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		h, ok := n.(*ast.Heading)
		if !entering || !ok {
			return ast.WalkContinue, nil
		}
		lines := h.Lines()
		if lines.Len() == 0 {
			return ast.WalkSkipChildren, nil
		}
		seg := lines.At(0)
		name := strings.TrimSpace(string(seg.Value(d.Text)))
		if name == "" {
			name = "(heading)"
		}
		items = append(items, item{seg.Start, &DocumentSymbol{Name: name, Kind: skNamespace, level: h.Level, end: seg.Stop}})
		return ast.WalkSkipChildren, nil
	})
	for _, nv := range d.Values {
		if nv.Pos.File == d.File {
			items = append(items, item{nv.Pos.Off, &DocumentSymbol{Name: nv.Name, Kind: skVariable, Detail: expr.FormatValue(nv.Value, nv.Display, d.Digits()), level: 99, end: nv.Pos.Off + len(nv.Name)}})
		}
	}
	for _, n := range d.Env.FuncNames() {
		if f := d.Env.LookupFunc(n); f != nil && f.Pos.File == d.File {
			items = append(items, item{f.Pos.Off, &DocumentSymbol{Name: f.Name, Kind: skFunction, level: 99, end: f.Pos.Off + len(f.Name)}})
		}
	}
	for _, b := range d.Blocks {
		if n := tableName(b); n != "" {
			items = append(items, item{b.ArgPos.Off, &DocumentSymbol{Name: n, Kind: skStruct, Detail: "table", level: 99, end: b.ArgPos.Off + len(n)}})
		}
	}
	sort.SliceStable(items, func(i, j int) bool { return items[i].off < items[j].off })
	var root []*DocumentSymbol
	var stack []*DocumentSymbol
	starts := map[*DocumentSymbol]int{}
	for _, it := range items {
		sym := it.sym
		starts[sym] = it.off
		sym.SelectionRange = v.rng(it.off, sym.end)
		for len(stack) > 0 && stack[len(stack)-1].level >= sym.level {
			stack = stack[:len(stack)-1]
		}
		if len(stack) == 0 {
			root = append(root, sym)
		} else {
			top := stack[len(stack)-1]
			top.Children = append(top.Children, sym)
		}
		if sym.level < 99 {
			stack = append(stack, sym)
		}
	}
	// a heading's range holds everything under it
	var fix func(sym *DocumentSymbol) int
	fix = func(sym *DocumentSymbol) int {
		end := sym.end
		for _, c := range sym.Children {
			end = max(end, fix(c))
		}
		sym.Range = v.rng(starts[sym], end)
		return end
	}
	for _, sym := range root {
		fix(sym)
	}
	if root == nil {
		root = []*DocumentSymbol{}
	}
	return root, nil
}
