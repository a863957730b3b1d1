package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"calcdoc/render/verify"
)

func init() {
	commands["sign"] = (*cli).sign
}

// signNow is the time a signature records; the tests fix it.
var signNow = func() time.Time { return time.Now().UTC().Truncate(time.Second) }

// sign signs issued sheets or packages (docs/issue.md, "Signatures"):
// each file must verify first; its canonical form (the file without its
// signature elements) is signed with ssh-keygen -Y sign under the role's
// namespace, and the signature element is added before </body>, the file
// being replaced atomically. Exit 0 when every file was signed, 1 when a
// file does not verify, 2 for a usage error, 3 when signing failed.
func (c *cli) sign(args []string) int {
	fs := c.flagSet("sign")
	key := fs.String("key", "", "the SSH key to sign with: a private key file, or a public key file whose private key ssh-agent holds")
	role := fs.String("role", "", "the role signed for: checked or approved")
	principal := fs.String("principal", "", "the signer's name as the allowed-signers file gives it (default: from --signers, else the key's comment)")
	signers := fs.String("signers", "", "an allowed-signers file: names the signer and refuses a key not allowed the role")
	paths, err := parseFlags(fs, args)
	if err != nil {
		return exitUsage
	}
	switch {
	case *key == "":
		return c.usageErr("sign needs --key KEY (an SSH key file)")
	case !verify.ValidRole(*role):
		return c.usageErr("sign needs --role checked or --role approved, not %q", *role)
	case len(paths) == 0:
		return c.usageErr("sign needs at least one SHEET.html")
	}
	if _, err := os.Stat(*key); err != nil {
		return c.usageErr("--key %s: %v", *key, err)
	}
	st := exitOK
	for _, p := range paths {
		st = max(st, c.signOne(p, *key, *role, *principal, *signers))
	}
	return st
}

func (c *cli) signOne(path, key, role, principal, signers string) int {
	page, err := os.ReadFile(path)
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %s: cannot read: %v\n", path, err)
		return exitUsage
	}
	rep, err := verify.Check(page, verify.Options{Version: version, SheetPath: path, Git: true, Signers: signers})
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %s: %v\n", path, err)
		return exitUsage
	}
	if !rep.OK() {
		c.printReport(path, rep)
		fmt.Fprintf(c.stderr, "calcdoc: %s: not signed: the file does not verify\n", path)
		return exitCheckFail
	}
	canon, _, _ := verify.Canonical(page)
	ns := verify.Namespace(role)
	armored, err := verify.SignBytes(canon, key, ns)
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %s: not signed: %v\n", path, err)
		return exitError
	}
	if signers != "" {
		names, err := verify.Principals(armored, signers)
		if err != nil {
			fmt.Fprintf(c.stderr, "calcdoc: %s: not signed: %v\n", path, err)
			return exitError
		}
		if len(names) == 0 {
			fmt.Fprintf(c.stderr, "calcdoc: %s: not signed: %s does not name the key %s\n", path, signers, fingerprint(armored))
			return exitCheckFail
		}
		if principal == "" {
			principal = names[0]
		}
	}
	if principal == "" {
		principal = keyComment(key)
	}
	if principal == "" {
		return c.usageErr("say who signs: --principal NAME, or --signers FILE that names the key (the key has no comment to take it from)")
	}
	out, err := verify.AddSignature(page, verify.Signature{Role: role, Principal: principal, Time: signNow().Format(time.RFC3339), Armored: armored})
	if err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %s: not signed: %v\n", path, err)
		return exitError
	}
	if signers != "" {
		// the new signature must be confirmed: the key is the principal's
		// and the role is allowed
		rep, err := verify.Check(out, verify.Options{Version: version, SheetPath: path, Signers: signers})
		if err != nil {
			fmt.Fprintf(c.stderr, "calcdoc: %s: not signed: %v\n", path, err)
			return exitError
		}
		if !rep.OK() {
			last := rep.Signatures[len(rep.Signatures)-1]
			fmt.Fprintf(c.stderr, "calcdoc: %s: not signed: %s\n", path, last.Problem)
			return exitCheckFail
		}
	}
	if err := replaceFile(path, out); err != nil {
		fmt.Fprintf(c.stderr, "calcdoc: %s: not signed: %v\n", path, err)
		return exitError
	}
	fmt.Fprintf(c.stdout, "%s: signed as %s by %s (key %s)\n", path, role, principal, fingerprint(armored))
	return exitOK
}

func fingerprint(armored string) string {
	if s, err := verify.ParseSSHSig(armored); err == nil {
		return s.Fingerprint
	}
	return "?"
}

// keyComment is the comment of the public key of key (KEY.pub beside a
// private key, or KEY itself when it is a public key), or "".
func keyComment(key string) string {
	for _, p := range []string{key, key + ".pub"} {
		b, err := os.ReadFile(p)
		if err != nil {
			continue
		}
		f := strings.Fields(strings.SplitN(string(b), "\n", 2)[0])
		if len(f) >= 3 && (strings.HasPrefix(f[0], "ssh-") || strings.HasPrefix(f[0], "ecdsa-") || strings.HasPrefix(f[0], "sk-")) {
			return strings.Join(f[2:], " ")
		}
	}
	return ""
}

// replaceFile writes data to path atomically: a temporary file in the
// same folder, with path's permissions, synced and renamed over it.
func replaceFile(path string, data []byte) (err error) {
	fi, err := os.Stat(path)
	if err != nil {
		return err
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".sign-*")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			os.Remove(tmp.Name())
		}
	}()
	if _, err = tmp.Write(data); err != nil {
		tmp.Close()
		return err
	}
	if err = tmp.Chmod(fi.Mode().Perm()); err != nil {
		tmp.Close()
		return err
	}
	if err = tmp.Sync(); err != nil {
		tmp.Close()
		return err
	}
	if err = tmp.Close(); err != nil {
		return err
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return errors.New("cannot replace the file: " + err.Error())
	}
	return nil
}
