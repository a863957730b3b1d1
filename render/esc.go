package render

import "html"

// esc escapes text for the page.
func esc(s string) string { return html.EscapeString(s) }
