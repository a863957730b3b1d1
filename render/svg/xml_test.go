package svg

import (
	"encoding/xml"
	"errors"
	"io"
	"strconv"
	"strings"
	"testing"
)

// node is a parsed XML element, for inspecting the SVG the package writes.
type node struct {
	name     string
	attr     map[string]string
	children []*node
	text     string // all character data inside the element, concatenated
}

// parseSVG decodes every token of s with encoding/xml (strict mode) and
// returns the root element. Any decoding error fails the test.
func parseSVG(t *testing.T, s string) *node {
	t.Helper()
	dec := xml.NewDecoder(strings.NewReader(s))
	var stack []*node
	var root *node
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("SVG does not parse as XML: %v\n%s", err, s)
		}
		switch tok := tok.(type) {
		case xml.StartElement:
			n := &node{name: tok.Name.Local, attr: map[string]string{}}
			for _, a := range tok.Attr {
				n.attr[a.Name.Local] = a.Value
			}
			if len(stack) > 0 {
				p := stack[len(stack)-1]
				p.children = append(p.children, n)
			} else if root == nil {
				root = n
			} else {
				t.Fatalf("more than one root element")
			}
			stack = append(stack, n)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			for _, n := range stack {
				n.text += string(tok)
			}
		}
	}
	if root == nil || root.name != "svg" {
		t.Fatalf("root element is not <svg>")
	}
	return root
}

// find returns every element below n (depth first, document order) with the
// given name and, if class is not empty, that class.
func (n *node) find(name, class string) []*node {
	var out []*node
	var walk func(*node)
	walk = func(m *node) {
		for _, c := range m.children {
			if c.name == name && (class == "" || c.attr["class"] == class) {
				out = append(out, c)
			}
			walk(c)
		}
	}
	walk(n)
	return out
}

// num parses a numeric attribute.
func (n *node) num(t *testing.T, key string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(n.attr[key], 64)
	if err != nil {
		t.Fatalf("<%s %s=%q>: %v", n.name, key, n.attr[key], err)
	}
	return v
}

// checkRoot checks the attributes every drawing's root must carry.
func checkRoot(t *testing.T, root *node) {
	t.Helper()
	for _, k := range []string{"viewBox", "width", "height"} {
		if root.attr[k] == "" {
			t.Errorf("<svg> lacks %s", k)
		}
	}
	if root.attr["role"] != "img" {
		t.Errorf("<svg role=%q>, want img", root.attr["role"])
	}
	if len(root.children) == 0 || root.children[0].name != "title" || root.children[0].text == "" {
		t.Errorf("<svg> does not start with a non-empty <title>")
	}
}

// checkSelfContained checks that the markup carries no script, no style
// sheet and no reference to anything outside itself, and no non-finite
// number (the test inputs carry no text "NaN" or "Inf").
func checkSelfContained(t *testing.T, s string) {
	t.Helper()
	if strings.Contains(s, "NaN") || strings.Contains(s, "Inf") {
		t.Errorf("SVG contains a non-finite number")
	}
	for _, bad := range []string{"<script", "<style", "href", "url(", "@import", "@font-face", "<image", "<foreignObject", "javascript:", "on" + "load="} {
		if strings.Contains(s, bad) {
			t.Errorf("SVG contains %q", bad)
		}
	}
}
