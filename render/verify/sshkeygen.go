package verify

import (
	"bytes"
	"context"
	"crypto/sha256"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"
)

// Signatures are made and checked by OpenSSH's ssh-keygen -Y, as git does
// for signed commits (gpg.format=ssh): calcdoc implements no cryptography,
// and a key in ssh-agent or on a hardware token works as ssh-keygen
// allows. The commands:
//
//	ssh-keygen -Y sign -n NAMESPACE -f KEY                 (the message on standard input)
//	ssh-keygen -Y check-novalidate -n NAMESPACE -s SIG     (the signature fits the message and its own key)
//	ssh-keygen -Y find-principals -s SIG -f ALLOWED        (who the allowed-signers file says holds the key)
//	ssh-keygen -Y verify -f ALLOWED -I SIGNER -n NAMESPACE -s SIG

// sshTimeout bounds each ssh-keygen command (a hardware key may wait for
// a touch).
var sshTimeout = 2 * time.Minute

// ErrNoSSHKeygen is returned when ssh-keygen is not installed.
var ErrNoSSHKeygen = errors.New("ssh-keygen (OpenSSH, Debian package openssh-client) is not installed: it makes and checks the signatures")

func sshKeygen(stdin []byte, args ...string) (stdout []byte, stderr string, err error) {
	bin, err := exec.LookPath("ssh-keygen")
	if err != nil {
		return nil, "", ErrNoSSHKeygen
	}
	ctx, cancel := context.WithTimeout(context.Background(), sshTimeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, args...)
	cmd.Stdin = bytes.NewReader(stdin)
	cmd.WaitDelay = time.Second
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err = cmd.Run()
	return out.Bytes(), strings.TrimSpace(errb.String()), err
}

// withSigFile writes armored to a temporary file for ssh-keygen's -s and
// removes it after fn.
func withSigFile(armored string, fn func(path string) error) error {
	dir, err := os.MkdirTemp("", "calcdoc-sig-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	p := filepath.Join(dir, "sig")
	if err := os.WriteFile(p, []byte(armored), 0o600); err != nil {
		return err
	}
	return fn(p)
}

// SignBytes signs msg with the key at key (a private key file, or a
// public key whose private key ssh-agent holds) under namespace, and
// returns the armored signature.
func SignBytes(msg []byte, key, namespace string) (string, error) {
	out, stderr, err := sshKeygen(msg, "-Y", "sign", "-n", namespace, "-f", key)
	if err != nil {
		if errors.Is(err, ErrNoSSHKeygen) {
			return "", err
		}
		return "", fmt.Errorf("ssh-keygen -Y sign: %v: %s", err, stderr)
	}
	if _, err := ParseSSHSig(string(out)); err != nil {
		return "", fmt.Errorf("ssh-keygen -Y sign gave no signature: %v", err)
	}
	return string(out), nil
}

// Principals are the signers that the allowed-signers file gives the key
// of the signature to, whatever their namespaces (ssh-keygen -Y
// find-principals); none when it does not name the key.
func Principals(armored, allowed string) ([]string, error) {
	var names []string
	err := withSigFile(armored, func(sig string) error {
		out, stderr, err := sshKeygen(nil, "-Y", "find-principals", "-s", sig, "-f", allowed)
		var ee *exec.ExitError
		switch {
		case errors.As(err, &ee):
			if _, serr := os.Stat(allowed); serr != nil {
				return fmt.Errorf("the allowed-signers file cannot be read: %v", serr)
			}
			for _, l := range strings.Split(stderr, "\n") {
				if l = strings.TrimSpace(l); l != "" && l != "No principal matched." {
					return fmt.Errorf("ssh-keygen cannot read the allowed-signers file %s: %s", allowed, l)
				}
			}
			return nil // no principal matched
		case err != nil:
			return fmt.Errorf("ssh-keygen -Y find-principals: %v: %s", err, stderr)
		}
		for _, l := range strings.Split(string(out), "\n") {
			if l = strings.TrimSpace(l); l != "" {
				names = append(names, l)
			}
		}
		return nil
	})
	return names, err
}

// SignatureResult is the check of one signature.
type SignatureResult struct {
	Index       int // from 1, in file order
	Role        string
	Principal   string // as the signature element names the signer
	Fingerprint string
	Time        string
	// Valid: the signature fits the file's canonical form and the key it
	// carries, under its role's namespace.
	Valid bool
	// Confirmed: the allowed-signers file gives the key to Principal and
	// allows them the role. False without an allowed-signers file.
	Confirmed bool
	// OK: Valid, and Confirmed when an allowed-signers file was given.
	OK bool
	// Problem says what is wrong when OK is false.
	Problem string
}

// Label names the signature for messages: "signature 2 (approved, by
// j.pereira, key SHA256:...)".
func (r SignatureResult) Label() string {
	return fmt.Sprintf("signature %d (%s, by %s, key %s)", r.Index, orDash(r.Role), orDash(r.Principal), orDash(r.Fingerprint))
}

// checkSignatures checks each signature against canon, the file's
// canonical form.
func checkSignatures(canon []byte, sigs []Signature, opt Options) []SignatureResult {
	out := make([]SignatureResult, 0, len(sigs))
	for i, s := range sigs {
		r := SignatureResult{Index: i + 1, Role: s.Role, Principal: s.Principal, Time: s.Time}
		r.Problem = checkOne(canon, s, opt, &r)
		r.OK = r.Problem == ""
		out = append(out, r)
	}
	return out
}

func checkOne(canon []byte, s Signature, opt Options, r *SignatureResult) string {
	info, err := ParseSSHSig(s.Armored)
	if err != nil {
		return err.Error()
	}
	r.Fingerprint = info.Fingerprint
	if !ValidRole(s.Role) {
		return fmt.Sprintf("the role %q is not checked or approved", s.Role)
	}
	ns := Namespace(s.Role)
	if info.Namespace != ns {
		return fmt.Sprintf("the signature was made for the namespace %q, but the element states the role %s (namespace %q)", info.Namespace, s.Role, ns)
	}
	var problem string
	err = withSigFile(s.Armored, func(sig string) error {
		_, stderr, err := sshKeygen(canon, "-Y", "check-novalidate", "-n", ns, "-s", sig)
		if errors.Is(err, ErrNoSSHKeygen) {
			return err
		}
		if err != nil {
			problem = fmt.Sprintf("broke: the file changed after it was signed: the file without its signatures now has SHA-256 %x (ssh-keygen: %s)", sha256.Sum256(canon), lastLine(stderr))
			return nil
		}
		if el, err := s.Element(canon); err != nil || el != string(s.raw) {
			d := firstDiff(s.raw, []byte(el), 0, 0, s.line)
			problem = "its visible block was changed after signing: " + strings.TrimPrefix(d.Message, "text: ")
			return nil
		}
		r.Valid = true
		if opt.Signers == "" {
			return nil
		}
		names, err := Principals(s.Armored, opt.Signers)
		if err != nil {
			return err
		}
		if len(names) == 0 {
			problem = fmt.Sprintf("unknown signer: the allowed-signers file %s does not name the key %s", opt.Signers, info.Fingerprint)
			return nil
		}
		found := false
		for _, n := range names {
			found = found || n == s.Principal
		}
		if !found {
			problem = fmt.Sprintf("the sheet names the signer %q, but the allowed-signers file %s gives the key %s to %s", s.Principal, opt.Signers, info.Fingerprint, strings.Join(names, ", "))
			return nil
		}
		_, stderr, err = sshKeygen(canon, "-Y", "verify", "-f", opt.Signers, "-I", s.Principal, "-n", ns, "-s", sig)
		if err != nil {
			problem = fmt.Sprintf("%s is not allowed the role %s: the allowed-signers file %s does not grant them the namespace %q (ssh-keygen: %s)", s.Principal, s.Role, opt.Signers, ns, firstLine(stderr))
			return nil
		}
		r.Confirmed = true
		return nil
	})
	if err != nil {
		return err.Error()
	}
	return problem
}

func lastLine(s string) string {
	lines := strings.Split(strings.TrimSpace(s), "\n")
	return lines[len(lines)-1]
}

func firstLine(s string) string {
	l, _, _ := strings.Cut(strings.TrimSpace(s), "\n")
	return l
}
