package preview

import (
	"fmt"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Saving a CSV file that a document's table read evaluates the document
// again, though the document's own bytes did not change; the CSV file
// lies in a folder outside the one watched, inside the repository.
func TestCSVSaveRebuilds(t *testing.T) {
	repo := t.TempDir()
	if err := os.Mkdir(filepath.Join(repo, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(repo, "docs")
	csv := filepath.Join(repo, "data", "cu.csv")
	write(t, csv, "S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.61\n")
	write(t, filepath.Join(dir, "a.md"), "```table cu from ../data/cu.csv\nsource: IEC 60228:2004, Table 2\n```\n```calc\nR = cu.R_20(4 mm²)\n```\n")
	h := start(t, Config{Paths: []string{dir}})
	shows := func(want string) func(int, string) string {
		return func(st int, body string) string {
			if st != http.StatusOK || !strings.Contains(body, want) {
				return fmt.Sprintf("status %d; %q not shown", st, want)
			}
			return ""
		}
	}
	h.wait("/a.html", shows("R_20 = 4.61 Ω/km (row 2)"))
	saveRenameOver(t, csv, "S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.62\n")
	h.wait("/a.html", shows("R_20 = 4.62 Ω/km (row 2)"))
	saveInPlace(t, csv, "S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.63\n")
	h.wait("/a.html", shows("R_20 = 4.63 Ω/km (row 2)"))
}

// A document whose CSV file is missing is evaluated again when the file
// appears.
func TestCSVAppearsRebuilds(t *testing.T) {
	repo := t.TempDir()
	if err := os.Mkdir(filepath.Join(repo, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(repo, "data", "other.csv"), "k\n1\n")
	write(t, filepath.Join(repo, "a.md"), "```table cu from data/cu.csv\nsource: IEC 60228:2004, Table 2\n```\n```calc\nR = cu.R_20(4 mm²)\n```\n")
	h := start(t, Config{Paths: []string{repo}})
	h.wait("/a.html", func(st int, body string) string {
		if !strings.Contains(body, "no such file") {
			return "the missing file is not reported"
		}
		return ""
	})
	saveRenameOver(t, filepath.Join(repo, "data", "cu.csv"), "S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.61\n")
	h.wait("/a.html", func(st int, body string) string {
		if !strings.Contains(body, "R_20 = 4.61 Ω/km (row 2)") {
			return "the file that appeared is not read"
		}
		return ""
	})
}
