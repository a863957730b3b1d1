package lsp

import (
	"encoding/json"
	"regexp"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"
)

// A code action is offered only where an error's message gives one fix
// that is certain: a name that holds a look-alike letter of another
// script or an invisible character ("the name "X" holds …: write Y" /
// "… delete it and write Y"). The name in the text must read as the
// message's name once its invisible characters are dropped; the fix
// replaces the whole name by the one the message writes.
var nameFix = sync.OnceValue(func() *regexp.Regexp {
	return regexp.MustCompile(`^the name "([^"]+)" holds .*: (?:delete it and )?write (\S+)$`)
})

// fixData is a diagnostic's certain fix, carried in its data member
// (LSP 3.16) to the code action request.
type fixData struct {
	Range   Range  `json:"range"`
	NewText string `json:"newText"`
}

// isNameOrFormat reports whether r may stand in a name as written: a
// name's characters and the invisible format characters (Cf).
func isNameOrFormat(r rune) bool { return isNameRune(r) || unicode.Is(unicode.Cf, r) }

// certainFix is the fix of an error at buffer offset off of t, or nil.
func certainFix(msg string, t *text, off int, enc string) *fixData {
	m := nameFix().FindStringSubmatch(msg)
	if m == nil {
		return nil
	}
	b := t.b
	start, end := off, off
	for start > 0 {
		r, w := utf8.DecodeLastRune(b[:start])
		if !isNameOrFormat(r) {
			break
		}
		start -= w
	}
	for end < len(b) {
		r, w := utf8.DecodeRune(b[end:])
		if !isNameOrFormat(r) {
			break
		}
		end += w
	}
	visible := strings.Map(func(r rune) rune {
		if unicode.Is(unicode.Cf, r) {
			return -1
		}
		return r
	}, string(b[start:end]))
	if visible != m[1] || string(b[start:end]) == m[2] {
		return nil
	}
	return &fixData{Range: t.rng(start, end, enc), NewText: m[2]}
}

// codeAction: the certain fixes of the diagnostics the client sends back.
func (s *Server) codeAction(raw json.RawMessage) (any, error) {
	var p struct {
		TextDocument docID `json:"textDocument"`
		Context      struct {
			Diagnostics []struct {
				Message string          `json:"message"`
				Data    json.RawMessage `json:"data"`
			} `json:"diagnostics"`
		} `json:"context"`
	}
	if err := params(raw, &p); err != nil {
		return nil, err
	}
	out := []any{}
	for _, d := range p.Context.Diagnostics {
		var f fixData
		if len(d.Data) == 0 || json.Unmarshal(d.Data, &f) != nil || f.NewText == "" {
			continue
		}
		out = append(out, map[string]any{
			"title":       "Write " + f.NewText,
			"kind":        "quickfix",
			"isPreferred": true,
			"edit": map[string]any{"changes": map[string]any{
				p.TextDocument.URI: []any{map[string]any{"range": f.Range, "newText": f.NewText}},
			}},
		})
	}
	return out, nil
}
