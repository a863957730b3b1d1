package render

import (
	"regexp"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
)

// TestPowerFactorSenseOnTheSheet checks that a power factor shows its
// sense (LANGUAGE.md section 3) on its result row, in a check row (which
// compares the number), in prose and in a sweep's table, and that a value
// computed from it shows none. The numbers: S = 400 kW + j300 kvar has
// |S| = 500 kVA and PF = 400/500 = 0.8, lagging as P·Q > 0 (IEEE Std
// 1459-2010 PF = P/S; hand derivation); conj(S) is leading.
func TestPowerFactorSenseOnTheSheet(t *testing.T) {
	src := "# pf\n\n" +
		"```calc\n" + // line 3
		"S_b = (400 + j300) kVA\n" + // 4
		"pf_b = powerfactor(S_b)\n" + // 5
		"pf_c = powerfactor(-conj(S_b))\n" + // 6
		"x = 2 * pf_b\n" + // 7
		"check powerfactor(S_b) >= 0.75\n" + // 8
		"```\n\n" +
		"The board runs at `=pf_b`.\n\n" +
		"```sweep n = 0 .. 2 3\n" + // 12
		"powerfactor(400 kW + j*(300 kvar - n * 300 kvar))\n" + // 13
		"```\n"
	doc := calcdoc.Parse("pf.md", []byte(src), kind.Standard())
	if len(doc.Errors) > 0 {
		t.Fatalf("errors: %v", doc.Errors)
	}
	html, err := Sheet(doc, Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	s := string(html)
	// the rows as plain text: tags dropped, the space the style puts
	// before a unit or a sense (classes "u", "pfsense") read as a space,
	// so that the test does not depend on how the math is typeset
	tagRE := regexp.MustCompile(`<[^>]*>`)
	plain := func(h string) string {
		return tagRE.ReplaceAllStringFunc(h, func(tag string) string {
			if tag == `<mi class="u">` || tag == `<mtext class="pfsense">` {
				return " "
			}
			return ""
		})
	}
	row := func(line string) string {
		m := regexp.MustCompile(`(?s)id="L` + line + `" data-line="` + line + `">.*?(?:<div class="desc">|</div>\n)`).FindString(s)
		if m == "" {
			t.Fatalf("no row for line %s", line)
		}
		return plain(m)
	}
	if r := row("5"); !strings.Contains(r, "=0.8000 lagging") {
		t.Errorf("line 5: no 0.8000 lagging in %q", r)
	}
	if r := row("6"); !strings.Contains(r, "=0.8000 leading, export") {
		t.Errorf("line 6: -conj(S) is P < 0, Q > 0: want leading, export in %q", r)
	}
	if r := row("7"); strings.Contains(r, "lagging") || !strings.Contains(r, "=1.600") {
		t.Errorf("line 7: 2·pf_b is the plain number 1.600, without a sense: %q", r)
	}
	if r := row("8"); !strings.Contains(r, "0.8000 lagging≥0.7500satisfied") {
		t.Errorf("line 8: the check row should show 0.8000 lagging ≥ 0.7500, satisfied: %q", r)
	}
	inl := regexp.MustCompile(`<span class="inl" title="pf_b">.*?</span>`).FindString(s)
	if got := plain(inl); got != "0.8000 lagging" {
		t.Errorf("the prose value =pf_b shows %q, want 0.8000 lagging", got)
	}
	// the sweep: Q = 300, 0, -300 kvar: 0.8 lagging, 1 (no word), 0.8 leading
	tbl := regexp.MustCompile(`(?s)<tbody>.*?</tbody>`).FindString(s)
	var cells []string
	for _, tr := range regexp.MustCompile(`(?s)<tr>.*?</tr>`).FindAllString(tbl, -1) {
		td := regexp.MustCompile(`(?s)<td[^>]*>(.*?)</td>`).FindAllStringSubmatch(tr, -1)
		if len(td) < 3 {
			t.Fatalf("sweep row with %d cells: %s", len(td), tr)
		}
		cells = append(cells, plain(td[2][1]))
	}
	if want := []string{"0.8000 lagging", "1.000", "0.8000 leading"}; strings.Join(cells, "|") != strings.Join(want, "|") {
		t.Errorf("sweep table column %q, want %q", cells, want)
	}
}
