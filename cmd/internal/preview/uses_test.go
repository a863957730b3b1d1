package preview

import (
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// A save of a used document rebuilds the sheets that use it, and the
// sheets that use those: real files, the real watcher.
func TestWatchRebuildsUsers(t *testing.T) {
	dir := t.TempDir()
	write(t, filepath.Join(dir, "fault.md"), "```calc\nI_k = 20 kA\n```\n")
	write(t, filepath.Join(dir, "cable.md"), "```calc\nuse I_k from fault.md\nI_end = I_k / 2\n```\n")
	write(t, filepath.Join(dir, "prot", "trip.md"), "```calc\nuse I_end from ../cable.md\nI_set = 0.8 * I_end\n```\n")
	h := start(t, Config{Paths: []string{dir}})
	// hand derivation: 0.8 · 20 kA / 2 = 8 kA
	h.wait("/prot/trip.html", bodyHas(`data-value="I_set"`, "<mn>8.000</mn>"))
	h.wait("/", bodyHas("Sheets that use sheets", "<code>"+filepath.Join(dir, "cable.md")+"</code> uses <code>fault.md</code>"))
	saveInPlace(t, filepath.Join(dir, "fault.md"), "```calc\nI_k = 30 kA\n```\n")
	// 0.8 · 30 kA / 2 = 12 kA; 30 kA / 2 = 15 kA
	h.wait("/cable.html", bodyHas(`data-value="I_end"`, "<mn>15.00</mn>"))
	h.wait("/prot/trip.html", bodyHas(`data-value="I_set"`, "<mn>12.00</mn>"))
}

// bodyHas waits for a page that shows each of want, the first as the
// start of a row whose text holds the next ones.
func bodyHas(want ...string) func(int, string) string {
	return func(st int, body string) string {
		if st != 200 {
			return "status " + strconv.Itoa(st)
		}
		i := strings.Index(body, want[0])
		if i < 0 {
			return "no " + want[0]
		}
		for _, w := range want[1:] {
			if !strings.Contains(body[i:], w) {
				return "no " + w + " after " + want[0]
			}
		}
		return ""
	}
}
