package verify

import (
	"bytes"
	"crypto/sha256"
	"encoding/base64"
	"encoding/binary"
	"errors"
	"fmt"
	"html"
	"strings"

	xhtml "golang.org/x/net/html"
)

// A signed sheet or package carries each signature in a signature
// element, written by AddSignature just before </body>, one after another:
//
//	<section class="calcdoc-signature" data-role="checked" data-principal="..." data-time="...">
//	... a visible table: role, signer, key, time, SHA-256 of the signed bytes ...
//	<pre hidden class="sshsig">-----BEGIN SSH SIGNATURE-----
//	...
//	-----END SSH SIGNATURE-----
//	</pre>
//	</section>
//
// The canonical form of a file (Canonical) is the file with every
// signature element removed: from its "<section" to the end of the
// "</section>" that closes it, and the one line feed that follows. Each
// signature signs the canonical form, that is the bytes that build or
// package wrote; the signatures are not signed, so a second signature
// leaves the first intact. The signature is in the SSH signature format
// (OpenSSH PROTOCOL.sshsig), made and checked by ssh-keygen -Y.

// SignatureClass is the class of a signature element.
const SignatureClass = "calcdoc-signature"

// Roles are the roles a signature can state; the namespace of a role's
// signature is "calcdoc-" followed by the role.
var Roles = []string{"checked", "approved"}

// Namespace is the SSH signature namespace of a role.
func Namespace(role string) string { return "calcdoc-" + role }

// ValidRole reports whether role is one of Roles.
func ValidRole(role string) bool { return role == "checked" || role == "approved" }

// Signature is what a signature element records.
type Signature struct {
	Role      string // "checked" or "approved"
	Principal string // the signer, as the allowed-signers file names them
	// Time is when it was signed, as the signer's clock gave it (RFC
	// 3339); it is not covered by the signature. "" when not recorded.
	Time string
	// Armored is the signature, "-----BEGIN SSH SIGNATURE-----" ...
	// "-----END SSH SIGNATURE-----\n".
	Armored string

	// where the element stands in the file: bytes [start, end)
	start, end int
	raw        []byte
	line       int // the file line on which the element starts
}

// Element is the HTML of the signature element (the layout above). The
// key and the hash of the signed bytes are read from the signature and
// from signed, the canonical form it signs.
func (s Signature) Element(signed []byte) (string, error) {
	info, err := ParseSSHSig(s.Armored)
	if err != nil {
		return "", err
	}
	var b strings.Builder
	e := html.EscapeString
	fmt.Fprintf(&b, "<section class=\"%s\" data-role=\"%s\" data-principal=\"%s\" data-time=\"%s\">\n", SignatureClass, e(s.Role), e(s.Principal), e(s.Time))
	fmt.Fprintf(&b, "<h2>Signature: %s</h2>\n<table class=\"stamp\">\n", e(s.Role))
	row := func(k, v string) { fmt.Fprintf(&b, "<tr><th>%s</th><td>%s</td></tr>\n", k, v) }
	row("Role", e(s.Role))
	row("Signer", e(orDash(s.Principal)))
	row("Key", "<code>"+e(info.KeyType)+" "+e(info.Fingerprint)+"</code>")
	t := "not recorded"
	if s.Time != "" {
		t = e(s.Time) + " (the signer's clock; not covered by the signature)"
	}
	row("Signed at", t)
	sum := sha256.Sum256(signed)
	row("Signed bytes", fmt.Sprintf("the file without its signatures, SHA-256 <code class=\"hash\">%x</code>", sum))
	b.WriteString("</table>\n")
	fmt.Fprintf(&b, "<pre hidden class=\"sshsig\">%s</pre>\n</section>\n", e(s.Armored))
	return b.String(), nil
}

// Canonical returns the canonical form of a file (the file without its
// signature elements), the signatures it carries in file order, and a
// difference for each signature element that does not stand where
// AddSignature puts it (together, just before the last </body>).
func Canonical(page []byte) ([]byte, []Signature, []Difference) {
	var sigs []Signature
	var diffs []Difference
	z := xhtml.NewTokenizer(bytes.NewReader(page))
	off, depth, bodyEnd := 0, 0, -1
	var cur *Signature
	var inPre bool
	var armored strings.Builder
	for {
		tt := z.Next()
		if tt == xhtml.ErrorToken {
			break
		}
		at := off
		off += len(z.Raw())
		switch tt {
		case xhtml.StartTagToken:
			name, more := z.TagName()
			n := string(name)
			attr := map[string]string{}
			for more {
				var k, v []byte
				k, v, more = z.TagAttr()
				if _, dup := attr[string(k)]; !dup {
					attr[string(k)] = string(v)
				}
			}
			switch {
			case cur == nil && n == "section" && attr["class"] == SignatureClass:
				cur = &Signature{Role: attr["data-role"], Principal: attr["data-principal"], Time: attr["data-time"], start: at}
				depth = 1
				armored.Reset()
			case cur != nil && n == "section":
				depth++
			case cur != nil && n == "pre" && attr["class"] == "sshsig":
				inPre = true
			}
		case xhtml.TextToken:
			if inPre {
				armored.Write(z.Text())
			}
		case xhtml.EndTagToken:
			name, _ := z.TagName()
			n := string(name)
			switch {
			case cur != nil && n == "pre":
				inPre = false
			case cur != nil && n == "section":
				depth--
				if depth == 0 {
					cur.end = off
					if cur.end < len(page) && page[cur.end] == '\n' {
						cur.end++
					}
					cur.Armored = armored.String()
					cur.raw = page[cur.start:cur.end]
					cur.line = 1 + bytes.Count(page[:cur.start], []byte("\n"))
					sigs = append(sigs, *cur)
					cur = nil
				}
			case n == "body":
				bodyEnd = at
			}
		}
	}
	if cur != nil {
		cur.end = len(page)
		sigs = append(sigs, *cur)
		diffs = append(diffs, Difference{Kind: "signature", Message: "signature: a signature element has no end (</section>)"})
	}
	if len(sigs) == 0 {
		return page, nil, diffs
	}
	var canon bytes.Buffer
	last := 0
	for i, s := range sigs {
		canon.Write(page[last:s.start])
		last = s.end
		next := bodyEnd
		if i+1 < len(sigs) {
			next = sigs[i+1].start
		}
		if s.end != next {
			diffs = append(diffs, Difference{Kind: "signature", Line: 1 + bytes.Count(page[:s.start], []byte("\n")),
				Message: fmt.Sprintf("signature: signature %d (line %d) does not stand where sign puts it (together with the others, just before </body>)", i+1, 1+bytes.Count(page[:s.start], []byte("\n")))})
		}
	}
	canon.Write(page[last:])
	return canon.Bytes(), sigs, diffs
}

// AddSignature returns page with the element of sig added after its other
// signatures, just before the last </body>; no other byte changes.
func AddSignature(page []byte, sig Signature) ([]byte, error) {
	canon, _, diffs := Canonical(page)
	if len(diffs) > 0 {
		return nil, errors.New(diffs[0].Message)
	}
	el, err := sig.Element(canon)
	if err != nil {
		return nil, err
	}
	end := bytes.LastIndex(page, []byte("</body>"))
	if end < 0 {
		return nil, errors.New("the file has no </body>")
	}
	out := make([]byte, 0, len(page)+len(el))
	out = append(out, page[:end]...)
	out = append(out, el...)
	return append(out, page[end:]...), nil
}

// SSHSig is what a signature in the SSH signature format (OpenSSH
// PROTOCOL.sshsig) holds, apart from the signature proper.
type SSHSig struct {
	KeyType     string // e.g. "ssh-ed25519"
	Fingerprint string // "SHA256:" and the unpadded base64 of the SHA-256 of the public key blob, as ssh-keygen -l prints it
	Namespace   string
	HashAlg     string // "sha256" or "sha512"
}

// ParseSSHSig reads an armored SSH signature (PROTOCOL.sshsig: the
// magic "SSHSIG", uint32 version 1, then the strings publickey,
// namespace, reserved, hash_algorithm and signature). It checks the
// layout only; ssh-keygen checks the signature.
func ParseSSHSig(armored string) (*SSHSig, error) {
	const begin, end = "-----BEGIN SSH SIGNATURE-----", "-----END SSH SIGNATURE-----"
	a := strings.TrimSpace(armored)
	if !strings.HasPrefix(a, begin) || !strings.HasSuffix(a, end) {
		return nil, errors.New("the signature is not an armored SSH signature (-----BEGIN SSH SIGNATURE-----)")
	}
	body := strings.Join(strings.Fields(a[len(begin):len(a)-len(end)]), "")
	blob, err := base64.StdEncoding.DecodeString(body)
	if err != nil {
		return nil, fmt.Errorf("the SSH signature is not valid base64: %v", err)
	}
	if len(blob) < 10 || string(blob[:6]) != "SSHSIG" || binary.BigEndian.Uint32(blob[6:10]) != 1 {
		return nil, errors.New("the SSH signature does not start with SSHSIG version 1")
	}
	rest := blob[10:]
	next := func() ([]byte, error) {
		if len(rest) < 4 {
			return nil, errors.New("the SSH signature is cut short")
		}
		n := binary.BigEndian.Uint32(rest)
		if uint64(n) > uint64(len(rest)-4) {
			return nil, errors.New("the SSH signature is cut short")
		}
		v := rest[4 : 4+n]
		rest = rest[4+n:]
		return v, nil
	}
	var f [5][]byte
	for i := range f {
		if f[i], err = next(); err != nil {
			return nil, err
		}
	}
	if len(rest) != 0 {
		return nil, errors.New("the SSH signature has bytes after its last field")
	}
	sum := sha256.Sum256(f[0])
	s := &SSHSig{Fingerprint: "SHA256:" + base64.RawStdEncoding.EncodeToString(sum[:]), Namespace: string(f[1]), HashAlg: string(f[3])}
	rest = f[0]
	kt, err := next()
	if err != nil {
		return nil, errors.New("the SSH signature's public key is unreadable")
	}
	s.KeyType = string(kt)
	return s, nil
}
