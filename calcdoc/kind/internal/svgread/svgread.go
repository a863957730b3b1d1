// Package svgread reads the inline SVG of a sheet back for the kinds'
// tests: the <svg> elements of a page, each parsed with encoding/xml into
// its elements.
package svgread

import (
	"encoding/xml"
	"io"
	"strconv"
	"strings"
	"testing"
)

// SVGs returns every inline <svg> element of a page, in order.
func SVGs(page string) []string {
	var out []string
	for {
		i := strings.Index(page, "<svg")
		if i < 0 {
			return out
		}
		j := strings.Index(page[i:], "</svg>")
		if j < 0 {
			return out
		}
		out = append(out, page[i:i+j+len("</svg>")])
		page = page[i+j+len("</svg>"):]
	}
}

// Element is one element of an SVG: its name, attributes and text.
type Element struct {
	Name  string
	Attr  map[string]string
	Text  string
	Depth int
}

// Parse parses an SVG with encoding/xml and lists its elements in
// document order; any XML error fails the test.
func Parse(t testing.TB, s string) []Element {
	t.Helper()
	dec := xml.NewDecoder(strings.NewReader(s))
	var out []Element
	var stack []int
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v\n%.300s", err, s)
		}
		switch tok := tok.(type) {
		case xml.StartElement:
			e := Element{Name: tok.Name.Local, Attr: map[string]string{}, Depth: len(stack)}
			for _, a := range tok.Attr {
				e.Attr[a.Name.Local] = a.Value
			}
			if len(stack) == 0 && (tok.Name.Space != "http://www.w3.org/2000/svg" || tok.Name.Local != "svg") {
				t.Fatalf("root element %v, want svg in the SVG namespace", tok.Name)
			}
			stack = append(stack, len(out))
			out = append(out, e)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			for _, k := range stack {
				out[k].Text += string(tok)
			}
		}
	}
	if len(stack) != 0 {
		t.Fatalf("SVG has unclosed elements")
	}
	return out
}

// Num reads a number of an attribute; anything else fails the test.
func Num(t testing.TB, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("not a number: %q", s)
	}
	return v
}
