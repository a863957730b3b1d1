package main

import (
	"fmt"
	"strings"
	"testing"
)

// frame is a body with its Content-Length header (LSP 3.17, base
// protocol).
func frame(body string) string {
	return fmt.Sprintf("Content-Length: %d\r\n\r\n%s", len(body), body)
}

// TestLSPCommand: `calcdoc lsp` answers initialize on standard output and
// exits 0 after shutdown and exit; with a PATH it is a usage error.
func TestLSPCommand(t *testing.T) {
	lspInput = strings.NewReader(frame(`{"jsonrpc":"2.0","id":1,"method":"initialize","params":{"capabilities":{}}}`) +
		frame(`{"jsonrpc":"2.0","method":"initialized","params":{}}`) +
		frame(`{"jsonrpc":"2.0","id":2,"method":"shutdown"}`) +
		frame(`{"jsonrpc":"2.0","method":"exit"}`))
	st, out, errOut := runCLI("lsp")
	if st != 0 {
		t.Errorf("exit status %d, want 0; stderr %q", st, errOut)
	}
	for _, want := range []string{`"positionEncoding":"utf-16"`, `"hoverProvider":true`, `"id":2,"result":null`} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %s: %s", want, out)
		}
	}
	if st, _, _ := runCLI("lsp", "x.md"); st != exitUsage {
		t.Errorf("lsp x.md: status %d, want %d", st, exitUsage)
	}
}
