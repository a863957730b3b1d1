package render

import (
	"regexp"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// checkRow returns the numbers (<mn>) of the check row of the given line,
// in order, and its verdict.
func checkRow(t *testing.T, html string, line string) ([]string, string) {
	t.Helper()
	i := strings.Index(html, `data-check="`+line+`">`)
	if i < 0 {
		t.Fatalf("no check row for line %s", line)
	}
	row := html[i:]
	row = row[:strings.Index(row, "</div>")]
	var nums []string
	for _, m := range regexp.MustCompile(`<mn>([^<]*)</mn>`).FindAllStringSubmatch(row, -1) {
		nums = append(nums, m[1])
	}
	verdict := "satisfied"
	if strings.Contains(row, "NOT SATISFIED") {
		verdict = "NOT SATISFIED"
	}
	return nums, verdict
}

// TestCheckRowTellsSidesApart: when the two sides of a check read the same
// at the sheet's digits but compare otherwise, the row shows as many more
// digits as it takes to tell them apart (LANGUAGE.md section 4). Expected
// figures by hand derivation: 1.0001 and 1.0002 agree to 4 significant
// figures (1.000) and differ at the 5th; 2.000004 and 2.000005 differ at
// the 7th; sides that are equal (or equal within the 1e-9 tolerance of ==)
// keep the sheet's digits; sides that differ at the sheet's digits
// already keep them.
func TestCheckRowTellsSidesApart(t *testing.T) {
	cases := []struct {
		name    string
		digits  string
		check   string
		want    []string
		verdict string
	}{
		{"strict less, 5th figure", "4", "check 1.0001 < 1.0002", []string{"1.0001", "1.0002"}, "satisfied"},
		{"greater fails, 5th figure", "4", "check 1.0001 > 1.0002", []string{"1.0001", "1.0002"}, "NOT SATISFIED"},
		{"with units, 7th figure", "4", "check 2.000004 V <= 2.000005 V", []string{"2.000004", "2.000005"}, "satisfied"},
		{"sheet digits 6, 7th figure", "6", "check 2.000004 < 2.000005", []string{"2.000004", "2.000005"}, "satisfied"},
		{"equal sides keep the digits", "4", "check 1.0001 <= 1.0001", []string{"1.000", "1.000"}, "satisfied"},
		{"equal within tolerance keeps the digits", "4", "check 1 == 1.0000000001", []string{"1.000", "1.000"}, "satisfied"},
		{"already apart", "4", "check 1.1 < 1.2", []string{"1.100", "1.200"}, "satisfied"},
		{"not equal beyond tolerance", "4", "check 1 != 1.00001", []string{"1.00000", "1.00001"}, "satisfied"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := "---\ndigits: " + c.digits + "\n---\n\n```calc\n" + c.check + "\n```\n"
			doc := calcdoc.Parse("c.md", []byte(src), kind.Standard())
			if len(doc.Errors) > 0 {
				t.Fatalf("errors: %v", doc.Errors)
			}
			out, err := Sheet(doc, Options{Version: "test"})
			if err != nil {
				t.Fatal(err)
			}
			nums, verdict := checkRow(t, string(out), "6")
			if strings.Join(nums, " ") != strings.Join(c.want, " ") || verdict != c.verdict {
				t.Errorf("row shows %v %s, want %v %s", nums, verdict, c.want, c.verdict)
			}
		})
	}
}
