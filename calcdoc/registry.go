package calcdoc

import (
	"fmt"
	"sort"
	"strings"

	"calcdoc/expr"

	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/text"
)

// Kind is one kind of evaluated fenced block: it owns the words an info
// string may start with (Words) and evaluates a block of its own (Eval).
// A document is parsed with the kinds of a Registry, as goldmark is built
// with its extenders; the package that ships the kinds (calcdoc/kind)
// builds the standard one. A kind's drawing is a method of the same value
// (the sheet writer asks for it by an interface check).
type Kind interface {
	// Words lists the words an info string may start with to be a block
	// of this kind.
	Words() []string
	// Eval evaluates the block: it fills b.Result and b.Errors and defines
	// names into b.Env().
	Eval(b *Block)
}

// DrawChecker is a Kind whose pictures may fail to draw (a plot value
// beyond what a drawing can hold, say). DrawCheck reports each as an error
// at the position the sheet shows it, with the very inputs the sheet draws,
// so that a picture that cannot be drawn is an error of the document:
// counted in the summary, in the exit status and in the values JSON, not
// only shown in the sheet's body.
type DrawChecker interface {
	DrawCheck(b *Block) []*expr.Error
}

// Registry is a set of kinds, each found by the words it owns.
type Registry struct {
	kinds  []Kind
	byWord map[string]Kind
}

// NewRegistry makes a registry of kinds. It panics if a kind owns no word
// or two kinds own the same word: the set of kinds is fixed in the source.
func NewRegistry(kinds ...Kind) *Registry {
	r := &Registry{byWord: map[string]Kind{}}
	for _, k := range kinds {
		if len(k.Words()) == 0 {
			panic(fmt.Sprintf("calcdoc: block kind %T owns no word", k))
		}
		for _, w := range k.Words() {
			if _, dup := r.byWord[w]; dup {
				panic(fmt.Sprintf("calcdoc: block word %q owned by two kinds", w))
			}
			r.byWord[w] = k
		}
		r.kinds = append(r.kinds, k)
	}
	return r
}

// Lookup returns the kind that owns word, or nil.
func (r *Registry) Lookup(word string) Kind {
	if r == nil {
		return nil
	}
	return r.byWord[word]
}

// Kinds lists the kinds in the order they were given.
func (r *Registry) Kinds() []Kind { return append([]Kind(nil), r.kinds...) }

// Words lists every owned word, sorted.
func (r *Registry) Words() []string {
	var out []string
	for w := range r.byWord {
		out = append(out, w)
	}
	sort.Strings(out)
	return out
}

// HasBlock reports whether a document's source holds a fenced block of one
// of the registry's kinds, wherever it stands (in a blockquote or a list
// item too): the Markdown is parsed as Parse parses it and the tree is
// walked, so a folder takes exactly the documents that would evaluate a
// block when named.
func (r *Registry) HasBlock(src []byte) bool {
	txt := readerLines(src)
	root := markdown.Parser().Parse(text.NewReader(txt))
	found := false
	ast.Walk(root, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if found {
			return ast.WalkStop, nil
		}
		if !entering {
			return ast.WalkContinue, nil
		}
		fc, ok := n.(*ast.FencedCodeBlock)
		if !ok {
			return ast.WalkContinue, nil
		}
		if r.Lookup(infoWord(fc, txt)) != nil {
			found = true
			return ast.WalkStop, nil
		}
		return ast.WalkSkipChildren, nil
	})
	return found
}

// infoWord is the first word of a fenced block's info string, or "".
func infoWord(n *ast.FencedCodeBlock, src []byte) string {
	if n.Info == nil {
		return ""
	}
	word, _, _ := strings.Cut(strings.TrimSpace(string(n.Info.Segment.Value(src))), " ")
	return word
}
