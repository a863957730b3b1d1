package data

import "calcdoc/calcdoc"

// ResolveInside resolves the path rel that a document at docPath names,
// inside root: the document layer's rule (calcdoc.ResolveInside), which
// use statements share.
func ResolveInside(docPath, rel, root string) (string, error) {
	return calcdoc.ResolveInside(docPath, rel, root)
}

// FindRoot is the folder that a document's files must stay inside
// (calcdoc.FindRoot).
func FindRoot(docPath, fallback string) string { return calcdoc.FindRoot(docPath, fallback) }

// ResolveLexical resolves rel without the disk, for a file read through
// Inputs.Read (calcdoc.ResolveLexical).
func ResolveLexical(docPath, rel, root string) (string, error) {
	return calcdoc.ResolveLexical(docPath, rel, root)
}
