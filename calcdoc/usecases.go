package calcdoc

import (
	"fmt"
	"strings"

	"calcdoc/expr"
)

// useCase is the value a use statement takes from a sheet with cases
// (LANGUAGE.md sections 10 and 12): "use NAME in CASE as NEW" takes one
// case's value, which depends on no case here; a value with cases used
// whole needs the same cases here. msg says why the value cannot be
// taken, or is "".
func useCase(n *expr.UseName, v *UsedValue, sh *Sheet, rel string, here []string) (val expr.Value, cases []expr.Value, msg string) {
	if n.Case != nil {
		if len(sh.Cases) == 0 {
			return nil, nil, fmt.Sprintf("%s has no cases: write use %s from %s", rel, n.Name.Name, rel)
		}
		k := -1
		for i, c := range sh.Cases {
			if c == n.Case.Name {
				k = i
			}
		}
		if k < 0 {
			return nil, nil, fmt.Sprintf("%s has no case %q: its cases are %s", rel, n.Case.Name, strings.Join(sh.Cases, ", "))
		}
		if v.Cases == nil {
			return v.Value, nil, "" // the same in every case
		}
		if v.Cases[k] == nil {
			return nil, nil, fmt.Sprintf("%s has no value in case %s of %s", n.Name.Name, n.Case.Name, rel)
		}
		return v.Cases[k], nil, ""
	}
	if v.Cases == nil {
		return v.Value, nil, ""
	}
	order, ok := caseMap(sh.Cases, here)
	if !ok {
		herew := "no cases"
		if len(here) > 0 {
			herew = "cases [" + strings.Join(here, ", ") + "]"
		}
		return nil, nil, fmt.Sprintf("%s has a value per case of %s, cases [%s], but this sheet has %s: give this sheet the same cases, or take one case with use %s in %s as NEW from %s",
			n.Name.Name, rel, strings.Join(sh.Cases, ", "), herew, n.Name.Name, sh.Cases[0], rel)
	}
	// the used sheet's cases map onto this sheet's cases of the same names
	cases = make([]expr.Value, len(here))
	for k, i := range order {
		cases[k] = v.Cases[i]
	}
	return cases[0], cases, ""
}

// caseMap gives, for each case here, the index of the case of that name
// there; ok is false when the two lists do not name the same cases.
func caseMap(there, here []string) (order []int, ok bool) {
	if len(there) != len(here) {
		return nil, false
	}
	for _, h := range here {
		k := -1
		for i, t := range there {
			if t == h {
				k = i
			}
		}
		if k < 0 {
			return nil, false
		}
		order = append(order, k)
	}
	return order, true
}
