package build

import (
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"time"
)

// runStart is when this run began: a temporary file older than it, whose
// process is gone, was left by an earlier run that was interrupted.
var runStart = time.Now()

// tempPattern is the os.CreateTemp pattern of the temporary files of an
// output: ".NAME.tmp-PID-RANDOM", hidden, beside it, naming the process
// that writes it.
func tempPattern(path string) string {
	return "." + filepath.Base(path) + ".tmp-" + strconv.Itoa(os.Getpid()) + "-*"
}

// staleNames match the temporary files an interrupted write of the output
// base may have left: ours (".NAME.tmp-PID-RANDOM", a pair's
// ".NAME.tmp-PID-RANDOM.EXT", and before the PID was in the name
// ".NAME.tmp-RANDOM"), and the printer's own temporary PDF beside a PDF
// (".NAME.RANDOM.tmp") or beside one of ours
// ("..NAME.tmp-PID-RANDOM.EXT.RANDOM.tmp").
func staleNames(base string) []*regexp.Regexp {
	q := regexp.QuoteMeta(base)
	// a pair's temporary files end in the output's own extension
	ext := `(?:` + regexp.QuoteMeta(filepath.Ext(base)) + `)?`
	return []*regexp.Regexp{
		regexp.MustCompile(`^\.` + q + `\.tmp-(?:([0-9]+)-)?[0-9]+` + ext + `$`),
		regexp.MustCompile(`^\.` + q + `\.[0-9]+\.tmp$`),
		regexp.MustCompile(`^\.\.` + q + `\.tmp-(?:([0-9]+)-)?[0-9]+` + ext + `\.[0-9]+\.tmp$`),
	}
}

// RemoveStale removes the temporary files that earlier, interrupted writes
// of path left beside it: a file whose name matches the output's temporary
// names, that is older than this run, and whose writing process (named in
// the file's name) no longer runs. It returns the names removed. Nothing
// else is touched: not another output's files, not a file of a run that is
// still going.
func RemoveStale(path string) []string {
	dir, base := filepath.Dir(path), filepath.Base(path)
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var pats []*regexp.Regexp // compiled when a name may match
	var removed []string
	for _, e := range entries {
		name := e.Name()
		// every stale name starts with a dot and holds base: a folder
		// with none such compiles no pattern
		if !strings.HasPrefix(name, ".") || !strings.Contains(name, base) {
			continue
		}
		if pats == nil {
			pats = staleNames(base)
		}
		var m []string
		for _, p := range pats {
			if m = p.FindStringSubmatch(name); m != nil {
				break
			}
		}
		if m == nil || !e.Type().IsRegular() {
			continue
		}
		fi, err := e.Info()
		if err != nil || !fi.ModTime().Before(runStart) {
			continue
		}
		if len(m) > 1 && m[1] != "" {
			if pid, err := strconv.Atoi(m[1]); err == nil && (pid == os.Getpid() || processRuns(pid)) {
				continue
			}
		}
		full := filepath.Join(dir, name)
		if os.Remove(full) == nil {
			removed = append(removed, full)
		}
	}
	return removed
}
