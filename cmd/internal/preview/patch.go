package preview

import (
	"bytes"
	"encoding/json"
	"net/http"

	"golang.org/x/net/html"
)

// PatchPath is where an open page asks for what changed since the page it
// shows: /_patch?doc=ADDRESS&from=VERSION answers, when VERSION is the
// version before the current one of the document at ADDRESS and the two
// pages differ only in the elements of their body (the head the same but
// for the version), a JSON patch (patch) that turns the elements of the
// one into those of the other; otherwise 409, and the page reloads. The
// page served at ADDRESS stays the whole sheet.
const PatchPath = "/_patch"

// patch is the answer of PatchPath: the new version and at most two
// edits, one of the body's elements and one of the elements of its
// <main class="body"> (or, when one calc block of it changed, of that
// block's rows), each replacing Del elements from At (counted among the
// elements of the sheet) with the elements in HTML.
type patch struct {
	V   string    `json:"v"`
	Ops []patchOp `json:"ops"`
}

type patchOp struct {
	In   string `json:"in"` // "body", "main", or "#ID": the element of that id
	At   int    `json:"at"`
	Del  int    `json:"del"`
	HTML string `json:"html"`
}

func (w *Watcher) servePatch(rw http.ResponseWriter, r *http.Request) {
	q := r.URL.Query()
	key, ok := docKey(q.Get("doc"))
	if !ok {
		http.Error(rw, "404 not found", http.StatusNotFound)
		return
	}
	w.mu.RLock()
	p := w.docs[key]
	_, busy := w.evaluating(key)
	w.mu.RUnlock()
	if p == nil || busy || p.status != 200 || p.before == nil || p.before.version != q.Get("from") {
		http.Error(rw, "409 no patch from that version: reload the page", http.StatusConflict)
		return
	}
	out := p.before.patchTo(p)
	if out == nil {
		http.Error(rw, "409 the pages differ outside their body's elements: reload the page", http.StatusConflict)
		return
	}
	h := rw.Header()
	h.Set("Content-Type", "application/json")
	rw.WriteHeader(http.StatusOK)
	if r.Method != http.MethodHead {
		rw.Write(out)
	}
}

// patchTo is the JSON patch from b (the page before p) to p, or nil when
// none can say it; made once, for every open page that asks.
func (b *page) patchTo(p *page) []byte {
	b.patchOnce.Do(func() {
		la := b.layoutOf(nil)
		if la == nil {
			return
		}
		lb := p.layoutOf(b)
		if lb == nil {
			return
		}
		pt, ok := diffShown(la.shown(b.body), lb.shown(p.body))
		if !ok {
			return
		}
		pt.V = p.version
		var out bytes.Buffer
		enc := json.NewEncoder(&out)
		enc.SetEscapeHTML(false) // HTML as it is: the patch is read as JSON, never as HTML
		if enc.Encode(pt) == nil {
			b.patch = out.Bytes()
		}
	})
	return b.patch
}

// shown is a page as a patch sees it: its head (with the version written
// as "") and the elements of its body and of its main.
type shown struct {
	head      []byte
	body, mai [][]byte // mai: the elements of <main class="body">
	mainAt    int      // main's place among the body's elements
}

// diffPages is the patch from the page before (version vb) to the page
// now (version vn), or false when a patch cannot say it.
func diffPages(before, now []byte, vb, vn string) (patch, bool) {
	a, ok1 := splitPage(before, vb)
	b, ok2 := splitPage(now, vn)
	if !ok1 || !ok2 {
		return patch{}, false
	}
	return diffShown(a, b)
}

// diffShown is the patch from the page before (a) to the page now (b), or
// false when a patch cannot say it.
func diffShown(a, b shown) (patch, bool) {
	if !bytes.Equal(a.head, b.head) || (a.mainAt < 0) != (b.mainAt < 0) {
		return patch{}, false
	}
	var pt patch
	if op, ok := diffElems("body", a.body, b.body); ok {
		if a.mainAt >= op.At && a.mainAt < op.At+op.Del {
			return patch{}, false // main itself would go: reload
		}
		pt.Ops = append(pt.Ops, op)
	}
	if op, ok := diffElems("main", a.mai, b.mai); ok {
		pt.Ops = append(pt.Ops, narrow(op, a.mai[op.At:op.At+op.Del]))
	}
	if pt.Ops == nil {
		pt.Ops = []patchOp{}
	}
	return pt, true
}

// diffElems is the one edit that turns the elements a into b (common
// first and last elements kept), or false when they are the same.
func diffElems(in string, a, b [][]byte) (patchOp, bool) {
	pre := 0
	for pre < len(a) && pre < len(b) && bytes.Equal(a[pre], b[pre]) {
		pre++
	}
	suf := 0
	for suf < len(a)-pre && suf < len(b)-pre && bytes.Equal(a[len(a)-1-suf], b[len(b)-1-suf]) {
		suf++
	}
	if pre == len(a) && pre == len(b) {
		return patchOp{}, false
	}
	return patchOp{In: in, At: pre, Del: len(a) - pre - suf, HTML: string(bytes.Join(b[pre:len(b)-suf], nil))}, true
}

// narrow makes an edit that replaces one element by one with the same
// start tag and an id (a calc block) an edit of that element's children
// (its rows).
func narrow(op patchOp, was [][]byte) patchOp {
	if len(was) != 1 {
		return op
	}
	ta, id, ka, ok1 := children(was[0])
	tb, _, kb, ok2 := children([]byte(op.HTML))
	if !ok1 || !ok2 || id == "" || ta != tb {
		return op
	}
	if in, ok := diffElems("#"+id, ka, kb); ok {
		return in
	}
	return op
}

// children reads one element (and the white space after it): its start
// tag, its id, and its child elements, each with the white space after it;
// false when it is not one element of elements.
func children(elem []byte) (tag, id string, kids [][]byte, ok bool) {
	z := html.NewTokenizer(bytes.NewReader(elem))
	off, depth, start := 0, 0, -1
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			return "", "", nil, false
		}
		raw := z.Raw()
		switch tt {
		case html.StartTagToken, html.SelfClosingTagToken:
			name := tagName(raw)
			if depth == 0 {
				if tt != html.StartTagToken || isVoid(name) {
					return "", "", nil, false
				}
				tag = string(raw)
				for more := true; more; {
					var k, v []byte
					k, v, more = z.TagAttr()
					if string(k) == "id" {
						id = string(v)
					}
				}
			} else if depth == 1 {
				if start >= 0 {
					kids = append(kids, elem[start:off])
				}
				start = off
			}
			if tt == html.StartTagToken && !isVoid(name) {
				depth++
			}
		case html.EndTagToken:
			depth--
			if depth == 0 {
				if start >= 0 {
					kids = append(kids, elem[start:off])
				}
				rest := elem[off+len(raw):]
				return tag, id, kids, len(bytes.TrimSpace(rest)) == 0
			}
		case html.TextToken:
			if depth == 1 && start < 0 && len(bytes.TrimSpace(raw)) > 0 {
				return "", "", nil, false
			}
		default:
			if depth == 0 {
				return "", "", nil, false
			}
		}
		off += len(raw)
	}
}

// voids are the elements that have no end tag.
var voids = map[string]bool{"area": true, "base": true, "br": true, "col": true, "embed": true, "hr": true, "img": true,
	"input": true, "link": true, "meta": true, "source": true, "track": true, "wbr": true}

// splitPage reads a sheet: its head, with the version (the content of the
// calcdoc-live meta element) left out, and the elements of its body and
// of its <main class="body">, each with the text after it up to the next
// (the line end). main stands in the body's elements as "<main>".
func splitPage(page []byte, version string) (shown, bool) {
	l, ok := split(page, version)
	if !ok {
		return shown{mainAt: -1}, false
	}
	return l.shown(page), true
}
