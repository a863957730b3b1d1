package calcdoc

import "regexp"

// evaluatedFence matches the opening fence of a calc or solve block.
var evaluatedFence = regexp.MustCompile("(?m)^[ ]{0,3}(```+|~~~+)[ \t]*(calc|solve)([ \t]|$)")

// HasCalc reports whether a document holds a calc or solve block.
func HasCalc(src []byte) bool { return evaluatedFence.Match(src) }
