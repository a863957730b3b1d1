package pack

import (
	"bytes"
	"errors"
	"io"

	"golang.org/x/net/html"
)

// prefixIDs copies a sheet's body to w with prefix put before every id
// and every link within the page (href="#..."), so that the ids of the
// sheets of a package stay apart. It reads the body with an HTML
// tokenizer and changes only the id and href attributes of start tags;
// every other byte is copied as it is.
func prefixIDs(w *bytes.Buffer, body []byte, prefix string) error {
	z := html.NewTokenizer(bytes.NewReader(body))
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			if errors.Is(z.Err(), io.EOF) {
				return nil
			}
			return z.Err()
		}
		raw := z.Raw()
		if tt != html.StartTagToken && tt != html.SelfClosingTagToken {
			w.Write(raw)
			continue
		}
		var id, href bool
		if _, more := z.TagName(); more {
			for {
				k, v, more := z.TagAttr()
				switch string(k) {
				case "id":
					id = true
				case "href":
					href = len(v) > 0 && v[0] == '#'
				}
				if !more {
					break
				}
			}
		}
		w.Write(prefixTag(raw, id, href, prefix))
	}
}

// prefixTag puts prefix at the start of the id and of the in-page href of
// one start tag as the sheet writer writes it (name="value", the value
// escaped, so that ` id="` and ` href="#` can only start the attribute).
func prefixTag(tag []byte, id, href bool, prefix string) []byte {
	if id {
		tag = bytes.Replace(tag, []byte(` id="`), []byte(` id="`+prefix), 1)
	}
	if href {
		tag = bytes.Replace(tag, []byte(` href="#`), []byte(` href="#`+prefix), 1)
	}
	return tag
}
