package calcdoc

import "testing"

// TestSourceSHA256 checks the source's hash that a build shares (the
// loader's memo key, the stamp, the embedded source) against the SHA-256
// of "abc" in FIPS 180-4's example (appendix B.1 of the earlier FIPS
// 180-2): the same whether the loader made it or the document makes it.
func TestSourceSHA256(t *testing.T) {
	const abc = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad" // FIPS 180-2, B.1
	src := []byte("abc")
	loaded := NewLoader(NewRegistry()).Parse("abc.md", src)
	if loaded.sum == "" {
		t.Error("the loader's document does not keep the hash the loader made")
	}
	direct := ParseOnly("abc.md", src, NewRegistry())
	for name, d := range map[string]*Document{"loader": loaded, "ParseOnly": direct} {
		if got := d.SourceSHA256(); got != abc {
			t.Errorf("%s: SourceSHA256 = %s, want %s", name, got, abc)
		}
	}
}
