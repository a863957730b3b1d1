package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// sshKey makes a throwaway ed25519 key without a passphrase and returns
// the private key's path and the public key ("TYPE BASE64").
func sshKey(t *testing.T, dir, name string) (string, string) {
	t.Helper()
	if _, err := exec.LookPath("ssh-keygen"); err != nil {
		if os.Getenv("CALCDOC_REQUIRE_BROWSER") != "" {
			t.Fatal("ssh-keygen (openssh-client) is not installed")
		}
		t.Skip("ssh-keygen (openssh-client) is not installed")
	}
	key := filepath.Join(dir, name)
	if out, err := exec.Command("ssh-keygen", "-q", "-t", "ed25519", "-N", "", "-C", name+"@example.invalid", "-f", key).CombinedOutput(); err != nil {
		t.Fatalf("ssh-keygen: %v\n%s", err, out)
	}
	b, err := os.ReadFile(key + ".pub")
	if err != nil {
		t.Fatal(err)
	}
	f := strings.Fields(string(b))
	return key, f[0] + " " + f[1]
}

// sign and verify --signers as a checker and an approver use them: two
// signatures on one built sheet, each confirmed; a sheet edited after
// signing fails and says which signature broke; a key not allowed the
// role is refused before anything is written.
func TestSignCommand(t *testing.T) {
	dir := t.TempDir()
	keys := t.TempDir()
	alice, alicePub := sshKey(t, keys, "alice")
	bob, bobPub := sshKey(t, keys, "bob")
	allowed := write(t, keys, "allowed_signers",
		"alice@example.invalid namespaces=\"calcdoc-checked\" "+alicePub+"\n"+
			"bob@example.invalid namespaces=\"calcdoc-approved\" "+bobPub+"\n")
	src := write(t, dir, "heater.md", heaterDoc)
	sheet := filepath.Join(dir, "heater.html")
	if st, _, errs := runCLI("build", src); st != exitOK {
		t.Fatalf("build: %d %s", st, errs)
	}
	if err := os.Chmod(sheet, 0o640); err != nil {
		t.Fatal(err)
	}
	built, _ := os.ReadFile(sheet)

	// usage errors
	for _, args := range [][]string{{sheet}, {"--key", alice, sheet}, {"--key", alice, "--role", "drawn", sheet}, {"--key", alice, "--role", "checked"}} {
		if st, _, _ := runCLI(append([]string{"sign"}, args...)...); st != exitUsage {
			t.Errorf("sign %v: status %d, want %d", args, st, exitUsage)
		}
	}
	// bob may not sign as checked: refused, the file untouched
	st, _, errs := runCLI("sign", "--key", bob, "--role", "checked", "--signers", allowed, sheet)
	if after, _ := os.ReadFile(sheet); st != exitCheckFail || string(after) != string(built) || !strings.Contains(errs, "bob@example.invalid is not allowed the role checked") {
		t.Fatalf("bob as checked: status %d, %s", st, errs)
	}

	st, out, errs := runCLI("sign", "--key", alice, "--role", "checked", sheet)
	if st != exitOK || !strings.Contains(out, "signed as checked by alice@example.invalid") {
		t.Fatalf("sign: %d %s %s", st, out, errs)
	}
	st, out, errs = runCLI("sign", "--key", bob, "--role", "approved", "--signers", allowed, sheet)
	if st != exitOK || !strings.Contains(out, "signed as approved by bob@example.invalid") {
		t.Fatalf("sign: %d %s %s", st, out, errs)
	}
	signed, _ := os.ReadFile(sheet)
	if !strings.HasPrefix(string(signed), strings.TrimSuffix(string(built), "</body>\n</html>\n")) {
		t.Error("signing changed the sheet before its signature elements")
	}
	if fi, _ := os.Stat(sheet); fi.Mode().Perm() != 0o640 {
		t.Errorf("mode %v after signing, want 0640", fi.Mode().Perm())
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".heater.html.sign-*")); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}

	st, out, _ = runCLI("verify", "--signers", allowed, sheet)
	if st != exitOK || !strings.Contains(out, "signature 1 (checked, by alice@example.invalid") ||
		!strings.Contains(out, "allows the role approved") {
		t.Fatalf("verify --signers: %d\n%s", st, out)
	}
	// edited after signing: the title in the head
	if !strings.Contains(string(signed), "Water heater element") {
		t.Fatal("no title in the sheet")
	}
	edited := write(t, dir, "edited.html", strings.Replace(string(signed), "Water heater element", "Water heater element, checked", 1))
	st, out, _ = runCLI("verify", "--signers", allowed, edited)
	if st != exitCheckFail || !strings.Contains(out, "signature 1 (checked, by alice@example.invalid") || !strings.Contains(out, "FAILS: broke") {
		t.Fatalf("verify of an edited sheet: %d\n%s", st, out)
	}
	// a file that does not verify is not signed
	before, _ := os.ReadFile(edited)
	st, _, errs = runCLI("sign", "--key", alice, "--role", "checked", edited)
	if after, _ := os.ReadFile(edited); st != exitCheckFail || string(after) != string(before) || !strings.Contains(errs, "not signed: the file does not verify") {
		t.Fatalf("sign of an edited sheet: %d %s", st, errs)
	}
}
