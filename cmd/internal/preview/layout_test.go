package preview

import (
	"fmt"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/build"
)

// TestLayoutDerived checks the layout of a page derived from the page
// before it (derive) against a reading of the whole page with
// golang.org/x/net/html's tokenizer (split), over random pages and random
// edits of their bytes: the same elements at the same offsets, and the
// same verdict on whether a patch can say the page.
func TestLayoutDerived(t *testing.T) {
	r := rand.New(rand.NewPCG(20, 10))
	pieces := []string{"<", "</", "<p>", "</p>", "</div>", "<div class=\"row\">", "<main class=\"body\">", "</main>",
		"<br>", "<!-- c -->", "x", " ", "\n", ">", "<script>a<b</script>", "</body>", "<pre>1 &lt; 2</pre>", "<P>", "</MAIN>"}
	for n := 0; n < 3000; n++ {
		before := randomPage(r)
		now := before
		for e := r.IntN(3) + 1; e > 0; e-- {
			at := r.IntN(len(now) + 1)
			cut := min(len(now)-at, r.IntN(12))
			now = now[:at] + pieces[r.IntN(len(pieces))] + now[at+cut:]
		}
		vb, vn := "v1", "v22"
		pb := strings.Replace(before, `content="VERSION"`, `content="`+vb+`"`, 1)
		pn := strings.Replace(now, `content="VERSION"`, `content="`+vn+`"`, 1)
		la, ok := split([]byte(pb), vb)
		if !ok {
			continue
		}
		want, wok := split([]byte(pn), vn)
		got, gok := derive(la, []byte(pb), []byte(pn), vn)
		if gok != wok || wok && !reflect.DeepEqual(got, want) {
			t.Fatalf("edit %d: derived %v %+v, read whole %v %+v\nbefore %q\nnow    %q", n, gok, got, wok, want, pb, pn)
		}
	}
}

// randomPage is a page with a head, body elements around a main of
// elements, some nested, with text inside them.
func randomPage(r *rand.Rand) string {
	var b strings.Builder
	b.WriteString("<!DOCTYPE html>\n<html><head><title>t</title>\n<meta name=\"calcdoc-live\" content=\"VERSION\" data-doc=\"/d.html\">\n</head>\n<body>\n")
	elem := func() {
		switch r.IntN(5) {
		case 0:
			fmt.Fprintf(&b, "<p>text %d</p>\n", r.IntN(100))
		case 1:
			fmt.Fprintf(&b, "<div class=\"block calc\" id=\"B%d\">\n", r.IntN(100))
			for i := r.IntN(4); i > 0; i-- {
				fmt.Fprintf(&b, "<div class=\"row\"><math><mi>x</mi><mn>%d</mn></math><br></div>\n", r.IntN(1000))
			}
			b.WriteString("</div>\n")
		case 2:
			b.WriteString("<hr>\n")
		case 3:
			b.WriteString("<pre>a &lt; b\n</pre>\n")
		default:
			fmt.Fprintf(&b, "<section class=\"s\"><h2>H%d</h2><!-- note --></section>\n", r.IntN(10))
		}
	}
	for i := r.IntN(3); i > 0; i-- {
		elem()
	}
	b.WriteString("<main class=\"body\">\n")
	for i := r.IntN(8); i > 0; i-- {
		elem()
	}
	b.WriteString("</main>\n")
	for i := r.IntN(3); i > 0; i-- {
		elem()
	}
	b.WriteString("</body>\n</html>\n")
	return b.String()
}

// TestLayoutDerivedSheets does the same over sheets: saves of a document
// of ten calc blocks edited in its first, a middle and its last block, with
// a block added and one taken away, each page derived from the one before.
func TestLayoutDerivedSheets(t *testing.T) {
	src := longDoc(0, 10, true)
	edits := []func(string) string{
		func(s string) string { return strings.Replace(s, "seed = 0 V", "seed = 7 V", 1) },
		func(s string) string { return strings.Replace(s, "U_0 = 230 V", "U_0 = 231 V", 1) },
		func(s string) string { return strings.Replace(s, "R_501 = (0.1", "R_501 = (0.2", 1) },
		func(s string) string { return s + "\n```calc\nextra = 2 V\n```\n" },
		func(s string) string { return strings.Replace(s, "## Section 4\n", "## Section four\n", 1) },
		func(s string) string { return s[:strings.LastIndex(s, "## Section")] },
		func(s string) string { return strings.Replace(s, "title: Latency test feeder", "title: Other", 1) },
	}
	sheet := func(src, v string) []byte {
		doc := calcdoc.Parse("doc.md", []byte(src), kind.Standard())
		body, err := build.Sheet(doc, build.Options{Version: "test", HeadExtra: liveHead("/doc.html", v)})
		if err != nil {
			t.Fatal(err)
		}
		return body
	}
	vb := "b-1"
	pb := sheet(src, vb)
	la, ok := split(pb, vb)
	if !ok {
		t.Fatal("a sheet does not read as elements")
	}
	for i, edit := range edits {
		src = edit(src)
		vn := fmt.Sprintf("b-%d", i+20)
		pn := sheet(src, vn)
		want, wok := split(pn, vn)
		got, gok := derive(la, pb, pn, vn)
		if !wok || !gok || !reflect.DeepEqual(got, want) {
			t.Fatalf("edit %d: derived %v, read whole %v, layouts equal %v", i, gok, wok, reflect.DeepEqual(got, want))
		}
		pb, la = pn, got
	}
}
