package calcdoc_test

import "calcdoc/calcdoc"

// kinds are the kinds of this package's external tests.
var kinds = calcdoc.NewRegistry(calcdoc.CalcKind, calcdoc.SolveKind, calcdoc.PhasorsKind, calcdoc.SweepKind)
