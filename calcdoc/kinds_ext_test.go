package calcdoc_test

import "calcdoc/calcdoc/kind"

// kinds are the shipped kinds, which this package's external tests use.
var kinds = kind.Standard()
