package sweep

import (
	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/calc"
	"calcdoc/calcdoc/kind/phasors"
)

// testKinds are the kinds this package's documents use.
var testKinds = calcdoc.NewRegistry(calc.Kind, Kind, phasors.Kind)
