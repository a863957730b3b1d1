package verify

import (
	"bytes"
	"fmt"
	"strings"

	"golang.org/x/net/html"
)

// comparePages names how sheet (the bytes of the file) differs from fresh
// (what calcdoc writes). The page is taken in three parts, each compared
// on its own so that one forgery cannot hide another: what comes before
// <body> (the head, its styles and scripts), the body, and what follows
// </body>. In the body, the result and check rows are compared by their
// text; if none differs (and no hash already explains the difference),
// the first difference is named with the element that holds it. A
// <script> the sheet holds and calcdoc does not write is named too.
// lineBase is the file line on which sheet starts.
func comparePages(sheet, fresh []byte, lineBase int, hashDiff bool) []Difference {
	var out []Difference
	if n, m := countTag(sheet, "script"), countTag(fresh, "script"); n > m {
		out = append(out, Difference{Kind: "script",
			Message: fmt.Sprintf("script: the file holds %d <script> element(s) where calcdoc writes %d (the first at line %d)", n, m, lineBase+lineOf(sheet, firstTag(sheet, "script")))})
	}
	sb, sa := bodyBounds(sheet)
	fb, fa := bodyBounds(fresh)
	if !bytes.Equal(sheet[:sb], fresh[:fb]) {
		out = append(out, firstDiff(sheet, fresh, 0, 0, lineBase))
	}
	items := compareItems(sheet[sb:sa], fresh[fb:fa])
	out = append(out, items...)
	if len(items) == 0 && !hashDiff && !bytes.Equal(sheet[sb:sa], fresh[fb:fa]) {
		out = append(out, firstDiff(sheet, fresh, sb, fb, lineBase))
	}
	if !bytes.Equal(sheet[sa:], fresh[fa:]) {
		d := firstDiff(sheet, fresh, sa, fa, lineBase)
		d.Kind = "after-body"
		d.Message = "after </body>: " + strings.TrimPrefix(d.Message, "text: ")
		out = append(out, d)
	}
	return out
}

// bodyBounds returns the offset of the <body> start tag and of the last
// </body> end tag in b, as the tokenizer finds them (0 and len(b) when
// there are none: a package's section is all body).
func bodyBounds(b []byte) (start, end int) {
	start, end = -1, -1
	z := html.NewTokenizer(bytes.NewReader(b))
	off := 0
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			break
		}
		at := off
		off += len(z.Raw())
		if tt == html.StartTagToken || tt == html.EndTagToken {
			if name, _ := z.TagName(); string(name) == "body" {
				if tt == html.StartTagToken && start < 0 {
					start = at
				} else if tt == html.EndTagToken {
					end = at
				}
			}
		}
	}
	if start < 0 {
		start = 0
	}
	if end < start {
		end = len(b)
	}
	return start, end
}

// countTag counts the start tags named name in b; firstTag is the offset
// of the first (-1 without one).
func countTag(b []byte, name string) int {
	n := 0
	forTags(b, func(tag string, _ int) {
		if tag == name {
			n++
		}
	})
	return n
}

func firstTag(b []byte, name string) int {
	first := -1
	forTags(b, func(tag string, at int) {
		if tag == name && first < 0 {
			first = at
		}
	})
	return first
}

func forTags(b []byte, fn func(name string, at int)) {
	z := html.NewTokenizer(bytes.NewReader(b))
	off := 0
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			return
		}
		at := off
		off += len(z.Raw())
		if tt == html.StartTagToken || tt == html.SelfClosingTagToken {
			name, _ := z.TagName()
			fn(string(name), at)
		}
	}
}

func lineOf(b []byte, off int) int {
	if off < 0 {
		return 0
	}
	return bytes.Count(b[:off], []byte("\n"))
}

// firstDiff reports the first byte at which sheet[from:] and
// fresh[freshFrom:] differ: the element of the sheet that holds it (its
// path of open elements), the line of the file, and an excerpt of each.
func firstDiff(sheet, fresh []byte, from, freshFrom, lineBase int) Difference {
	s, f := sheet[from:], fresh[freshFrom:]
	i := 0
	for i < len(s) && i < len(f) && s[i] == f[i] {
		i++
	}
	// a difference within a tag's name is a different element: name the
	// element that holds it, not the one the common "<" seemed to open
	if lt := bytes.LastIndexByte(s[:i], '<'); lt >= 0 && !bytes.ContainsAny(s[lt:i], " \t\n>") {
		i = lt
	}
	off := from + i
	ls := bytes.LastIndexByte(sheet[:off], '\n') + 1
	lf := bytes.LastIndexByte(fresh[:freshFrom+i], '\n') + 1
	lineEnd := func(b []byte, at int) int {
		if j := bytes.IndexByte(b[at:], '\n'); j >= 0 {
			return at + j
		}
		return len(b)
	}
	sl, fl := string(sheet[ls:lineEnd(sheet, ls)]), string(fresh[lf:lineEnd(fresh, lf)])
	line := lineBase + lineOf(sheet, off)
	d := Difference{Kind: "text", Line: line, Sheet: excerpt(sl, off-ls), Source: excerpt(fl, freshFrom+i-lf)}
	where := Region(sheet, off)
	switch {
	case i >= len(s):
		d.Message = fmt.Sprintf("text: the sheet ends at line %d, in %s, where the source gives more: «%s»", line, where, d.Source)
	case i >= len(f):
		d.Message = fmt.Sprintf("text: the sheet goes on at line %d, in %s, where the source gives no more: «%s»", line, where, d.Sheet)
	default:
		d.Message = fmt.Sprintf("text: first difference at line %d of the file, in %s: sheet has «%s», source gives «%s»", line, where, d.Sheet, d.Source)
	}
	return d
}

// voidElements have no end tag.
var voidElements = map[string]bool{"area": true, "base": true, "br": true, "col": true, "embed": true, "hr": true,
	"img": true, "input": true, "link": true, "meta": true, "source": true, "track": true, "wbr": true}

// Region names the element of b that holds byte off: the path of the
// elements open there, e.g. "<head> > <style>" or "<body> >
// <section class="stamp"> > <table class="stamp"> > <tr>", each with its
// id, class or sheet number, and "after </body>" past the body.
func Region(b []byte, off int) string {
	type open struct{ name, label string }
	var stack []open
	z := html.NewTokenizer(bytes.NewReader(b))
	pos := 0
	afterBody := false
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			break
		}
		at := pos
		pos += len(z.Raw())
		if at >= off {
			break
		}
		switch tt {
		case html.StartTagToken:
			name, more := z.TagName()
			n := string(name)
			label := "<" + n
			for more {
				var k, v []byte
				k, v, more = z.TagAttr()
				switch string(k) {
				case "id", "class", "data-sheet", "data-value", "data-check":
					label += fmt.Sprintf(" %s=%q", k, v)
				}
			}
			label += ">"
			if !voidElements[n] {
				stack = append(stack, open{n, label})
			}
		case html.EndTagToken:
			name, _ := z.TagName()
			n := string(name)
			if n == "body" {
				afterBody = true
			}
			for j := len(stack) - 1; j >= 0; j-- {
				if stack[j].name == n {
					stack = stack[:j]
					break
				}
			}
		}
	}
	if afterBody {
		return "what follows </body>"
	}
	var parts []string
	for _, o := range stack {
		if o.name != "html" {
			parts = append(parts, o.label)
		}
	}
	if len(parts) == 0 {
		return "the top of the file"
	}
	return strings.Join(parts, " > ")
}
