// Package gfmhtml holds the HTML renderers of goldmark's GitHub Flavored
// Markdown tables and strikethrough, copied from github.com/yuin/goldmark
// v1.8.7 (extension/table.go and extension/strikethrough.go; MIT licence,
// see LICENSE in this folder) with only the package name changed. Their
// parsers are in calcdoc/calcdoc/gfm, which says why calcdoc carries a
// copy: importing goldmark's extension package compiles, at every start,
// the regular expressions of an extension calcdoc does not use.
package gfmhtml
