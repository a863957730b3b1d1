package linalg

import (
	"fmt"
	"math"
)

// Singular reports a matrix that is singular after equilibration: at step
// Pivot (from 0) of the elimination the largest candidate pivot of the
// scaled matrix B is at most PivotTol times the largest entry of B. Cond is
// then max|B_ij| / |pivot|, a lower bound on the condition number of B that
// needs no further work (+Inf for a pivot that is exactly zero).
type Singular struct {
	Pivot int
	Cond  float64
}

func (e *Singular) Error() string {
	if math.IsInf(e.Cond, 1) {
		return fmt.Sprintf("linalg: the matrix is singular (pivot %d is exactly 0 after scaling)", e.Pivot)
	}
	return fmt.Sprintf("linalg: the matrix is singular (after scaling, pivot %d is %.2g of the largest entry; condition estimate %.2g)", e.Pivot, 1/e.Cond, e.Cond)
}

// Exact reports whether a pivot was exactly zero.
func (e *Singular) Exact() bool { return math.IsInf(e.Cond, 1) }

// IllConditioned reports a regular matrix whose 1-norm condition estimate
// (see LU.Cond) exceeds the limit the caller set.
type IllConditioned struct {
	Cond  float64 // the estimate of κ₁(B)
	Limit float64 // the caller's limit
}

func (e *IllConditioned) Error() string {
	return fmt.Sprintf("linalg: the matrix is too badly conditioned (condition estimate %.3g exceeds %.3g)", e.Cond, e.Limit)
}

// NotSquare reports a matrix given with a length that is not n².
type NotSquare struct {
	N, Len int
}

func (e *NotSquare) Error() string {
	return fmt.Sprintf("linalg: %d entries do not make a %d×%d matrix", e.Len, e.N, e.N)
}

// BadScale reports a given scale that is not finite and positive, or a
// scale list of the wrong length (Index −1).
type BadScale struct {
	Which string // "row" or "column"
	Index int
	Value float64
}

func (e *BadScale) Error() string {
	if e.Index < 0 {
		return fmt.Sprintf("linalg: the %s scales do not match the matrix size", e.Which)
	}
	return fmt.Sprintf("linalg: %s scale %d is %v: it must be finite and > 0", e.Which, e.Index, e.Value)
}

// NotFinite reports an entry that is NaN or infinite, before or after
// scaling.
type NotFinite struct {
	Row, Col int
}

func (e *NotFinite) Error() string {
	return fmt.Sprintf("linalg: entry (%d, %d) is not finite (or overflows when scaled)", e.Row, e.Col)
}
