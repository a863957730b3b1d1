package verify

import (
	"bytes"
	"strings"

	"golang.org/x/net/html"
)

// element is one element of a page that has attributes, as the HTML
// tokenizer reads it.
type element struct {
	name string
	// attr holds the element's attributes, values unescaped; of an
	// attribute given twice, the first.
	attr map[string]string
	// start is the offset of the start tag in the page
	start int
	// raw is the content between the start tag and the end tag that
	// closes it (nested elements of the same name counted), as bytes of
	// the page; without an end tag, the rest of the page.
	raw    []byte
	closed bool
	// content is the offset just past the start tag
	content int
}

func (e *element) hasAttr(k string) bool {
	_, ok := e.attr[k]
	return ok
}

// page is a page as the tokenizer reads it: its elements with attributes
// in page order, and the offset of its last </body> (-1 without one).
type page struct {
	els     []*element
	bodyEnd int
}

// tokenize reads b with golang.org/x/net/html's tokenizer (the WHATWG
// tokenization rules), keeping the byte offset of every token.
func tokenize(b []byte) *page {
	p := &page{bodyEnd: -1}
	open := map[string][]*element{}
	z := html.NewTokenizer(bytes.NewReader(b))
	off := 0
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			break
		}
		start := off
		off += len(z.Raw())
		switch tt {
		case html.StartTagToken, html.SelfClosingTagToken:
			name, more := z.TagName()
			e := &element{name: string(name), start: start}
			for more {
				var k, v []byte
				k, v, more = z.TagAttr()
				if e.attr == nil {
					e.attr = map[string]string{}
				}
				if _, dup := e.attr[string(k)]; !dup {
					e.attr[string(k)] = string(v)
				}
			}
			if tt == html.StartTagToken {
				e.content = off
				e.raw = b[off:] // until its end tag is found
				open[e.name] = append(open[e.name], e)
			}
			if e.attr != nil {
				p.els = append(p.els, e)
			}
		case html.EndTagToken:
			name, _ := z.TagName()
			n := string(name)
			if n == "body" {
				p.bodyEnd = start
			}
			if st := open[n]; len(st) > 0 {
				e := st[len(st)-1]
				open[n] = st[:len(st)-1]
				e.raw = b[e.content:start]
				e.closed = true
			}
		}
	}
	return p
}

// elements lists the elements with attributes of b.
func elements(b []byte) []*element { return tokenize(b).els }

// find returns the first element for which ok holds, or nil.
func find(els []*element, ok func(*element) bool) *element {
	for _, e := range els {
		if ok(e) {
			return e
		}
	}
	return nil
}

// plainText is the text of an HTML fragment, read with the tokenizer: tags
// removed, entities undone, a space where MathML or HTML separates things
// (a unit or a power factor's sense, which the sheet's style spaces from
// its number: <mi class="u">, <mtext class="pfsense">; table cells,
// spans, divisions), rows of a matrix separated by
// "; ", whitespace collapsed.
func plainText(frag []byte) string {
	var b strings.Builder
	z := html.NewTokenizer(bytes.NewReader(frag))
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			break
		}
		switch tt {
		case html.TextToken:
			b.WriteString(html.UnescapeString(string(z.Raw())))
		case html.StartTagToken, html.EndTagToken, html.SelfClosingTagToken:
			name, _ := z.TagName()
			switch n := string(name); {
			case tt == html.EndTagToken && n == "mtr":
				b.WriteString("; ")
			case n == "mtd" || n == "span" || n == "div" || n == "td" || n == "th":
				b.WriteByte(' ')
			case tt == html.StartTagToken && (n == "mi" || n == "mtext") && spacedClass(z):
				b.WriteByte(' ')
			}
		}
	}
	return strings.TrimSpace(strings.TrimSuffix(strings.Join(strings.Fields(b.String()), " "), ";"))
}

// spacedClass reports whether the tag z has just read carries the class
// of a unit ("u") or of a power factor's sense ("pfsense"), which the
// sheet's style puts a space before.
func spacedClass(z *html.Tokenizer) bool {
	for {
		k, v, more := z.TagAttr()
		if string(k) == "class" && (string(v) == "u" || string(v) == "pfsense") {
			return true
		}
		if !more {
			return false
		}
	}
}
