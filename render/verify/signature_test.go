package verify

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/render/internal/sheettest"
)

// needSSHKeygen skips a test without ssh-keygen, except in CI, which
// installs openssh-client and sets CALCDOC_REQUIRE_BROWSER.
func needSSHKeygen(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath("ssh-keygen"); err != nil {
		if os.Getenv("CALCDOC_REQUIRE_BROWSER") != "" {
			t.Fatal("ssh-keygen (openssh-client) is not installed")
		}
		t.Skip("ssh-keygen (openssh-client) is not installed")
	}
}

// testKey makes a throwaway ed25519 key without a passphrase in dir and
// returns the private key's path and the public key line.
func testKey(t *testing.T, dir, name string) (key, pub string) {
	t.Helper()
	key = filepath.Join(dir, name)
	if out, err := exec.Command("ssh-keygen", "-q", "-t", "ed25519", "-N", "", "-C", name, "-f", key).CombinedOutput(); err != nil {
		t.Fatalf("ssh-keygen: %v\n%s", err, out)
	}
	b, err := os.ReadFile(key + ".pub")
	if err != nil {
		t.Fatal(err)
	}
	f := strings.Fields(string(b))
	return key, f[0] + " " + f[1]
}

type signKeys struct {
	dir                   string
	alice, bob, eve       string // private key files
	alicePub, bobPub      string
	allowed               string // allowed-signers file
	aliceFP, bobFP, eveFP string
}

// newSignKeys: alice may sign as checked, bob as approved; eve is in no
// allowed-signers file. The file's format is git's (gpg.ssh.allowedSignersFile),
// that is ssh-keygen(1) ALLOWED SIGNERS.
func newSignKeys(t *testing.T) *signKeys {
	needSSHKeygen(t)
	k := &signKeys{dir: t.TempDir()}
	k.alice, k.alicePub = testKey(t, k.dir, "alice")
	k.bob, k.bobPub = testKey(t, k.dir, "bob")
	k.eve, _ = testKey(t, k.dir, "eve")
	k.allowed = filepath.Join(k.dir, "allowed_signers")
	text := "alice@example.invalid namespaces=\"calcdoc-checked\" " + k.alicePub + "\n" +
		"bob@example.invalid namespaces=\"calcdoc-approved\" " + k.bobPub + "\n"
	if err := os.WriteFile(k.allowed, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	fp := func(key string) string {
		out, err := exec.Command("ssh-keygen", "-l", "-E", "sha256", "-f", key+".pub").Output()
		if err != nil {
			t.Fatal(err)
		}
		return strings.Fields(string(out))[1]
	}
	k.aliceFP, k.bobFP, k.eveFP = fp(k.alice), fp(k.bob), fp(k.eve)
	return k
}

// sign adds a signature by key in role, naming principal, to page.
func sign(t *testing.T, page []byte, key, role, principal string) []byte {
	t.Helper()
	canon, _, diffs := Canonical(page)
	if len(diffs) > 0 {
		t.Fatal(diffs)
	}
	armored, err := SignBytes(canon, key, Namespace(role))
	if err != nil {
		t.Fatal(err)
	}
	out, err := AddSignature(page, Signature{Role: role, Principal: principal, Time: "2026-12-02T07:00:00Z", Armored: armored})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func checkSigned(t *testing.T, page []byte, signers string) *Report {
	t.Helper()
	rep, err := Check(page, Options{Version: "test", Signers: signers})
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// The fingerprint read from a signature (PROTOCOL.sshsig: the public key
// blob, hashed as ssh-keygen -l hashes it) is the one ssh-keygen -l
// prints for the key.
func TestParseSSHSig(t *testing.T) {
	k := newSignKeys(t)
	armored, err := SignBytes([]byte("calcdoc"), k.alice, "calcdoc-checked")
	if err != nil {
		t.Fatal(err)
	}
	s, err := ParseSSHSig(armored)
	if err != nil {
		t.Fatal(err)
	}
	if s.Fingerprint != k.aliceFP || s.KeyType != "ssh-ed25519" || s.Namespace != "calcdoc-checked" || s.HashAlg != "sha512" {
		t.Errorf("parsed %+v, ssh-keygen -l gives %s", s, k.aliceFP)
	}
	for _, bad := range []string{"", "-----BEGIN SSH SIGNATURE-----\n!!\n-----END SSH SIGNATURE-----", strings.Replace(armored, "U1NIU0lH", "U1NIU0lI", 1)} {
		if _, err := ParseSSHSig(bad); err == nil {
			t.Errorf("%q parsed", bad)
		}
	}
}

func TestSignatures(t *testing.T) {
	k := newSignKeys(t)
	page := verifySheet(t, "heater.md", sheettest.HeaterDoc, "test")

	t.Run("a good signature", func(t *testing.T) {
		signed := sign(t, page, k.alice, "checked", "alice@example.invalid")
		// only the signature element is added, just before </body>
		canon, sigs, _ := Canonical(signed)
		if string(canon) != string(page) || len(sigs) != 1 || !strings.HasSuffix(string(signed), "</section>\n</body>\n</html>\n") {
			t.Fatal("signing changed more than the signature element")
		}
		for _, want := range []string{"<h2>Signature: checked</h2>", "<td>alice@example.invalid</td>", k.aliceFP, "2026-12-02T07:00:00Z"} {
			if !strings.Contains(string(signed), want) {
				t.Errorf("the signature block does not show %q", want)
			}
		}
		rep := checkSigned(t, signed, k.allowed)
		s := rep.Signatures[0]
		if !rep.OK() || !s.Valid || !s.Confirmed || s.Principal != "alice@example.invalid" || s.Role != "checked" || s.Fingerprint != k.aliceFP {
			t.Fatalf("%+v", rep.Signatures)
		}
		// without an allowed-signers file the signature is good for its
		// key, the signer unconfirmed
		rep = checkSigned(t, signed, "")
		if !rep.OK() || !rep.Signatures[0].Valid || rep.Signatures[0].Confirmed {
			t.Fatalf("%+v", rep.Signatures)
		}
	})

	t.Run("the sheet changed after signing", func(t *testing.T) {
		signed := string(sign(t, page, k.alice, "checked", "alice@example.invalid"))
		// a change that the re-render alone cannot see: the stamp's
		// commit edited in every place it stands, so that the sheet is
		// still what calcdoc writes for the facts it records
		changed := strings.ReplaceAll(signed, "89abcdef0123456789abcdef0123456789abcdef", "99abcdef0123456789abcdef0123456789abcdef")
		rep := checkSigned(t, []byte(changed), k.allowed)
		if rep.OK() || rep.Signatures[0].Valid || !strings.Contains(rep.Signatures[0].Problem, "broke: the file changed after it was signed") ||
			!strings.HasPrefix(rep.Signatures[0].Label(), "signature 1 (checked, by alice@example.invalid") {
			t.Fatalf("%+v", rep.Signatures)
		}
	})

	t.Run("the signature block's signer edited", func(t *testing.T) {
		signed := string(sign(t, page, k.alice, "checked", "alice@example.invalid"))
		changed := strings.Replace(signed, "<td>alice@example.invalid</td>", "<td>chief@example.invalid</td>", 1)
		rep := checkSigned(t, []byte(changed), "")
		if rep.OK() || !strings.Contains(rep.Signatures[0].Problem, "its visible block was changed after signing") {
			t.Fatalf("%+v", rep.Signatures)
		}
		changed = strings.Replace(signed, `data-principal="alice@example.invalid"`, `data-principal="bob@example.invalid"`, 1)
		changed = strings.Replace(changed, "<td>alice@example.invalid</td>", "<td>bob@example.invalid</td>", 1)
		rep = checkSigned(t, []byte(changed), k.allowed)
		if rep.OK() || !strings.Contains(rep.Signatures[0].Problem, `the sheet names the signer "bob@example.invalid", but the allowed-signers file`) {
			t.Fatalf("%+v", rep.Signatures)
		}
	})

	t.Run("an unknown signer", func(t *testing.T) {
		signed := sign(t, page, k.eve, "checked", "eve")
		rep := checkSigned(t, signed, k.allowed)
		if rep.OK() || !rep.Signatures[0].Valid || !strings.Contains(rep.Signatures[0].Problem, "unknown signer: the allowed-signers file "+k.allowed+" does not name the key "+k.eveFP) {
			t.Fatalf("%+v", rep.Signatures)
		}
	})

	t.Run("a signer not allowed the role", func(t *testing.T) {
		signed := sign(t, page, k.bob, "checked", "bob@example.invalid")
		rep := checkSigned(t, signed, k.allowed)
		if rep.OK() || !strings.Contains(rep.Signatures[0].Problem, `bob@example.invalid is not allowed the role checked`) {
			t.Fatalf("%+v", rep.Signatures)
		}
	})

	t.Run("a role relabelled", func(t *testing.T) {
		signed := string(sign(t, page, k.alice, "checked", "alice@example.invalid"))
		changed := strings.Replace(signed, `data-role="checked"`, `data-role="approved"`, 1)
		rep := checkSigned(t, []byte(changed), k.allowed)
		if rep.OK() || !strings.Contains(rep.Signatures[0].Problem, `made for the namespace "calcdoc-checked"`) {
			t.Fatalf("%+v", rep.Signatures)
		}
	})

	t.Run("two signatures", func(t *testing.T) {
		one := sign(t, page, k.alice, "checked", "alice@example.invalid")
		two := sign(t, one, k.bob, "approved", "bob@example.invalid")
		rep := checkSigned(t, two, k.allowed)
		if !rep.OK() || len(rep.Signatures) != 2 || !rep.Signatures[0].Confirmed || !rep.Signatures[1].Confirmed ||
			rep.Signatures[1].Role != "approved" || rep.Signatures[1].Principal != "bob@example.invalid" {
			t.Fatalf("%+v", rep.Signatures)
		}
		// the second signature left the first intact, byte for byte
		if !strings.HasPrefix(string(two), strings.TrimSuffix(string(one), "</body>\n</html>\n")) {
			t.Fatal("the second signature changed the bytes before it")
		}
		// removing either leaves the other valid
		_, sigs, _ := Canonical(two)
		for i, s := range sigs {
			rest := append(append([]byte{}, two[:s.start]...), two[s.end:]...)
			rep := checkSigned(t, rest, k.allowed)
			if !rep.OK() || len(rep.Signatures) != 1 || rep.Signatures[0].Principal == s.Principal {
				t.Errorf("without signature %d: %+v", i+1, rep.Signatures)
			}
		}
	})

	t.Run("a signature element moved", func(t *testing.T) {
		signed := string(sign(t, page, k.alice, "checked", "alice@example.invalid"))
		_, sigs, _ := Canonical([]byte(signed))
		el := signed[sigs[0].start:sigs[0].end]
		moved := strings.Replace(signed[:sigs[0].start]+signed[sigs[0].end:], "<body>\n", "<body>\n"+el, 1)
		rep := checkSigned(t, []byte(moved), "")
		if rep.OK() || !strings.Contains(rep.PackageDifferences[0].Message, "does not stand where sign puts it") {
			t.Fatalf("%+v %+v", rep.PackageDifferences, rep.Signatures)
		}
	})
}

// A package is signed as a sheet is: the signature follows its last
// sheet; a style added to its head after signing breaks the signature
// and fails the package.
func TestSignPackage(t *testing.T) {
	k := newSignKeys(t)
	page := buildPackage(t, pkgFiles)
	signed := sign(t, page, k.bob, "approved", "bob@example.invalid")
	rep := checkSigned(t, signed, k.allowed)
	if !rep.OK() || !rep.Package || len(rep.Signatures) != 1 || !rep.Signatures[0].Confirmed {
		t.Fatalf("%+v %+v", rep.PackageDifferences, rep.Signatures)
	}
	forged := strings.Replace(string(signed), "</head>", "<style>.marker{display:none}</style>\n</head>", 1)
	rep = checkSigned(t, []byte(forged), k.allowed)
	if rep.OK() || rep.Signatures[0].Valid || !strings.Contains(rep.Signatures[0].Problem, "broke") ||
		len(rep.PackageDifferences) == 0 || !strings.Contains(rep.PackageDifferences[0].Message, "in <head>") {
		t.Fatalf("%+v %+v", rep.PackageDifferences, rep.Signatures)
	}
}

// An allowed-signers file that ssh-keygen cannot read is named as such,
// not taken for an unknown signer.
func TestSignersFileBroken(t *testing.T) {
	k := newSignKeys(t)
	signed := sign(t, verifySheet(t, "heater.md", sheettest.HeaterDoc, "test"), k.alice, "checked", "alice@example.invalid")
	bad := filepath.Join(k.dir, "bad_signers")
	if err := os.WriteFile(bad, []byte("alice@example.invalid not-a-key\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{bad, filepath.Join(k.dir, "none")} {
		rep := checkSigned(t, signed, f)
		if rep.OK() || strings.Contains(rep.Signatures[0].Problem, "unknown signer") || !strings.Contains(rep.Signatures[0].Problem, "allowed-signers file") {
			t.Errorf("%s: %+v", f, rep.Signatures)
		}
	}
}
