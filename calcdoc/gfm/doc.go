// Package gfm holds the parsers of goldmark's GitHub Flavored Markdown
// tables and strikethrough, copied from github.com/yuin/goldmark v1.8.7
// (extension/table.go and extension/strikethrough.go; MIT licence, see
// LICENSE in this folder). Changed: the package name; the table's
// delimiter-row regular expressions are compiled when a table is first
// met, not at start-up; and the extensions register their parsers only
// (the document layer parses, and writes no HTML: the sheet writer
// registers the HTML renderers, copied into calcdoc/render/internal/gfmhtml).
//
// Why a copy: calcdoc uses these two extensions only, but importing
// goldmark's extension package runs its package initialisation, which
// compiles the linkify extension's regular expressions (about 1 ms of
// every run, `GODEBUG=inittrace=1`) although calcdoc never links a URL.
// The node kinds stay goldmark's (github.com/yuin/goldmark/extension/ast),
// so the parsed tree and the HTML are those of the original.
package gfm
