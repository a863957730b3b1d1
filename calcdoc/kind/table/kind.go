// Package table is the table block kind (LANGUAGE.md section 9): `table
// NAME` holds a table of data in the block, `table NAME from PATH` reads
// its rows from a CSV file in the repository. It reads the block (the
// data package), defines the table into the document's names, and draws
// it on the sheet with its source, its notes and, for a file, its path
// and SHA-256.
package table

import (
	"calcdoc/calcdoc"
	"calcdoc/render/markup"
)

// Kind is the table block kind: it owns the word table, evaluates table
// blocks and draws them.
var Kind kind

type kind struct{}

// Words lists the info-string words of the kind.
func (kind) Words() []string { return []string{"table"} }

// Eval evaluates a table block.
func (kind) Eval(b *calcdoc.Block) { evalTable(b) }

// Draw draws an evaluated table block into the sheet.
func (kind) Draw(w *markup.Writer, b *calcdoc.Block) { drawTable(w, b) }
