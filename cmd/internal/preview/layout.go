package preview

import (
	"bytes"
	"sort"
	"sync"
	"sync/atomic"

	"golang.org/x/net/html"
)

// A patch compares the elements of two pages (patch.go). Reading a
// 10,000-statement sheet (some 7 MB) with the HTML tokenizer takes longer
// than evaluating and drawing its save, so each page's elements are kept
// as offsets (a layout), and the layout of a new page is derived from the
// one before it: the elements within the bytes the two pages share at
// their start are the same, the tokenizer reads the new page only from the
// element where they part, and it stops at the first element that starts
// where the two pages again share their bytes to the end, at the same
// depth as an element of the page before; the elements from there on are
// those of the page before, moved. A save in the last block reads a few
// kilobytes. The layout is exactly the one a reading of the whole page
// gives (split); TestLayoutDerived compares them.

// item is one element of a page's body (in 'b'), of its <main
// class="body"> (in 'm'), or main's start tag itself (in 'M', main
// standing among the body's elements): page[at:end], with the text after
// it up to the next element (the line end).
type item struct {
	at, end int
	in      byte
	inMain  bool // main was open (its end tag not read) where it starts
}

// moved is the item d bytes further on.
func (it item) moved(d int) item {
	it.at += d
	it.end += d
	return it
}

// layout is a page as a patch sees it, by offsets.
type layout struct {
	head   []byte // the head, with the version written as ""
	bodyAt int    // where "<body>" starts
	items  []item // in page order
}

// shown is the layout as slices of the page: main stands among the body's
// elements as "<main>".
func (l *layout) shown(page []byte) shown {
	s := shown{head: l.head, mainAt: -1}
	for _, it := range l.items {
		switch it.in {
		case 'M':
			s.mainAt = len(s.body)
			s.body = append(s.body, []byte("<main>"))
		case 'm':
			s.mai = append(s.mai, page[it.at:it.end])
		default:
			s.body = append(s.body, page[it.at:it.end])
		}
	}
	return s
}

// headOf is a page's head with its version written as "", and where its
// body starts; false when it has no body.
func headOf(page []byte, version string) ([]byte, int, bool) {
	i := bytes.Index(page, []byte("<body>"))
	if i < 0 {
		return nil, 0, false
	}
	live := `<meta name="calcdoc-live" content="`
	return bytes.Replace(page[:i], []byte(live+html.EscapeString(version)+`"`), []byte(live+`"`), 1), i, true
}

// split reads the whole of a page: false when a patch cannot say it (no
// body, text outside the body's elements, a body not closed).
func split(page []byte, version string) (*layout, bool) {
	head, at, ok := headOf(page, version)
	if !ok {
		return nil, false
	}
	l := &layout{head: head, bodyAt: at}
	l.items, _, ok = scan(page, at, 0, false, nil, nil)
	return l, ok
}

// scan reads page from off on, the tokenizer standing at the start of a
// token there at the given depth of elements (1 in the body, 2 in main
// when inMain), and appends the elements it finds to items until the body
// ends. When stop is not nil it is asked at the start of each element
// (with its kind, and whether main is open there) whether the rest of the
// page is known; scan then returns the offset of
// that element (the element before it ending there). It reports false
// when the page is no sheet a patch can say.
func scan(page []byte, off, depth int, inMain bool, items []item, stop func(at int, in byte, inMain bool) bool) ([]item, int, bool) {
	z := html.NewTokenizer(bytes.NewReader(page[off:]))
	start, open := -1, false
	var in byte
	flush := func(end int) {
		if start >= 0 {
			items = append(items, item{at: start, end: end, in: in, inMain: open})
		}
		start = -1
	}
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			return items, -1, false // io.EOF included: the body is not closed
		}
		raw := z.Raw()
		switch tt {
		case html.StartTagToken, html.SelfClosingTagToken:
			name := tagName(raw)
			if depth == 1 || depth == 2 && inMain {
				kind := byte('b')
				switch {
				case depth == 2:
					kind = 'm'
				case tt == html.StartTagToken && isTag(name, "main"):
					kind = 'M'
				}
				if stop != nil && stop(off, kind, inMain) {
					flush(off)
					return items, off, true
				}
				flush(off)
				if kind == 'M' {
					items = append(items, item{at: off, end: off + len(raw), in: 'M', inMain: inMain})
					inMain = true
					depth++
					off += len(raw)
					continue
				}
				start, in, open = off, kind, inMain
			}
			if tt == html.StartTagToken && !isVoid(name) {
				depth++
			}
		case html.EndTagToken:
			name := tagName(raw)
			depth--
			if depth == 1 && inMain && isTag(name, "main") {
				flush(off)
				inMain = false
			}
			if depth == 0 && isTag(name, "body") {
				flush(off)
				return items, -1, true
			}
		case html.TextToken:
			if (depth == 1 || depth == 2 && inMain) && start < 0 && len(bytes.TrimSpace(raw)) > 0 {
				return items, -1, false // text outside any element: no patch
			}
		}
		off += len(raw)
	}
}

// tagName is the name of a tag as written in its raw bytes (`<NAME` or
// `</NAME`), up to white space, '/' or '>', as the tokenizer reads it;
// read in place, since the tokenizer's TagName copies it.
func tagName(raw []byte) []byte {
	i := 1
	if len(raw) > 1 && raw[1] == '/' {
		i = 2
	}
	j := i
	for j < len(raw) {
		switch raw[j] {
		case ' ', '\n', '\t', '\f', '\r', '/', '>':
			return raw[i:j]
		}
		j++
	}
	return raw[i:j]
}

// isTag reports whether name is the lower-case want, in any case.
func isTag(name []byte, want string) bool { return bytes.EqualFold(name, []byte(want)) }

// isVoid reports whether a tag name is one of an element with no end tag.
func isVoid(name []byte) bool {
	if len(name) > 6 {
		return false
	}
	var low [6]byte
	for i, c := range name {
		if 'A' <= c && c <= 'Z' {
			c += 'a' - 'A'
		}
		low[i] = c
	}
	return voids[string(low[:len(name)])]
}

// derive is the layout of the page now (version vn), from the layout la of
// the page before; false when a patch cannot say the page now.
func derive(la *layout, before, now []byte, vn string) (*layout, bool) {
	head, at, ok := headOf(now, vn)
	if !ok {
		return nil, false
	}
	if !bytes.Equal(head, la.head) {
		return split(now, vn)
	}
	a, b := before[la.bodyAt:], now[at:]
	pre := commonPrefix(a, b)
	suf := commonSuffix(a[pre:], b[pre:])
	shift := at - la.bodyAt
	l := &layout{head: head, bodyAt: at, items: make([]item, 0, len(la.items)+8)}
	// the elements that start at least three bytes into the shared start
	// (a tag's first bytes decide what it is) are read alike up to there
	k := sort.Search(len(la.items), func(i int) bool { return la.items[i].at-la.bodyAt+3 > pre })
	if k == 0 {
		return split(now, vn)
	}
	if pre == len(a) && pre == len(b) {
		for _, it := range la.items {
			l.items = append(l.items, it.moved(shift))
		}
		return l, true
	}
	for _, it := range la.items[:k-1] {
		l.items = append(l.items, it.moved(shift))
	}
	from := la.items[k-1] // read again from its start
	depth := 1
	if from.in == 'm' {
		depth = 2
	}
	// the shared end: from tail in now (and tail-move in before) on
	tail, move := len(now)-suf, len(now)-len(before)
	resume := -1
	stop := func(x int, in byte, inMain bool) bool {
		if x < tail {
			return false
		}
		j := sort.Search(len(la.items), func(i int) bool { return la.items[i].at >= x-move })
		if j < len(la.items) && la.items[j].at == x-move && la.items[j].in == in && la.items[j].inMain == inMain {
			resume = j
			return true
		}
		return false
	}
	l.items, _, ok = scan(now, from.at+shift, depth, from.inMain, l.items, stop)
	if !ok {
		return nil, false
	}
	if resume >= 0 {
		for _, it := range la.items[resume:] {
			l.items = append(l.items, it.moved(move))
		}
	}
	return l, true
}

// commonPrefix is the length of the bytes a and b share at their start.
func commonPrefix(a, b []byte) int {
	n, i := min(len(a), len(b)), 0
	for i+4096 <= n && bytes.Equal(a[i:i+4096], b[i:i+4096]) {
		i += 4096
	}
	for i < n && a[i] == b[i] {
		i++
	}
	return i
}

// commonSuffix is the length of the bytes a and b share at their end.
func commonSuffix(a, b []byte) int {
	n, i := min(len(a), len(b)), 0
	for i+4096 <= n && bytes.Equal(a[len(a)-i-4096:len(a)-i], b[len(b)-i-4096:len(b)-i]) {
		i += 4096
	}
	for i < n && a[len(a)-1-i] == b[len(b)-1-i] {
		i++
	}
	return i
}

// layoutCell holds a page's layout once it is read; the page before it in
// a later page (page.before) shares it.
type layoutCell struct {
	once  sync.Once
	l     *layout // nil: a patch cannot say the page
	known atomic.Bool
}

// layoutOf returns p's layout, derived from that of from (the page before
// it) when that one is known, else read whole; nil when a patch cannot
// say p.
func (p *page) layoutOf(from *page) *layout {
	c := p.lay
	if c == nil {
		l, _ := split(p.body, p.version)
		return l
	}
	c.once.Do(func() {
		var ok bool
		if from != nil && from.lay != nil && from.lay.known.Load() && from.lay.l != nil {
			c.l, ok = derive(from.lay.l, from.body, p.body, p.version)
		} else {
			c.l, ok = split(p.body, p.version)
		}
		if !ok {
			c.l = nil
		}
		c.known.Store(true)
	})
	return c.l
}
