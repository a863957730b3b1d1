package main

import (
	"io"
	"os"
	"runtime/debug"

	"calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/lsp"
)

func init() {
	commands["lsp"] = (*cli).lsp
}

// lspInput is what `calcdoc lsp` reads its messages from.
var lspInput io.Reader = os.Stdin

// lsp serves the Language Server Protocol over standard input and output
// until the client's exit notification. Exit status: 0 after shutdown
// and exit, 1 when the input ended or exit came without shutdown (LSP
// 3.17), 2 for a usage error.
func (c *cli) lsp(args []string) int {
	fs := c.flagSet("lsp")
	paths, err := parseFlags(fs, args)
	if err != nil {
		return exitUsage
	}
	if len(paths) > 0 {
		return c.usageErr("lsp takes no PATH: the editor sends the documents")
	}
	// a long-running server: collect garbage at Go's usual pace, so that
	// memory stays flat over a long session
	debug.SetGCPercent(100)
	s := lsp.New(kind.Standard())
	s.Version = version
	return s.Run(lspInput, c.stdout)
}
