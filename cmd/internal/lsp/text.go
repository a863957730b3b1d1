package lsp

import (
	"bytes"
	"unicode/utf8"
)

// The position encodings (LSP 3.17, PositionEncodingKind): a character
// offset in a line counts UTF-16 code units (the default), bytes of UTF-8,
// or code points.
const (
	encUTF16 = "utf-16"
	encUTF8  = "utf-8"
	encUTF32 = "utf-32"
)

// Position is an LSP position: a zero-based line and a character offset
// in the negotiated encoding.
type Position struct {
	Line      int `json:"line"`
	Character int `json:"character"`
}

// Range is an LSP range, end exclusive.
type Range struct {
	Start Position `json:"start"`
	End   Position `json:"end"`
}

// text is an open document's text with its line starts, as LSP counts
// lines: a line ends at LF, CR LF or a lone CR.
type text struct {
	b      []byte
	starts []int
}

func newText(b []byte) *text {
	t := &text{b: b, starts: []int{0}}
	for i := 0; i < len(b); i++ {
		switch b[i] {
		case '\n':
			t.starts = append(t.starts, i+1)
		case '\r':
			if i+1 < len(b) && b[i+1] == '\n' {
				i++
			}
			t.starts = append(t.starts, i+1)
		}
	}
	return t
}

// lineEnd is the offset where line n's content ends (before its line
// end).
func (t *text) lineEnd(n int) int {
	end := len(t.b)
	if n+1 < len(t.starts) {
		end = t.starts[n+1]
	}
	for end > t.starts[n] && (t.b[end-1] == '\n' || t.b[end-1] == '\r') {
		end--
	}
	return end
}

// units is the length of s in the encoding.
func units(s []byte, enc string) int {
	switch enc {
	case encUTF8:
		return len(s)
	case encUTF32:
		return utf8.RuneCount(s)
	}
	n := 0
	for len(s) > 0 {
		r, w := utf8.DecodeRune(s)
		if r >= 0x10000 {
			n += 2 // a surrogate pair
		} else {
			n++
		}
		s = s[w:]
	}
	return n
}

// pos is the LSP position of byte offset off.
func (t *text) pos(off int, enc string) Position {
	off = max(0, min(off, len(t.b)))
	// the last line start at or before off
	lo, hi := 0, len(t.starts)-1
	for lo < hi {
		mid := (lo + hi + 1) / 2
		if t.starts[mid] <= off {
			lo = mid
		} else {
			hi = mid - 1
		}
	}
	end := min(off, t.lineEnd(lo))
	return Position{Line: lo, Character: units(t.b[t.starts[lo]:end], enc)}
}

// offset is the byte offset of an LSP position: a line past the end is
// the end of the text, a character past the line's end is its end, and a
// character inside a UTF-8 sequence (or between the halves of a surrogate
// pair) is the start of that character.
func (t *text) offset(p Position, enc string) int {
	if p.Line < 0 {
		return 0
	}
	if p.Line >= len(t.starts) {
		return len(t.b)
	}
	start, end := t.starts[p.Line], t.lineEnd(p.Line)
	if enc == encUTF8 {
		off := start + max(0, min(p.Character, end-start))
		for off > start && off < len(t.b) && !utf8.RuneStart(t.b[off]) {
			off--
		}
		return off
	}
	n, off := 0, start
	for off < end {
		r, w := utf8.DecodeRune(t.b[off:end])
		u := 1
		if enc == encUTF16 && r >= 0x10000 {
			u = 2
		}
		if n+u > p.Character {
			break
		}
		n += u
		off += w
	}
	return off
}

// rng is the range between two byte offsets.
func (t *text) rng(from, to int, enc string) Range {
	return Range{Start: t.pos(from, enc), End: t.pos(max(from, to), enc)}
}

// edit returns the text with the range r replaced by s.
func (t *text) edit(r Range, s string, enc string) []byte {
	a, b := t.offset(r.Start, enc), t.offset(r.End, enc)
	if b < a {
		a, b = b, a
	}
	out := make([]byte, 0, len(t.b)-(b-a)+len(s))
	out = append(out, t.b[:a]...)
	out = append(out, s...)
	return append(out, t.b[b:]...)
}

// bomLen is the length of a UTF-8 byte-order mark at the start of b: the
// document reader drops it, so its offsets are the buffer's less this.
func bomLen(b []byte) int {
	if bytes.HasPrefix(b, []byte("\uFEFF")) {
		return 3
	}
	return 0
}
