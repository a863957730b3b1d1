package lsp

import "testing"

// TestTextPositions: byte offsets and LSP positions, hand-counted. The
// line "a𝒵∠b" is a (1 byte), 𝒵 U+1D4B5 (4 bytes, 2 UTF-16 code units:
// RFC 2781), ∠ U+2220 (3 bytes, 1 unit), b; lines end in LF, CR LF and a
// lone CR (LSP 3.17 counts each as one line end).
func TestTextPositions(t *testing.T) {
	tx := newText([]byte("a𝒵∠b\nx\r\ny\rz"))
	for _, c := range []struct {
		off        int
		enc        string
		line, char int
	}{
		{0, encUTF16, 0, 0},
		{1, encUTF16, 0, 1},
		{5, encUTF16, 0, 3}, // after 𝒵
		{8, encUTF16, 0, 4}, // after ∠
		{9, encUTF16, 0, 5}, // end of line 0
		{8, encUTF8, 0, 8},
		{8, encUTF32, 0, 3},
		{10, encUTF16, 1, 0}, // x
		{11, encUTF16, 1, 1}, // the CR of CR LF stays on line 1
		{13, encUTF16, 2, 0}, // y
		{15, encUTF16, 3, 0}, // z after a lone CR
		{99, encUTF16, 3, 1}, // past the end: the end
	} {
		p := tx.pos(c.off, c.enc)
		if p != at(c.line, c.char) {
			t.Errorf("pos(%d, %s) = %+v, want %d:%d", c.off, c.enc, p, c.line, c.char)
		}
	}
	for _, c := range []struct {
		line, char int
		enc        string
		off        int
	}{
		{0, 3, encUTF16, 5},
		{0, 2, encUTF16, 1}, // between the halves of 𝒵: its start
		{0, 4, encUTF16, 8},
		{0, 99, encUTF16, 9}, // past the line's end: its end
		{0, 3, encUTF8, 1},   // inside 𝒵's bytes: its start
		{0, 2, encUTF32, 5},
		{1, 5, encUTF16, 11}, // before CR LF
		{9, 0, encUTF16, 16}, // past the last line: the end
	} {
		if off := tx.offset(at(c.line, c.char), c.enc); off != c.off {
			t.Errorf("offset(%d:%d, %s) = %d, want %d", c.line, c.char, c.enc, off, c.off)
		}
	}
	if got := string(tx.edit(Range{at(0, 1), at(0, 3)}, "Z", encUTF16)); got != "aZ∠b\nx\r\ny\rz" {
		t.Errorf("edit: %q", got)
	}
}
