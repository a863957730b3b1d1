package expr

import (
	"fmt"
	"strings"
	"sync"
	"sync/atomic"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/unicode/norm"
)

// Names are compared by their key (LANGUAGE.md section 3): the name after
// Unicode NFKC normalisation (UAX #15, "Unicode Normalization Forms"),
// with every "_"-separated part that is a spelled Greek name read as its
// letter. "phi" and "φ", "V_phi" and "V_φ", "µ" (U+00B5 MICRO SIGN) and
// "μ" (U+03BC GREEK SMALL LETTER MU) have one key. The name as written is
// kept for the sheet, the messages and the values file.

// greekNames maps the spelled Greek names to their letters: the small
// letters, and the capitals that do not look like Latin ones.
var greekNames = map[string]string{
	"alpha": "α", "beta": "β", "gamma": "γ", "delta": "δ", "epsilon": "ε", "zeta": "ζ",
	"eta": "η", "theta": "θ", "iota": "ι", "kappa": "κ", "lambda": "λ", "mu": "μ",
	"nu": "ν", "xi": "ξ", "pi": "π", "rho": "ρ", "sigma": "σ", "tau": "τ",
	"upsilon": "υ", "phi": "φ", "chi": "χ", "psi": "ψ", "omega": "ω",
	"Gamma": "Γ", "Delta": "Δ", "Theta": "Θ", "Lambda": "Λ", "Xi": "Ξ", "Pi": "Π",
	"Sigma": "Σ", "Phi": "Φ", "Psi": "Ψ", "Omega": "Ω",
}

// GreekLetter returns the letter of a spelled Greek name ("phi": "φ").
func GreekLetter(s string) (string, bool) {
	g, ok := greekNames[s]
	return g, ok
}

// NameKey returns the key under which a name is defined and looked up.
// A name of ASCII characters with no spelled Greek part is its own key,
// with no allocation.
func NameKey(name string) string {
	// one pass: ASCII throughout, and no "_"-separated part Greek
	ascii, greek, start := true, false, 0
	for i := 0; i <= len(name); i++ {
		if i < len(name) {
			c := name[i]
			if c >= utf8.RuneSelf {
				ascii = false
				break
			}
			if c != '_' {
				continue
			}
		}
		if n := i - start; !greek && n >= 2 && n <= 7 && isGreekName(name[start:i]) {
			greek = true
		}
		start = i + 1
	}
	if ascii && !greek {
		return name
	}
	if k, ok := keyCache.Load(name); ok {
		return k.(string)
	}
	key := nameKey(name, ascii)
	if keyCacheSize.Add(1) < maxCachedKeys {
		keyCache.Store(name, key)
	}
	return key
}

// The keys of the names that are not their own key are kept: a document
// writes the same few names many times, and an environment looks each up
// by its written form from outside the scanner. The cache is bounded, for
// a long-running preview.
var (
	keyCache     sync.Map
	keyCacheSize atomic.Int64
)

const maxCachedKeys = 50000

func nameKey(name string, ascii bool) string {
	if !ascii {
		name = norm.NFKC.String(name)
		if !hasGreekPart(name) {
			return name
		}
	}
	var b strings.Builder
	b.Grow(len(name))
	for i, p := range strings.Split(name, "_") {
		if i > 0 {
			b.WriteByte('_')
		}
		if g, ok := greekNames[p]; ok {
			p = g
		}
		b.WriteString(p)
	}
	return b.String()
}

// hasGreekPart reports whether a "_"-separated part of name is a spelled
// Greek name.
func hasGreekPart(name string) bool {
	start := 0
	for i := 0; i <= len(name); i++ {
		if i < len(name) && name[i] != '_' {
			continue
		}
		if n := i - start; n >= 2 && n <= 7 && isGreekName(name[start:i]) {
			return true
		}
		start = i + 1
	}
	return false
}

// greekFirst marks the first bytes of the spelled Greek names: a part
// that starts with another (a digit, most letters) is not one of them.
var greekFirst = func() (t [256]bool) {
	for k := range greekNames {
		t[k[0]] = true
	}
	return t
}()

// isGreekName reports whether p is a key of greekNames (the test holds
// the two lists together); a switch on constant strings compares lengths
// and bytes, with no hashing, for the many names that are not Greek.
func isGreekName(p string) bool {
	if p == "" || !greekFirst[p[0]] {
		return false
	}
	switch p {
	case "alpha", "beta", "gamma", "delta", "epsilon", "zeta",
		"eta", "theta", "iota", "kappa", "lambda", "mu",
		"nu", "xi", "pi", "rho", "sigma", "tau",
		"upsilon", "phi", "chi", "psi", "omega",
		"Gamma", "Delta", "Theta", "Lambda", "Xi", "Pi",
		"Sigma", "Phi", "Psi", "Omega":
		return true
	}
	return false
}

// key is the identifier's key: set by the parser, computed for an
// identifier made some other way.
func (id *Ident) key() string {
	if id.Key != "" {
		return id.Key
	}
	return NameKey(id.Name)
}

// latinLookalikes are the letters of other scripts that look like Latin
// ones: the Greek capitals Α Β Ε Ζ Η Ι Κ Μ Ν Ο Ρ Τ Υ Χ and the small ο
// (Unicode code chart U+0370–U+03FF, Greek and Coptic), and the Cyrillic
// letters of the same shapes (code chart U+0400–U+04FF, Cyrillic).
var latinLookalikes = map[rune]string{
	'Α': "A", 'Β': "B", 'Ε': "E", 'Ζ': "Z", 'Η': "H", 'Ι': "I", 'Κ': "K", 'Μ': "M",
	'Ν': "N", 'Ο': "O", 'Ρ': "P", 'Τ': "T", 'Υ': "Y", 'Χ': "X", 'ο': "o",
	'А': "A", 'В': "B", 'Е': "E", 'К': "K", 'М': "M", 'Н': "H", 'О': "O", 'Р': "P",
	'С': "C", 'Т': "T", 'Х': "X", 'а': "a", 'е': "e", 'о': "o", 'р': "p", 'с': "c",
	'у': "y", 'х': "x", 'і': "i", 'ј': "j", 'ѕ': "s", 'І': "I", 'Ј': "J", 'Ѕ': "S",
}

// invisibleNames names the invisible characters that may hide in a name:
// the format characters most often met (general category Cf) and the
// Hangul fillers, which are letters (Lo) that show nothing.
var invisibleNames = map[rune]string{
	0x00AD: "SOFT HYPHEN",
	0x034F: "COMBINING GRAPHEME JOINER",
	0x115F: "HANGUL CHOSEONG FILLER",
	0x1160: "HANGUL JUNGSEONG FILLER",
	0x180E: "MONGOLIAN VOWEL SEPARATOR",
	0x200B: "ZERO WIDTH SPACE",
	0x200C: "ZERO WIDTH NON-JOINER",
	0x200D: "ZERO WIDTH JOINER",
	0x200E: "LEFT-TO-RIGHT MARK",
	0x200F: "RIGHT-TO-LEFT MARK",
	0x2060: "WORD JOINER",
	0x2061: "FUNCTION APPLICATION",
	0x2062: "INVISIBLE TIMES",
	0x2063: "INVISIBLE SEPARATOR",
	0x2064: "INVISIBLE PLUS",
	0x3164: "HANGUL FILLER",
	0xFEFF: "ZERO WIDTH NO-BREAK SPACE",
	0xFFA0: "HALFWIDTH HANGUL FILLER",
}

// isInvisible reports whether r shows nothing: a format character or one
// of the fillers above.
func isInvisible(r rune) bool {
	_, ok := invisibleNames[r]
	return ok || unicode.Is(unicode.Cf, r)
}

// inName reports whether the scanner keeps r inside a name, so that a
// name with a character it refuses is reported as one name: the letters,
// digits and "_", and beyond ASCII every digit, combining mark and
// invisible character.
func inName(r rune) bool {
	if r < utf8.RuneSelf {
		return isLetter(r) || isDigit(r) || r == '_'
	}
	return unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.In(r, unicode.Mn, unicode.Mc, unicode.Me) || isInvisible(r)
}

// startsName reports whether r begins a name (or what the scanner reads as
// one in order to report it: an invisible character).
func startsName(r rune) bool {
	return isLetter(r) || r >= utf8.RuneSelf && isInvisible(r)
}

// NameProblem says what is wrong with a name read outside the scanner
// (a sweep variable in a block header), or "" when it is a good name.
func NameProblem(name string) string {
	_, msg := checkName(name)
	return msg
}

// checkName finds the first character of name that a name may not hold
// (LANGUAGE.md section 3: letters are Latin or Greek; no letter of another
// script, no invisible character, no Greek letter that looks like a
// Latin one). It returns the byte offset of that character in name and
// the message, or -1.
func checkName(name string) (int, string) {
	visible := visibleText(name)
	for off, r := range name {
		if r < utf8.RuneSelf {
			continue
		}
		if isInvisible(r) {
			what := invisibleNames[r]
			if what == "" {
				what = "a format character"
			}
			if visible == "" {
				return off, fmt.Sprintf("an invisible character, %U (%s), stands here: delete it", r, what)
			}
			return off, fmt.Sprintf("the name %q holds an invisible character, %U (%s): delete it and write %s", visible, r, what, visible)
		}
		// compatibility forms are read through NFKC (µ is μ, 𝑥 is x)
		for _, q := range norm.NFKC.String(string(r)) {
			if msg := checkNameRune(name, visible, r, q, off == 0); msg != "" {
				return off, msg
			}
		}
	}
	return -1, ""
}

// checkNameRune checks one character q (r as written, normalised) of a name.
func checkNameRune(name, visible string, r, q rune, first bool) string {
	if q < utf8.RuneSelf {
		return ""
	}
	if latin, ok := latinLookalikes[q]; ok {
		fixed := strings.Replace(visible, string(r), latin, 1)
		return fmt.Sprintf("the name %q holds the %s letter %q (%U), which looks like the Latin %s: write %s", visible, scriptOf(q), string(r), r, latin, fixed)
	}
	switch {
	case unicode.IsLetter(q) && (unicode.Is(unicode.Latin, q) || unicode.Is(unicode.Greek, q)):
		return ""
	case unicode.In(q, unicode.Mn, unicode.Mc, unicode.Me) && !first:
		return "" // a combining accent on the letter before it
	case unicode.IsDigit(q):
		return fmt.Sprintf("the name %q holds the digit %q (%U): write the digits 0 to 9", visible, string(r), r)
	case unicode.IsLetter(q):
		return fmt.Sprintf("the name %q holds the %s letter %q (%U): names are written in Latin or Greek letters", visible, scriptOf(q), string(r), r)
	}
	return fmt.Sprintf("the name %q holds the character %q (%U), which is not a letter: names are written in Latin or Greek letters, digits and _", visible, string(r), r)
}

// visibleText is name without its invisible characters.
func visibleText(name string) string {
	return strings.Map(func(r rune) rune {
		if r >= utf8.RuneSelf && isInvisible(r) {
			return -1
		}
		return r
	}, name)
}

// scriptOf names the script of a letter, for messages.
func scriptOf(r rune) string {
	for name, t := range unicode.Scripts {
		if unicode.Is(t, r) {
			return strings.ReplaceAll(name, "_", " ")
		}
	}
	return "unknown"
}
