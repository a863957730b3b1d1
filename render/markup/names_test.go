package markup

import "testing"

// TestSpellingsTypesetAlike: two spellings of one name (LANGUAGE.md
// section 3: a spelled Greek name and its letter are one name) are
// typeset alike, the letter in both, so the sheet shows one name.
func TestSpellingsTypesetAlike(t *testing.T) {
	tests := []struct{ name, a, b, want string }{
		{"phi", "phi", "φ", "<mi>φ</mi>"},
		{"subscript", "V_phi", "V_φ", "<msub><mi>V</mi><mi>φ</mi></msub>"},
		{"omega", "omega", "ω", "<mi>ω</mi>"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if a, b := NameML(tc.a), NameML(tc.b); a != tc.want || b != tc.want {
				t.Errorf("NameML(%q) = %q, NameML(%q) = %q, want both %q", tc.a, a, tc.b, b, tc.want)
			}
		})
	}
}
