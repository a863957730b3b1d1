package calcdoc

import "testing"

func TestRuneSlice(t *testing.T) {
	cases := []struct {
		s    string
		a, b int
		want string
	}{
		{"abc", 0, 3, "abc"}, {"abc", 1, 2, "b"}, {"aΩb", 1, 3, "Ωb"}, {"aΩb", 2, 9, "b"}, {"aΩb", 5, 9, ""},
		{"", 0, 0, ""}, {"µF", -1, 1, "µ"}, {"ab", 1, 0, ""},
	}
	for _, c := range cases {
		if got := runeSlice(c.s, c.a, c.b); got != c.want {
			t.Errorf("runeSlice(%q, %d, %d) = %q, want %q", c.s, c.a, c.b, got, c.want)
		}
	}
}
