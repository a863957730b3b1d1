package markup

import "calcdoc/expr"

// senseML is the sense of a power factor as the sheet writes it after the
// number ("0.9140 lagging", LANGUAGE.md section 3): a thin space and the
// words, or "" for a value that is no power factor or whose reactive
// power is zero. The space before the words is the class's (style.go).
func SenseML(v expr.Value) string {
	s, ok := v.(*expr.Scalar)
	if !ok || s.Sense.String() == "" {
		return ""
	}
	return "<mtext class=\"pfsense\">" + Esc(s.Sense.String()) + "</mtext>"
}

// withSense adds the sense of each power factor among the sides of a
// check to its part of the row: parts alternate side, operator, side.
func WithSense(parts []string, sides []*expr.Scalar) []string {
	for i, v := range sides {
		if 2*i < len(parts) {
			parts[2*i] += SenseML(v)
		}
	}
	return parts
}
