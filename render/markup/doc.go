// Package markup holds what a block kind's drawing needs: the Writer a
// sheet is written into, MathML typesetting of names, numbers, units,
// values and expressions (ExprML), statement, check and error rows, the
// picture labels' text runs and the digits a check row needs. It assembles
// no page: the sheet writer (package render) does.
package markup
