package expr

import "sort"

// UnitSymbols lists the symbols of the unit table, without SI prefixes,
// sorted; an editor's completion offers them.
func UnitSymbols() []string {
	out := make([]string, 0, len(unitTable))
	for s := range unitTable {
		out = append(out, s)
	}
	sort.Strings(out)
	return out
}
