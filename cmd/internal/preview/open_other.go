//go:build !unix

package preview

import "os"

// openDoc opens a document's file for reading.
func openDoc(name string) (*os.File, error) { return os.Open(name) }
