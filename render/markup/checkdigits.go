package markup

import (
	"math"
	"math/cmplx"

	"calcdoc/expr"
)

// maxCheckDigits is the most significant figures a check row shows when it
// adds digits to tell its sides apart: the most the number formatter
// writes (expr.FormatScalar), about the precision of a float64.
const maxCheckDigits = 15

// checkRowDigits is the number of significant figures a check row shows
// its sides with (LANGUAGE.md section 4): the sheet's digits, or more when
// two neighbouring sides read the same at the sheet's digits but compare
// otherwise, as many more as it takes to tell each such pair apart (at
// most maxCheckDigits). Sides compare otherwise when they are not equal in
// the check's own sense: for == and ≠ not within expr.EqualTolerance, for
// <, ≤, >, ≥ not exactly equal. disp is the display the row shows every
// side in.
func CheckRowDigits(vals []*expr.Scalar, ops []expr.Kind, disp *expr.Display, digits int) int {
	dg := digits
	for i, op := range ops {
		if i+1 >= len(vals) {
			break
		}
		a, b := vals[i], vals[i+1]
		if !differ(a, b, op) {
			continue
		}
		for dg < maxCheckDigits && expr.FormatScalar(a, disp, dg).String() == expr.FormatScalar(b, disp, dg).String() {
			dg++
		}
	}
	return dg
}

// differ reports whether the sides a, b of op are not equal in the sense of
// the comparison (expr.Env.EvalCheck).
func differ(a, b *expr.Scalar, op expr.Kind) bool {
	switch op {
	case expr.EQ, expr.NE:
		return cmplx.Abs(a.Z-b.Z) > expr.EqualTolerance*math.Max(cmplx.Abs(a.Z), cmplx.Abs(b.Z))
	}
	return a.Z != b.Z
}
