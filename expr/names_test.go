package expr

import (
	"strings"
	"testing"
)

// TestNameKey: names are compared after Unicode NFKC normalisation (UAX #15,
// "Unicode Normalization Forms": U+00B5 MICRO SIGN has the compatibility
// decomposition U+03BC GREEK SMALL LETTER MU; U+2126 OHM SIGN the canonical
// decomposition U+03A9; U+FF36 FULLWIDTH LATIN CAPITAL LETTER V the
// compatibility decomposition U+0056; U+1D465 MATHEMATICAL ITALIC SMALL X
// decomposes to U+0078; e followed by U+0301 COMBINING ACUTE ACCENT composes
// to U+00E9) and with each "_"-separated part that is a spelled Greek name
// read as its letter (LANGUAGE.md section 3).
func TestNameKey(t *testing.T) {
	tests := []struct {
		name, a, b string
		same       bool
	}{
		{"spelled phi", "phi", "φ", true},
		{"subscript phi", "V_phi", "V_φ", true},
		{"omega", "omega", "ω", true},
		{"capital Omega and the ohm sign", "Omega", "\u2126", true},
		{"micro sign and mu", "\u00b5", "\u03bc", true},
		{"spelled mu and micro sign", "mu_0", "\u00b5_0", true},
		{"every part", "phi_alpha_2", "φ_α_2", true},
		{"fullwidth V", "\uff36_1", "V_1", true},
		{"mathematical italic x", "\U0001d465", "x", true},
		{"combining accent", "Re\u0301", "R\u00e9", true},
		{"pi is the constant's letter", "pi", "π", true},
		{"a Greek name inside a word is not a part", "alphabet", "αbet", false},
		{"case counts", "Phi", "phi", false},
		{"Mu is not a spelled name (its capital looks Latin)", "Mu", "μ", false},
		{"plain names differ", "V_1", "V_2", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ka, kb := NameKey(tc.a), NameKey(tc.b)
			if (ka == kb) != tc.same {
				t.Errorf("NameKey(%q) = %q, NameKey(%q) = %q: same = %v, want %v", tc.a, ka, tc.b, kb, ka == kb, tc.same)
			}
		})
	}
}

// TestNameKeyASCIIFastPath: an ASCII name with no spelled Greek part is
// its own key, with no allocation (the hot path of every lookup).
func TestNameKeyASCIIFastPath(t *testing.T) {
	for _, name := range []string{"V_LL", "Z_th", "I_k3", "x"} {
		if k := NameKey(name); k != name {
			t.Errorf("NameKey(%q) = %q", name, k)
		}
		if n := testing.AllocsPerRun(100, func() { _ = NameKey(name) }); n != 0 {
			t.Errorf("NameKey(%q): %v allocations, want 0", name, n)
		}
	}
}

// TestOneNameTwoSpellings: defining the second spelling of a name is the
// "already defined" error naming the first's line (LANGUAGE.md section 3);
// either spelling reads the value.
func TestOneNameTwoSpellings(t *testing.T) {
	tests := []struct {
		name, src, pos, msg string
	}{
		{"phi then φ", "phi = 1\nφ = 2", "2:1", `"φ" is already defined at line 1, written "phi" (a spelled Greek name and its letter are one name)`},
		{"V_φ then V_phi", "V_φ = 1 V\nx = 2\nV_phi = 3 V", "3:1", `"V_phi" is already defined at line 1, written "V_φ"`},
		{"omega then ω", "omega = 314 Hz\nω = 1 Hz", "2:1", `"ω" is already defined at line 1`},
		{"micro sign then mu", "\u00b5 = 1\n\u03bc = 2", "2:1", `"μ" is already defined at line 1, written "µ" (the same name after Unicode NFKC normalisation)`},
		{"function then value", "f_phi(x) = x\nf_φ = 2", "2:1", `"f_φ" is already defined as a function at line 1, written "f_phi"`},
		{"two parameters", "f(phi, φ) = phi", "1:8", `parameter "φ" is listed twice`},
		{"two names of one assignment", "phi, φ = [1; 2]", "1:6", `"φ" is listed twice before "="`},
		{"the constant pi", "π = 3.14", "1:1", `"π" is a built-in constant`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := firstError(tc.src)
			if err == nil {
				t.Fatalf("%q: no error", tc.src)
			}
			if got := errPos(err).String(); got != tc.pos {
				t.Errorf("%q: error at %s, want %s (%v)", tc.src, got, tc.pos, err)
			}
			if !strings.Contains(errMsg(err), tc.msg) {
				t.Errorf("%q: message\n %q\nwant it to contain\n %q", tc.src, errMsg(err), tc.msg)
			}
		})
	}
	reads := []struct{ name, src string }{
		{"φ read as phi", "φ = 2\n3 * phi"},
		{"V_phi read as V_φ", "V_phi = 2\n3 * V_φ"},
		{"parameter phi used as φ", "f(phi) = 3 * φ\nf(2)"},
		{"function called by the other spelling", "g_omega(x) = 3 * x\ng_ω(2)"},
		{"pi written as π", "6 / π * pi"},
	}
	for _, tc := range reads {
		t.Run(tc.name, func(t *testing.T) {
			if s := evalScalar(t, tc.src); real(s.Z) != 6 {
				t.Errorf("%q = %v, want 6", tc.src, s.Z)
			}
		})
	}
}

// TestNameLetters: letters are Latin or Greek; a letter of another script,
// an invisible character, or a Greek letter that looks like a Latin one is
// an error at that character that suggests the Latin letter. Code points
// from the Unicode code charts: Greek and Coptic (U+0370–U+03FF: U+0391
// ALPHA, U+0399 IOTA, U+039F OMICRON, U+03BF small omicron), Cyrillic
// (U+0430 SMALL LETTER A), General Punctuation (U+200B ZERO WIDTH SPACE,
// U+200D ZERO WIDTH JOINER), Hangul Compatibility Jamo (U+3164 HANGUL
// FILLER), Arabic Presentation Forms-B (U+FEFF ZERO WIDTH NO-BREAK SPACE),
// Hebrew (U+05D0 ALEF).
func TestNameLetters(t *testing.T) {
	tests := []struct {
		name, src, pos, msg string
	}{
		{"Greek capital Iota for I", "\u0399_k = 3 A", "1:1", `the name "Ι_k" holds the Greek letter "Ι" (U+0399), which looks like the Latin I: write I_k`},
		{"Greek capital Alpha inside", "R\u0391 = 1", "1:2", `which looks like the Latin A: write RA`},
		{"Greek capital Omicron", "x = 2 * V_\u039f", "1:11", `looks like the Latin O: write V_O`},
		{"Greek small omicron", "\u03bf = 1", "1:1", `looks like the Latin o: write o`},
		{"Cyrillic a", "V_\u0430 = 1", "1:3", `the name "V_а" holds the Cyrillic letter "а" (U+0430), which looks like the Latin a: write V_a`},
		{"Hebrew letter", "x\u05d0 = 1", "1:2", `holds the Hebrew letter "א" (U+05D0): names are written in Latin or Greek letters`},
		{"Hangul filler", "I_k\u3164 = 1", "1:4", `the name "I_k" holds an invisible character, U+3164 (HANGUL FILLER): delete it and write I_k`},
		{"zero width space", "a\u200bb = 1", "1:2", `U+200B (ZERO WIDTH SPACE)`},
		{"zero width joiner", "y = 2 * V\u200d_1", "1:10", `the name "V_1" holds an invisible character, U+200D (ZERO WIDTH JOINER)`},
		{"byte order mark inside a name", "Z\ufeff_s = 1", "1:2", `U+FEFF (ZERO WIDTH NO-BREAK SPACE)`},
		{"an invisible character alone", "x = 1 +\u200b 2", "1:8", `an invisible character, U+200B (ZERO WIDTH SPACE), stands here: delete it`},
		{"Arabic-Indic digit", "V_\u0661 = 1", "1:3", `holds the digit "١" (U+0661): write the digits 0 to 9`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := firstError(tc.src)
			if err == nil {
				t.Fatalf("%q: no error", tc.src)
			}
			if got := errPos(err).String(); got != tc.pos {
				t.Errorf("%q: error at %s, want %s (%v)", tc.src, got, tc.pos, err)
			}
			if !strings.Contains(errMsg(err), tc.msg) {
				t.Errorf("%q: message\n %q\nwant it to contain\n %q", tc.src, errMsg(err), tc.msg)
			}
		})
	}
	// accepted: Greek letters that do not look Latin, Latin letters with
	// accents, the micro sign, units with µ, u, Ω and the ohm sign
	ok := []struct{ name, src string }{
		{"Greek small letters", "α_β = 1\nφ_ω = 2"},
		{"Greek capitals that look Greek", "Δ_V = 1 V\nΦ = 2\nΩ_1 = 3"},
		{"Latin with an accent", "T_é = 1"},
		{"micro sign in a name", "\u00b5_r = 1"},
		{"units with micro", "C_1 = 4.7\u00b5F\nC_2 = 4.7\u03bcF\nC_3 = 4.7uF\ncheck C_1 == C_2\ncheck C_1 == C_3"},
		{"ohm and the ohm sign", "R_1 = 2 Ω\nR_2 = 2 \u2126\ncheck R_1 == R_2"},
	}
	for _, tc := range ok {
		t.Run(tc.name, func(t *testing.T) {
			if errs := runBlock(tc.src).allErrors(); len(errs) > 0 {
				t.Errorf("%q: %v", tc.src, errs[0])
			}
		})
	}
}

// TestNamesKeepTheirSpelling: the name as written stays on the binding (the
// sheet and the values file show it), only the comparison uses the key.
func TestNamesKeepTheirSpelling(t *testing.T) {
	b := runBlock("V_phi = 1 V\nomega = 2 Hz")
	for _, tc := range []struct{ lookup, want string }{{"V_φ", "V_phi"}, {"V_phi", "V_phi"}, {"ω", "omega"}} {
		bd := b.env.Lookup(tc.lookup)
		if bd == nil || bd.Name != tc.want {
			t.Errorf("Lookup(%q) = %+v, want the binding named %q", tc.lookup, bd, tc.want)
		}
	}
	if got := strings.Join(b.env.Names(), ","); got != "V_phi,omega" {
		t.Errorf("Names() = %q", got)
	}
}
