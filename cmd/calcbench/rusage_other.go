//go:build !unix

package main

import "os"

// maxRSS is 0 where the system reports no resident set size of a child.
func maxRSS(ps *os.ProcessState) int64 { return 0 }
